"""Lay the report model out as a PDF with reportlab (platypus), in memory.

`render(model, files, signed)` returns the PDF bytes: the caution band, "page n of N" and the
survey's identification on every page, page one's recommendation, then storeys, drift chart,
members, hazards, repairability, notes, photos and the method page. Every piece of text goes
through `para` / `esc` (`layout.py`), so user text such as `<b>`, `&` or `</para>` prints as typed.
"""

from __future__ import annotations

import io
from typing import Any

from reportlab.lib.units import mm
from reportlab.platypus import (
    CondPageBreak,
    Image,
    KeepTogether,
    PageBreak,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from .chart import DriftChart
from .fonts import register
from .layout import (
    BODY_H,
    CONTENT_W,
    Drawn,
    build,
    bullets,
    cells,
    esc,
    grid,
    h2,
    height,
    keep_tail,
    page_canvas,
    para,
    section,
)
from .model import ReportModel
from .pdfparts import add_to_document
from .style import ACCENT, ACCENT_WEAK, MUTED, styles


def _page_one(m: ReportModel, body_height: float) -> tuple[list[Any], list[Any]]:
    """Page one's flowables, and what did not fit on it (continued on page two).

    Everything but the reasons and keep-out lines is kept on page one; those fill the room
    left, so the signature and the engineer of record's block always end page one.
    """
    st = styles()
    head: list[Any] = [
        para("Occupancy recommendation · indicative, for the engineer of record", "kicker"),
        para(m.building[0][1], "title"),
    ]
    pairs = m.building[1:]
    kv = []
    for i in range(0, len(pairs), 2):
        row: list[Any] = []
        for k, v in pairs[i:i + 2]:
            row += [para(k, "label"), para(v, "cell")]
        kv.append(row + [""] * (4 - len(row)))
    lw = 22 * mm
    vw = CONTENT_W / 2 - lw
    head.append(grid(kv, [lw, vw, lw, vw], header=False, zebra=False))
    head.append(Spacer(1, 6))

    # The result as three plain columns under an accent rule: words and mark, not a notice.
    result = Table([
        [para("indicative tier", "label"), para("structural performance level", "label"),
         para("governed by", "label")],
        [para(m.tier_words, "tier"), para(m.level, "level"), para(m.governing, "strong")],
        [para(m.tier_line, "small"), "", ""],
        [para("Caution: " + m.caution, "caution"), "", ""],
    ], colWidths=[66 * mm, 46 * mm, CONTENT_W - 112 * mm])
    result.setStyle(TableStyle([
        ("LINEABOVE", (0, 0), (-1, 0), 1.6, ACCENT),
        ("VALIGN", (0, 0), (-1, -1), "BOTTOM"),
        ("LEFTPADDING", (0, 0), (-1, -1), 0),
        ("TOPPADDING", (0, 0), (-1, 0), 5),
        ("SPAN", (0, 2), (-1, 2)),
        ("SPAN", (0, 3), (-1, 3)),
        ("TOPPADDING", (0, 3), (-1, 3), 4),
        ("LINEBELOW", (0, 3), (-1, 3), 1.6, ACCENT),
    ]))
    head += [result, Spacer(1, 3), para(m.provisional_text, "strong" if m.provisional else "body")]

    probs: list[Any] = [h2(f"Tier probabilities ({m.probability_label})")]
    probs.append(Paragraph("   ·   ".join(f"{esc(t)}  <b>{esc(p)}</b>"
                                          for t, p in m.probabilities), st["body"]))
    probs.append(para(m.borderline_text, "strong" if m.borderline else "body"))
    probs.append(para("measure next: " + m.measure_next))
    signature: list[Any] = [h2("Digital signature"),
                            para(m.signer_text, "strong" if m.signer is None else "body")]
    if m.signer is not None:
        signature += [para(f"signed at {m.signer.signed_at or 'an unrecorded time'}; covers "
                         f"{m.signer.covers}", "small")]
        if m.signer.not_inspector:
            signature += [para(f"Note: the signer is not the inspector of this survey "
                             f"({m.signer.not_inspector}).", "strong")]
    block = Table([
        [para("The binding decision, made under local codes and with the local building "
            "authority, is the engineer of record's. Sign by hand below.", "small"), ""],
        [para("name", "label"), ""], [para("registration", "label"), ""],
        [para("decision and conditions", "label"), ""], ["", ""],
        [para("signature", "label"), ""], [para("date", "label"), ""],
    ], colWidths=[38 * mm, CONTENT_W - 38 * mm], rowHeights=[None, 16, 16, 16, 16, 20, 16])
    block.setStyle(TableStyle([
        ("SPAN", (0, 0), (-1, 0)),
        ("LINEBELOW", (1, 1), (1, -1), 0.5, MUTED),
        ("VALIGN", (0, 1), (-1, -1), "BOTTOM"),
        ("LEFTPADDING", (0, 0), (-1, -1), 0),
    ]))
    signature += [h2("Engineer of record"), block]

    why_lines = m.reasons or ["no reason recorded"]
    keep_lines = m.keep_out or []
    keep_none = [] if keep_lines else [para("no hazard with a height above ground was logged")]
    fixed = [*head, h2("Why"), *probs, h2("Keep-out distances"), *keep_none, *signature]
    room = body_height - height(fixed) - 14
    fitted: dict[str, list[Any]] = {}
    left: list[Any] = []
    for title, lines in (("Why", why_lines), ("Keep-out distances", keep_lines)):
        paras = bullets(lines)
        note = para("(more on the next page)", "small")
        take: list[Any] = []
        for i, one in enumerate(paras):
            h = height([one]) + (height([note]) if i < len(paras) - 1 else 0.0)
            if h > room and (take or title != "Why"):
                break
            take.append(one)
            room -= height([one])
        if len(take) < len(paras):
            rest = lines[len(take):]
            take.append(para(f"({len(rest)} more on the next page)", "small"))
            room -= height([take[-1]])
            room = min(room, 0.0)
            left += [h2(f"{title} (continued)"), *bullets(rest)]
        fitted[title] = take
    out = [*head, h2("Why"), *fitted["Why"], *probs, h2("Keep-out distances"),
           *(fitted["Keep-out distances"] or keep_none), *signature]
    return out, left


def _thumb(data: bytes) -> Image | None:
    """A small JPEG of checked photo bytes (`triage.photos.thumbnail_jpeg`), or None."""
    from triage.photos import thumbnail_jpeg

    got = thumbnail_jpeg(data)
    if got is None:
        return None
    jpeg, w, h = got
    box = 52 * mm
    scale = min(box / w, box / h)
    return Image(io.BytesIO(jpeg), width=w * scale, height=h * scale)


READING_HEAD = ["storey", "dir", "where", "readings as taken", "baseline",
                "drift ratio ± u", "repeats"]


def table(head: list[str], rows: list[list[str]], widths: list[float], **kw: Any) -> Table:
    """A table of plain cells (header included), each wrapped to its column's width."""
    return grid([cells(head, widths), *(cells(r, widths) for r in rows)], widths, **kw)


def widths_mm(*given: float) -> list[float]:
    """Column widths: the given ones in mm, the last column taking what is left."""
    w = [g * mm for g in given]
    return [*w, CONTENT_W - sum(w)]


def _readings(m: ReportModel) -> list[Any]:
    """Every spot's readings, one block of rows per storey and direction, top storey first."""
    title = "Readings (every spot, to recheck by hand)"
    if not m.spot_tables:
        return section(title, [para("no reading was logged")])
    widths = widths_mm(12, 7, 24, 64, 20, 30)
    rows: list[list[Any]] = [cells(READING_HEAD, widths)]
    starts: list[int] = []
    # top storey first, as the storey table; x before y within a storey
    groups: list[Any] = []
    for i in range(len(m.spot_tables) - 1, -1, -1):
        t = m.spot_tables[i]
        if groups and groups[-1][0].storey == t.storey:
            groups[-1].insert(0, t)
        else:
            groups.append([t])
    for g in groups:
        for t in g:
            starts.append(len(rows))
            for k, r in enumerate(t.rows):
                rows.append(cells([t.storey if k == 0 else "", t.dir if k == 0 else "",
                                   r.where, r.readings, r.baseline, r.value, r.repeats],
                                  widths))
    tab = grid(rows, widths, zebra=False, split_in_row=True)
    tab.setStyle(TableStyle([("LINEABOVE", (0, k), (-1, k), 0.4, ACCENT_WEAK)
                             for k in starts[1:]]))
    return section(title, [tab, para(
        "drift ratio: the offset less its baseline over the gauge, or the tangent of the tilt "
        "less its baseline, signed toward +x or +y; u: its standard uncertainty, the "
        "baseline's included; repeats at one spot are averaged by inverse variance "
        "(docs/method.md).", "small")])


def _storeys(m: ReportModel) -> list[Any]:
    w = [CONTENT_W / 9] * 9
    tab = table(["storey", "height m", "drift x", "drift y", "level x", "level y", "capacity",
                 "grade", "access"],
                [[s.label, s.height, s.drift_x, s.drift_y, s.level_x, s.level_y, s.capacity,
                  s.grade, s.access] for s in reversed(m.storeys)], w)
    return section("Storeys (top to bottom)", [tab, para(
        "drift: the largest absolute residual drift ratio read in the storey; level by drift "
        f"(FEMA 356 figures); {m.capacity_caption}.", "small")])


def _members(m: ReportModel) -> list[Any]:
    if not m.members:
        return section("Member groups", [para("no member group was logged")])
    widths = widths_mm(14, 28, 15, 11, 10, 9, 40)
    rows = [[r.storey, r.group, r.kind, r.count, r.damage_class, r.eta, r.class_from, r.seen]
            for r in m.members]
    return section("Member groups", [table(["storey", "group", "kind", "count", "class", "eta",
                                            "class set", "seen"], rows, widths)])


def _hazards(m: ReportModel) -> list[Any]:
    if not m.hazards:
        return section("Hazards", [para("no hazard was logged")])
    rows = [[h.kind, h.where, h.storey, h.effect, h.height, h.factor, h.keep_out, h.note]
            for h in m.hazards]
    return section("Hazards", [
        table(["kind", "where", "storey", "effect", "height", "factor", "keep out", "note"],
              rows, widths_mm(26, 30, 13, 24, 13, 11, 14)),
        para("height: above ground; keep out = factor × height, the width kept clear around "
             "the hazard.", "small")])


def _notes(m: ReportModel) -> list[Any]:
    if not (m.storey_notes or m.notes or m.defaulted or m.long_texts):
        return []
    body = bullets([f"storey {lab}: {text}" for lab, text in m.storey_notes])
    body += bullets([f"{what}, in full: {text}" for what, text in m.long_texts])
    body += bullets(m.notes)
    if m.defaulted:
        body.append(para("uncertainties taken from instrument defaults:", "small"))
        body += bullets(m.defaulted, "small")
    return section("Notes", body)


def _photos(m: ReportModel) -> list[Any]:
    if not m.photos:
        return []
    body: list[Any] = []
    found: list[Any] = []
    missing: list[str] = []
    for ph in m.photos:
        img = _thumb(ph.data) if ph.data is not None else None
        if img is None:
            why = "not found" if ph.data is None else "could not be read"
            missing.append(f"{ph.belongs_to}: {ph.path} ({why})"
                           + (f", {ph.caption}" if ph.caption else ""))
            continue
        found.append([img, para(f"{ph.belongs_to}: {ph.caption or ph.path}", "small")])
    if found:
        grid_rows = [found[i:i + 3] for i in range(0, len(found), 3)]
        grid_rows[-1] += [""] * (3 - len(grid_rows[-1]))
        t = Table(grid_rows, colWidths=[CONTENT_W / 3] * 3)
        t.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP")]))
        body.append(t)
    if missing:
        body.append(para("photos named in the survey but not included:", "small"))
        body += bullets(missing, "small")
    return section("Photos", body)


def _method(m: ReportModel) -> list[Any]:
    """The method page: text, the tables used, the figures, the words, the assumptions.

    It ends with the assumptions table, whose last rows `keep_tail` keeps together, so the
    report never ends on a near-blank page.
    """
    # a page of its own unless the page before has half of it free (no near-blank page)
    out: list[Any] = [CondPageBreak(BODY_H / 2), h2("Method"),
                      *(para(t) for t in m.method_text)]
    if m.method:
        out += section("Tables used", [table(
            ["what", "source", "status", "note"],
            [[r.what, r.source, r.status, r.note] for r in m.method],
            widths_mm(46, 50, 18))])
    if m.figures:
        out += section("FEMA 356 Table C1-3 figures used for this building", [table(
            ["directions", "system", "IO", "LS", "CP", "how used"],
            [[f.dirs, f.system, f.io, f.ls, f.cp, f.note] for f in m.figures],
            widths_mm(18, 36, 24, 14, 14)),
            para("residual (permanent) drift ratios bounding each structural performance "
                 "level, as this assessment compared them.", "small")])
    out += section("Status words", [table(
        ["word", "meaning"], [[w, d] for w, d in m.status_words], widths_mm(26))])
    out += section("Assumptions applied (values used by this assessment)", [table(
        ["assumption", "value", "status", "why"],
        [[a.key, a.value, a.status, a.why] for a in m.assumptions],
        widths_mm(38, 40, 26))])
    return keep_tail(out)


def _rest(m: ReportModel, reasons_left: list[Any]) -> list[Any]:
    """Every page after the first: what page one could not hold, then the detail."""
    out: list[Any] = [PageBreak(), *reasons_left]
    out += _storeys(m)
    out += _readings(m)
    n = len(m.chart)
    chart_h = min(200 * mm, max(80 * mm, 34.0 * mm + n * 4.2 * mm))
    out.append(KeepTogether([h2("Drift profile"),
                             DriftChart(m.chart, m.chart_figures, CONTENT_W, chart_h,
                                        *register())]))
    out += _members(m)
    out += _hazards(m)
    repair = table(["alternative", "probability", "source"],
                   [list(r) for r in m.repairability], widths_mm(70, 20))
    out += section("Repairability (named alternatives)",
                   [repair, para(m.repairability_basis, "small")])
    if m.comparison is not None:
        out += section("Since the previous inspection",
                       bullets(m.comparison) if m.comparison else [para("nothing changed")])
    out += _notes(m)
    out += _photos(m)
    return out + _method(m)


def render(m: ReportModel, files: list[tuple[str, bytes, str]], signed: bool,
           trace: list[Drawn] | None = None) -> bytes:
    """The PDF bytes of the report, byte-reproducible for the same input (invariant mode).

    `trace` receives what was drawn where (`layout.build`), for the layout tests.
    """
    register()
    first, reasons_left = _page_one(m, BODY_H)
    canvas = page_canvas(m.caution, m.state, m.footer,
                         lambda doc: add_to_document(doc, files, signed))
    return build(first + _rest(m, reasons_left), canvas, title=m.title, author=m.inspector,
                 subject=f"triage report of survey {m.survey_id}",
                 keywords="triage report; indicative only", trace=trace)
