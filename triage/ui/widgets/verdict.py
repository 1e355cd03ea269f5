"""The verdict: a compact line always in view, and the full panel.

Both are drawn from the one `Assessment`; both carry the caution. Severity is carried by the
tier's words and our mark; the only colour is the app's accent, stronger for the tier word.
"""

from __future__ import annotations

from typing import Any

from rich.text import Text
from textual.widgets import Static

from triage.assess import tier_words
from triage.assess.drift import pct
from triage.standards.vocabulary import plain_text, words
from triage.ui.messages import CAUTION_FULL, CAUTION_SHORT, PROBABILITY_NOTE
from triage.ui.widgets.profile import drift_profile


def governing_text(a: Any) -> str:
    """What sets the tier, in a few words."""
    g = a.governing
    if g.basis == "no-data":
        return words("basis", "no-data")
    where = f"storey {g.storey}" if g.storey else "the building"
    return f"{words('basis', g.basis)}, {where}" + (f" {g.dir}" if g.dir else "")


def verdict_summary(a: Any) -> str:
    """One line: tier with mark, level, what governs, provisional, borderline."""
    parts = [tier_words(a.tier), f"level {a.performance_level or '—'}",
             f"governed by {governing_text(a)}"]
    if a.provisional:
        parts.append("provisional")
    if a.borderline:
        parts.append("borderline")
    return " · ".join(parts)


class VerdictLine(Static):
    """The compact verdict, two lines, at the foot of the logging screen."""

    DEFAULT_CSS = """
    VerdictLine { height: 2; width: 1fr; padding: 0 1; background: $boost;
                  border-left: outer $accent; }
    """

    def __init__(self, id: str | None = None) -> None:
        super().__init__("", id=id)
        self.assessment: Any = None
        self.pending = False

    def on_mount(self) -> None:
        """Start with the caution alone."""
        self.show(None)

    def show(self, a: Any, pending: bool = False) -> None:
        """Draw an assessment (None: not yet computed)."""
        self.assessment = a
        self.pending = pending
        t = Text(no_wrap=True, overflow="ellipsis")
        if a is None:
            t.append("verdict: working it out …", style="dim")
        else:
            t.append(tier_words(a.tier), style="bold")
            rest = verdict_summary(a)[len(tier_words(a.tier)):]
            t.append(rest)
            if pending:
                t.append("  (updating …)", style="dim")
        t.append("\n")
        t.append(CAUTION_SHORT, style="italic")
        self.update(t, layout=False)

    @property
    def text(self) -> str:
        """The line's plain text."""
        return str(self.render())


def verdict_lines(survey: Any, a: Any, width: int = 76) -> Text:
    """The whole verdict as rich text: tier, caution, reasons, probabilities, profile, R."""
    t = Text()
    t.append(tier_words(a.tier), style="bold reverse")
    t.append("  " + verdict_summary(a)[len(tier_words(a.tier)):].lstrip(" ·") + "\n")
    t.append(CAUTION_FULL + "\n\n", style="italic")
    t.append("Reasons\n", style="bold underline")
    for r in a.reasons or ("none: nothing logged sets a level yet",):
        t.append(f" • {plain_text(r, survey)}\n")
    t.append("\nTier probabilities ", style="bold underline")
    t.append(f"({PROBABILITY_NOTE})\n", style="italic")
    t.append("  " + "   ".join(f"{tier_words(k)} {v:.2f}" for k, v in a.tier_probability.items())
             + "\n")
    t.append("\nMeasure next\n", style="bold underline")
    if a.measure_next is not None:
        m = a.measure_next
        at = f" ({m.where})" if m.where else ""
        t.append(f"  storey {m.storey}, {m.dir}{at}: {plain_text(m.why, survey)}\n")
    else:
        t.append("  nothing near a threshold\n")
    t.append("\nKeep-out and hazards\n", style="bold underline")
    if a.hazards:
        for h in a.hazards:
            keep = (f"; keep {h.keep_out_m:g} m clear below it" if h.keep_out_m is not None
                    else "; no height given, no keep-out distance")
            where = f" at {h.where}" if h.where else ""
            t.append(f"  {words('hazards', h.kind)}{where}: at least {tier_words(h.tier)}"
                     f"{keep}\n")
    else:
        t.append("  none logged\n")
    t.append("\nDrift profile\n", style="bold underline")
    for line in drift_profile(a, width):
        t.append(line + "\n")
    t.append("\nResidual capacity R per storey\n", style="bold underline")
    t.append("  storey   R        by x     by y     grade     level\n", style="dim")
    for s in reversed(a.storeys):
        def r(v: float | None) -> str:
            return "—" if v is None else f"{v:.1%}"
        t.append(f"  {s.label:<8} {r(s.residual_capacity):<8} "
                 f"{r(s.residual_capacity_by_dir.x):<8} {r(s.residual_capacity_by_dir.y):<8} "
                 f"{s.damage_grade or '—':<9} {s.level or '—'}\n")
    if a.notes:
        t.append("\nNotes\n", style="bold underline")
        for n in a.notes:
            t.append(f"  • {plain_text(n, survey)}\n")
    if a.defaulted:
        t.append("\nUncertainties from instrument defaults\n", style="bold underline")
        for d in a.defaulted:
            t.append(f"  • {plain_text(d, survey)}\n")
    t.append(f"\nThe tier is indicative. {CAUTION_FULL}\n", style="italic")
    return t


def storey_drift_text(a: Any, label: str) -> str:
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
