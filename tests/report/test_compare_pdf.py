"""`triage compare OLD NEW -o FILE.pdf`: the aftershock comparison as an unsigned working
document, checked by text extraction (what moved, by how much, beyond the uncertainty or not,
the building line, the reversal warning; caution and "unsigned" on every page)."""

from __future__ import annotations

import io
import itertools
import json
import os
import re
from pathlib import Path
from typing import Any

import pytest
from pypdf import PdfReader

from tests.helpers import flat, pdf_pages, reading, storey, survey_dict
from triage.assess import CAUTION, assess
from triage.assess.compare import compare, sidak_bound
from triage.model import parse_survey, parse_survey_text
from triage.report import render_comparison
from triage.report.compare_draw import render_comparison as draw
from triage.report.compare_model import build_compare_model
from triage.report.layout import BODY_H, FOOT_H, MARGIN, PAGE_H
from triage.resources import samples_dir

BUILDING = "5b0c8f0e-1d1e-4f2a-9a3b-7c6d5e4f3a21"
FLATS = [samples_dir() / "flats_mariner_court_1.json", samples_dir() / "flats_mariner_court_2.json"]


def two(old: list[dict[str, Any]], new: list[dict[str, Any]]):
    out = []
    for n, (at, st) in enumerate((("2026-11-28T10:00:00+13:00", old),
                                  ("2026-11-30T10:00:00+13:00", new))):
        d = survey_dict(st, id=f"0c3d2a1b-0000-4000-8000-00000000000{n + 1}",
                        inspection={"inspector": {"name": "Tess Tester"}, "at": at})
        d["building"]["id"] = BUILDING
        out.append(parse_survey(d))
    return out[0], out[1]


def _pdf(o, n) -> tuple[Any, bytes]:
    c = compare(o, assess(o), n, assess(n))
    return c, render_comparison(c, o, n)


def test_every_spot_with_its_change_and_verdict():
    # 6 -> 14 mm over 2000 mm, 1 mm each: +0.30% -> +0.70%, change +0.40%, 2u = 0.14%,
    # z = 0.004 / 0.000707 = +5.66; 2 -> 2.5 mm: change +0.03%, z = +0.35, within
    o, n = two([storey("G", [reading("x", 6.0, where="grid A"),
                             reading("y", 2.0, where="grid 1")])],
               [storey("G", [reading("x", 14.0, where="grid A"),
                             reading("y", 2.5, where="grid 1"),
                             reading("y", 1.0, where="grid 4")])])
    c, pdf = _pdf(o, n)
    text = " ".join(pdf_pages(pdf))
    assert "G x grid A +0.30% +0.70% +0.40% 0.14% +5.66 BEYOND the uncertainty" in text
    assert "G y grid 1 +0.10% +0.12% +0.03% 0.14% +0.35 within the uncertainty" in text
    assert "grid 4 — +0.05% — — — new spot: not measured before" in text
    # the building line: m = 2 compared, F = 1, 2 x 4.55% = 0.091 by chance, Sidak k_2 = 2.24
    assert c.building_line.compared == 2 and c.building_line.flagged == 1
    assert "spots compared 2" in text and "flagged beyond 2 standard uncertainties 1" in text
    assert "about 0.091 (4.55% of each unmoved spot)" in text
    assert f"Šidák bound at 95% for these spots {sidak_bound(2):.2f}" in text
    assert "MOVEMENT BEYOND CHANCE: the largest |z|, 5.66, is over 2.24" in text
    assert "Every spot (3; 1 beyond the uncertainty)" in text


def test_a_reversal_in_every_spot_warns():
    o, n = two([storey("G", [reading("x", 6.0, where="A"), reading("x", 4.0, where="B")])],
               [storey("G", [reading("x", -6.0, where="A"), reading("x", -4.0, where="B")])])
    _c, pdf = _pdf(o, n)
    text = " ".join(pdf_pages(pdf))
    assert "WARNING: every spot compared in x reversed its lean" in text
    assert text.count("the lean reversed") == 2


def test_no_movement_beyond_chance_is_said_too():
    o, n = two([storey("G", [reading("x", 6.0, where="A")])],
               [storey("G", [reading("x", 6.5, where="A")])])
    text = " ".join(pdf_pages(_pdf(o, n)[1]))
    assert "No movement beyond chance: the largest |z|, 0.35, is within 1.96" in text


@pytest.fixture(scope="module")
def flats() -> tuple[Any, Any, Any, list[str]]:
    o, n = (parse_survey_text(p.read_text(encoding="utf-8")) for p in FLATS)
    c = compare(o, assess(o), n, assess(n))
    return o, n, c, pdf_pages(render_comparison(c, o, n))


def test_caution_and_unsigned_working_document_on_every_page(flats):
    _o, _n, _c, text = flats
    assert len(text) >= 1
    for i, page in enumerate(text):
        assert "Caution Indicative only, not a safety certificate" in page, i
        assert "UNSIGNED WORKING DOCUMENT" in page and "not a signed report" in page, i
    assert "Caution: " + flat(CAUTION) in text[0]
    assert "SIGNED by" not in " ".join(text)


def test_the_flats_pair_reads_in_words(flats):
    o, n, c, text = flats
    allt = " ".join(text)
    assert not re.search(r"\d{4}-\d\d-\d\dT\d\d:\d\d", allt)           # no raw ISO time
    assert not re.search(r"\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b", allt)   # no internal key
    assert "inspected 28 November 2026, 14:20 UTC+13:00 by" in allt
    assert str(o.survey_id)[:8] in allt and str(n.survey_id)[:8] in allt
    assert "wall W5 (end wall, east end) worsened from class III to class V" in allt
    assert "new: falling hazard at block parapet" in allt
    for st in c.storeys:
        for sc in st.spots:
            if sc.status == "compared":
                assert f"{sc.z:+.2f}" in allt


