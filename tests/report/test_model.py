"""The report model on its own: what page one and the later pages say, without drawing."""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from tests.helpers import make, reading, storey
from tests.report.conftest import clinic_dict
from triage.assess import CAUTION, PROBABILITY_LABEL, assess
from triage.model import parse_survey
from triage.report.model import Signer, build_report_model, pct, survey_digest
from triage.standards import load
from triage.standards.vocabulary import words


def test_page_one_fields(clinic_pair):
    s, a = clinic_pair
    m = build_report_model(s, a)
    assert m.caution == CAUTION
    assert dict(m.building)["building"] == "Ngāti Whare Clinic, Øster wing ≤ ± θ"
    assert dict(m.building)["address"] == "1 Test Lane, Kōwhai Bay"
    assert "Tess Tester (id T-1)" in dict(m.building)["inspector"]
    assert dict(m.building)["inspected"] == "29 November 2026, 09:00 UTC+13:00"
    assert "concrete walls" in dict(m.building)["systems"]
    assert "rc_wall" not in dict(m.building)["systems"]  # words, never the key
    assert m.tier == a.tier == "hold"
    assert m.tier_words == "◐ hold"
    assert m.level == a.performance_level
    assert m.governing == "residual drift, storey 1, direction y"
    assert m.reasons == [r.replace("falling_hazard", "falling hazard") for r in a.reasons]
    assert m.probability_label == PROBABILITY_LABEL
    assert [t for t, _ in m.probabilities] == ["○ occupy", "◐ hold", "● evacuate"]
    assert dict(m.probabilities)["◐ hold"] == f"{a.tier_probability['hold']:.2f}"
    assert m.keep_out == ["falling hazard at north parapet: keep 7.5 m clear around it"]
    assert m.signer is None and m.signer_text.startswith("UNSIGNED")


def test_signer_revision_and_digest(clinic_pair):
    s, a = clinic_pair
    m = build_report_model(s, a, revision=7, signer=Signer("Aroha Ngāti", "R-77", "ab" * 16))
    assert "Aroha Ngāti (id R-77)" in m.signer_text and "ab" * 16 in m.signer_text
    assert "store revision 7" in m.footer
    assert survey_digest(s) in m.footer and str(s.survey_id) in m.footer
    assert m.footer.startswith(f"survey {str(s.survey_id)[:8]} (id {s.survey_id})")
    # the digest follows the canonical survey: any change to the survey changes it
    d = clinic_dict()
    d["storeys"][0]["readings"][0]["offset_mm"] = 1.5
    assert survey_digest(parse_survey(d)) != survey_digest(s)
    assert "store revision" not in build_report_model(s, a).footer


def test_provisional_and_borderline_plain():
    s = make([storey("1", [], [])])
    a = assess(s)
    m = build_report_model(s, a)
    assert a.provisional and m.provisional
    assert m.provisional_text.startswith("PROVISIONAL")
    assert m.level == "not assessed (no data)"
    assert m.governing.startswith("nothing logged")
    # 4 mm over 2 m is 0.20%, the IO figure itself: the tier is a coin toss, so borderline
    s2 = make([storey("1", [reading("x", 4.0), reading("y", 4.0)])])
    m2 = build_report_model(s2, assess(s2))
    assert m2.borderline is True and not m2.provisional
    assert m2.borderline_text.startswith("BORDERLINE: the measurement uncertainty alone")
    # 1 mm over 2 m (0.05%) is far below it: plainly not borderline
    s3 = make([storey("1", [reading("x", 1.0), reading("y", 1.0)])])
    m3 = build_report_model(s3, assess(s3))
    assert m3.borderline is False and m3.borderline_text == "not borderline"
    assert not m3.provisional


def test_storey_rows_chart_and_figures(clinic_pair):
    s, a = clinic_pair
    m = build_report_model(s, a)
    assert [r.label for r in m.storeys] == ["G", "1"]
    assert m.storeys[1].drift_y == "0.60%" and m.storeys[0].drift_x == "0.05%"
    assert m.storeys[1].level_y == "LS"
    assert [(p.label, p.x, p.y) for p in m.chart] == [
        (st.label, st.drift_ratio.x, st.drift_ratio.y) for st in a.storeys]
    # different systems in x and y: each direction's IO, LS and CP are drawn
    want = {(d, lv, getattr(a.drift_figures[d], lv)) for d in ("x", "y")
            for lv in ("IO", "LS", "CP")}
    assert {(f.dirs, f.level, f.ratio) for f in m.chart_figures} == want
    same = make([storey("1", [reading("x", 1.0)])])
    assert {f.dirs for f in build_report_model(same, assess(same)).chart_figures} == {"x, y"}


