"""What the engineer of record rechecks from paper: every reading, every hazard height, the new
survey fields, no internal key, and the caution and signed state on every page."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

from tests.helpers import flat, pdf_pages
from tests.report.conftest import clinic_dict
from triage.assess import CAUTION, assess
from triage.model import parse_survey, parse_survey_text
from triage.report import render_report
from triage.report.keys import new_key
from triage.report.model import build_report_model
from triage.resources import samples_dir
from triage.standards.vocabulary import vocabulary

SAMPLES = sorted(samples_dir().glob("*.json"))


def _sample(path: Path):
    s = parse_survey_text(path.read_text(encoding="utf-8"))
    return s, assess(s)


@pytest.fixture(scope="module", params=SAMPLES, ids=[p.stem for p in SAMPLES])
def sample(request):
    s, a = _sample(request.param)
    return s, a, pdf_pages(render_report(s, a, photo_dir=request.param.parent))


def _num(v: float) -> str:
    return f"{v:g}"


def test_every_reading_and_hazard_height_is_printed(sample):
    s, _a, text = sample
    allt = " ".join(text)
    for st in s.storeys:
        for i, r in enumerate(st.readings):
            if r.tilt_deg is not None:
                want = f"reading {i + 1}: tilt {_num(r.tilt_deg)}°"
            else:
                want = (f"reading {i + 1}: {_num(r.offset_mm)} mm over "
                        f"{_num(r.gauge_mm)} mm")
            assert want in allt, (st.label, want)
    for h in s.hazards:
        if h.height_above_ground_m is not None:
            assert f"{h.height_above_ground_m:g} m" in allt


def test_spot_values_carry_uncertainty_and_repeats(sample):
    s, a, text = sample
    allt = " ".join(text)
    m = build_report_model(s, a)
    n = sum(len(st.readings) for st in s.storeys)
    rows = [r for t in m.spot_tables for r in t.rows]
    assert sum(r.readings.count("reading ") for r in rows) == n
    for r in rows:
        assert "±" in r.value and r.value in allt
        assert r.repeats in allt


def test_no_internal_key_reaches_a_person(sample):
    _s, _a, text = sample
    keys = {k for sec in vocabulary().values() for k in sec if "_" in k}
    allt = " ".join(text)
    # a file name such as damage_floors.toml names a file, not a key
    leaked = sorted(k for k in keys
                    if re.search(rf"(?<![\w/.]){re.escape(k)}(?!\w|\.toml)", allt))
    assert not leaked


def test_caution_and_unsigned_state_on_every_page(sample):
    _s, _a, text = sample
    head = CAUTION.split(":")[0]
    for i, page in enumerate(text):
        assert head in page, i
        assert "UNSIGNED" in page, i


def test_caution_sits_with_the_tier(sample):
    _s, _a, text = sample
    one = text[0]
    assert "Caution: " + flat(CAUTION) in one


def test_signed_state_on_every_page(clinic_pair, tmp_path: Path):
    s, a = clinic_pair
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "k.key", None, algorithm="ecdsa-p256")
    text = pdf_pages(render_report(s, a, key=key))
    for page in text:
        assert "SIGNED by Aroha Ngāti" in page and "UNSIGNED" not in page


def test_new_fields_and_provisional_storeys_are_printed():
    d = clinic_dict()
    d["format"] = "triage-survey/2"
    d["building"]["year_built"] = 1968
    d["inspection"].update(team=[{"name": "Mere Kawa", "id": "T-9"}], event="Kōwhai Bay "
                           "swarm, main shock", not_inspected="roof space above level 1",
                           weather="rain, 12 °C")
    d["storeys"][1]["members"] = []
    s = parse_survey(d)
    a = assess(s)
    assert a.provisional
    allt = " ".join(pdf_pages(render_report(s, a)))
    for want in ("1968", "Mere Kawa (id T-9)", "Kōwhai Bay swarm, main shock",
                 "roof space above level 1", "rain, 12 °C", "storey 1 (no member group)"):
        assert want in allt, want


def test_a_reading_whose_place_is_at_the_text_limit_is_still_reported():
    # A "where" of 2,000 characters (the model's text limit) makes a readings row taller than a
    # page; the row must split across pages rather than the report being refused.
    d = clinic_dict()
    place = " ".join(["north-west corner column face beside the stair"] * 42)[:2000]
    d["storeys"][0]["readings"][0]["where"] = place
    survey = parse_survey(d)
    text = flat("".join(pdf_pages(render_report(survey, assess(survey)))))
    assert flat(place[:200]) in text and flat(place[-40:]) in text
