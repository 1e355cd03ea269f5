"""Lay the aftershock comparison out as a PDF: a working document, unsigned, saying so.

Page one gives the two surveys, the tier and level then and now, the building line (spots
compared, flagged, expected by chance, Šidák's bound), any reversal warning, member, capacity
and hazard changes and how to read it; the spot table comes last, one row per spot. Every page
carries the caution band and "UNSIGNED WORKING DOCUMENT" (`layout.page_canvas`).
"""

from __future__ import annotations

from typing import Any

from reportlab.lib.units import mm
from reportlab.platypus import Spacer, Table, TableStyle

from .compare_model import ALSO_INDICATIVE, CompareModel
from .layout import (
    CONTENT_W,
    Drawn,
    build,
    bullets,
    cells,
    grid,
    keep_tail,
    page_canvas,
    para,
    section,
)
from .style import ACCENT

SPOT_HEAD = ["storey", "dir", "where", "before", "after", "change", "2u", "z", "verdict",
             "notes"]


def _pairs(pairs: list[tuple[str, str]], label_w: float) -> Table:
    rows = [[para(k, "label"), para(v, "cell")] for k, v in pairs]
    return grid(rows, [label_w, CONTENT_W - label_w], header=False, zebra=False)


def _spot_table(m: CompareModel) -> Table:
    w = [12 * mm, 7 * mm, 24 * mm, 14 * mm, 14 * mm, 14 * mm, 12 * mm, 11 * mm, 34 * mm]
    w.append(CONTENT_W - sum(w))
    head = list(SPOT_HEAD)
    head[6] = m.bound_head
    rows = [cells(head, w)]
    rows += [cells([s.storey, s.dir, s.where, s.before, s.after, s.change, s.bound, s.z,
                    s.verdict, s.notes], w) for s in m.spots]
    return grid(rows, w, split_in_row=True)


def flowables(m: CompareModel) -> list[Any]:
    """Every flowable of the comparison, in order."""
    head: list[Any] = [
        para("Aftershock comparison · working document, unsigned", "kicker"),
        para(m.header[0][1], "title"),
        _pairs(m.header[1:], 28 * mm),
        Spacer(1, 6),
    ]
    result = Table([[para("Caution: " + m.caution, "caution")],
                    [para(ALSO_INDICATIVE, "strong")],
                    [para(m.state, "strong")]], colWidths=[CONTENT_W])
    result.setStyle(TableStyle([("LINEABOVE", (0, 0), (-1, 0), 1.6, ACCENT),
                                ("LINEBELOW", (0, -1), (-1, -1), 1.6, ACCENT),
                                ("LEFTPADDING", (0, 0), (-1, -1), 0)]))
    out: list[Any] = [*head, result]
    out += section("Then and now", [para(x) for x in m.summary])
    out += section("The building line", [
        _pairs(m.building_line, 62 * mm),
        para(m.beyond_chance, "strong"),
        *[para(w, "strong") for w in m.warnings]])
    if m.members:
        out += section("Member groups", bullets(m.members))
    if m.capacity:
        out += section("Residual seismic capacity", bullets(m.capacity))
    out += section("Hazards", bullets(m.hazards) if m.hazards else
                   [para("no hazard new or cleared")])
    out += section("How to read it", [para(x, "small") for x in m.how_to_read])
    title = f"Every spot ({len(m.spots)}; {m.flagged} beyond the uncertainty)"
    out += section(title, [_spot_table(m)] if m.spots else [para("no spot in either survey")])
    return keep_tail(out)


def render_comparison(m: CompareModel, trace: list[Drawn] | None = None) -> bytes:
    """The comparison PDF's bytes (reproducible: invariant mode, never signed)."""
    canvas = page_canvas(m.caution, m.state, m.footer)
    return build(flowables(m), canvas, trace=trace, title=m.title,
                 subject="triage aftershock comparison (unsigned working document)",
                 keywords="triage comparison; indicative only; unsigned")