def test_members_hazards_repairability(clinic_pair):
    s, a = clinic_pair
    m = build_report_model(s, a)
    wall = next(r for r in m.members if r.group == "2 W1")
    assert wall.damage_class == "III"
    assert wall.class_from == "set by the inspector: diagonal cracking <b>over 1 mm</b> & wide"
    c3 = next(r for r in m.members if r.group == "2 C3")
    assert c3.seen == "crack 1.4 mm; signs: cover spalled"
    # 1.4 mm is class III by width; spalled cover is class III too: the crack width sets it
    assert (c3.class_from, c3.damage_class) == ("by crack width", "III")
    sound = m.members[0]
    assert (sound.class_from, sound.damage_class, sound.seen) == ("undamaged", "—",
                                                                  "nothing seen")
    assert m.hazards[0].keep_out == "7.5 m" and m.hazards[0].effect == "at least ◐ hold"
    assert m.hazards[0].note == "loose <i>coping</i> & glass"
    assert [n for n, _, _ in m.repairability] == [r.name for r in a.repairability]
    assert "0.60%" in m.repairability_basis


def test_method_lists_the_tables_used_and_every_assumption(clinic_pair):
    s, a = clinic_pair
    std = load()
    m = build_report_model(s, a)
    sources = " ".join(r.source for r in m.method)
    assert "FEMA 356 (2000) Table C1-3" in sources
    for r in std.repairability:
        assert r.label in sources
    # a concrete building: ACI 117-10's tolerance applies, the steel and masonry ones do not
    assert "ACI 117-10" in sources
    assert "AISC 303-16" not in sources and "TMS 602" not in sources
    fema = m.method[0]
    assert fema.status == "memory" and "not acceptance limits" in fema.note
    text = " ".join(m.method_text)
    assert "illustrating the damage, not limits" in text
    assert "from memory" in text
    assert {r.key for r in m.assumptions} == {words("assumptions", k) for k in a.engine.assumptions}
    neg = next(r for r in m.assumptions if r.key == words("assumptions",
                                                           "negligible_permanent_drift"))
    assert neg.value == str(a.engine.assumptions["negligible_permanent_drift"])


def test_photos_found_and_missing(tmp_path: Path):
    import io

    import pytest
    from PIL import Image

    from triage.photos import PhotoRefused

    d = clinic_dict()
    (tmp_path / "img").mkdir()
    buf = io.BytesIO()
    Image.new("RGB", (40, 30)).save(buf, format="PNG")
    (tmp_path / "img" / "c3.png").write_bytes(buf.getvalue())
    d["storeys"][1]["members"][1]["photos"] = [{"path": "img/c3.png", "caption": "C3 north"}]
    d["hazards"][0]["photos"] = [{"path": "img/gone.jpg", "caption": "parapet"}]
    s = parse_survey(d)
    m = build_report_model(s, assess(s), photo_dir=tmp_path)
    assert [(p.belongs_to, p.data) for p in m.photos] == [
        ("storey 1, column group 2 C3", buf.getvalue()),
        ("hazard 1, falling hazard at north parapet", None)]
    # without the survey file's folder, relative paths cannot be found
    assert all(p.data is None for p in build_report_model(s, assess(s)).photos)
    # a file that is not a JPEG or PNG by content refuses the report, naming the photo
    (tmp_path / "img" / "c3.png").write_bytes(b"not really a png")
    with pytest.raises(PhotoRefused, match=r"storeys\[1\]\.members\[1\]\.photos\[0\]"):
        build_report_model(s, assess(s), photo_dir=tmp_path)


def test_comparison_lines():
    class Cmp:
        def lines(self):
            return ["storey 1, y: 0.40% then, 0.60% now"]

    s = make([storey("1", [reading("x", 1.0)])])
    assert build_report_model(s, assess(s)).comparison is None
    assert build_report_model(s, assess(s), comparison=Cmp()).comparison == [
        "storey 1, y: 0.40% then, 0.60% now"]


def test_pct():
    assert (pct(0.006), pct(0.0123), pct(None)) == ("0.60%", "1.2%", "—")


def test_model_imports_no_reportlab():
    code = ("import sys, triage.report, triage.report.model, triage.report.verify; "
            "print('reportlab' in sys.modules)")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True)
    assert out.stdout.strip() == "False"


def test_long_text_clipped_in_tables_kept_in_full():
    from triage.report.model import CLIP, CLIPPED

    long = "parapet stones loose along the whole frontage; " * 20
    s = make([storey("1", [reading("x", 1.0)])],
             hazards=[{"kind": "falling_hazard", "where": long, "note": "short"}])
    m = build_report_model(s, assess(s))
    assert len(m.hazards[0].where) <= CLIP
    assert m.hazards[0].where.endswith(CLIPPED)
    assert m.hazards[0].note == "short"
    assert m.long_texts == [("hazard 1 (falling hazard), where", long)]
