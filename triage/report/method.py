"""The method page: what this assessment rests on. Pure: no reportlab.

The tables it used, the FEMA 356 figures of this building's systems, the status words, and
the named assumptions with their values.

Only what applied to this building is listed: a table the engine never consulted for it (no
drift measured, no member class, a material without a plumbness standard) is left out, so the
page says what this result rests on. A new published table gets one `MethodRow` here, under the
condition that makes it apply.
"""

from __future__ import annotations

from dataclasses import dataclass

from triage.assess import Assessment
from triage.model import Survey
from triage.report.capacity_rows import capacity_note
from triage.standards import Source, Standards
from triage.standards.vocabulary import words

from .words import cite, pct, pct_figure, value_text

# What the status words mean (docs/references.md, "What the status words mean").
STATUS_WORDS: tuple[tuple[str, str], ...] = (
    ("checked", "read in a public copy of the document"),
    ("secondary", "seen only as quoted in another publication, not in the document itself"),
    ("memory", "recalled, not re-read: marked \"from memory\" and kept configurable; check it "
               "in the source before relying on it"),
    ("common practice", "a fact of the trade with no single source"),
    ("ours", "a rule of this tool, named and configurable as an assumption"),
)


@dataclass(frozen=True)
class MethodRow:
    """A table the method rests on: name, source and how sure we are of it."""

    what: str
    source: str
    status: str
    note: str


@dataclass(frozen=True)
class FigureRow:
    """The FEMA 356 Table C1-3 row of one system, as this assessment used it."""

    dirs: str
    system: str
    io: str
    ls: str
    cp: str
    note: str


@dataclass(frozen=True)
class AssumptionRow:
    """A named assumption applied, with the value used."""

    key: str
    value: str
    status: str
    why: str


def drift_measured(a: Assessment) -> bool:
    """Whether any residual drift was measured (the drift tables then applied)."""
    return any(s.spots or s.drift_ratio.x is not None or s.drift_ratio.y is not None
               for s in a.storeys)


def _dirs_measured(a: Assessment) -> list[str]:
    return [d for d in ("x", "y") if any(s.drift_ratio.get(d) is not None for s in a.storeys)]


def capacity_methods(std: Standards) -> list[tuple[str, str, Source]]:
    """The residual capacity methods (the assessment's `method` key), each with its table."""
    return [("jbdpa", "damage classes, reduction factors eta, damage grades by R",
             std.capacity.source),
            ("fema352", "steel moment frames: connection damage and the floor's damage index",
             std.steel.source),
            ("fema306", "concrete and masonry walls: behaviour modes, severity and lambda "
                        "factors", std.walls.source)]


def method_rows(survey: Survey, a: Assessment, std: Standards) -> list[MethodRow]:
    """The published tables this assessment used, each with its source and status."""
    rows: list[MethodRow] = []
    drift = drift_measured(a)
    if drift:
        s = std.drift.source
        rows.append(MethodRow("structural performance levels by residual drift (IO, LS, CP)",
                              cite(s), s.status,
                              "the standard calls these drifts typical values illustrating the "
                              "damage, not acceptance limits, and does not mean them for "
                              "post-earthquake evaluation; used here as indicative thresholds "
                              "only"))
    used_methods = {c.method for c in a.residual_capacity}
    if "jbdpa" not in used_methods and any(m.damage_class for s in a.storeys for m in s.members):
        used_methods.add("jbdpa")   # the damage classes I to V are the JBDPA guideline's
    for key, what, source in capacity_methods(std):
        if key in used_methods:
            note = capacity_note(std, key) if key != "jbdpa" else source.status_note
            rows.append(MethodRow(what, cite(source), source.status, note))
    if drift and any(f.io_negligible for f in a.drift_figures.values()):
        s = std.damage_states.source
        rows.append(MethodRow("residual drift damage states DS1–DS4 (the number taken for "
                              "FEMA 356's 'negligible')", cite(s), s.status, s.status_note))
    used = {r.key for r in a.repairability if r.probability is not None}
    for r in std.repairability:
        if r.key in used:
            rows.append(MethodRow(f"repairability: {r.name}", r.label, r.source.status,
                                  r.source.table))
    if drift:
        materials = {std.systems[getattr(survey.building.system, d)].material
                     for d in _dirs_measured(a)}
        for material in sorted(materials):
            cited = std.plumbness_sources.get(material, "").split(",")[0].strip()
            for t in std.plumbness:
                if cited and t.source.document.startswith(cited):
                    rows.append(MethodRow(f"as-built plumbness tolerance, {material}",
                                          cite(t.source), t.source.status,
                                          f"{t.rule} ({pct_figure(t.drift_pct)})"))
    return rows


def figure_rows(a: Assessment, std: Standards) -> list[FigureRow]:
    """FEMA 356 Table C1-3 as used: the residual drift figures of each direction's system."""
    if not drift_measured(a):
        return []
    out: list[FigureRow] = []
    fx, fy = a.drift_figures.get("x"), a.drift_figures.get("y")
    groups = ([("x, y", fx)] if fx is not None and fy is not None and fx.system == fy.system
              else [(d, f) for d, f in (("x", fx), ("y", fy)) if f is not None])
    for dirs, f in groups:
        assert f is not None
        row = std.drift.systems.get(f.system)
        if f.io_negligible:
            note = (f"IO: the table says 'negligible' permanent drift; {pct(f.IO)} is taken "
                    "(assumption, listed below)")
        else:
            note = "IO, LS: the table's permanent (residual) drifts; CP: its one figure"
        if row is not None:
            note += (f"; transient figures, not used: IO {pct_figure(row.io_transient_pct)}, "
                     f"LS {pct_figure(row.ls_transient_pct)}")
        io = f"negligible: {pct(f.IO)}" if f.io_negligible else pct(f.IO)
        out.append(FigureRow(dirs, words("systems", f.system), io, pct(f.LS), pct(f.CP), note))
    return out


def method_text(a: Assessment, rows: list[MethodRow]) -> list[str]:
    """The paragraphs that open the method page."""
    memory = list(dict.fromkeys(r.what for r in rows if r.status == "memory"))
    out = [
        "The tier is computed from point values of the readings; the tier probabilities come "
        "from the stated measurement uncertainties alone, not from any uncertainty of the "
        "method, the tables or the building.",
    ]
    if drift_measured(a):
        out.append("FEMA 356 calls its drift figures typical values illustrating the damage, "
                   "not limits; the tool uses them as indicative thresholds only.")
    if memory:
        out.append("Values recalled rather than read in the source (from memory): "
                   + "; ".join(memory) + ".")
    out.append(f"The assessment was made by triage engine {a.engine.version} (seed "
               f"{a.engine.seed}) with the assumptions listed below. The survey and the "
               "assessment travel inside this PDF as embedded files (survey.json, "
               "assessment.json). Only the tables that applied to this building are listed.")
    return out


def assumption_rows(a: Assessment, std: Standards) -> list[AssumptionRow]:
    """Every named assumption with the value this assessment used, its status and why."""
    labels = {r.key: r.label for r in std.floor_rows}
    out = []
    for key, value in a.engine.assumptions.items():
        note = std.assumption_notes.get(key)
        if key == "damage_floors" and isinstance(value, dict):
            value = {labels.get(k, k): v for k, v in value.items()}
        out.append(AssumptionRow(words("assumptions", key), value_text(value),
                                 note.status if note else "ours", note.why if note else ""))
    return out
