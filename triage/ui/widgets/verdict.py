"""The verdict: a compact line always in view, and the full panel.

Both are drawn from the one `Assessment`; both carry the caution. Severity is carried by the
tier's words and our mark; the only colour is the app's accent, stronger for the tier word.
"""

from __future__ import annotations

from rich.text import Text
from textual.widgets import Static

from triage.assess import Assessment, tier_words
from triage.assess.drift import pct
from triage.assess.result import probability_text
from triage.assess.text import borderline_words, plumbness_words, probability_label
from triage.model import Survey
from triage.safetext import visible, visible_line
from triage.standards.vocabulary import plain_text, words
from triage.ui.messages import CAUTION_FULL, CAUTION_SHORT
from triage.ui.widgets.profile import drift_profile


def governing_text(a: Assessment) -> str:
    """What sets the tier, in a few words."""
    g = a.governing
    if g.basis == "no-data":
        return words("basis", "no-data")
    where = f"storey {g.storey}" if g.storey else "the building"
    return f"{words('basis', g.basis)}, {where}" + (f" {g.dir}" if g.dir else "")


def borderline_text(a: Assessment) -> str:
    """'borderline: hold 0.38' (the other tiers' chances), or '' when not borderline."""
    if not a.borderline:
        return ""
    others = [f"{t} {probability_text(p, a.tier_probability_se.get(t, 0.0))}"
              for t, p in a.tier_probability.items() if t != a.tier and p > 0]
    return "borderline: " + ", ".join(others) if others else "borderline"


def verdict_summary(a: Assessment) -> str:
    """One line: tier with mark, level, what governs, provisional, borderline with the chances."""
    parts = [tier_words(a.tier), f"level {a.performance_level or '—'}",
             f"governed by {governing_text(a)}"]
    if a.provisional:
        parts.append("provisional")
    if a.borderline:
        parts.append(borderline_text(a))
    return visible_line(" · ".join(parts))


class VerdictLine(Static):
    """The compact verdict, two lines, at the foot of the logging screen."""

    DEFAULT_CSS = """
    VerdictLine { height: 2; width: 1fr; padding: 0 1; background: $boost;
                  border-left: outer $accent; }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id)
        self.assessment: Assessment | None = None
        self.pending = False

    def on_mount(self) -> None:
        """Start with the caution alone."""
        self.show(None)

    def show(self, a: Assessment | None, pending: bool = False) -> None:
        """Draw an assessment (None: not yet computed)."""
        self.assessment = a
        self.pending = pending
        t = Text(no_wrap=True, overflow="ellipsis")
        if a is None:
            t.append("verdict: working it out …", style="dim")
        else:
            # a space after the tier: its mark is of ambiguous width, and where a terminal
            # (or a font) draws it two cells wide the words after it still stand apart
            t.append(tier_words(a.tier) + " ", style="bold")
            t.append(verdict_summary(a)[len(tier_words(a.tier)):])
            if pending:
                t.append("  (updating …)", style="dim")
        t.append("\n")
        t.append(CAUTION_SHORT, style="italic")
        self.update(t, layout=False)

    @property
    def text(self) -> str:
        """The line's plain text."""
        return str(self.render())


def _reason_plumbness(a: Assessment) -> dict[int, list[str]]:
    """Plumbness lines by the index of the reason they stand beside (-1: no reason names it).

    A plumbness spot stands beside the first reason naming its storey and direction.
    """
    out: dict[int, list[str]] = {}
    for p, line in zip(a.plumbness, plumbness_words(a), strict=True):
        at = next((i for i, r in enumerate(a.reasons)
                   if f"storey {p.storey}, {p.dir}" in r), -1)
        out.setdefault(at, []).append(line)
    return out


def measure_next_text(a: Assessment, survey: Survey | None = None) -> str:
    """The one measurement that could change the tier, or that no reading can."""
    if a.measure_next is not None:
        return plain_text(a.measure_next.text(), survey)
    if a.performance_level is None:
        return "nothing logged yet sets a level: log readings and member groups first"
    head = "no reading can change this tier"
    settled = a.settled_by or ""
    rests = settled.partition("it rests on: ")[2]
    if rests:
        z = a.engine.assumptions.get("measure_next_max_z")
        near = f" within {z:g} sd of" if isinstance(z, (int, float)) else " near"
        return (f"{head} (no spot or crack width lies{near} a threshold); it rests on: "
                + plain_text(rests, survey))
    return head + (f": {plain_text(settled, survey)}" if settled else "")


