"""Comparison of two surveys of one building (`triage-comparison/2`), on hand-made pairs.

Every expected value is worked by hand in the comment beside it: drift ratios are offset over
gauge, u = sd over gauge, the combined uncertainty sqrt(u_old^2 + u_new^2 [+ 0.0015^2]).
"""

from __future__ import annotations

import json
import math
import subprocess
import sys
from typing import Any

import pytest

from tests.helpers import reading, storey, survey_dict, tilt
from triage.assess import assess
from triage.assess.compare import (
    all_reversed,
    building_line,
    chance_rate,
    compare,
    match_groups,
    sidak_bound,
)
from triage.assess.text import summary
from triage.model import parse_survey

BUILDING = "5b0c8f0e-1d1e-4f2a-9a3b-7c6d5e4f3a21"
OLD_ID = "0c3d2a1b-0000-4000-8000-000000000001"
NEW_ID = "0c3d2a1b-0000-4000-8000-000000000002"


def two(old_storeys: list[dict[str, Any]], new_storeys: list[dict[str, Any]],
        old_hazards=None, new_hazards=None):
    """Two surveys of one building, two days apart, parsed."""
    out = []
    for sid, at, st, hz in ((OLD_ID, "2026-11-28T10:00:00+13:00", old_storeys, old_hazards),
                            (NEW_ID, "2026-11-30T10:00:00+13:00", new_storeys, new_hazards)):
        d = survey_dict(st, hazards=hz, id=sid,
                        inspection={"inspector": {"name": "Tess Tester"}, "at": at})
        d["building"]["id"] = BUILDING
        out.append(parse_survey(d))
    return out[0], out[1]


def cmp(o, n):
    return compare(o, assess(o), n, assess(n))


def at(where: str, d: str, offset: float, **kw) -> dict[str, Any]:
    return reading(d, offset, where=where, **kw)


def spots(c, label="G"):
    return {(s.dir, s.where): s for st in c.storeys if st.label == label for s in st.spots}


# --- spots on signed values --------------------------------------------------------------------

def test_a_reversed_lean_is_a_change_and_is_flagged():
    # +6 mm -> -6 mm over 2000 mm, 1 mm each: +0.30% -> -0.30%, change -12/2000 = -0.60%.
    # u = 1/2000 = 0.05% each, combined sqrt(2) * 0.05% = 0.0707%, 2u = 0.1414%:
    # 0.60% is 4.24 times 2u; z = -0.006 / 0.000707 = -8.485.
    o, n = two([storey("G", [at("grid A", "x", 6.0), at("grid 1", "y", 2.0)])],
               [storey("G", [at("grid A", "x", -6.0), at("grid 1", "y", 2.0)])])
    c = cmp(o, n)
    x = spots(c)[("x", "grid A")]
    assert x.status == "compared" and x.matched_by == "where"
    assert (x.before, x.after) == (pytest.approx(0.003), pytest.approx(-0.003))
    assert x.change == pytest.approx(-0.006)
    assert x.u_combined == pytest.approx(math.sqrt(2) / 2000, rel=1e-5)
    assert x.z == pytest.approx(-8.48528, rel=1e-5)
    assert x.significant and x.reversed
    assert abs(x.change) / (2 * x.u_combined) == pytest.approx(4.24264, rel=1e-5)
    y = spots(c)[("y", "grid 1")]
    assert not y.significant and not y.reversed and y.change == 0.0
    text = "\n".join(c.lines())
    assert "drift +0.30% -> −0.30% (change −0.60%" in text and "the lean reversed" in text


