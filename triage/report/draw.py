"""Lay the report model out as a PDF with reportlab (platypus), in memory.

`render(model, files, signed)` returns the PDF bytes: the caution band, "page n of N" and the
survey's identification on every page, page one's recommendation, then storeys, drift chart,
members, hazards, repairability, notes, photos and the method page. Every piece of text goes
through `_p` / `esc`, so user text such as `<b>`, `&` or `</para>` prints as typed.
"""

from __future__ import annotations

import io
from typing import Any
from xml.sax.saxutils import escape

from reportlab.lib.pagesizes import A4
from reportlab.lib.units import mm
from reportlab.pdfgen.canvas import Canvas
from reportlab.platypus import (
    BaseDocTemplate,
    Frame,
    Image,
    KeepTogether,
    LayoutError,
    PageBreak,
    PageTemplate,
    Paragraph,
    Spacer,
    Table,
    TableStyle,
)

from .chart import DriftChart
from .fonts import register
from .model import ReportModel
from .pdfparts import add_to_document
from .style import ACCENT, ACCENT_TINT, ACCENT_WEAK, INK, MUTED, styles

PAGE_W, PAGE_H = A4
MARGIN = 16 * mm
BAND_H = 30.0
FOOT_H = 22.0
CONTENT_W = PAGE_W - 2 * MARGIN


def esc(text: str) -> str:
    """User or table text made safe for reportlab's paragraph markup; newlines kept."""
    return escape(text).replace("\n", "<br/>")


def _p(text: str, style: str = "body", markup: str | None = None) -> Paragraph:
    """A paragraph of literal text; `markup` (ours, trusted) wraps the escaped text."""
    body = esc(text)
    if markup:
        body = markup.replace("{}", body)
    return Paragraph(body, styles()[style])


def _grid(rows: list[list[Any]], widths: list[float], header: bool = True,
          zebra: bool = True) -> Table:
    # splitInRow: a row taller than a page (a 2,000-character "where") splits across pages.
    t = Table(rows, colWidths=widths, repeatRows=1 if header else 0, splitInRow=1)
    regular, bold = register()
    cmds: list[tuple[Any, ...]] = [
        ("FONTNAME", (0, 0), (-1, -1), regular),
        ("FONTSIZE", (0, 0), (-1, -1), 7.5),
        ("LEADING", (0, 0), (-1, -1), 9),
        ("TEXTCOLOR", (0, 0), (-1, -1), INK),
        ("VALIGN", (0, 0), (-1, -1), "TOP"),
        ("TOPPADDING", (0, 0), (-1, -1), 1.5),
        ("BOTTOMPADDING", (0, 0), (-1, -1), 1.5),
        ("LEFTPADDING", (0, 0), (-1, -1), 3),
        ("RIGHTPADDING", (0, 0), (-1, -1), 3),
        ("LINEBELOW", (0, -1), (-1, -1), 0.4, ACCENT_WEAK),
    ]
    if header:
        cmds += [("FONTNAME", (0, 0), (-1, 0), bold), ("TEXTCOLOR", (0, 0), (-1, 0), ACCENT),
                 ("LINEBELOW", (0, 0), (-1, 0), 0.8, ACCENT)]
    if zebra and len(rows) > 2:
        cmds.append(("ROWBACKGROUNDS", (0, 1), (-1, -1), [None, ACCENT_TINT]))
    t.setStyle(TableStyle(cmds))
    return t


def _cell(text: str, width: float) -> str:
    """Plain (unparsed, so literal) cell text broken into lines that fit `width` points.

    Much quicker than a Paragraph for the long tables of a tall building.
    """
    from reportlab.lib.utils import simpleSplit

    regular, _ = register()
    lines: list[str] = []
    for part in text.split("\n"):
        lines += simpleSplit(part, regular, 7.5, width - 6) or [""]
    return "\n".join(lines)


def _h2(text: str) -> Paragraph:
    return _p(text, "h2")


_CHUNK = 600   # characters per paragraph of a long text (see `_pieces`)


