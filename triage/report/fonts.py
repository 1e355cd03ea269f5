"""The report's Unicode fonts: DejaVu Sans, shipped in the package (see fonts/LICENSE-DejaVu.txt).

Registered with reportlab once per process, under names of our own.
"""

from __future__ import annotations

from functools import cache
from pathlib import Path

FONT_DIR = Path(__file__).resolve().parent / "fonts"
REGULAR = "TriageSans"
BOLD = "TriageSans-Bold"


@cache
def register() -> tuple[str, str]:
    """Register the regular and bold font with reportlab; return their names."""
    from reportlab.lib.fonts import addMapping
    from reportlab.pdfbase import pdfmetrics
    from reportlab.pdfbase.ttfonts import TTFont

    pdfmetrics.registerFont(TTFont(REGULAR, str(FONT_DIR / "DejaVuSans.ttf")))
    pdfmetrics.registerFont(TTFont(BOLD, str(FONT_DIR / "DejaVuSans-Bold.ttf")))
    addMapping(REGULAR, 0, 0, REGULAR)
    addMapping(REGULAR, 1, 0, BOLD)
    addMapping(REGULAR, 0, 1, REGULAR)
    addMapping(REGULAR, 1, 1, BOLD)
    return REGULAR, BOLD
