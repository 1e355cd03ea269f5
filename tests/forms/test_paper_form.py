"""The paper fallback: `triage form SYSTEM -o FILE.pdf`, a blank storey-grid form per system."""

from __future__ import annotations

import re
from pathlib import Path

import pytest
from pypdf import PdfReader

from tests.wording import BORROWED
from triage import standards
from triage.assess import CAUTION
from triage.cli import main
from triage.forms import load_form, load_forms
from triage.report import paper_form
from triage.report.paper_form import write_paper_form
from triage.standards.vocabulary import many, words


def _pages(path: Path) -> list[str]:
    return [re.sub(r"\s+", " ", p.extract_text() or "") for p in PdfReader(path).pages]


@pytest.fixture(scope="module")
def printed(tmp_path_factory: pytest.TempPathFactory) -> dict[str, tuple[int, list[str]]]:
    folder = tmp_path_factory.mktemp("paper")
    out = {}
    for key, form in load_forms().items():
        path = folder / f"{key}.pdf"
        n = write_paper_form(form, path, storeys=2)
        out[key] = (n, _pages(path))
    return out


def test_every_page_carries_the_caution_band(printed: dict[str, tuple[int, list[str]]]) -> None:
    for key, (n, pages) in printed.items():
        assert len(pages) == n, key
        for i, text in enumerate(pages, start=1):
            assert CAUTION in text, (key, i)
            assert f"page {i} of {n}" in text, (key, i)


def test_form_holds_building_storey_bands_hazards_and_signature(
        printed: dict[str, tuple[int, list[str]]]) -> None:
    hazards = standards.load().hazards
    for key, (_, pages) in printed.items():
        form = load_form(key)
        whole = " ".join(pages)
        assert "Building" in pages[0] and "Inspection" in pages[0]
        assert "Storey band 1" in whole and "Storey band 2" in whole
        assert "Storey band 3" not in whole
        for label in ("offset (mm)", "gauge (mm)", "uncertainty (mm)", "tilt (°)", "where",
                      "all entered", "partly entered", "not entered", "height (m)"):
            assert label in whole, (key, label)
        for kind in form.member_kinds:
            assert many("member_kinds", kind).capitalize() in whole, (key, kind)
            for sign, _ in form.signs_for(kind):
                assert words("signs", sign) in whole, (key, sign)
        for hk in hazards:
            assert words("hazards", hk) + ":" in whole, (key, hk)
        assert "inspector's signature" in whole
        for c, text in form.class_text.items():
            assert f"{c}: {text[:30]}" in whole, (key, c)


def test_there_is_no_result_box(printed: dict[str, tuple[int, list[str]]]) -> None:
    banned = ("occupy", "evacuate", "○", "◐", "●", "tag", "result", *BORROWED)
    for key, (_, pages) in printed.items():
        whole = " ".join(pages).lower()
        found = [w for w in banned if w in whole]
        assert not found, (key, found)
        assert "no tier is worked out on paper" in whole


def test_one_page_per_storey_band_and_reproducible_bytes(tmp_path: Path) -> None:
    form = load_form("rc_frame")
    a, b, c = tmp_path / "a.pdf", tmp_path / "b.pdf", tmp_path / "c.pdf"
    n1 = write_paper_form(form, a, storeys=1)
    n5 = write_paper_form(form, b, storeys=5)
    per_band = len([p for p in _pages(a) if "storey band 1 of 1" in p])
    assert per_band >= 2   # readings on one sheet, member grids on the next
    assert n5 - n1 == 4 * per_band
    write_paper_form(form, c, storeys=1)
    assert a.read_bytes() == c.read_bytes()
    with pytest.raises(ValueError, match=r"storeys: 0 is outside 1\.\.20"):
        write_paper_form(form, a, storeys=0)


