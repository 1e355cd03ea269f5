"""The report model: everything the PDF shows, as plain text and numbers. Pure: no reportlab.

`build_report_model(survey, assessment, ...)` turns a validated `Survey` and its `Assessment`
into a `ReportModel`. The drawing code (`triage.report.draw`) only lays these strings out, so
what the report says can be tested without drawing a PDF. Strings here are the user's text as
typed: the drawer escapes them for reportlab's markup, never this module.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass, field
from functools import cache
from pathlib import Path
from typing import Any, Protocol

from triage.assess import CAUTION, PROBABILITY_LABEL, TIERS, Assessment, tier_words
from triage.assess.spots import Spot, spots_of_survey
from triage.model import Survey
from triage.photos import PhotoLoader, folder_loader
from triage.standards import Assumptions, Standards, load
from triage.standards.vocabulary import message_words, vocabulary, words

DASH = "—"
CLIP = 300  # longest text put in a table cell; longer ones are printed in full under Notes
CLIPPED = "… (in full under Notes)"


class Comparison(Protocol):
    """What the report needs of a comparison with the previous inspection."""

    def lines(self) -> list[str]:
        """One line per change since the previous inspection."""
        ...


@dataclass(frozen=True)
class Signer:
    """Who signs the report digitally: shown on page one."""

    name: str
    id: str
    fingerprint: str
    signed_at: str = ""  # as printed, e.g. "2026-12-01 20:00:00 UTC"
    covers: str = ""  # what the signature covers, in words
    not_inspector: str = ""  # the inspector ("name (id …)") when the signer is someone else


@dataclass(frozen=True)
class StoreyRow:
    """One row of the storey table (bottom to top in the model, drawn top to bottom)."""

    label: str
    height: str
    drift_x: str
    drift_y: str
    level_x: str
    level_y: str
    r: str
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


@dataclass(frozen=True)
class MethodRow:
    """A table the method rests on: name, source and how sure we are of it."""

    what: str
    source: str
    status: str
    note: str


@dataclass(frozen=True)
class AssumptionRow:
    """A named assumption applied, with the value used."""

    key: str
    value: str
    status: str
    why: str


@dataclass(frozen=True)
class ReportModel:
    """The report, ready to lay out."""

    caution: str
    title: str
    survey_id: str
    survey_digest: str
    revision: int | None
    building: list[tuple[str, str]]
    tier: str
    tier_words: str
    tier_line: str
    level: str
    governing: str
    provisional: bool
    provisional_text: str
    reasons: list[str]
    probability_label: str
    probabilities: list[tuple[str, str]]
    borderline: bool
    borderline_text: str
    measure_next: str
    keep_out: list[str]
    signer: Signer | None
    signer_text: str
    storeys: list[StoreyRow]
    chart: list[ChartPoint]
    chart_figures: list[ChartFigure]
    members: list[MemberRow]
    hazards: list[HazardRow]
    repairability: list[tuple[str, str, str]]
    repairability_basis: str
    photos: list[PhotoItem]
    storey_notes: list[tuple[str, str]]
    notes: list[str]
    defaulted: list[str]
    method: list[MethodRow]
    method_text: list[str]
    assumptions: list[AssumptionRow]
    engine: str
    inspector: str = ""
    long_texts: list[tuple[str, str]] = field(default_factory=list)
    comparison: list[str] | None = None
    extra: dict[str, Any] = field(default_factory=dict)
    spot_tables: list[SpotTable] = field(default_factory=list)
    state: str = "UNSIGNED"  # the signed state printed on every page


    @property
    def footer(self) -> str:
        """The identification printed at the foot of every page (page number added there)."""
        rev = f" · store revision {self.revision}" if self.revision is not None else ""
        return f"survey {self.survey_id} · survey digest {self.survey_digest}{rev}"


def pct(v: float | None) -> str:
    """A drift ratio as a percentage (two decimals under 1%), a dash when unmeasured."""
    if v is None:
        return DASH
    p = v * 100.0
    return f"{p:.2f}%" if abs(p) < 1.0 else f"{p:.1f}%"


class _Clipper:
    """Shortens text for table cells, keeping every full text for the Notes section."""

    def __init__(self) -> None:
        self.full: list[tuple[str, str]] = []

    def __call__(self, what: str, text: str) -> str:
        if len(text) <= CLIP:
            return text
        self.full.append((what, text))
        return text[:CLIP - len(CLIPPED)].rstrip() + CLIPPED


def survey_digest(survey: Survey) -> str:
    """The short digest of the canonical survey shown on every page (SHA-256, 12 hex)."""
    return hashlib.sha256(survey.canonical().encode("utf-8")).hexdigest()[:12]


def _governing(a: Assessment) -> str:
    g = a.governing
    if g.basis == "no-data":
        return "nothing logged yet (no reading, no member group)"
    what = {"drift": "residual drift", "capacity": "residual seismic capacity R",
            "damage": "member damage", "hazard": "a hazard"}[g.basis]
    parts = [what]
    if g.storey is not None:
        parts.append(f"storey {g.storey}")
    if g.dir is not None:
        parts.append(f"direction {g.dir}")
    return ", ".join(parts)


def _systems_text(survey: Survey, std: Standards) -> str:
    sx, sy = survey.building.system.x, survey.building.system.y
    nx, ny = words("systems", sx), words("systems", sy)
    if sx == sy:
        return f"x and y: {nx}"
    return f"x: {nx}; y: {ny}"


@cache
def _key_pattern() -> tuple[re.Pattern[str], dict[str, str]]:
    table = {k: e.words for sec, entries in vocabulary().items() if not sec.startswith("fields")
             for k, e in entries.items() if "_" in k}
    keys = sorted(table, key=len, reverse=True)
    return re.compile(r"(?<![\w/.])(" + "|".join(map(re.escape, keys)) + r")(?!\w|\.toml)"), table


def in_words(text: str, survey: Survey | None = None) -> str:
    """A line of the engine in the shared vocabulary's words: no internal key is left in it."""
    text = message_words(text, survey)
    pattern, table = _key_pattern()
    return pattern.sub(lambda m: table[m.group(1)], text)


