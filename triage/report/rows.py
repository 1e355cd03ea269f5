"""The report's tables as rows of text: storeys, spots and readings, members, hazards, photos.

Pure: no reportlab. Each builder takes the survey and its assessment and returns the rows one
table of the report lays out; a table of a new kind gets its row class and builder here.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import Any

from triage.assess import Assessment, tier_words
from triage.assess.spots import Spot, spots_of_survey
from triage.model import Survey
from triage.photos import PhotoLoader
from triage.report.capacity_rows import capacity_cell, capacity_seen
from triage.standards import Assumptions
from triage.standards.vocabulary import words

from .words import DASH, num, pct, ratio_pm

Clip = Callable[[str, str], str]


@dataclass(frozen=True)
class StoreyRow:
    """One row of the storey table (bottom to top in the model, drawn top to bottom)."""

    label: str
    height: str
    drift_x: str
    drift_y: str
    level_x: str
    level_y: str
    capacity: str   # the residual capacity ratio and, below it, the method that gave it
    grade: str
    access: str


@dataclass(frozen=True)
class SpotRow:
    """One spot of a storey and direction: every reading taken there, so it can be rechecked."""

    where: str
    readings: str  # each reading as taken: "3 mm over 2000 mm (sd 1 mm)" or "tilt 0.12° (sd …)"
    baseline: str
    value: str  # signed drift ratio ± standard uncertainty, in percent
    repeats: str  # "n repeats averaged", "1 reading", or the largest of disagreeing repeats


@dataclass(frozen=True)
class SpotTable:
    """The spots of one storey in one direction."""

    storey: str
    dir: str
    rows: list[SpotRow]


@dataclass(frozen=True)
class ChartPoint:
    """One storey of the drift profile: residual drift ratio per direction (None: unmeasured)."""

    label: str
    x: float | None
    y: float | None


@dataclass(frozen=True)
class ChartFigure:
    """A level figure drawn on the drift chart: IO, LS or CP of one direction's system."""

    dirs: str
    level: str
    ratio: float
    system: str


@dataclass(frozen=True)
class MemberRow:
    """A member group as the report lists it."""

    storey: str
    group: str
    kind: str
    count: str
    damage_class: str
    eta: str
    class_from: str
    seen: str


@dataclass(frozen=True)
class HazardRow:
    """A hazard and what it does."""

    kind: str
    where: str
    storey: str
    effect: str
    keep_out: str
    note: str
    height: str = DASH  # height above ground, m
    factor: str = DASH  # keep-out width per metre of height


@dataclass(frozen=True)
class PhotoItem:
    """A photo named in the survey: where it belongs, its caption and its checked bytes.

    `data` is None when the photo is not at hand (a missing file, a blob not in the store).
    """

    belongs_to: str
    caption: str
    path: str
    data: bytes | None


def _spot_row(survey: Survey, sp: Spot, a: Assumptions) -> SpotRow:
    st = survey.storeys[sp.storey]
    texts = []
    for i in sp.readings:
        r = st.readings[i]
        if r.tilt_deg is not None:
            sd = f"{r.sd_deg:g}°" if r.sd_deg is not None else f"{a.sd_tilt_deg:g}° (default)"
            texts.append(f"reading {i + 1}: tilt {r.tilt_deg:g}°, sd {sd}")
        else:
            sd = f"{r.sd_mm:g} mm" if r.sd_mm is not None else f"{a.sd_offset_mm:g} mm (default)"
            texts.append(f"reading {i + 1}: {num(r.offset_mm or 0.0)} mm over "
                         f"{num(r.gauge_mm or 0.0)} mm, sd {sd}")
    first = st.readings[sp.readings[0]]
    if sp.baseline is None:
        base = "none"
    elif sp.method == "tilt":
        bsd = first.baseline_sd_deg
        base = f"{sp.baseline:g}° (sd {bsd if bsd is not None else a.sd_tilt_deg:g}°)"
    else:
        bsd = first.baseline_sd_mm
        base = f"{sp.baseline:g} mm (sd {bsd if bsd is not None else a.sd_offset_mm:g} mm)"
    n = len(sp.readings)
    if n == 1:
        rep = "1 reading"
    elif sp.disagree:
        rep = f"{n} readings disagree: the largest taken"
    else:
        rep = f"{n} repeats averaged"
    return SpotRow(where=sp.where or "not given", readings="\n".join(texts), baseline=base,
                   value=ratio_pm(sp.value, sp.u), repeats=rep)


def spot_tables(survey: Survey, a: Assumptions) -> list[SpotTable]:
    """Every spot of the survey, one table per storey and direction (survey order)."""
    tables: list[SpotTable] = []
    for sp in spots_of_survey(survey, a).spots:
        if not tables or tables[-1].storey != sp.storey_label or tables[-1].dir != sp.dir:
            tables.append(SpotTable(sp.storey_label, sp.dir, []))
        tables[-1].rows.append(_spot_row(survey, sp, a))
    return tables


def provisional_storeys(survey: Survey) -> list[str]:
    """Which storeys leave the survey provisional, and why (the engine's rule, in words)."""
    out = []
    for st in survey.storeys:
        why = []
        if st.access != "full":
            why.append(f"access {words('access', st.access)}")
        elif not st.below_grade:
            dirs = {r.dir for r in st.readings}
            missing = [d for d in ("x", "y") if d not in dirs]
            if missing:
                why.append("no reading in " + " or ".join(missing))
            if not st.members:
                why.append("no member group")
        if why:
            out.append(f"storey {st.label} ({', '.join(why)})")
    return out