def test_falls_back_to_helvetica_without_the_shipped_font(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    monkeypatch.setattr(paper_form, "REGULAR_TTF", tmp_path / "missing.ttf")
    assert paper_form.fonts() == ("Helvetica", "Helvetica-Bold")
    out = tmp_path / "f.pdf"
    write_paper_form(load_form("wood_stud_wall"), out, storeys=1)
    raw = out.read_bytes()
    assert b"Helvetica" in raw and b"DejaVu" not in raw
    pages = _pages(out)
    assert all(CAUTION in p for p in pages)
    whole = " ".join(pages)
    assert "class set by hand (I–V)" in whole and "tilt (°)" in whole   # Windows-1252 glyphs
    whole.encode("cp1252")   # nothing Helvetica cannot show


def test_uses_the_shipped_font_when_present(tmp_path: Path) -> None:
    if not paper_form.REGULAR_TTF.is_file():
        pytest.fail("triage/report/fonts/DejaVuSans.ttf is shipped with the package")
    out = tmp_path / "f.pdf"
    write_paper_form(load_form("urm_wall"), out, storeys=1)
    assert b"DejaVuSans" in out.read_bytes()


def test_cli_writes_the_form(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "rc.pdf"
    assert main(["form", "steel_braced_frame", "-o", str(out), "--storeys", "4"]) == 0
    assert out.read_bytes().startswith(b"%PDF")
    assert "Storey band 4" in " ".join(_pages(out))
    said = capsys.readouterr()
    assert said.out == ""   # a status line, not data
    assert "for braced steel frame (steel_braced_frame), 4 storey bands" in said.err


def test_cli_writes_a_form_for_two_systems(tmp_path: Path,
                                           capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "mixed.pdf"
    assert main(["form", "rc_frame", "steel_braced_frame", "-o", str(out),
                 "--storeys", "1"]) == 0
    said = capsys.readouterr().err
    assert "for concrete frame (x), braced steel frame (y) (rc_frame, steel_braced_frame)" in said
    whole = " ".join(_pages(out))
    assert "for concrete frame (x), braced steel frame (y)" in whole
    for title in ("Columns", "Beams", "Floor slabs", "Braces", "Connections"):
        assert title in whole, title
    # both systems' look-up sheets, each with its own class words
    for key in ("rc_frame", "steel_braced_frame"):
        form = load_form(key)
        assert f"What to look for: {form.title.lower()}" in whole
        assert form.class_text["IV"][:40] in whole
    same = tmp_path / "same.pdf"
    assert main(["form", "rc_frame", "rc_frame", "-o", str(same), "--storeys", "1"]) == 0
    assert "for concrete frame (rc_frame)," in capsys.readouterr().err
    single = tmp_path / "single.pdf"
    assert main(["form", "rc_frame", "-o", str(single), "--storeys", "1"]) == 0
    assert same.read_bytes() == single.read_bytes()
    capsys.readouterr()
    assert main(["form", "rc_frame", "adobe", "-o", str(tmp_path / "x.pdf")]) == 1
    err = capsys.readouterr().err.strip()
    assert "\n" not in err and "'adobe' is not a structural system (known: rc_frame," in err
    assert main(["form", "rc_frame", "rc_wall", "urm_wall", "-o", str(out)]) == 2


def test_cli_refuses_an_unknown_system_with_the_known_ones(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "x.pdf"
    assert main(["form", "adobe", "-o", str(out)]) == 1
    err = capsys.readouterr().err.strip()
    assert "\n" not in err
    assert err.startswith("triage form: 'adobe' is not a structural system (known: rc_frame,")
    assert all(k in err for k in standards.system_keys())
    assert not out.exists()


def test_cli_refusals_are_one_line(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["form", "rc_frame", "-o", str(tmp_path / "no" / "x.pdf")]) == 1
    assert "does not exist" in capsys.readouterr().err
    assert main(["form", "rc_frame", "-o", str(tmp_path), "--storeys", "2"]) == 1
    assert "is a folder" in capsys.readouterr().err
    assert main(["form", "rc_frame", "-o", str(tmp_path / "x.pdf"), "--storeys", "0"]) == 1
    assert "--storeys: 0 is outside 1..20" in capsys.readouterr().err
    assert main(["form", "rc_frame"]) == 2