def when_text(at: Any) -> str:
    """A time as people read it, with its zone: '1 December 2026, 14:05 UTC+13:00'."""
    off = at.utcoffset()
    zone = ""
    if off is not None:
        mins = int(off.total_seconds() // 60)
        sign = "+" if mins >= 0 else "-"
        zone = "UTC" if mins == 0 else f"UTC{sign}{abs(mins) // 60:02d}:{abs(mins) % 60:02d}"
    return f"{at.day} {at:%B %Y, %H:%M} {zone}".strip()


def _num(v: float) -> str:
    return f"{v:g}"


def _ratio_pm(value: float, u: float) -> str:
    """A signed drift ratio and its standard uncertainty, in percent."""
    return f"{value * 100:+.3f}% ± {u * 100:.3f}%"


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
            texts.append(f"reading {i + 1}: {_num(r.offset_mm or 0.0)} mm over "
                         f"{_num(r.gauge_mm or 0.0)} mm, sd {sd}")
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
                   value=_ratio_pm(sp.value, sp.u), repeats=rep)


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


def _photos(survey: Survey, load: PhotoLoader | None) -> list[PhotoItem]:
    """Each photo with its bytes from `load` (checked there); a refusal there refuses all."""
    found: list[PhotoItem] = []

    def add(belongs: str, field: str, photos: Any) -> None:
        for j, ph in enumerate(photos):
            data = load(ph, f"{field}.photos[{j}]") if load is not None else None
            found.append(PhotoItem(belongs, ph.caption, ph.path, data))

    for si, st in enumerate(survey.storeys):
        add(f"storey {st.label}", f"storeys[{si}]", st.photos)
        for i, m in enumerate(st.members):
            ref = f" {m.ref}" if m.ref else ""
            add(f"storey {st.label}, {m.kind} group {i + 1}{ref}",
                f"storeys[{si}].members[{i}]", m.photos)
    for i, h in enumerate(survey.hazards):
        where = f" at {h.where}" if h.where else ""
        add(f"hazard {i + 1}, {words('hazards', h.kind)}{where}", f"hazards[{i}]", h.photos)
    return found


def _value_text(v: Any) -> str:
    if isinstance(v, dict):
        return ", ".join(f"{k} → {w}" for k, w in v.items())
    if isinstance(v, list | tuple):
        return ", ".join(str(w) for w in v)
    return str(v)