def repairability_lines(a: Assessment) -> list[str]:
    """The named repairability alternatives, as the report gives them, and their basis."""
    largest = max((v for s in a.storeys for v in (s.drift_ratio.x, s.drift_ratio.y)
                   if v is not None), default=None)
    lines = [f"{r.name}: {'—' if r.probability is None else f'{r.probability:.3f}'} "
             f"({r.source})" for r in a.repairability]
    lines.append("applied to the largest storey drift ratio, "
                 f"{pct(largest)}; the published figures disagree, so each is shown on its own"
                 if largest is not None else
                 "no residual drift measured: no probability is given")
    return lines


def _share(v: float | None) -> str:
    """A share as a percentage with one decimal, or a dash."""
    return "—" if v is None else f"{v:.1%}"


def verdict_lines(survey: Survey, a: Assessment, width: int = 76) -> Text:
    """The whole verdict as rich text: tier, caution, reasons, probabilities, profile, R.

    Every text that comes from the survey (labels, places, notes) is shown through
    `triage.safetext.visible`: a control or bidi character reads as an escape.
    """
    t = Text()

    def add(text: str, style: str | None = None) -> None:
        t.append(visible(text), style=style or "")

    t.append(f" {tier_words(a.tier)} ", style="bold reverse")
    add("  " + verdict_summary(a)[len(tier_words(a.tier)):].lstrip(" ·") + "\n")
    t.append(CAUTION_FULL + "\n\n", style="italic")
    t.append("Reasons\n", style="bold underline")
    beside = _reason_plumbness(a)
    for i, r in enumerate(a.reasons or ("none: nothing logged sets a level yet",)):
        add(f" • {plain_text(r, survey)}\n")
        for line in beside.get(i, ()):
            add(f"   plumbness: {line}\n", "italic")
    for line in beside.get(-1, ()):
        add(f" • plumbness: {line}\n")
    t.append("\nTier probabilities ", style="bold underline")
    t.append(f"({probability_label(a)})\n", style="italic")
    t.append("  " + "   ".join(
        f"{tier_words(k)} {probability_text(v, a.tier_probability_se.get(k, 0.0))}"
        for k, v in a.tier_probability.items()) + "\n")
    if a.borderline is not None:
        t.append(f"  {borderline_words(a)}\n", style="bold" if a.borderline else "")
    t.append("\nMeasure next\n", style="bold underline")
    add(f"  {measure_next_text(a, survey)}\n")
    t.append("\nKeep-out and hazards\n", style="bold underline")
    if a.hazards:
        for h in a.hazards:
            keep = (f"; keep {h.keep_out_m:g} m clear below it" if h.keep_out_m is not None
                    else "; no height given, no keep-out distance")
            where = f" at {h.where}" if h.where else ""
            add(f"  {words('hazards', h.kind)}{where}: at least {tier_words(h.tier)}{keep}\n")
    else:
        t.append("  none logged\n")
    t.append("\nDrift profile\n", style="bold underline")
    for line in drift_profile(a, width):
        add(line + "\n")
    t.append("\nResidual capacity R per storey\n", style="bold underline")
    t.append("  storey   R        by x     by y     grade     level\n", style="dim")
    for s in reversed(a.storeys):
        add(f"  {s.label:<8} {_share(s.residual_capacity):<8} "
            f"{_share(s.residual_capacity_by_dir.x):<8} {_share(s.residual_capacity_by_dir.y):<8} "
            f"{s.damage_grade or '—':<9} {s.level or '—'}\n")
    t.append("\nRepairability (named alternatives)\n", style="bold underline")
    for line in repairability_lines(a):
        add(f"  {line}\n")
    if a.notes:
        t.append("\nNotes\n", style="bold underline")
        for n in a.notes:
            add(f"  • {plain_text(n, survey)}\n")
    if a.defaulted:
        t.append("\nUncertainties from instrument defaults\n", style="bold underline")
        for d in a.defaulted:
            add(f"  • {plain_text(d, survey)}\n")
    t.append(f"\nThe tier is indicative. {CAUTION_FULL}\n", style="italic")
    return t


def storey_drift_text(a: Assessment, label: str) -> str:
    """A storey's drift ratios and levels in one line."""
    try:
        s = a.storey(label)
    except KeyError:
        return ""
    parts = []
    for d in ("x", "y"):
        v = s.drift_ratio.get(d)
        parts.append(f"{d} {'—' if v is None else pct(v)} {s.performance_level.get(d) or ''}")
    return "drift " + ", ".join(p.strip() for p in parts)
