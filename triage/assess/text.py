"""The plain-text summary of an assessment, as `triage assess` prints it. Pure string work."""

from __future__ import annotations

from triage.model import Survey
from triage.standards.vocabulary import words

from .drift import pct
from .result import (
    CAUTION,
    PROBABILITY_LABEL,
    PROVISIONAL_LABEL,
    SPOTS_LABEL,
    TIERS,
    Assessment,
    probability_text,
    tier_words,
)
from .wording import hazard_words, level_words, system_words


def _pct(v: float | None) -> str:
    return "—" if v is None else pct(v)


def _short(level: str | None) -> str:
    """A level as the table shows it: IO, LS, CP, 'beyond CP' (the key's hyphen dropped)."""
    return "—" if level is None else level.replace("-", " ")


# The words below are shared by the text output, the screens and the report.

def probabilities_words(a: Assessment) -> str:
    """'occupy 0.841, hold 0.159, evacuate < 0.001', each printed no finer than its error."""
    return ", ".join(f"{t} {probability_text(a.tier_probability[t], a.tier_probability_se[t])}"
                     for t in TIERS)


def probability_label(a: Assessment) -> str:
    """What the probabilities rest on.

    Measurement uncertainty only; on a provisional survey, the measured parts only; with
    several spots, each taken as a separate place.
    """
    parts = [PROBABILITY_LABEL]
    if a.provisional and a.performance_level is not None:
        parts.append(PROVISIONAL_LABEL)
    if sum(len(s.spots) for s in a.storeys) > 1:
        parts.append(SPOTS_LABEL)
    return "; ".join(parts)


def borderline_words(a: Assessment) -> str:
    """Whether the point tier is borderline, and which other tier has what chance."""
    if a.borderline is None:
        return "borderline: not assessed (no level)"
    p = a.tier_probability[a.tier]
    if not a.borderline:
        return (f"not borderline: {a.tier} has {probability_text(p, a.tier_probability_se[a.tier])}"
                " from measurement uncertainty")
    others = [f"{t} {probability_text(a.tier_probability[t], a.tier_probability_se[t])}"
              for t in TIERS if t != a.tier and a.tier_probability[t] > 0]
    return (f"BORDERLINE: {a.tier} has only "
            f"{probability_text(p, a.tier_probability_se[a.tier])}; "
            + ", ".join(others))


def governing_words(a: Assessment) -> str:
    """What sets the tier, e.g. 'drift, storey 2, y (grid B2)'."""
    g = a.governing
    if g.basis == "no-data":
        return "no data yet"
    text = words("basis", g.basis) + (f", storey {g.storey}" if g.storey else "") + (
        f", {g.dir}" if g.dir else "")
    if a.governing_spot is not None and a.governing_spot.where:
        text += f" ({a.governing_spot.where})"
    return text


def measure_next_words(a: Assessment) -> str:
    """The one measurement that could change the tier, or what settles it."""
    if a.measure_next is not None:
        return a.measure_next.text()
    return "nothing to measure: " + (a.settled_by or "no reading or crack could change the tier")


def plumbness_words(a: Assessment) -> list[str]:
    """One line per spot that sets the tier inside its plumbness band."""
    return [f"storey {p.storey}, {p.dir}" + (f" ({p.where})" if p.where else "")
            + f": {pct(p.drift)} is within the as-built plumbness band ({pct(p.band)}) and sets "
            "the tier; an as-built baseline at that spot (drawings, a lift shaft, facade lines) "
            "or a second method would settle it" for p in a.plumbness]


def capacity_words(a: Assessment) -> list[str]:
    """One line per storey, direction and method of residual capacity, the worse marked.

    FEMA 352 and FEMA 306 ratios are ours, on tables from memory; a FEMA 306 grade is ours and
    said so, so that it is not read as a JBDPA grade.
    """
    out = []
    for c in a.residual_capacity:
        head = f"storey {c.storey}, {c.dir}: {words('capacity_methods', c.method)}"
        if c.ratio is None:
            out.append(f"{head}: not established ({c.inspected} of {c.count} inspected)")
            continue
        text = f"{head} {c.ratio:.1%}"
        if c.index is not None:
            text += f" (D = {c.index:.2f} of 10)"
        if c.grade is not None:
            text += f", grade {words('grades', c.grade)}" + (" (ours)" if c.method == "fema306"
                                                              else "")
        if c.level is not None:
            text += f", {level_words(c.level)}"
        if c.sampled:
            text += f"; {c.inspected} of {c.count} inspected"
        text += f"; {c.source}" + ("  [taken]" if c.taken else "")
        out.append(text)
    return out


def summary(survey: Survey, a: Assessment) -> str:
    """A short readable summary that starts with the caution."""
    b = survey.building
    lines = [
        f"CAUTION: {CAUTION}",
        "",
        f"{b.name}, {b.address}" + (f" ({b.use})" if b.use else ""),
        f"systems: x {system_words(b.system.x)}, y {system_words(b.system.y)}; inspected "
        f"{survey.inspection.at.isoformat()} "
        f"by {survey.inspection.inspector.name}",
        f"survey {a.survey}",
        "",
        f"indicative tier: {tier_words(a.tier)}"
        + ("   [provisional: the survey is incomplete]" if a.provisional else "")
        + ("   [borderline]" if a.borderline else ""),
        "structural performance level: " + (level_words(a.performance_level)
                                            if a.performance_level else "not assessed (no data)"),
        "governed by: " + governing_words(a),
        "",
        "reasons:",
        *[f"  - {r}" for r in a.reasons],
        "",
        f"tier probabilities ({probability_label(a)}): {probabilities_words(a)}",
        borderline_words(a),
        "measure next: " + measure_next_words(a),
    ]
    if a.plumbness:
        lines += ["", "plumbness (drift that cannot be told from construction lean):"]
        lines += [f"  - {line}" for line in plumbness_words(a)]
    lines += ["", "storey   drift x   drift y   level x   level y   capacity grade"]
    for s in reversed(a.storeys):
        r = "—" if s.residual_capacity is None else f"{s.residual_capacity:.1%}"
        lines.append(f"{s.label:<8} {_pct(s.drift_ratio.x):>8}  {_pct(s.drift_ratio.y):>8}  "
                     f"{_short(s.performance_level.x):<8}  {_short(s.performance_level.y):<8}  "
                     f"{r:<7}  {s.damage_grade or '—'}")
    if a.residual_capacity:
        lines += ["", "residual capacity (per storey, direction and method; the worse is taken):"]
        lines += [f"  - {line}" for line in capacity_words(a)]
    if a.hazards:
        lines += ["", "hazards:"]
        for h in a.hazards:
            keep = f"; keep {h.keep_out_m:g} m clear" if h.keep_out_m is not None else ""
            lines.append(f"  - {hazard_words(h.kind)}" + (f" at {h.where}" if h.where else "")
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
