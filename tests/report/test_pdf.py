"""The drawn PDF: caution on every page, page one's content, Unicode, literal markup,
reproducible bytes, embedded survey and assessment, photos, rendering with poppler."""

from __future__ import annotations

import json
import subprocess
import sys
from pathlib import Path

import pytest
from pypdf import PdfReader

from tests.helpers import flat, make, pdf_pages, program, reading, storey
from tests.report.conftest import clinic_dict
from triage.assess import CAUTION, assess
from triage.model import parse_survey, parse_survey_text
from triage.report import read_embedded, read_embedded_files, render_report, write_report
from triage.standards.vocabulary import words


@pytest.fixture
def clinic_pdf(clinic_pair, tmp_path: Path) -> Path:
    s, a = clinic_pair
    out = tmp_path / "clinic.pdf"
    info = write_report(s, a, out, revision=3)
    assert info.path == out and not info.signed and info.fingerprint is None
    return out


def test_caution_and_page_numbers_on_every_page(clinic_pdf: Path):
    texts = pdf_pages(clinic_pdf)
    assert len(texts) >= 3
    for n, t in enumerate(texts, 1):
        assert CAUTION in t, f"page {n} lacks the caution"
        assert f"page {n} of {len(texts)}" in t
        assert "store revision 3" in t
        assert "survey digest" in t


def test_page_one_has_tier_building_and_the_rest(clinic_pair, clinic_pdf: Path):
    _s, a = clinic_pair
    one = pdf_pages(clinic_pdf)[0]
    assert "◐ hold" in one
    assert "Ngāti Whare Clinic, Øster wing ≤ ± θ" in one
    assert "1 Test Lane, Kōwhai Bay" in one
    assert "Tess Tester" in one and "29 November 2026, 09:00 UTC+13:00" in one
    assert a.performance_level in one
    assert "from measurement uncertainty only" in one
    assert "measure next" in one
    assert "keep 7.5 m clear" in one
    assert "UNSIGNED" in one
    assert "Engineer of record" in one and "signature" in one
    assert flat(a.reasons[0]) in one


def test_markup_in_user_text_is_literal(clinic_pdf: Path):
    everything = " ".join(pdf_pages(clinic_pdf))
    assert "north bay: <b>bold?</b> & </para> stays as typed" in everything
    assert "diagonal cracking <b>over 1 mm</b> & wide" in everything
    assert "loose <i>coping</i> & glass" in everything


def test_later_pages_storeys_members_method(clinic_pdf: Path):
    rest = " ".join(pdf_pages(clinic_pdf)[1:])
    for heading in ("Storeys (top to bottom)", "Drift profile", "Member groups", "Hazards",
                    "Repairability (named alternatives)", "Method", "Tables used",
                    "Assumptions applied"):
        assert heading in rest
    assert "FEMA 356 (2000) Table C1-3" in rest
    assert "not acceptance limits" in rest
    assert words("assumptions", "negligible_permanent_drift") in rest
    assert "negligible_permanent_drift" not in rest
    assert "residual drift ratio (absolute)" in rest  # the chart's axis


