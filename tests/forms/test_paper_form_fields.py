"""The paper form asks for exactly what the screens take, in words, in black and white.

Every box and column is tied to the survey field it records, and that field to the screen that
takes it (read from the screens' own field lists and sources); no key reaches the paper; steel
is asked about in steel terms; every colour the form sets is a grey, and every rendered pixel is
grey (R = G = B).
"""

from __future__ import annotations

import re
import subprocess
from pathlib import Path

import pytest

from tests.forms.conftest import CASES
from tests.forms.pdfgrid import Page, cell_text, grids
from tests.helpers import program
from triage import standards
from triage.forms import load_form
from triage.resources import forms_dir
from triage.standards.vocabulary import many, words
from triage.ui.widgets import hazards as hazard_pane
from triage.ui.widgets import members as member_pane
from triage.ui.widgets import readings as reading_pane

UI = Path(member_pane.__file__).resolve().parents[1]

# Every labelled box, top to bottom and left to right, and where the screens take its field:
# (start of the printed label, screen source file, the field's path or key as that file names it)
def _taken_by(source: str, *boxes: tuple[str, str]) -> list[tuple[str, str, str]]:
    """(label, source, '"field"') for each (label, field) one screen source takes."""
    return [(label, source, f'"{field}"') for label, field in boxes]


PAGE_ONE = [
    *_taken_by("screens/new_survey.py",
               ("name", "building.name"), ("address", "building.address"),
               ("use", "building.use"), ("year built", "building.year_built"),
               ("latitude (°)", "building.location.lat"),
               ("longitude (°)", "building.location.lon"),
               ("storeys named (circle one", "storeys.naming"),
               ("storeys above ground", "storeys.above"),
               ("storeys below ground", "storeys.below"),
               ("inspector: name", "inspection.inspector.name"),
               ("inspector: id", "inspection.inspector.id"),
               ("date and time (with the UTC offset", "inspection.at"),
               ("team: name (id); name (id)", "inspection.team"), ("event", "inspection.event"),
               ("weather", "inspection.weather"), ("not inspected", "inspection.not_inspected")),
    ("previous survey, for a re-inspection", "screens/survey_list.py", "def action_reinspect"),
]
STOREY = _taken_by("widgets/storey_pane.py",
                   ("label (as marked on site)", "label"), ("height (m)", "height_m"),
                   ("below ground", "below_grade"), ("access (circle one)", "access"),
                   ("notes (and photo numbers", "notes"))
READING_KEYS = {"direction": "dir", "where": "where", "offset (mm)": "offset_mm",
                "gauge (mm)": "gauge_mm", "uncertainty (mm)": "sd_mm",
                "as-built offset (mm)": "baseline_mm", "as-built uncertainty (mm)":
                "baseline_sd_mm", "tilt (°)": "tilt_deg", "uncertainty (°)": "sd_deg",
                "as-built tilt (°)": "baseline_deg", "as-built uncertainty (°)":
                "baseline_sd_deg"}
MEMBER_KEYS = {"mark": "ref", "count": "count", "ductility: tick if brittle": "ductility",
               "acts in (blank: both)": "dir", "weight per member (blank: 1)": "weight",
               "widest crack (mm)": "crack_mm", "crack uncertainty (mm)": "crack_sd_mm",
               "class set by hand (I–V)": "damage_class", "why set by hand": "override_reason",
               "members inspected (blank: all)": "inspected",
               "FEMA 352 damage type (code)": "connection_type", "behaviour mode": "mode",
               "FEMA 306 severity": "severity"}
HAZARD_KEYS = {"kind, and where to look": "kind", "where": "where", "storey": "storey",
               "height above ground (m)": "height_above_ground_m", "note": "note"}
STEEL = ("steel_moment_frame", "steel_braced_frame")


@pytest.fixture(scope="module")
def printed(printed_forms) -> dict[str, list[Page]]:
    return {name: pages for name, (_, pages) in printed_forms.items()}


def _boxes(page: Page) -> list[str]:
    """The text of every labelled box (single-row cells that are no grid's heading)."""
    out = []
    for g in grids(page):
        if len(g.rows) == 1 and any(cell_text(page, c) for c in g.rows[0]):
            out += [cell_text(page, c) for c in g.rows[0]]
    return out


def _asks_exactly(name: str, page: Page, wanted: list[tuple[str, str, str]]) -> list[str]:
    """The page's labelled boxes, checked against `wanted` in order: each box's label, and
    that the screen source named takes its field. Returns the boxes."""
    boxes = [b for b in _boxes(page) if not b.startswith("Indicative only")]
    assert len(boxes) == len(wanted), (name, boxes)
    for text, (label, source, field) in zip(boxes, wanted, strict=True):
        assert text.startswith(label), (name, text, label)
        assert field in (UI / source).read_text(encoding="utf-8"), (label, source, field)
    return boxes


def test_page_one_asks_exactly_for_the_fields_the_screens_take(printed) -> None:
    for name, pages in printed.items():
        _asks_exactly(name, pages[0], PAGE_ONE)
        whole = " ".join(p.text for p in pages).lower()
        for absent in ("typed in by", "typed into triage by", "second inspector"):
            assert absent not in whole, (name, absent)
        # the structural system of each direction: every system, in words, to tick
        systems = next(g for g in grids(pages[0]) if len(g.rows) == 3)
        assert systems.heads(pages[0])[1:] == [words("systems", k)
                                               for k in standards.system_keys()]
        assert [cell_text(pages[0], r[0]) for r in systems.body] == ["x direction",
                                                                       "y direction"]