def test_two_spots_that_swapped_which_is_largest_are_both_flagged():
    # A: +8 -> +2 mm, B: +2 -> +8 mm over 2000 mm. The storey's largest is 0.40% both times,
    # yet each spot moved 6/2000 = 0.30%: z = 0.003 / 0.000707 = 4.243, -4.243 for A.
    o, n = two([storey("G", [at("A", "x", 8.0), at("B", "x", 2.0)])],
               [storey("G", [at("A", "x", 2.0), at("B", "x", 8.0)])])
    c = cmp(o, n)
    a, b = spots(c)[("x", "A")], spots(c)[("x", "B")]
    assert a.z == pytest.approx(-4.24264, rel=1e-5) and b.z == pytest.approx(4.24264, rel=1e-5)
    assert a.significant and b.significant
    assert not a.reversed and not b.reversed
    assert c.building_line.compared == 2 and c.building_line.flagged == 2
    assert c.all_reversed == ()


def test_a_change_within_twice_its_uncertainty_is_not_significant():
    # 4.0 -> 6.5 mm: 2.5/2000 = 0.125% < 2u = 0.1414%: z = 1.768, not significant.
    # The same change read to 0.5 mm: 2u = 0.0707%, z = 3.536, significant.
    o, n = two([storey("G", [at("A", "x", 4.0)])], [storey("G", [at("A", "x", 6.5)])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.z == pytest.approx(1.76777, rel=1e-5) and not s.significant
    o, n = two([storey("G", [at("A", "x", 4.0, sd_mm=0.5)])],
               [storey("G", [at("A", "x", 6.5, sd_mm=0.5)])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.z == pytest.approx(3.53553, rel=1e-5) and s.significant


# --- spots measured another way, baselines -----------------------------------------------------

def test_a_changed_gauge_adds_the_method_uncertainty_in_quadrature():
    # Old 4 mm over 2000 (0.20%, u 1/2000 = 0.0005); new 12 mm over 3000 (0.40%, u 1/3000),
    # the gauge 50% longer: change 0.0020. Without method_change_sd u = sqrt(0.0005^2 +
    # 0.000333^2) = 0.000601 and z = 3.33 (significant); with it u = sqrt(0.0005^2 + 0.000333^2
    # + 0.0015^2) = sqrt(2.6111e-6) = 0.0016159, z = 0.0020 / 0.0016159 = 1.2377: not.
    o, n = two([storey("G", [at("A", "x", 4.0)])],
               [storey("G", [at("A", "x", 12.0, gauge_mm=3000.0)])])
    c = cmp(o, n)
    s = spots(c)[("x", "A")]
    assert s.method_changed == ("gauge",)
    assert s.u_method == pytest.approx(0.0015)
    assert s.u_combined == pytest.approx(0.00161589, rel=1e-5)
    assert s.z == pytest.approx(1.23771, rel=1e-5) and not s.significant
    assert c.method_change_sd == pytest.approx(0.0015)
    assert "gauge more than 10% apart" in "\n".join(c.lines())
    # A gauge within 10% (2000 -> 2150 mm, 7.5%) is the same method: nothing added.
    o, n = two([storey("G", [at("A", "x", 4.0)])],
               [storey("G", [at("A", "x", 8.6, gauge_mm=2150.0)])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.method_changed == () and s.u_method == 0.0


def test_tilt_against_offset_is_a_method_change():
    # Old offset 4 mm / 2000 = 0.0020 (u 0.0005); new tilt 0.2 deg: tan(0.2 deg) = 0.00349067,
    # u = radians(0.05) / cos^2(0.2 deg) = 0.000872676. Change 0.00149067; u = sqrt(0.0005^2 +
    # 0.000872676^2 + 0.0015^2) = sqrt(3.261563e-6) = 0.00180598; z = 0.825409.
    o, n = two([storey("G", [at("A", "x", 4.0)])],
               [storey("G", [tilt("x", 0.2, where="A")])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.method_changed == ("method",)
    assert s.change == pytest.approx(0.00149067, rel=1e-5)
    assert s.u_combined == pytest.approx(0.00180598, rel=1e-5)
    assert s.z == pytest.approx(0.825409, rel=1e-4)


def test_the_same_baseline_cancels_and_its_uncertainty_is_left_out():
    # Both: baseline 4 mm with baseline_sd_mm 2 over 2000 mm. Old 10 mm -> 6/2000 = 0.0030,
    # new 14 mm -> 0.0050: change 0.0020, as the raw readings (14 - 10) / 2000. The baseline
    # cancels, so u = sqrt(2) * 1/2000 = 0.000707, z = 2.828: significant. Had the baseline's
    # 2 mm been kept, each side's u = sqrt(1 + 4)/2000 = 0.001118, combined 0.001581, z = 1.26.
    base = {"baseline_mm": 4.0, "baseline_sd_mm": 2.0}
    o, n = two([storey("G", [at("A", "x", 10.0, **base)])],
               [storey("G", [at("A", "x", 14.0, **base)])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.same_baseline and s.method_changed == ()
    assert s.change == pytest.approx((14.0 - 10.0) / 2000)
    assert s.u_before == pytest.approx(0.0005) and s.u_after == pytest.approx(0.0005)
    assert s.z == pytest.approx(2.82843, rel=1e-5) and s.significant
    # Another baseline (5 mm the second time): a method change, baselines' uncertainties kept.
    # Old 0.0030 (u sqrt(5)/2000 = 0.00111803), new (14 - 5)/2000 = 0.0045 (same u):
    # u = sqrt(2 * 0.00111803^2 + 0.0015^2) = sqrt(4.75e-6) = 0.00217945, z = 0.0015/u = 0.688.
    o, n = two([storey("G", [at("A", "x", 10.0, **base)])],
               [storey("G", [at("A", "x", 14.0, baseline_mm=5.0, baseline_sd_mm=2.0)])])
    s = spots(cmp(o, n))[("x", "A")]
    assert s.method_changed == ("baseline",) and not s.same_baseline
    assert s.u_before == pytest.approx(0.00111803, rel=1e-5)
    assert s.u_combined == pytest.approx(0.00217945, rel=1e-5)
    assert s.z == pytest.approx(0.688247, rel=1e-5)


# --- reversals, spots in one survey only, the building line ------------------------------------

def test_every_spot_of_a_direction_reversed_warns_about_the_sign():
    # x: +6 -> -6 and +4 -> -3 mm at two spots: both reversed, so a warning for x; y: one of
    # two reversed (+2 -> -1), the other not (+3 -> +3): no warning for y.
    o, n = two([storey("G", [at("A", "x", 6.0), at("C", "x", 4.0),
                             at("1", "y", 2.0), at("5", "y", 3.0)])],
               [storey("G", [at("A", "x", -6.0), at("C", "x", -3.0),
                             at("1", "y", -1.0), at("5", "y", 3.0)])])
    c = cmp(o, n)
    assert c.all_reversed == ("x",)
    text = "\n".join(c.lines())
    assert "WARNING: every spot compared in x reversed its lean" in text
    assert "+x means the same direction in both surveys" in text
    assert "in y reversed" not in text
    # A spot at exactly 0 has no lean to reverse.
    assert all_reversed(c.storeys[0].spots) == ("x",)


def test_spots_in_one_survey_only_are_listed_not_compared():
    o, n = two([storey("G", [at("A", "x", 3.0), at("B", "x", 2.0)])],
               [storey("G", [at("A", "x", 3.0), at("stair core", "x", 5.0)])])
    c = cmp(o, n)
    s = spots(c)
    assert s[("x", "stair core")].status == "new" and s[("x", "stair core")].after == 0.0025
    assert s[("x", "B")].status == "not_remeasured" and s[("x", "B")].before == 0.001
    assert c.building_line.compared == 1
    text = "\n".join(c.lines())
    assert "stair core: new spot, +0.25% (not measured before)" in text
    assert "x, B: not re-measured (was +0.10%)" in text


def test_where_is_matched_normalised_and_readings_without_where_in_order():
    # "Grid  A" and " grid a" are one spot; the two readings without `where` pair in order.
    o, n = two([storey("G", [at("Grid  A", "x", 3.0), reading("x", 1.0), reading("x", 2.0)])],
               [storey("G", [at(" grid a", "x", 3.0), reading("x", 1.0), reading("x", 7.0)])])
    got = [(s.where, s.matched_by, s.change) for s in cmp(o, n).storeys[0].spots]
    # 7 - 2 = 5 mm over 2000 = 0.0025
    assert got == [("grid a", "where", 0.0), (None, "order", 0.0), (None, "order", 0.0025)]


def test_sidak_bound_and_chance_rate():
    # Sidak: k_m = Phi^-1(1 - (1 - 0.95^(1/m)) / 2). m = 10: 1 - 0.95^0.1 = 0.0051162,
    # half 0.0025581, Phi^-1(0.9974419) = 2.80. m = 100: 1 - 0.95^0.01 = 0.00051280,
    # half 0.00025640, Phi^-1(0.9997436) = 3.47 (the figures docs/method.md gives).
    assert sidak_bound(10) == pytest.approx(2.80, abs=0.005)
    assert sidak_bound(100) == pytest.approx(3.47, abs=0.005)
    # One spot: plain two-sided 95%, 1.96.
    assert sidak_bound(1) == pytest.approx(1.95996, abs=1e-5)
    # P(|Z| > 2) = erfc(2 / sqrt 2) = 0.0455.
    assert chance_rate(2.0) == pytest.approx(0.0455, abs=5e-5)


def test_building_line_counts_flags_against_chance():
    # Ten |z|: three over 2; the largest 2.9 is over k_10 = 2.80: beyond chance. Expected by
    # chance alone: 10 * 0.0455 = 0.455.
    zs = [0.1, 0.5, 1.0, 1.5, 1.9, 2.0, 2.1, 2.5, 2.9, 0.0]
    b = building_line(zs)
    assert (b.compared, b.flagged) == (10, 3)
    assert b.expected_by_chance == pytest.approx(0.455, abs=5e-4)
    assert b.bound == pytest.approx(2.80, abs=0.005) and b.beyond_chance
    # With the largest at 2.7, three are still flagged but none beyond the bound.
    b = building_line([*zs[:8], 2.7, 0.0])
    assert b.flagged == 3 and not b.beyond_chance
    assert building_line([]).bound is None


def test_building_line_of_a_comparison():
    # Two spots, A +8 -> +2 (|z| 4.243), B +2 -> +2 (0): k_2 = Phi^-1(1 - (1 - 0.95^0.5)/2)
    # = Phi^-1(0.987340) = 2.236; 4.243 > 2.236: movement beyond chance.
    o, n = two([storey("G", [at("A", "x", 8.0), at("B", "x", 2.0)])],
               [storey("G", [at("A", "x", 2.0), at("B", "x", 2.0)])])
    c = cmp(o, n)
    b = c.building_line
    assert (b.compared, b.flagged) == (2, 1)
    assert b.bound == pytest.approx(2.2365, abs=5e-4) and b.beyond_chance
    assert b.largest_z == pytest.approx(4.24264, rel=1e-5)
    assert "movement beyond chance" in c.building_words()


# --- member groups -----------------------------------------------------------------------------

def _groups(*gs: dict[str, Any]) -> list[dict[str, Any]]:
    return list(gs)


def test_groups_without_ref_match_as_the_ith_of_their_kind_ductility_and_dir():
    # Old: ductile columns (sound), ductile columns crack 1.4 mm (class III).
    # New: a brittle column group put first (another key), then the two ductile groups, the
    # second now at 2.5 mm (class IV). The 2nd ductile column group matches the 2nd: worse.
    old = _groups({"kind": "column", "count": 10},
                  {"kind": "column", "count": 2, "crack_mm": 1.4})
    new = _groups({"kind": "column", "count": 3, "ductility": "brittle"},
                  {"kind": "column", "count": 10},
                  {"kind": "column", "count": 2, "crack_mm": 2.5})
    o, n = two([storey("G", [at("A", "x", 1.0)], old)], [storey("G", [at("A", "x", 1.0)], new)])
    pairs, gone, fresh = match_groups(o.storeys[0].members, n.storeys[0].members)
    assert pairs == [(0, 1, "order"), (1, 2, "order")] and gone == [] and fresh == [0]
    m = cmp(o, n).storeys[0].members
    assert [(g.change, g.before, g.after, g.matched_by) for g in m] == [
        ("worse", "III", "IV", "order")]


def test_an_unchanged_group_is_never_new():
    # The same damaged group, no ref, logged both times at class III: nothing to list.
    g = _groups({"kind": "wall", "count": 1, "crack_mm": 1.4, "dir": "x"})
    o, n = two([storey("G", [at("A", "x", 1.0)], g)], [storey("G", [at("A", "x", 1.0)], g)])
    assert cmp(o, n).storeys[0].members == ()
    # A wall in y is another key: the x wall is not logged again and the y wall is new.
    gy = _groups({"kind": "wall", "count": 1, "crack_mm": 1.4, "dir": "y"})
    o, n = two([storey("G", [at("A", "x", 1.0)], g)], [storey("G", [at("A", "x", 1.0)], gy)])
    assert [(m.change, m.dir) for m in cmp(o, n).storeys[0].members] == [("new", "y"),
                                                                          ("gone", "x")]


def test_groups_with_ref_match_by_ref_wherever_they_are_listed():
    old = _groups({"kind": "column", "count": 1, "crack_mm": 0.3, "ref": "C4"},
                  {"kind": "column", "count": 1, "ref": "C5"})
    new = _groups({"kind": "column", "count": 1, "ref": "C5"},
                  {"kind": "column", "count": 1, "crack_mm": 1.6, "ref": "C4"})
    o, n = two([storey("G", [at("A", "x", 1.0)], old)], [storey("G", [at("A", "x", 1.0)], new)])
    c = cmp(o, n)
    assert [(m.ref, m.before, m.after, m.matched_by) for m in c.storeys[0].members] == [
        ("C4", "II", "III", "ref")]
    assert "column C4 worsened from class II to class III" in "\n".join(c.lines())


# --- hazards, text and JSON --------------------------------------------------------------------

def test_new_and_cleared_hazards_in_words():
    hz_old = [{"kind": "utility_hazard", "where": "gas meter"}]
    hz_new = [{"kind": "falling_hazard", "where": "parapet", "height_above_ground_m": 7.0}]
    o, n = two([storey("G", [at("A", "x", 1.0)])], [storey("G", [at("A", "x", 1.0)])],
               hz_old, hz_new)
    c = cmp(o, n)
    assert [h.kind for h in c.new_hazards] == ["falling_hazard"]
    assert [h.kind for h in c.cleared_hazards] == ["utility_hazard"]
    text = "\n".join(c.lines())
    assert "new hazard: falling hazard at parapet" in text
    assert "no longer reported: services hazard at gas meter" in text
    assert "falling_hazard" not in text


def test_times_are_written_as_the_text_output_writes_them():
    # ISO 8601 as recorded, with the zone, as `triage assess` and `triage list` print them;
    # never cut to the minute without its zone
    o, n = two([storey("G", [at("A", "x", 1.0)])], [storey("G", [at("A", "x", 1.2)])])
    c = cmp(o, n)
    assert c.lines()[0] == ("tier: ○ occupy on 2026-11-28T10:00:00+13:00 -> ○ occupy on "
                            "2026-11-30T10:00:00+13:00 (unchanged)")
    assert o.inspection.at.isoformat() in summary(o, assess(o))


def _write_pair(tmp_path, o, n, other_building=False):
    paths = []
    for name, s in (("old", o), ("new", n)):
        data = s.to_json_dict()
        if other_building and name == "new":
            data["building"]["id"] = "99999999-1d1e-4f2a-9a3b-7c6d5e4f3a21"
        p = tmp_path / f"{name}.json"
        p.write_text(json.dumps(data), encoding="utf-8")
        paths.append(str(p))
    return paths


def test_command_text_starts_with_the_caution_and_escapes_control_characters(tmp_path):
    # A `where` carrying an escape sequence (clear the screen) is shown as \u001b, never raw.
    o, n = two([storey("G", [at("A\x1b[2J", "x", 6.0)])],
               [storey("G", [at("A\x1b[2J", "x", -6.0)])])
    old, new = _write_pair(tmp_path, o, n)
    run = [sys.executable, "-m", "triage", "--db", str(tmp_path / "db.sqlite"), "compare"]
    done = subprocess.run([*run, old, new], capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    assert done.stdout.startswith("CAUTION: Indicative")
    assert "engineer of record" in done.stdout.splitlines()[1]
    # each survey by its code and whole id, as reports print them
    assert f"earlier: survey 0c3d2a1b (id {OLD_ID}) by Tess Tester" in done.stdout
    assert f"later:   survey 0c3d2a1b (id {NEW_ID}) by Tess Tester" in done.stdout
    assert "\x1b" not in done.stdout and "A\\u001b[2J" in done.stdout
    assert "significant" in done.stdout and "movement beyond chance" in done.stdout
    js = subprocess.run([*run, old, new, "--format", "json"], capture_output=True, text=True)
    data = json.loads(js.stdout)
    assert data["format"] == "triage-comparison/2"
    spot = data["storeys"][0]["spots"][0]
    assert spot["where"] == "A\x1b[2J"  # the JSON escape reads back as the text written
    assert spot["significant"] is True and spot["reversed"] is True
    assert data["all_reversed"] == ["x"] and data["building_line"]["flagged"] == 1


def test_command_refuses_two_buildings_unless_forced(tmp_path):
    o, n = two([storey("G", [at("A", "x", 4.0)])], [storey("G", [at("A", "x", 9.0)])])
    old, other = _write_pair(tmp_path, o, n, other_building=True)
    run = [sys.executable, "-m", "triage", "--db", str(tmp_path / "db.sqlite"), "compare"]
    bad = subprocess.run([*run, old, other], capture_output=True, text=True)
    assert bad.returncode == 1 and "different buildings" in bad.stderr
    assert bad.stderr.count("\n") == 1
    forced = subprocess.run([*run, old, other, "--force"], capture_output=True, text=True)
    assert forced.returncode == 0 and "different buildings" in forced.stdout


def test_every_json_key_is_documented():
    from pathlib import Path

    o, n = two([storey("G", [at("A", "x", 4.0)], _groups(
                    {"kind": "column", "count": 1, "crack_mm": 1.4}))],
               [storey("G", [at("A", "x", 9.0), at("B", "y", 1.0)], _groups(
                   {"kind": "column", "count": 1, "crack_mm": 2.5}))],
               new_hazards=[{"kind": "utility_hazard"}])
    data = json.loads(cmp(o, n).to_json())
    keys: set[str] = set()

    def walk(v: Any) -> None:
        if isinstance(v, dict):
            keys.update(v)
            for x in v.values():
                walk(x)
        elif isinstance(v, list):
            for x in v:
                walk(x)

    walk(data)
    doc = Path(__file__).resolve().parents[2] / "docs" / "formats.md"
    text = doc.read_text(encoding="utf-8")
    section = text[text.index("## Comparison"):text.index("## Keys and signatures")]
    missing = sorted(k for k in keys if f"`{k}`" not in section)
    assert missing == []


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
    assert "worsened from class III to class V" in text