def test_unsigned_report_is_reproducible(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    first = render_report(s, a)
    assert render_report(s, a) == first
    # and in a fresh process, where nothing is registered or cached yet
    code = ("import sys; from pathlib import Path; from tests.report.conftest import clinic_dict;"
            "from triage.model import parse_survey; from triage.assess import assess;"
            "from triage.report import write_report; s = parse_survey(clinic_dict());"
            "write_report(s, assess(s), Path(sys.argv[1]))")
    out = tmp_path / "fresh.pdf"
    subprocess.run([sys.executable, "-c", code, str(out)], check=True,
                   cwd=Path(__file__).resolve().parents[2])
    assert out.read_bytes() == first
    # a different survey gives a different file
    d = clinic_dict()
    d["storeys"][0]["notes"] = "changed"
    s2 = parse_survey(d)
    assert render_report(s2, assess(s2)) != first


def test_embedded_survey_reimports_to_the_same_survey(clinic_pair, clinic_pdf: Path):
    s, a = clinic_pair
    survey_json, assessment_json = read_embedded(clinic_pdf)
    back = parse_survey_text(survey_json)
    assert back == s
    assert back.canonical() == s.canonical()
    assert assessment_json == a.to_json()
    assert json.loads(assessment_json)["tier"] == a.tier
    assert set(read_embedded_files(clinic_pdf)) == {"survey.json", "assessment.json"}


def test_read_embedded_refuses_plainly(tmp_path: Path):
    from reportlab.pdfgen.canvas import Canvas

    plain = tmp_path / "plain.pdf"
    c = Canvas(str(plain))
    c.drawString(72, 72, "nothing embedded")
    c.save()
    with pytest.raises(ValueError, match=r"plain\.pdf: carries no embedded triage survey"):
        read_embedded(plain)
    junk = tmp_path / "junk.pdf"
    junk.write_bytes(b"this is no pdf at all")
    with pytest.raises(ValueError, match=r"junk\.pdf: not a readable PDF"):
        read_embedded(junk)
    with pytest.raises(ValueError, match="no such file"):
        read_embedded(tmp_path / "absent.pdf")


def test_page_one_renders_with_poppler(clinic_pdf: Path, tmp_path: Path):
    program("pdftoppm", "poppler-utils")
    from PIL import Image

    subprocess.run(["pdftoppm", "-png", "-r", "40", "-f", "1", "-l", "1", str(clinic_pdf),
                    str(tmp_path / "p")], check=True, capture_output=True)
    (png,) = tmp_path.glob("p*.png")
    with Image.open(png) as im:
        assert im.format == "PNG"
        w, h = im.size
        assert abs(h / w - 297 / 210) < 0.02  # an A4 page
        grey = im.convert("L")
        dark = sum(grey.histogram()[:128])
        assert dark > 0.005 * w * h  # text was drawn, not a blank page


def test_photos_are_thumbnails_and_missing_ones_listed(tmp_path: Path):
    from PIL import Image

    (tmp_path / "img").mkdir()
    Image.new("RGB", (1200, 800), (120, 130, 140)).save(tmp_path / "img" / "c3.jpg")
    d = clinic_dict()
    d["storeys"][1]["members"][1]["photos"] = [{"path": "img/c3.jpg", "caption": "C3 face"}]
    d["hazards"][0]["photos"] = [{"path": "img/missing.jpg", "caption": "parapet"}]
    s = parse_survey(d)
    out = tmp_path / "photos.pdf"
    write_report(s, assess(s), out, photo_dir=tmp_path)
    reader = PdfReader(out)
    images = [img for page in reader.pages for img in page.images]
    assert len(images) == 1
    assert max(images[0].image.size) <= 640  # a thumbnail, not the full photo
    text = " ".join(flat(p.extract_text()) for p in reader.pages)
    assert "storey 1, column group 2 C3: C3 face" in text
    assert "img/missing.jpg (not found)" in text


def test_tall_building_report(tmp_path: Path):
    storeys = [storey(str(i + 1), [reading("x", 1.0 + i % 5), reading("y", 2.0)])
               for i in range(60)]
    s = make(storeys)
    out = tmp_path / "tall.pdf"
    info = write_report(s, assess(s), out)
    texts = pdf_pages(out)
    assert info.pages == len(texts) > 3
    assert all(CAUTION in t for t in texts)
    rest = " ".join(texts[1:])
    assert "60 3.2" in rest and " 1 3.2" in rest  # first and last storey rows


def test_comparison_section_drawn(clinic_pair, tmp_path: Path):
    class Cmp:
        def lines(self):
            return ["storey 1, y: 0.40% then, 0.60% now"]

    s, a = clinic_pair
    out = tmp_path / "cmp.pdf"
    write_report(s, a, out, comparison=Cmp())
    rest = " ".join(pdf_pages(out)[1:])
    assert "Since the previous inspection" in rest
    assert "storey 1, y: 0.40% then, 0.60% now" in rest


def test_assessment_of_another_survey_refused(clinic_pair, tmp_path: Path):
    s, _ = clinic_pair
    other = make([storey("1", [reading("x", 1.0)])])
    with pytest.raises(ValueError, match="the assessment is of survey"):
        write_report(s, assess(other), tmp_path / "x.pdf")
    assert not (tmp_path / "x.pdf").exists()


def test_long_lists_continue_and_page_one_keeps_the_signing_block(tmp_path: Path):
    hazards = [{"kind": "falling_hazard", "height_above_ground_m": 5.0 + i,
                "where": f"parapet segment {i} along the northern street frontage"}
               for i in range(25)]
    s = make([storey("1", [reading("x", 3.0), reading("y", 1.0)])], hazards=hazards)
    out = tmp_path / "many.pdf"
    write_report(s, assess(s), out)
    texts = pdf_pages(out)
    one = texts[0]
    assert "Engineer of record" in one and "UNSIGNED" in one and "◐ hold" in one
    assert "more on the next page" in one
    assert "Why (continued)" in texts[1] and "Keep-out distances (continued)" in texts[1]
    everything = " ".join(texts)
    for i in range(25):  # every keep-out line is printed somewhere
        assert f"parapet segment {i} along the northern street frontage: keep {5 + i} m" in (
            everything)


def test_very_long_entries_still_lay_out(tmp_path: Path):
    long = "a" * 2000   # the longest a text field may hold (docs/formats.md)
    s = make([storey("1", [reading("x", 1.0)], notes=long)],
             hazards=[{"kind": "utility_hazard", "where": long, "note": "word " * 1500}])
    out = tmp_path / "long.pdf"
    write_report(s, assess(s), out)
    everything = "".join(p.extract_text() for p in PdfReader(out).pages)
    assert "in full under Notes" in flat(everything)
    assert everything.replace("\n", "").count("a" * 200) >= 2  # the note and the full "where"
