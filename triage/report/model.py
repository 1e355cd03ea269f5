"""The report model: everything the PDF shows, as plain text and numbers. Pure: no reportlab.

`build_report_model(survey, assessment, ...)` turns a validated `Survey` and its `Assessment`
into a `ReportModel`. The drawing code (`triage.report.draw`) only lays these strings out, so
what the report says can be tested without drawing a PDF. Strings here are the user's text as
typed: the drawer escapes them for reportlab's markup, never this module.
"""

from __future__ import annotations

import hashlib
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Protocol

from triage.assess import CAUTION, PROBABILITY_LABEL, TIERS, Assessment, tier_words
from triage.model import Survey
from triage.photos import PhotoLoader, folder_loader
from triage.standards import Standards, load

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
    nx = std.drift.systems[sx].name if sx in std.drift.systems else sx
    ny = std.drift.systems[sy].name if sy in std.drift.systems else sy
    if sx == sy:
        return f"x and y: {nx} ({sx})"
    return f"x: {nx} ({sx}); y: {ny} ({sy})"


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
        add(f"hazard {i + 1}, {h.kind}{where}", f"hazards[{i}]", h.photos)
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
                ("inspected", ins.at.isoformat()), ("building id", str(survey.building_id))]
    if b.location is not None:
        building.insert(2, ("location", f"{b.location.lat:.5f}, {b.location.lon:.5f}"))
    if ins.previous is not None:
        building.append(("follows survey", str(ins.previous)))
    building = [building[0]] + [(k, clip(k, v)) for k, v in building[1:]]

    probs = [(tier_words(t), f"{a.tier_probability.get(t, 0.0):.2f}") for t in TIERS]
    if a.measure_next is not None:
        m = a.measure_next
        at = f" ({m.where})" if m.where else ""
        measure_next = f"storey {m.storey}, direction {m.dir}{at}: {m.why}"
    else:
        measure_next = "no reading lies near a threshold"

    keep_out = []
    for h in a.hazards:
        if h.keep_out_m is not None:
            where = f" at {h.where}" if h.where else ""
            keep_out.append(f"{h.kind}{where}: keep {h.keep_out_m:g} m clear around it")

    storeys = [StoreyRow(label=clip(f"storey {s.label}", s.label), height=f"{s.height_m:g}",
                         drift_x=pct(s.drift_ratio.x),
                         drift_y=pct(s.drift_ratio.y), level_x=s.performance_level.x or DASH,
                         level_y=s.performance_level.y or DASH,
                         r=DASH if s.residual_capacity is None else f"{s.residual_capacity:.1%}",
                         grade=s.damage_grade or DASH, access=s.access)
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
                seen.append("signs: " + ", ".join(s.replace("_", " ") for s in mg.signs))
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
                kind=mr.kind, count=str(mr.count), damage_class=mr.damage_class or DASH,
                eta=DASH if mr.eta is None else f"{mr.eta:g}",
                class_from=clip(f"{what}, how the class was set", how),
                seen=clip(f"{what}, what was seen", "; ".join(seen) or "nothing seen")))

    hazards = []
    for hr in a.hazards:
        hs = survey.hazards[hr.index]
        what = f"hazard {hr.index + 1} ({hr.kind})"
        hazards.append(HazardRow(kind=hr.kind, where=clip(f"{what}, where", hr.where or DASH),
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
        assumptions.append(AssumptionRow(key, _value_text(value),
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
        provisional_text=("PROVISIONAL: the survey is incomplete (a storey unmeasured in a "
                          "direction, without member groups, or not fully accessible)"
                          if a.provisional else "complete: every storey measured and entered"),
        reasons=list(a.reasons),
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
        notes=list(a.notes), defaulted=list(a.defaulted),
        method=_method(std), method_text=method_text, assumptions=assumptions,
        engine=f"triage {a.engine.version}",
        inspector=inspector,
        long_texts=clip.full,
        comparison=list(comparison.lines()) if comparison is not None else None,
    )
