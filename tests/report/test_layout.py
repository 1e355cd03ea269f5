"""The report's layout rules, each checked on the drawn pages (`render(..., trace=...)` says
what was drawn on which page) or on the PDF's text, over a sweep of surveys whose page breaks
fall in different places."""

from __future__ import annotations

import io
import itertools
import re
import subprocess
from pathlib import Path
from typing import Any
from xml.etree import ElementTree

import pytest
from pypdf import PdfReader

from tests.helpers import program
from tests.report.conftest import clinic_dict
from triage.assess import assess
from triage.model import parse_survey, parse_survey_text
from triage.report import render_report
from triage.report.draw import _page_one, _rest, render
from triage.report.layout import BODY_H, CONTENT_W, FOOT_H, MARGIN, PAD, PAGE_H, SMALL_TABLE
from triage.report.model import build_report_model
from triage.resources import samples_dir

SAMPLES = sorted(samples_dir().glob("*.json"))
NOTE = "the north bay ceiling tiles are down along the corridor, stair open"
# flowables that draw nothing a reader sees
QUIET = {"LCActionFlowable", "CondPageBreak", "_FrameBreak", "PageBreak", "Spacer",
         "NullActionFlowable"}


def _surveys() -> list[tuple[str, Any]]:
    out = [(p.stem, parse_survey_text(p.read_text(encoding="utf-8"))) for p in SAMPLES]
    for k in range(0, 26, 2):  # notes of 0..24 lines move every later page break
        d = clinic_dict()
        d["storeys"][0]["notes"] = " ".join(f"({i}) {NOTE}." for i in range(k)) or None
        if k % 4 == 2:
            d["storeys"][1]["notes"] = f"{NOTE}; " * (k // 2)
        out.append((f"clinic+{k}", parse_survey(d)))
    return out


SURVEYS = _surveys()


@pytest.fixture(scope="module", params=SURVEYS, ids=[n for n, _ in SURVEYS])
def drawn(request):
    """(survey, PDF bytes, trace of what was drawn on which page)."""
    _name, s = request.param
    trace: list[Any] = []
    m = build_report_model(s, assess(s))
    return s, render(m, [], False, trace=trace), trace


def _seen(trace):
    return [t for t in trace if t[1] not in QUIET]


def test_a_heading_is_never_the_last_thing_on_a_page(drawn):
    _s, _pdf, trace = drawn
    seen = _seen(trace)
    for here, after in itertools.pairwise(seen):
        if here[1] == "Paragraph:h2":
            assert after[0] == here[0], f"heading {here[2]!r} ends page {here[0]}"
    assert seen[-1][1] != "Paragraph:h2"


def test_a_small_table_is_never_split(drawn):
    _s, _pdf, trace = drawn
    tables = [t for t in _seen(trace) if t[1].startswith("Table:")]
    for a, b in itertools.pairwise(tables):
        if a[2] == b[2] and b[0] == a[0] + 1:  # the same header again on the next page: a split
            rows = int(a[1].split(":")[1]) + int(b[1].split(":")[1]) - 1
            assert rows > SMALL_TABLE, f"a table of {rows} rows split over pages {a[0]}-{b[0]}"


def _lowest_text(page) -> float:
    """The lowest baseline of body text on a page (the footer and band left out)."""
    ys: list[float] = []

    def visit(text, cm, tm, _font, _size):
        if text.strip():
            ys.append(tm[4] * cm[1] + tm[5] * cm[3] + cm[5])

    page.extract_text(visitor_text=visit)
    body = [y for y in ys if MARGIN + FOOT_H - 2 < y < PAGE_H - MARGIN - 40]
    return min(body)


def test_the_last_page_holds_at_least_a_third_of_a_page(drawn):
    _s, pdf, _trace = drawn
    pages = PdfReader(io.BytesIO(pdf)).pages
    assert len(pages) > 1
    top = MARGIN + FOOT_H + BODY_H
    filled = (top - _lowest_text(pages[-1])) / BODY_H
    assert filled >= 1 / 3, f"the last page is {filled:.0%} full"


def test_every_table_cell_fits_its_column(drawn):
    # a cell wider than its column runs into the next one ("common practice" over "why")
    from reportlab.pdfbase.pdfmetrics import stringWidth
    from reportlab.platypus import KeepTogether, Table

    from triage.report.fonts import register

    s, _pdf, _trace = drawn
    m = build_report_model(s, assess(s))
    first, left = _page_one(m, BODY_H)
    regular, _ = register()

    def tables(items):
        for f in items:
            if isinstance(f, Table):
                yield f
            elif isinstance(f, KeepTogether):
                yield from tables(f._content)

    checked = 0
    for t in tables(first + _rest(m, left)):
        assert sum(t._colWidths) <= CONTENT_W + 0.01
        for row in t._cellvalues:
            for text, width in zip(row, t._colWidths, strict=True):
                if isinstance(text, str):
                    for line in text.split("\n"):
                        assert stringWidth(line, regular, 7.5) <= width - 2 * PAD + 0.01, line
                        checked += 1
    assert checked > 50


def _word_boxes(pdf: Path) -> list[list[tuple[float, float, float, float, str]]]:
    out = subprocess.run(["pdftotext", "-bbox", str(pdf), "-"], capture_output=True, text=True,
                         check=True).stdout
    root = ElementTree.fromstring(re.sub(r"<!DOCTYPE[^>]*>", "", out))
    x = "{http://www.w3.org/1999/xhtml}"
    return [[(float(w.get("xMin")), float(w.get("xMax")), float(w.get("yMin")),
              float(w.get("yMax")), w.text or "") for w in page.iter(x + "word")]
            for page in root.iter(x + "page")]


def pdftotext_or_skip() -> None:
    """pdftotext is needed: a failure under CI, else a skip."""
    program("pdftotext", "poppler-utils")


@pytest.mark.parametrize("path", SAMPLES, ids=[p.stem for p in SAMPLES])
def test_no_word_is_printed_over_another(path: Path, tmp_path: Path):
    """pdftotext's word boxes: no two words of a page overlap (the method page's "common
    practice" column once ran over the next)."""
    pdftotext_or_skip()
    s = parse_survey_text(path.read_text(encoding="utf-8"))
    pdf = tmp_path / "r.pdf"
    pdf.write_bytes(render_report(s, assess(s), photo_dir=path.parent))
    for n, words in enumerate(_word_boxes(pdf), 1):
        for i, a in enumerate(words):
            for b in words[i + 1:]:
                assert not (a[2] < b[3] - 1 and b[2] < a[3] - 1 and a[0] < b[1] - 0.5
                            and b[0] < a[1] - 0.5), f"page {n}: {a[4]!r} over {b[4]!r}"