def _method(std: Standards) -> list[MethodRow]:
    rows = [MethodRow("structural performance levels by residual drift (IO, LS, CP)",
                      f"{std.drift.source.document} ({std.drift.source.edition}) "
                      f"{std.drift.source.table}", std.drift.source.status,
                      "the standard calls these drifts typical values illustrating the damage, "
                      "not acceptance limits, and does not mean them for post-earthquake "
                      "evaluation; used here as indicative thresholds only"),
            MethodRow("damage classes, reduction factors eta, damage grades by R",
                      f"{std.capacity.source.document} ({std.capacity.source.edition})",
                      std.capacity.source.status, std.capacity.source.status_note),
            MethodRow("residual drift damage states DS1–DS4",
                      f"{std.damage_states.source.document} ({std.damage_states.source.edition})"
                      f" {std.damage_states.source.table}", std.damage_states.source.status,
                      std.damage_states.source.status_note)]
    for r in std.repairability:
        rows.append(MethodRow(f"repairability: {r.name}", r.label, r.source.status,
                              r.source.table))
    for t in std.plumbness:
        rows.append(MethodRow("as-built plumbness tolerance",
                              f"{t.source.document} ({t.source.edition}) {t.source.table}",
                              t.source.status, f"{t.rule} ({t.drift_pct:g}%)"))
    return rows


