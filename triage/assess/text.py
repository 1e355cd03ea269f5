"""The plain-text summary of an assessment, as `triage assess` prints it. Pure string work."""

from __future__ import annotations

from triage.model import Survey

from .drift import pct
from .result import CAUTION, PROBABILITY_LABEL, Assessment, tier_words


def _pct(v: float | None) -> str:
    return "—" if v is None else pct(v)


def summary(survey: Survey, a: Assessment) -> str:
    """A short readable summary that starts with the caution."""
    b = survey.building
    g = a.governing
    lines = [
        f"CAUTION: {CAUTION}",
        "",
        f"{b.name}, {b.address}" + (f" ({b.use})" if b.use else ""),
        f"systems: x {b.system.x}, y {b.system.y}; inspected {survey.inspection.at.isoformat()} "
        f"by {survey.inspection.inspector.name}",
        f"survey {a.survey}",
        "",
        f"indicative tier: {tier_words(a.tier)}"
        + ("   [provisional: the survey is incomplete]" if a.provisional else "")
        + ("   [borderline]" if a.borderline else ""),
        f"structural performance level: {a.performance_level or 'not assessed (no data)'}",
        "governed by: " + (
            {"no-data": "no data yet"}.get(g.basis)
            or f"{g.basis}" + (f", storey {g.storey}" if g.storey else "")
            + (f", {g.dir}" if g.dir else "")),
        "",
        "reasons:",
        *[f"  - {r}" for r in a.reasons],
        "",
        f"tier probabilities ({PROBABILITY_LABEL}): "
        + ", ".join(f"{t} {p:.2f}" for t, p in a.tier_probability.items()),
    ]
    if a.measure_next:
        m = a.measure_next
        at = f" ({m.where})" if m.where else ""
        lines.append(f"measure next: storey {m.storey}, {m.dir}{at}: {m.why}")
    lines += ["", "storey   drift x   drift y   level x   level y   R        grade"]
    for s in reversed(a.storeys):
        r = "—" if s.residual_capacity is None else f"{s.residual_capacity:.1%}"
        lines.append(f"{s.label:<8} {_pct(s.drift_ratio.x):>8}  {_pct(s.drift_ratio.y):>8}  "
                     f"{s.performance_level.x or '—':<8}  {s.performance_level.y or '—':<8}  "
                     f"{r:<7}  {s.damage_grade or '—'}")
    if a.hazards:
        lines += ["", "hazards:"]
        for h in a.hazards:
            keep = f"; keep {h.keep_out_m:g} m clear" if h.keep_out_m is not None else ""
            lines.append(f"  - {h.kind}" + (f" at {h.where}" if h.where else "")
                         + f": at least {h.tier}{keep}")
    lines += ["", "repairability (named alternatives, largest storey drift):"]
    for rp in a.repairability:
        p = "—" if rp.probability is None else f"{rp.probability:.3f}"
        lines.append(f"  - {rp.name}: {p} ({rp.source})")
    if a.defaulted:
        lines += ["", "uncertainties taken from instrument defaults:"]
        lines += [f"  - {d}" for d in a.defaulted]
    if a.notes:
        lines += ["", "notes:"]
        lines += [f"  - {n}" for n in a.notes]
    lines += ["", f"The tier is indicative. {CAUTION}", ""]
    return "\n".join(lines)
