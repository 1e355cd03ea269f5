"""The paper form's edges: the shipped font as a fresh process registers it, the storey counts at
the ends of 1..20, and each refusal's whole sentence (a refusal is read by a person; a word
dropped from it is a fault)."""

from __future__ import annotations

import re
import subprocess
import sys
from pathlib import Path

import pytest

from tests.forms.paper_ops import record
from triage.forms import load_form
from triage.report import paper_form
from triage.report.paper_form import fonts, fw, systems_line, write_paper_form

FRESH = """
from reportlab.pdfbase import pdfmetrics
from triage.report.paper_form import BOLD, REGULAR, fonts
before = set(pdfmetrics.getRegisteredFontNames())
got = fonts()
assert fonts() == got
print(REGULAR in before, BOLD in before, *got)
for name in got:
    face = pdfmetrics.getFont(name).face
    print(name, face.name.decode(), face.filename.rpartition("/")[2])
"""


def test_a_fresh_process_registers_the_shipped_font_once() -> None:
    assert fonts() == (paper_form.REGULAR, paper_form.BOLD)   # this process: registered already
    out = subprocess.run([sys.executable, "-c", FRESH], capture_output=True, text=True,
                         timeout=120, cwd=Path.cwd())
    assert out.returncode == 0, out.stderr
    assert out.stdout.split("\n") == [
        "False False TriageFormSans TriageFormSans-Bold",
        "TriageFormSans DejaVuSans DejaVuSans.ttf",
        "TriageFormSans-Bold DejaVuSans-Bold DejaVuSans-Bold.ttf", ""]


@pytest.mark.parametrize(("storeys", "bands"), [(1, 1), (20, 20)])
def test_one_and_twenty_storey_bands_are_drawn(tmp_path: Path, storeys: int, bands: int) -> None:
    pages, made = record(tmp_path, ("wood_stud_wall",), storeys)
    heads = [a[2] for n, a, _ in made[-1].calls if n == "drawString"
             and str(a[2]).startswith("Storey band ")]
    assert heads == [f"Storey band {n}" for n in range(1, bands + 1)]
    assert pages == [n for n, _, _ in made[-1].calls].count("showPage")


@pytest.mark.parametrize("storeys", [0, 21, -1])
def test_a_storey_count_outside_one_to_twenty_is_refused(tmp_path: Path, storeys: int) -> None:
    with pytest.raises(ValueError) as got:
        write_paper_form(load_form("rc_frame"), tmp_path / "x.pdf", storeys)
    assert str(got.value) == f"storeys: {storeys} is outside 1..20"
    assert not (tmp_path / "x.pdf").exists()


@pytest.mark.parametrize("n", [0, 3])
def test_other_than_one_or_two_systems_is_refused_in_full(tmp_path: Path, n: int) -> None:
    forms = [load_form(k) for k in ("rc_frame", "steel_braced_frame", "urm_wall")][:n]
    with pytest.raises(ValueError) as got:
        write_paper_form(forms, tmp_path / "x.pdf")
    assert str(got.value) == f"systems: {n} given; one, or two (x then y)"


def test_a_field_without_words_is_refused_in_full() -> None:
    with pytest.raises(KeyError) as got:
        fw("reading", "colour")
    assert got.value.args == ("the vocabulary has no words for fields.reading.colour",)
    assert fw("reading", "gauge_mm") == "gauge (mm)"


def test_the_systems_line_names_one_system_or_both_directions() -> None:
    rc, steel = load_form("rc_frame"), load_form("steel_braced_frame")
    assert systems_line([rc]) == "for concrete frame"
    assert systems_line([rc, steel]) == "for concrete frame (x), braced steel frame (y)"
    assert re.fullmatch(r"for [a-z ]+", systems_line([steel]))