def test_storey_bands_ask_for_the_fields_the_screens_take(printed) -> None:
    for name, pages in printed.items():
        band = next(p for p in pages if "Storey band 1" in p.text)
        boxes = _asks_exactly(name, band, STOREY)
        assert "all entered partly entered not entered" in " ".join(boxes[3].split())
        heads = {h for p in pages for g in grids(p) for h in g.heads(p)}
        signs = {words("signs", s) for s in standards.load().signs}
        for head in heads:
            if head in READING_KEYS:
                assert READING_KEYS[head] in reading_pane.ALL_KEYS, head
            elif head in MEMBER_KEYS:
                assert MEMBER_KEYS[head] in member_pane.KEYS, head
            elif head in HAZARD_KEYS:
                assert HAZARD_KEYS[head] in hazard_pane.KEYS, head
            else:   # a sign to tick, the row number, a tick column, a system, a labelled box,
                # and the signature, which stays on paper (the name is typed from page 1)
                assert (head in signs or head in ("#", "seen", "structural system", "",
                                                  "inspector's signature")
                        or head in {words("systems", k) for k in standards.system_keys()}
                        or any(head.startswith(b) for b, _, _ in PAGE_ONE + STOREY)
                        or head.startswith("Indicative only")), (name, head)


def test_no_key_reaches_the_paper(printed) -> None:
    snake = re.compile(r"\b[A-Za-z0-9]+_[A-Za-z0-9_]+\b")
    keys = [k for k in (*standards.system_keys(), *standards.load().signs,
                        *standards.load().hazards) if "_" in k]
    assert len(keys) > 10 and snake.fullmatch(keys[0])   # the pattern finds a key
    for name, pages in printed.items():
        for i, page in enumerate(pages, start=1):
            found = snake.findall(page.text)
            assert not found, (name, i, found)


def test_steel_forms_ask_in_steel_terms(printed) -> None:
    for key in STEEL:
        pages = printed[key]
        form = load_form(key)
        # the first page and the storey bands (ground cracks are a hazard, not a member's)
        asked = " ".join(p.text for p in pages if "storey band" in p.text or p is pages[0])
        assert "crack" not in asked.lower(), key
        heads = [h for p in pages for g in grids(p) for h in g.heads(p)]
        assert "connection broken" in heads and "local buckling" in heads, key
        assert ("brace buckled" in heads) == ("brace" in form.member_kinds)
        assert "Connections" in asked and "sound ones: no sign" in asked
    # a concrete frame is asked for crack widths; a mixed building's concrete columns too,
    # while its steel braces and connections are not
    for name in ("rc_frame", "mixed"):
        pages = printed[name]
        for p in pages:
            for g in grids(p):
                heads = g.heads(p)
                if "brace buckled" in heads or ("connection broken" in heads
                                                 and "bar broken" not in heads):
                    assert "widest crack (mm)" not in heads, (name, heads)
                if "cover spalled" in heads:
                    assert "widest crack (mm)" in heads, (name, heads)


def test_every_colour_set_is_a_grey(printed) -> None:
    for name, pages in printed.items():
        for i, page in enumerate(pages, start=1):
            assert page.colours, (name, i)
            for op, values in page.colours:
                if op in ("g", "G"):
                    continue
                if op in ("rg", "RG"):
                    assert len(set(values)) == 1, (name, i, op, values)
                elif op in ("k", "K"):
                    assert values[:3] == (0.0, 0.0, 0.0), (name, i, op, values)
                else:
                    pytest.fail(f"{name} page {i}: colour space operator {op} {values}")


def test_every_pixel_is_grey(printed_forms, tmp_path: Path) -> None:
    program("pdftoppm", "poppler-utils")
    from PIL import Image

    path, pages = printed_forms["mixed"]
    subprocess.run(["pdftoppm", "-png", "-r", "30", str(path), str(tmp_path / "p")],
                   check=True, timeout=120)
    images = sorted(tmp_path.glob("p-*.png"))
    assert len(images) == len(pages)
    for img in images:
        with Image.open(img) as im:
            rgb = im.convert("RGB")
            r, g, b = rgb.split()
            assert r.tobytes() == g.tobytes() == b.tobytes(), img.name
            assert rgb.getextrema()[0][0] < 60   # black ink is there


def test_the_instructions_agree_with_the_grids(printed) -> None:
    vertical = standards.load().assumptions.vertical_kinds
    for name, pages in printed.items():
        forms = [load_form(s) for s in CASES[name]]
        text = pages[0].text
        kinds = list(dict.fromkeys(k for f in forms for k in f.member_kinds))
        carry = [many("member_kinds", k) for k in kinds if k in vertical]
        rest = [many("member_kinds", k) for k in kinds if k not in vertical]
        said = " ".join(text.split())
        if carry:
            assert f"8 lines for {', '.join(carry)}" in said, (name, said)
        if rest:
            assert f"4 for {', '.join(rest)}" in said, (name, said)
        assert "at least 10 readings a storey" in said
        assert ("widest residual crack" in said) == any(
            standards.load().systems[f.system].material in ("reinforced concrete", "masonry")
            for f in forms), name


def test_forms_folder_is_the_one_read() -> None:
    assert {p.stem for p in forms_dir().glob("*.toml")} == set(standards.system_keys())
