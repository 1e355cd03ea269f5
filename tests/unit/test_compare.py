"""Comparison of two surveys of one building, on hand-made pairs."""

from __future__ import annotations

import json
import subprocess
import sys

import pytest

from tests.helpers import reading, storey, survey_dict
from triage.assess import assess
from triage.assess.compare import compare
from triage.model import parse_survey

BUILDING = "5b0c8f0e-1d1e-4f2a-9a3b-7c6d5e4f3a21"


def pair(after_x: float, sd: float = 1.0, cls_after: float = 0.3, hazards=None):
    def one(x, crack, at, sid):
        return survey_dict([
            storey("G", [reading("x", x, sd_mm=sd), reading("y", 2.0)],
                   [{"kind": "column", "count": 10},
                    {"kind": "column", "count": 1, "crack_mm": crack, "ref": "C4"}]),
            storey("1", [reading("x", 1.0), reading("y", 1.0)])],
            id=sid, inspection={"inspector": {"name": "Tess Tester"}, "at": at})
    old = one(4.0, 0.3, "2026-11-28T10:00:00+13:00", "0c3d2a1b-0000-4000-8000-000000000001")
    new = one(after_x, cls_after, "2026-11-30T10:00:00+13:00",
              "0c3d2a1b-0000-4000-8000-000000000002")
    for s in (old, new):
        s["building"]["id"] = BUILDING
    if hazards:
        new["hazards"] = hazards
    o, n = parse_survey(old), parse_survey(new)
    return o, n


def test_a_drift_that_rose_beyond_its_uncertainty_is_significant():
    # G x: 4.0 mm -> 9.0 mm over 2000 mm: 0.20% -> 0.45%, change 0.25%. u = 1/2000 each,
    # combined sqrt(2)/2000 = 0.0707%; 2u = 0.141% < 0.25%: significant.
    o, n = pair(9.0)
    c = compare(o, assess(o), n, assess(n))
    g = c.storeys[0]
    assert g.drift["x"].change == pytest.approx(0.0025)
    assert g.drift["x"].u_combined == pytest.approx(2 ** 0.5 / 2000, rel=1e-6)
    assert g.drift["x"].significant
    assert not g.drift["y"].significant  # 2.0 -> 2.0
    assert (c.old.tier, c.new.tier, c.tier_changed) == ("occupy", "hold", True)


def test_a_drift_that_moved_within_its_uncertainty_is_not():
    # 4.0 -> 6.5 mm: change 2.5/2000 = 0.125% < 2u = 0.141%: not significant.
    o, n = pair(6.5)
    g = compare(o, assess(o), n, assess(n)).storeys[0]
    assert not g.drift["x"].significant
    # The same change with readings good to 0.5 mm is significant: 2u = 0.0707%.
    o, n = pair(6.5, sd=0.5)
    assert compare(o, assess(o), n, assess(n)).storeys[0].drift["x"].significant


def test_worsened_member_and_new_hazard():
    o, n = pair(4.0, cls_after=1.6, hazards=[{"kind": "falling_hazard", "where": "parapet",
                                              "height_above_ground_m": 7.0}])
    c = compare(o, assess(o), n, assess(n))
    w = c.storeys[0].worsened
    assert [(m.ref, m.before, m.after) for m in w] == [("C4", "II", "III")]
    assert [h.kind for h in c.new_hazards] == ["falling_hazard"]
    text = "\n".join(c.lines())
    assert "C4 worsened from class II to III" in text
    assert "new hazard: falling_hazard at parapet" in text


def test_command_refuses_two_buildings_unless_forced(tmp_path):
    o, n = pair(9.0)
    other = json.loads(json.dumps(n.to_json_dict()))
    other["building"]["id"] = "99999999-1d1e-4f2a-9a3b-7c6d5e4f3a21"
    paths = []
    for name, data in (("old", o.to_json_dict()), ("new", n.to_json_dict()), ("other", other)):
        p = tmp_path / f"{name}.json"
        p.write_text(json.dumps(data), encoding="utf-8")
        paths.append(str(p))
    run = [sys.executable, "-m", "triage", "--db", str(tmp_path / "db.sqlite"), "compare"]
    ok = subprocess.run([*run, paths[0], paths[1]], capture_output=True, text=True)
    assert ok.returncode == 0, ok.stderr
    assert "Indicative" in ok.stdout and "significant" in ok.stdout
    js = subprocess.run([*run, paths[0], paths[1], "--format", "json"], capture_output=True,
                        text=True)
    assert json.loads(js.stdout)["storeys"][0]["drift"]["x"]["significant"] is True
    bad = subprocess.run([*run, paths[0], paths[2]], capture_output=True, text=True)
    assert bad.returncode == 1 and "different buildings" in bad.stderr
    assert bad.stderr.count("\n") == 1
    forced = subprocess.run([*run, paths[0], paths[2], "--force"], capture_output=True, text=True)
    assert forced.returncode == 0 and "different buildings" in forced.stdout


def test_report_of_a_reinspection_has_the_since_previous_section(tmp_path):
    import pypdf

    from triage.resources import samples_dir

    db = tmp_path / "db.sqlite"
    first = samples_dir() / "flats_mariner_court_1.json"
    second = samples_dir() / "flats_mariner_court_2.json"
    base = [sys.executable, "-m", "triage", "--db", str(db)]
    assert subprocess.run([*base, "import", str(first), str(second)],
                          capture_output=True).returncode == 0
    sid = json.loads(second.read_text(encoding="utf-8"))["id"]
    out = tmp_path / "r.pdf"
    done = subprocess.run([*base, "report", sid, "-o", str(out)], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    text = "".join(p.extract_text() for p in pypdf.PdfReader(str(out)).pages)
    assert "Since the previous inspection" in text
    assert "worsened from class III to V" in text