def _pieces(text: str) -> list[str]:
    """A long text cut at spaces into pieces of about `_CHUNK` characters.

    reportlab wraps a paragraph again from its start each time it splits it across a page, so
    one paragraph of 20,000 characters costs many times one of 600; pieces keep a report of
    texts at their length limits within its time (the text reads on as one).
    """
    if len(text) <= _CHUNK:
        return [text]
    out = []
    while len(text) > _CHUNK:
        cut = text.rfind(" ", _CHUNK // 2, _CHUNK)
        cut = _CHUNK if cut < 0 else cut + 1
        out.append(text[:cut])
        text = text[cut:]
    if text:
        out.append(text)
    return out


def _bullets(lines: list[str], style: str = "bullet") -> list[Paragraph]:
    out = []
    for x in lines:
        first, *rest = _pieces(x)
        out.append(Paragraph(esc(first), styles()[style], bulletText="–"))
        out += [Paragraph(esc(r), styles()[style]) for r in rest]
    return out


def _height(flowables: list[Any]) -> float:
    """The height a list of flowables takes in the body frame (spaces included)."""
    total = 0.0
    for f in flowables:
        _, h = f.wrap(CONTENT_W, PAGE_H)
        total += h + f.getSpaceBefore() + f.getSpaceAfter()
    return total


def _page_one(m: ReportModel, body_height: float) -> tuple[list[Any], list[Any]]:
    """Page one's flowables, and what did not fit on it (continued on page two).

    Everything but the reasons and keep-out lines is kept on page one; those fill the room
    left, so the signature and the engineer of record's block always end page one.
    """
    st = styles()
    head: list[Any] = [
        _p("Occupancy recommendation · indicative, for the engineer of record", "kicker"),
        _p(m.building[0][1], "title"),
    ]
    pairs = m.building[1:]
    kv = []
    for i in range(0, len(pairs), 2):
        row: list[Any] = []
        for k, v in pairs[i:i + 2]:
            row += [_p(k, "label"), _p(v, "cell")]
        kv.append(row + [""] * (4 - len(row)))
    lw = 22 * mm
    vw = CONTENT_W / 2 - lw
    head.append(_grid(kv, [lw, vw, lw, vw], header=False, zebra=False))
    head.append(Spacer(1, 6))

    # The result as three plain columns under an accent rule: words and mark, not a notice.
    result = Table([
        [_p("indicative tier", "label"), _p("structural performance level", "label"),
         _p("governed by", "label")],
        [_p(m.tier_words, "tier"), _p(m.level, "level"), _p(m.governing, "strong")],
        [_p(m.tier_line, "small"), "", ""],
        [_p("Caution: " + m.caution, "caution"), "", ""],
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
    head += [result, Spacer(1, 3), _p(m.provisional_text, "strong" if m.provisional else "body")]

    probs: list[Any] = [_h2(f"Tier probabilities ({m.probability_label})")]
    probs.append(Paragraph("   ·   ".join(f"{esc(t)}  <b>{esc(p)}</b>"
                                          for t, p in m.probabilities), st["body"]))
    probs.append(_p(m.borderline_text, "strong" if m.borderline else "body"))
    probs.append(_p("measure next: " + m.measure_next))
    signature: list[Any] = [_h2("Digital signature"),
                            _p(m.signer_text, "strong" if m.signer is None else "body")]
    if m.signer is not None:
        signature += [_p(f"signed at {m.signer.signed_at or 'an unrecorded time'}; covers "
                         f"{m.signer.covers}", "small")]
        if m.signer.not_inspector:
            signature += [_p(f"Note: the signer is not the inspector of this survey "
                             f"({m.signer.not_inspector}).", "strong")]
    block = Table([
        [_p("The binding decision, made under local codes and with the local building "
            "authority, is the engineer of record's. Sign by hand below.", "small"), ""],
        [_p("name", "label"), ""], [_p("registration", "label"), ""],
        [_p("decision and conditions", "label"), ""], ["", ""],
        [_p("signature", "label"), ""], [_p("date", "label"), ""],
    ], colWidths=[38 * mm, CONTENT_W - 38 * mm], rowHeights=[None, 16, 16, 16, 16, 20, 16])
    block.setStyle(TableStyle([
        ("SPAN", (0, 0), (-1, 0)),
        ("LINEBELOW", (1, 1), (1, -1), 0.5, MUTED),
        ("VALIGN", (0, 1), (-1, -1), "BOTTOM"),
        ("LEFTPADDING", (0, 0), (-1, -1), 0),
    ]))
    signature += [_h2("Engineer of record"), block]

    why_lines = m.reasons or ["no reason recorded"]
    keep_lines = m.keep_out or []
    keep_none = [] if keep_lines else [_p("no hazard with a height above ground was logged")]
    fixed = [*head, _h2("Why"), *probs, _h2("Keep-out distances"), *keep_none, *signature]
    room = body_height - _height(fixed) - 14
    fitted: dict[str, list[Any]] = {}
    left: list[Any] = []
    for title, lines in (("Why", why_lines), ("Keep-out distances", keep_lines)):
        paras = _bullets(lines)
        note = _p("(more on the next page)", "small")
        take: list[Any] = []
        for i, para in enumerate(paras):
            h = _height([para]) + (_height([note]) if i < len(paras) - 1 else 0.0)
            if h > room and (take or title != "Why"):
                break
            take.append(para)
            room -= _height([para])
        if len(take) < len(paras):
            rest = lines[len(take):]
            take.append(_p(f"({len(rest)} more on the next page)", "small"))
            room -= _height([take[-1]])
            room = min(room, 0.0)
            left += [_h2(f"{title} (continued)"), *_bullets(rest)]
        fitted[title] = take
    out = [*head, _h2("Why"), *fitted["Why"], *probs, _h2("Keep-out distances"),
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


def _readings(m: ReportModel) -> list[Any]:
    """Every spot's readings, one block of rows per storey and direction, top storey first."""
    out: list[Any] = [_h2("Readings (every spot, to recheck by hand)")]
    if not m.spot_tables:
        return [*out, _p("no reading was logged")]
    widths = [12 * mm, 8 * mm, 24 * mm, 60 * mm, 20 * mm, 28 * mm, CONTENT_W - 152 * mm]
    rows: list[list[Any]] = [READING_HEAD]
    starts: list[int] = []
    order = sorted(range(len(m.spot_tables)), key=lambda i: -i)
    # top storey first, as the storey table; x before y within a storey
    groups: list[Any] = []
    for i in order:
        t = m.spot_tables[i]
        if groups and groups[-1][0].storey == t.storey:
            groups[-1].insert(0, t)
        else:
            groups.append([t])
    for g in groups:
        for t in g:
            starts.append(len(rows))
            for k, r in enumerate(t.rows):
                rows.append([_cell(t.storey, widths[0]) if k == 0 else "",
                             t.dir if k == 0 else "", _cell(r.where, widths[2]),
                             _cell(r.readings, widths[3]), _cell(r.baseline, widths[4]),
                             r.value, _cell(r.repeats, widths[6])])
    t = _grid(rows, widths, zebra=False)
    t.setStyle(TableStyle([("LINEABOVE", (0, k), (-1, k), 0.4, ACCENT_WEAK)
                           for k in starts[1:]]))
    out.append(t)
    out.append(_p("drift ratio: the offset less its baseline over the gauge, or the tangent of "
                  "the tilt less its baseline, signed toward +x or +y; u: its standard "
                  "uncertainty, the baseline's included; repeats at one spot are averaged by "
                  "inverse variance (docs/method.md).", "small"))
    return out


def _rest(m: ReportModel, reasons_left: list[Any]) -> list[Any]:
    """Every page after the first: what page one could not hold, then the detail."""
    out: list[Any] = [PageBreak()]
    out += reasons_left
    out.append(_h2("Storeys (top to bottom)"))
    rows: list[list[Any]] = [["storey", "height m", "drift x", "drift y", "level x", "level y",
                              "R", "grade", "access"]]
    w = CONTENT_W / 9
    rows += [[_cell(s.label, w), s.height, s.drift_x, s.drift_y, s.level_x, s.level_y, s.r,
              s.grade, s.access] for s in reversed(m.storeys)]
    out.append(_grid(rows, [w] * 9))
    out.append(_p("drift: the largest absolute residual drift ratio read in the storey; level "
                  "by drift (FEMA 356 figures); R: residual seismic capacity ratio where a "
                  "published method covers the system; grade from R.", "small"))

    out += _readings(m)

    n = len(m.chart)
    chart_h = min(200 * mm, max(80 * mm, 34.0 * mm + n * 4.2 * mm))
    out.append(KeepTogether([_h2("Drift profile"),
                             DriftChart(m.chart, m.chart_figures, CONTENT_W, chart_h,
                                        *register())]))

    out.append(_h2("Member groups"))
    if m.members:
        widths = [14 * mm, 28 * mm, 15 * mm, 11 * mm, 10 * mm, 9 * mm, 40 * mm,
                  CONTENT_W - 127 * mm]
        rows = [["storey", "group", "kind", "count", "class", "eta", "class set", "seen"]]
        rows += [[_cell(r.storey, widths[0]), _cell(r.group, widths[1]), r.kind, r.count,
                  r.damage_class, r.eta, _cell(r.class_from, widths[6]),
                  _cell(r.seen, widths[7])] for r in m.members]
        out.append(_grid(rows, widths))
    else:
        out.append(_p("no member group was logged"))

    out.append(_h2("Hazards"))
    if m.hazards:
        rows = [["kind", "where", "storey", "effect", "height", "factor", "keep out", "note"]]
        rows += [[_p(h.kind, "cell"), _p(h.where, "cell"), _p(h.storey, "cell"),
                  _p(h.effect, "cell"), h.height, h.factor, h.keep_out, _p(h.note, "cell")]
                 for h in m.hazards]
        out.append(_grid(rows, [26 * mm, 30 * mm, 13 * mm, 24 * mm, 13 * mm, 11 * mm, 14 * mm,
                                CONTENT_W - 131 * mm]))
        out.append(_p("height: above ground; keep out = factor × height, the width kept clear "
                      "around the hazard.", "small"))
    else:
        out.append(_p("no hazard was logged"))

    out.append(_h2("Repairability (named alternatives)"))
    rows = [["alternative", "probability", "source"]]
    rows += [[_p(a, "cell"), p, _p(s, "cell")] for a, p, s in m.repairability]
    out.append(_grid(rows, [70 * mm, 20 * mm, CONTENT_W - 90 * mm]))
    out.append(_p(m.repairability_basis, "small"))

    if m.comparison is not None:
        out.append(_h2("Since the previous inspection"))
        out += _bullets(m.comparison) if m.comparison else [_p("nothing changed")]

    if m.storey_notes or m.notes or m.defaulted or m.long_texts:
        out.append(_h2("Notes"))
        out += _bullets([f"storey {lab}: {text}" for lab, text in m.storey_notes])
        out += _bullets([f"{what}, in full: {text}" for what, text in m.long_texts])
        out += _bullets(m.notes)
        if m.defaulted:
            out.append(_p("uncertainties taken from instrument defaults:", "small"))
            out += _bullets(m.defaulted, "small")

    if m.photos:
        out.append(_h2("Photos"))
        cells: list[Any] = []
        missing: list[str] = []
        for ph in m.photos:
            img = _thumb(ph.data) if ph.data is not None else None
            if img is None:
                why = "not found" if ph.data is None else "could not be read"
                missing.append(f"{ph.belongs_to}: {ph.path} ({why})"
                               + (f", {ph.caption}" if ph.caption else ""))
                continue
            cells.append([img, _p(f"{ph.belongs_to}: {ph.caption or ph.path}", "small")])
        if cells:
            grid_rows = [cells[i:i + 3] for i in range(0, len(cells), 3)]
            grid_rows[-1] += [""] * (3 - len(grid_rows[-1]))
            t = Table(grid_rows, colWidths=[CONTENT_W / 3] * 3)
            t.setStyle(TableStyle([("VALIGN", (0, 0), (-1, -1), "TOP")]))
            out.append(t)
        if missing:
            out.append(_p("photos named in the survey but not included:", "small"))
            out += _bullets(missing, "small")

    out += [PageBreak(), _h2("Method")]
    out += [_p(t) for t in m.method_text]
    out.append(_h2("Tables used"))
    rows = [["what", "source", "status", "note"]]
    rows += [[_p(r.what, "cell"), _p(r.source, "cell"), r.status, _p(r.note, "cell")]
             for r in m.method]
    out.append(_grid(rows, [46 * mm, 50 * mm, 16 * mm, CONTENT_W - 112 * mm]))
    out.append(_h2("Assumptions applied (values used by this assessment)"))
    rows = [["assumption", "value", "status", "why"]]
    rows += [[_p(a.key, "cell"), _p(a.value, "cell"), a.status, _p(a.why, "cell")]
             for a in m.assumptions]
    out.append(_grid(rows, [38 * mm, 38 * mm, 20 * mm, CONTENT_W - 96 * mm]))
    out.append(Spacer(1, 6))
    out.append(_p(f"Made by {m.engine}. The survey and the assessment travel inside this PDF as "
                  "embedded files (survey.json, assessment.json).", "small"))
    return out


def _canvas_class(m: ReportModel, files: list[tuple[str, bytes, str]], signed: bool) -> type:
    regular, bold = register()

    class ReportCanvas(Canvas):
        """Holds pages back until the end, to print 'page n of N' and the band on each."""

        def __init__(self, *args: Any, **kw: Any) -> None:
            super().__init__(*args, **kw)
            self._pages: list[dict[str, Any]] = []

        def showPage(self) -> None:
            self._pages.append(dict(self.__dict__))
            self._startPage()

        def save(self) -> None:
            total = len(self._pages)
            for i, state in enumerate(self._pages):
                self.__dict__.update(state)
                self._furniture(i + 1, total)
                Canvas.showPage(self)
            add_to_document(self._doc, files, signed)
            Canvas.save(self)

        def _furniture(self, page: int, total: int) -> None:
            self.saveState()
            top = PAGE_H - MARGIN + 8
            self.setFillColor(ACCENT_TINT)
            self.setStrokeColor(ACCENT)
            self.rect(MARGIN, top - BAND_H, CONTENT_W, BAND_H, stroke=0, fill=1)
            self.setLineWidth(2)
            self.line(MARGIN, top - BAND_H, MARGIN, top)
            self.setFillColor(ACCENT)
            self.setFont(bold, 8.5)
            self.drawString(MARGIN + 7, top - 11, "Caution")
            self.setFont(bold, 8.5)
            self.setFillColor(INK)
            words = m.caution.split()
            line, lines = "", []
            for wd in words:
                trial = (line + " " + wd).strip()
                if self.stringWidth(trial, bold, 8.5) > CONTENT_W - 60:
                    lines.append(line)
                    line = wd
                else:
                    line = trial
            lines.append(line)
            for k, text in enumerate(lines[:2]):
                self.drawString(MARGIN + 50, top - 11 - 10 * k, text)
            self.setFont(regular, 6.5)
            self.setFillColor(MUTED)
            self.setStrokeColor(ACCENT_WEAK)
            self.setLineWidth(0.4)
            self.line(MARGIN, MARGIN + 10, PAGE_W - MARGIN, MARGIN + 10)
            self.drawString(MARGIN, MARGIN + 2, m.footer)
            self.setFont(bold, 8)
            self.setFillColor(INK)
            self.drawString(MARGIN, MARGIN + 13, m.state)
            self.setFont(bold, 7)
            self.setFillColor(INK)
            self.drawRightString(PAGE_W - MARGIN, MARGIN + 2, f"page {page} of {total}")
            self.restoreState()

    return ReportCanvas


def render(m: ReportModel, files: list[tuple[str, bytes, str]], signed: bool) -> bytes:
    """The PDF bytes of the report, byte-reproducible for the same input (invariant mode)."""
    register()
    buf = io.BytesIO()
    doc = BaseDocTemplate(
        buf, pagesize=A4, leftMargin=MARGIN, rightMargin=MARGIN,
        topMargin=MARGIN + BAND_H + 4, bottomMargin=MARGIN + FOOT_H, invariant=1,
        title=m.title, author=m.inspector,
        subject=f"triage report of survey {m.survey_id}", creator="triage",
        keywords="triage report; indicative only")
    frame = Frame(doc.leftMargin, doc.bottomMargin, doc.width, doc.height, id="body",
                  leftPadding=0, rightPadding=0, topPadding=0, bottomPadding=0)
    doc.addPageTemplates([PageTemplate(id="page", frames=[frame])])
    first, reasons_left = _page_one(m, doc.height)
    try:
        doc.build(first + _rest(m, reasons_left), canvasmaker=_canvas_class(m, files, signed))
    except LayoutError as err:  # an entry that no page can hold: one line, not a traceback
        raise ValueError("the report cannot be laid out: an entry is too large for a page "
                         f"({str(err).splitlines()[0][:120]})") from None
    return buf.getvalue()
