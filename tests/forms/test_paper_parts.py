"""The paper form's parts on their own: column tables, fitting, a grid longer than a page, and
the refusals of `write_paper_form` and `triage form`."""

from __future__ import annotations

from pathlib import Path

import pytest
from reportlab.pdfgen.canvas import Canvas

from tests.forms.pdfgrid import grids, read_pages
from triage.cli import main
from triage.forms import FormError, load_form
from triage.report import paper_columns, paper_form
from triage.report.paper_columns import Col, fit, member_columns
from triage.report.paper_sheet import MARGIN, PAGE_H, PAGE_W, ROW_H, Sheet


def test_fit_gives_the_rest_to_one_column_or_shrinks_all_alike() -> None:
    cols = [Col("a", 100.0, field="x.a"), Col("b", 50.0, field="x.b"), Col("c", 50.0)]
    assert fit(cols, 400.0, "x.a") == [300.0, 50.0, 50.0]
    assert fit(cols, 400.0) == [100.0, 50.0, 250.0]          # the last, by default
    assert fit(cols, 100.0, "x.b") == [50.0, 25.0, 25.0]     # too wide: all shrink alike
    assert sum(fit(cols, 160.0, "x.a")) == pytest.approx(160.0)


def test_a_field_without_words_is_refused_by_name() -> None:
    with pytest.raises(KeyError, match=r"fields\.reading\.colour"):
        paper_form.fw("reading", "colour")
    with pytest.raises(KeyError, match=r"fields\.member_group\.colour"):
        paper_columns._field_head("member_group", "colour")


def test_member_columns_follow_kind_and_material() -> None:
    heads = [c.head for c in member_columns("connection", ["steel_moment_frame"],
                                            [("connection_fractured", "welds")])]
    assert heads == ["mark", "count", "acts in (blank: both)", "members inspected (blank: all)",
                     "FEMA 352 damage type (code)", "connection broken",
                     "class set by hand (I–V)", "why set by hand"]
    heads = [c.head for c in member_columns("connection", ["steel_braced_frame"], [])]
    assert "FEMA 352 damage type (code)" not in heads   # read in moment frames only
    heads = [c.head for c in member_columns("wall", ["urm_wall", "wood_stud_wall"], [])]
    assert "widest crack (mm)" in heads and "weight per member (blank: 1)" in heads
    assert "behaviour mode" in heads and "FEMA 306 severity" in heads
    heads = [c.head for c in member_columns("wall", ["wood_stud_wall"], [])]
    assert "widest crack (mm)" not in heads and "behaviour mode" not in heads


def test_one_or_two_forms_and_no_more(tmp_path: Path) -> None:
    rc, steel, urm = (load_form(k) for k in ("rc_frame", "steel_braced_frame", "urm_wall"))
    with pytest.raises(ValueError, match=r"systems: 3 given; one, or two \(x then y\)"):
        paper_form.write_paper_form([rc, steel, urm], tmp_path / "x.pdf")
    with pytest.raises(ValueError, match="systems: 0 given"):
        paper_form.write_paper_form([], tmp_path / "x.pdf")
    assert not (tmp_path / "x.pdf").exists()
    a, b = tmp_path / "a.pdf", tmp_path / "b.pdf"
    paper_form.write_paper_form([rc, rc], a, storeys=1)    # the same system twice: once
    paper_form.write_paper_form(rc, b, storeys=1)
    assert a.read_bytes() == b.read_bytes()


def test_a_grid_longer_than_a_page_goes_on_with_its_heading(tmp_path: Path) -> None:
    out = tmp_path / "long.pdf"
    c = Canvas(str(out), pagesize=(PAGE_W, PAGE_H), invariant=1)
    d = Sheet(c=c, title="test", systems_line="for a test", regular="Helvetica",
              bold="Helvetica-Bold", total=None)
    d.new_page("a long grid")
    cols = [Col("number", 60.0), Col("tick", 40.0, "tick"), Col("words", 300.0)]
    d.table(MARGIN, cols, [c.width for c in cols], [[str(i), "", ""] for i in range(40)],
            "a long grid")
    c.showPage()
    c.save()
    pages = read_pages(out)
    assert len(pages) >= 3
    numbers = []
    for page in pages:
        (grid,) = [g for g in grids(page) if g.heads(page) == ["number", "tick", "words"]]
        assert all(cell.h >= ROW_H - 0.01 for row in grid.rows for cell in row)
        numbers += [int(f.text) for f in page.frags if f.text.isdigit() and f.x < MARGIN + 60
                    and f.y < grid.top - 20]
        assert len(page.boxes()) == len(grid.body)
    assert numbers == list(range(40))


def test_cli_says_when_the_forms_are_bad_or_the_file_cannot_be_written(
        tmp_path: Path, capsys: pytest.CaptureFixture[str],
        monkeypatch: pytest.MonkeyPatch) -> None:
    full = Path("/dev/full")
    if full.exists():
        assert main(["form", "rc_frame", "-o", str(full), "--storeys", "1"]) == 1
        err = capsys.readouterr().err.strip()
        assert err.startswith("triage form: /dev/full: cannot be written") and "\n" not in err

    def bad(folder: Path | None = None) -> dict[str, object]:
        raise FormError("forms/rc_frame.toml: title: required key is missing")

    monkeypatch.setattr("triage.forms.load_forms", bad)
    assert main(["form", "rc_frame", "-o", str(tmp_path / "x.pdf")]) == 1
    err = capsys.readouterr().err.strip()
    assert err.startswith("triage form: forms/rc_frame.toml: title: required key is missing")
    assert "\n" not in err
    assert not (tmp_path / "x.pdf").exists()
