"""The report model: everything the PDF shows, as plain text and numbers. Pure: no reportlab.

`build_report_model(survey, assessment, ...)` turns a validated `Survey` and its `Assessment`
into a `ReportModel`. The drawing code (`triage.report.draw`) only lays these strings out, so
what the report says can be tested without drawing a PDF. Strings here are the user's text as
typed: the drawer escapes them for reportlab's markup, never this module.

By concern: `words.py` (numbers, times, citations, engine lines in words), `rows.py` (the
tables of storeys, readings, members, hazards, photos), `method.py` (the method page); this
module puts page one together and holds the `ReportModel`.
"""

from __future__ import annotations

import hashlib
import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Protocol

from triage.assess import CAUTION, PROBABILITY_LABEL, TIERS, Assessment, tier_words
from triage.model import Survey
from triage.photos import PhotoLoader, folder_loader
from triage.standards import Assumptions, Standards, load
from triage.standards.vocabulary import words

from .capacity_rows import capacity_caption
from .method import (
    STATUS_WORDS,
    AssumptionRow,
    FigureRow,
    MethodRow,
    assumption_rows,
    figure_rows,
    method_rows,
    method_text,
)
from .rows import (
    ChartFigure,
    ChartPoint,
    HazardRow,
    MemberRow,
    PhotoItem,
    SpotRow,
    SpotTable,
    StoreyRow,
    chart,
    hazard_rows,
    member_rows,
    photo_items,
    provisional_storeys,
    spot_tables,
    storey_rows,
)
from .words import CLIP, CLIPPED, DASH, Clipper, in_words, pct, when_iso_text, when_text

__all__ = ["CLIP", "CLIPPED", "DASH", "AssumptionRow", "ChartFigure", "ChartPoint",
           "Comparison", "FigureRow", "HazardRow", "MemberRow", "MethodRow", "PhotoItem",
           "ReportModel", "Signer", "SpotRow", "SpotTable", "StoreyRow", "build_report_model",
           "in_words", "pct", "provisional_storeys", "spot_tables", "survey_digest", "when_text"]


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
    signed_at: str = ""  # as printed, e.g. "1 December 2026, 20:00:00 UTC"
    covers: str = ""  # what the signature covers, in words
    not_inspector: str = ""  # the inspector ("name (id …)") when the signer is someone else


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
    figures: list[FigureRow] = field(default_factory=list)
    status_words: list[tuple[str, str]] = field(default_factory=list)
    capacity_caption: str = ""   # which method gave each figure of the storey table's capacity
    @property
    def footer(self) -> str:
        """The identification printed at the foot of every page (page number added there)."""
        rev = f" · store revision {self.revision}" if self.revision is not None else ""
        return (f"survey {self.survey_id[:8]} (id {self.survey_id}) · survey digest "
                f"{self.survey_digest}{rev}")


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
    clip = Clipper()
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

    points, figs = chart(a)
    a_used = Assumptions.model_validate(a.engine.assumptions)
    repair = [(r.name, DASH if r.probability is None else f"{r.probability:.3f}", r.source)
              for r in a.repairability]
    largest = max((v for s in a.storeys for v in (s.drift_ratio.x, s.drift_ratio.y)
                   if v is not None), default=None)
    basis = ("applied to the largest storey drift ratio, "
             f"{pct(largest)}; the published figures disagree, so each is shown on its own"
             if largest is not None else "no residual drift measured: no probability is given")
    method = method_rows(survey, a, std)

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
        storeys=storey_rows(a, clip), capacity_caption=capacity_caption(a),
        chart=points, chart_figures=figs,
        members=member_rows(survey, a, clip), hazards=hazard_rows(survey, a, a_used, clip),
        repairability=repair, repairability_basis=basis,
        photos=photo_items(survey, photos if photos is not None
                       else folder_loader(photo_dir) if photo_dir is not None else None),
        storey_notes=[(s.label, s.notes) for s in survey.storeys if s.notes],
        notes=[in_words(n, survey) for n in a.notes],
        defaulted=[in_words(d, survey) for d in a.defaulted],
        method=method, method_text=method_text(a, method),
        assumptions=assumption_rows(a, std), figures=figure_rows(a, std),
        status_words=list(STATUS_WORDS),
        engine=f"triage {a.engine.version}",
        inspector=inspector,
        long_texts=clip.full,
        comparison=comparison_lines(comparison) if comparison is not None else None,
        spot_tables=spot_tables(survey, a_used),
        state=(f"SIGNED by {signer.name}, key {signer.fingerprint[:16]}: check with triage "
               "verify" if signer else "UNSIGNED: no digital signature"),
    )


def comparison_lines(comparison: Comparison) -> list[str]:
    """The comparison's lines with its times as people read them (never raw ISO 8601)."""
    return [_ISO.sub(lambda m: when_iso_text(m.group(0)), line) for line in comparison.lines()]


_ISO = re.compile(r"\d{4}-\d\d-\d\dT\d\d:\d\d(?::\d\d(?:\.\d+)?)?(?:Z|[+-]\d\d:\d\d)?")


def _provisional_text(survey: Survey) -> str:
    which = provisional_storeys(survey)
    if not which:
        return "PROVISIONAL: nothing was logged yet (no reading, no member group)"
    return ("PROVISIONAL: the survey is incomplete at " + "; ".join(which)
            + ". The tier rests on the measured parts only.")
