"""The report's look: one accent hue (strong and weak), ink, paragraph styles. reportlab only."""

from __future__ import annotations

from functools import cache
from typing import Any

from reportlab.lib.colors import HexColor
from reportlab.lib.styles import ParagraphStyle

from .fonts import register

# One hue of our own, deep slate blue, in a strong and a weak weight; never a traffic light.
ACCENT = HexColor("#24476b")
ACCENT_WEAK = HexColor("#9fb4c9")
ACCENT_TINT = HexColor("#e6edf4")
INK = HexColor("#1a1a1a")
MUTED = HexColor("#5a5a5a")


@cache
def styles() -> dict[str, Any]:
    """Paragraph styles by name."""
    regular, bold = register()
    base = ParagraphStyle("body", fontName=regular, fontSize=9, leading=11.5, textColor=INK)
    return {
        "body": base,
        "small": ParagraphStyle("small", parent=base, fontSize=7.5, leading=9.5),
        "cell": ParagraphStyle("cell", parent=base, fontSize=7.5, leading=9),
        "cellb": ParagraphStyle("cellb", parent=base, fontName=bold, fontSize=7.5, leading=9),
        "label": ParagraphStyle("label", parent=base, fontSize=7.5, leading=9,
                                textColor=MUTED),
        "title": ParagraphStyle("title", parent=base, fontName=bold, fontSize=15, leading=19,
                                spaceAfter=2),
        "kicker": ParagraphStyle("kicker", parent=base, fontSize=8, leading=10,
                                 textColor=ACCENT),
        "h2": ParagraphStyle("h2", parent=base, fontName=bold, fontSize=10.5, leading=13,
                             spaceBefore=8, spaceAfter=3, textColor=ACCENT),
        "tier": ParagraphStyle("tier", parent=base, fontName=bold, fontSize=24, leading=28,
                               textColor=ACCENT),
        "level": ParagraphStyle("level", parent=base, fontName=bold, fontSize=18, leading=22,
                                textColor=ACCENT),
        "strong": ParagraphStyle("strong", parent=base, fontName=bold),
        "caution": ParagraphStyle("caution", parent=base, fontName=bold, fontSize=11,
                                  leading=14, textColor=INK),
        "bullet": ParagraphStyle("bullet", parent=base, leftIndent=10, bulletIndent=0,
                                 spaceAfter=1.5),
    }