def photo_items(survey: Survey, load: PhotoLoader | None) -> list[PhotoItem]:
    """Each photo with its bytes from `load` (checked there); a refusal there refuses all."""
    found: list[PhotoItem] = []

    def add(belongs: str, field: str, items: Any) -> None:
        for j, ph in enumerate(items):
            data = load(ph, f"{field}.photos[{j}]") if load is not None else None
            found.append(PhotoItem(belongs, ph.caption, ph.path, data))

    for si, st in enumerate(survey.storeys):
        add(f"storey {st.label}", f"storeys[{si}]", st.photos)
        for i, m in enumerate(st.members):
            ref = f" {m.ref}" if m.ref else ""
            add(f"storey {st.label}, {words('member_kinds', m.kind)} group {i + 1}{ref}",
                f"storeys[{si}].members[{i}]", m.photos)
    for i, h in enumerate(survey.hazards):
        where = f" at {h.where}" if h.where else ""
        add(f"hazard {i + 1}, {words('hazards', h.kind)}{where}", f"hazards[{i}]", h.photos)
    return found


def storey_rows(a: Assessment, clip: Clip) -> list[StoreyRow]:
    """One row per storey, bottom to top."""
    return [StoreyRow(label=clip(f"storey {s.label}", s.label), height=f"{s.height_m:g}",
                      drift_x=pct(s.drift_ratio.x), drift_y=pct(s.drift_ratio.y),
                      level_x=s.performance_level.x or DASH,
                      level_y=s.performance_level.y or DASH,
                      capacity=capacity_cell(a, s),
                      grade=s.damage_grade or DASH, access=words("access", s.access))
            for s in a.storeys]


def chart(a: Assessment) -> tuple[list[ChartPoint], list[ChartFigure]]:
    """The drift profile's points and the IO, LS and CP figures drawn on it."""
    points = [ChartPoint(s.label, s.drift_ratio.x, s.drift_ratio.y) for s in a.storeys]
    figs: list[ChartFigure] = []
    fx, fy = a.drift_figures.get("x"), a.drift_figures.get("y")
    for lv in ("IO", "LS", "CP"):
        if fx is not None and fy is not None and fx.system == fy.system:
            figs.append(ChartFigure("x, y", lv, getattr(fx, lv), fx.system_name))
        else:
            for d, f in (("x", fx), ("y", fy)):
                if f is not None:
                    figs.append(ChartFigure(d, lv, getattr(f, lv), f.system_name))
    return points, figs


def member_rows(survey: Survey, a: Assessment, clip: Clip) -> list[MemberRow]:
    """Every member group, storey by storey, with its class, eta and what was seen."""
    members: list[MemberRow] = []
    for st_survey, st in zip(survey.storeys, a.storeys, strict=True):
        for mr in st.members:
            mg = st_survey.members[mr.index]
            seen = []
            if mg.crack_mm:
                sd = f" ± {mg.crack_sd_mm:g}" if mg.crack_sd_mm else ""
                seen.append(f"crack {mg.crack_mm:g}{sd} mm")
            if mg.signs:
                seen.append("signs: " + ", ".join(words("signs", s) for s in mg.signs))
            if mg.ductility == "brittle":
                seen.append("brittle")
            if mg.dir is not None:
                seen.append(f"acts in {mg.dir}")
            seen += capacity_seen(mr)
            how = {"crack": "by crack width", "signs": "by signs",
                   "type": "by FEMA 352 damage type (our link)",
                   "severity": "by FEMA 306 severity (our link)",
                   "override": f"set by the inspector: {mg.override_reason or ''}"}.get(
                       mr.class_from or "", "undamaged")
            group = f"{mr.index + 1}" + (f" {mr.ref}" if mr.ref else "")
            what = f"storey {st.label}, member group {group}"
            members.append(MemberRow(
                storey=clip(f"storey {st.label}", st.label), group=clip(what, group),
                kind=words("member_kinds", mr.kind), count=str(mr.count),
                damage_class=mr.damage_class or DASH,
                eta=DASH if mr.eta is None else f"{mr.eta:g}",
                class_from=clip(f"{what}, how the class was set", how),
                seen=clip(f"{what}, what was seen", "; ".join(seen) or "nothing seen")))
    return members


def hazard_rows(survey: Survey, a: Assessment, used: Assumptions, clip: Clip) -> list[HazardRow]:
    """Every hazard with its height, keep-out factor and width, and what it does to the tier."""
    hazards = []
    for hr in a.hazards:
        hs = survey.hazards[hr.index]
        kind = words("hazards", hr.kind)
        what = f"hazard {hr.index + 1} ({kind})"
        height = hs.height_above_ground_m
        hazards.append(HazardRow(kind=kind, height=DASH if height is None else f"{height:g} m",
                                 factor=DASH if height is None else f"{used.keep_out_factor:g}",
                                 where=clip(f"{what}, where", hr.where or DASH),
                                 storey=clip(f"{what}, storey", hr.storey or DASH),
                                 effect=f"at least {tier_words(hr.tier)}",
                                 keep_out=DASH if hr.keep_out_m is None else f"{hr.keep_out_m:g} m",
                                 note=clip(f"{what}, note", hs.note or "")))
    return hazards