def build_report_model(survey: Survey, assessment: Assessment, *, revision: int | None = None,
                       signer: Signer | None = None, comparison: Comparison | None = None,
                       photo_dir: Path | None = None, photos: PhotoLoader | None = None,
                       std: Standards | None = None) -> ReportModel:
    """Everything the report shows, from the survey and its assessment.

    Pure but for the photos: their bytes come from `photos` (`triage.photos.PhotoLoader`:
    the store's blobs, or a survey file's folder), else from inside `photo_dir` (the survey
    file's folder); a path leaving that folder refuses the report (`PhotoRefused`).
    """
    std = std or load()
    a = assessment
    b = survey.building
    clip = _Clipper()
    ins = survey.inspection
    inspector = ins.inspector.name + (f" (id {ins.inspector.id})" if ins.inspector.id else "")
    building = [("building", b.name), ("address", b.address), ("use", b.use or DASH),
                ("systems", _systems_text(survey, std)), ("inspector", inspector),
                ("inspected", when_text(ins.at)), ("building id", str(survey.building_id))]
    if b.location is not None:
        building.insert(2, ("location", f"{b.location.lat:.5f}, {b.location.lon:.5f}"))
    if b.year_built is not None:
        building.insert(3, ("year built", str(b.year_built)))
    if ins.team:
        building.append(("team", "; ".join(t.name + (f" (id {t.id})" if t.id else "")
                                           for t in ins.team)))
    for label, value in (("event", ins.event), ("weather", ins.weather),
                         ("not inspected", ins.not_inspected)):
        if value:
            building.append((label, value))
    if ins.previous is not None:
        building.append(("follows survey", str(ins.previous)))
    building = [building[0]] + [(k, clip(k, v)) for k, v in building[1:]]

    probs = [(tier_words(t), f"{a.tier_probability.get(t, 0.0):.2f}") for t in TIERS]
    if a.measure_next is not None:
        m = a.measure_next
        at = f" ({m.where})" if m.where else ""
        d = f", direction {m.dir}" if m.dir is not None else ""
        measure_next = f"storey {m.storey}{d}{at}: {m.why}"
    else:
        measure_next = "no reading lies near a threshold"

    keep_out = []
    for h in a.hazards:
        if h.keep_out_m is not None:
            where = f" at {h.where}" if h.where else ""
            keep_out.append(f"{words('hazards', h.kind)}{where}: keep {h.keep_out_m:g} m "
                            "clear around it")

    storeys = [StoreyRow(label=clip(f"storey {s.label}", s.label), height=f"{s.height_m:g}",
                         drift_x=pct(s.drift_ratio.x),
                         drift_y=pct(s.drift_ratio.y), level_x=s.performance_level.x or DASH,
                         level_y=s.performance_level.y or DASH,
                         r=DASH if s.residual_capacity is None else f"{s.residual_capacity:.1%}",
                         grade=s.damage_grade or DASH, access=words("access", s.access))
               for s in a.storeys]
    chart = [ChartPoint(s.label, s.drift_ratio.x, s.drift_ratio.y) for s in a.storeys]
    figs: list[ChartFigure] = []
    fx, fy = a.drift_figures.get("x"), a.drift_figures.get("y")
    for lv in ("IO", "LS", "CP"):
        if fx is not None and fy is not None and fx.system == fy.system:
            figs.append(ChartFigure("x, y", lv, getattr(fx, lv), fx.system_name))
        else:
            for d, f in (("x", fx), ("y", fy)):
                if f is not None:
                    figs.append(ChartFigure(d, lv, getattr(f, lv), f.system_name))

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
            how = {"crack": "by crack width", "signs": "by signs",
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

    a_used = Assumptions.model_validate(a.engine.assumptions)
    hazards = []
    for hr in a.hazards:
        hs = survey.hazards[hr.index]
        kind = words("hazards", hr.kind)
        what = f"hazard {hr.index + 1} ({kind})"
        height = hs.height_above_ground_m
        hazards.append(HazardRow(kind=kind, height=DASH if height is None else f"{height:g} m",
                                 factor=DASH if height is None
                                 else f"{a_used.keep_out_factor:g}",
                                 where=clip(f"{what}, where", hr.where or DASH),
                                 storey=clip(f"{what}, storey", hr.storey or DASH),
                                 effect=f"at least {tier_words(hr.tier)}",
                                 keep_out=DASH if hr.keep_out_m is None else f"{hr.keep_out_m:g} m",
                                 note=clip(f"{what}, note", hs.note or "")))

    repair = [(r.name, DASH if r.probability is None else f"{r.probability:.3f}", r.source)
              for r in a.repairability]
    largest = max((v for s in a.storeys for v in (s.drift_ratio.x, s.drift_ratio.y)
                   if v is not None), default=None)
    basis = ("applied to the largest storey drift ratio, "
             f"{pct(largest)}; the published figures disagree, so each is shown on its own"
             if largest is not None else "no residual drift measured: no probability is given")

    assumptions = []
    for key, value in a.engine.assumptions.items():
        note = std.assumption_notes.get(key)
        assumptions.append(AssumptionRow(words("assumptions", key), _value_text(value),
                                         note.status if note else "ours",
                                         note.why if note else ""))
    memory = [r.what for r in _method(std) if r.status == "memory"]
    method_text = [
        "The tier is computed from point values of the readings; the tier probabilities come "
        "from the stated measurement uncertainties alone, not from any uncertainty of the "
        "method, the tables or the building.",
        "FEMA 356 calls its drift figures typical values illustrating the damage, not limits; "
        "the tool uses them as indicative thresholds only.",
        "Values recalled rather than read in the source (from memory): " + "; ".join(memory)
        + ".",
        f"The assessment was made by triage engine {a.engine.version} (seed {a.engine.seed}) "
        "with the assumptions listed below.",
    ]

    return ReportModel(
        caution=CAUTION,
        title=f"Occupancy recommendation: {b.name}",
        survey_id=str(survey.survey_id), survey_digest=survey_digest(survey), revision=revision,
        building=building,
        tier=a.tier, tier_words=tier_words(a.tier),
        tier_line="indicative tier, for the engineer of record to confirm or change",
        level=a.performance_level or "not assessed (no data)",
        governing=_governing(a),
        provisional=a.provisional,
        provisional_text=(_provisional_text(survey) if a.provisional
                          else "complete: every storey measured and entered"),
        reasons=[in_words(r, survey) for r in a.reasons],
        probability_label=PROBABILITY_LABEL,
        probabilities=probs,
        borderline=bool(a.borderline),
        borderline_text=("BORDERLINE: the measurement uncertainty alone gives the point tier "
                         "less than an even chance" if a.borderline else "not borderline"),
        measure_next=measure_next,
        keep_out=keep_out,
        signer=signer,
        signer_text=(f"Digitally signed by {signer.name} (id {signer.id}), key fingerprint "
                     f"{signer.fingerprint}. Check with: triage verify FILE"
                     if signer else
                     "UNSIGNED: this report carries no digital signature; nothing shows who "
                     "made it or that it is unchanged."),
        storeys=storeys, chart=chart, chart_figures=figs, members=members, hazards=hazards,
        repairability=repair, repairability_basis=basis,
        photos=_photos(survey, photos if photos is not None
                       else folder_loader(photo_dir) if photo_dir is not None else None),
        storey_notes=[(s.label, s.notes) for s in survey.storeys if s.notes],
        notes=[in_words(n, survey) for n in a.notes], defaulted=list(a.defaulted),
        method=_method(std), method_text=method_text, assumptions=assumptions,
        engine=f"triage {a.engine.version}",
        inspector=inspector,
        long_texts=clip.full,
        comparison=list(comparison.lines()) if comparison is not None else None,
        spot_tables=spot_tables(survey, a_used),
        state=(f"SIGNED by {signer.name}, key {signer.fingerprint[:16]}: check with triage "
               "verify" if signer else "UNSIGNED: no digital signature"),
    )


def _provisional_text(survey: Survey) -> str:
    which = provisional_storeys(survey)
    if not which:
        return "PROVISIONAL: nothing was logged yet (no reading, no member group)"
    return ("PROVISIONAL: the survey is incomplete at " + "; ".join(which)
            + ". The tier rests on the measured parts only.")