def test_the_last_page_holds_a_third_of_a_page_and_headings_stay_with_their_text():
    # many spots: the table runs over pages; it must not end with a near-blank page
    rows = [reading("x", 2.0 + i * 0.1, where=f"spot {i}") for i in range(70)]
    rows2 = [reading("x", 2.0 + i * 0.13, where=f"spot {i}") for i in range(70)]
    o, n = two([storey("G", rows)], [storey("G", rows2)])
    c = compare(o, assess(o), n, assess(n))
    trace: list[Any] = []
    pdf = draw(build_compare_model(c, o, n), trace=trace)
    reader = PdfReader(io.BytesIO(pdf))
    assert len(reader.pages) >= 2
    ys: list[float] = []
    reader.pages[-1].extract_text(visitor_text=lambda t, cm, tm, f, s: ys.append(
        tm[4] * cm[1] + tm[5] * cm[3] + cm[5]) if t.strip() else None)
    lowest = min(y for y in ys if MARGIN + FOOT_H - 2 < y < PAGE_H - MARGIN - 40)
    assert (MARGIN + FOOT_H + BODY_H - lowest) / BODY_H >= 1 / 3
    shown = [t for t in trace if t[1] not in {"LCActionFlowable", "CondPageBreak", "_FrameBreak",
                                              "PageBreak", "Spacer"}]
    for here, after in itertools.pairwise(shown):
        if here[1] == "Paragraph:h2":
            assert after[0] == here[0], here


def test_no_word_is_printed_over_another(tmp_path: Path):
    from tests.report.test_layout import _word_boxes, pdftotext_or_skip

    pdftotext_or_skip()
    o, n = (parse_survey_text(p.read_text(encoding="utf-8")) for p in FLATS)
    pdf = tmp_path / "c.pdf"
    pdf.write_bytes(render_comparison(compare(o, assess(o), n, assess(n)), o, n))
    for k, words in enumerate(_word_boxes(pdf), 1):
        for i, a in enumerate(words):
            for b in words[i + 1:]:
                assert not (a[2] < b[3] - 1 and b[2] < a[3] - 1 and a[0] < b[1] - 0.5
                            and b[0] < a[1] - 0.5), f"page {k}: {a[4]!r} over {b[4]!r}"


def test_cli_writes_the_pdf(cli, tmp_path: Path):
    out = tmp_path / "cmp.pdf"
    code, said, err = cli("compare", str(FLATS[0]), str(FLATS[1]), "-o", str(out))
    assert code == 0, err
    assert said == ""   # the status line goes to standard error, as every command's does
    assert err.startswith(f"comparison written to {out} (") and "UNSIGNED working document" in err
    assert "13 spots compared, 3 beyond the uncertainty" in err and len(err.splitlines()) == 1
    text = " ".join(pdf_pages(out.read_bytes()))
    assert "MOVEMENT BEYOND CHANCE" in text
    # the same input, the same bytes (a working document is reproducible)
    again = tmp_path / "again.pdf"
    assert cli("compare", str(FLATS[0]), str(FLATS[1]), "-o", str(again))[0] == 0
    assert again.read_bytes() == out.read_bytes()


def test_cli_output_follows_the_write_rules(cli, tmp_path: Path):
    # a symlink is followed (the link stays a link), a folder is refused in one line
    target = tmp_path / "real.pdf"
    target.write_bytes(b"old")
    link = tmp_path / "link.pdf"
    link.symlink_to(target)
    assert cli("compare", str(FLATS[0]), str(FLATS[1]), "-o", str(link))[0] == 0
    assert link.is_symlink() and target.read_bytes().startswith(b"%PDF")
    code, _out, err = cli("compare", str(FLATS[0]), str(FLATS[1]), "-o", str(tmp_path))
    assert code == 1 and "is a folder" in err and len(err.strip().splitlines()) == 1
    # a FIFO is written in place, never replaced by a file
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    got: list[bytes] = []

    import threading

    def drain() -> None:
        with open(fifo, "rb") as f:
            got.append(f.read())

    t = threading.Thread(target=drain)
    t.start()
    assert cli("compare", str(FLATS[0]), str(FLATS[1]), "-o", str(fifo))[0] == 0
    t.join(30)
    assert got and got[0].startswith(b"%PDF")
    assert fifo.is_fifo()


def test_cli_refusals_are_one_line(cli, tmp_path: Path):
    code, _out, err = cli("compare", str(FLATS[0]), str(FLATS[1]), "--format", "json",
                          "-o", str(tmp_path / "x.pdf"))
    assert code == 1 and "not with -o" in err and not (tmp_path / "x.pdf").exists()
    copy = tmp_path / "old.json"
    copy.write_text(FLATS[0].read_text(encoding="utf-8"), encoding="utf-8")
    code, _out, err = cli("compare", str(copy), str(FLATS[1]), "-o", str(copy))
    assert code == 1 and "is the survey file" in err
    assert json.loads(copy.read_text(encoding="utf-8"))  # left as it was
    # without -o, text stays the default
    code, out, _err = cli("compare", str(FLATS[0]), str(FLATS[1]))
    assert code == 0 and out.startswith("CAUTION:")
