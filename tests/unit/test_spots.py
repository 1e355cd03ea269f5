"""Readings to spots (docs/method.md, "Readings, spots and repeats"), each value worked by hand below.

Units: offsets over a 2000 mm gauge, so 1 mm is a drift ratio of 0.0005.
"""

from __future__ import annotations

import math

import pytest
from scipy.stats import chi2, norm

from tests.helpers import make, reading, storey, tilt
from triage.assess import assess
from triage.assess.spots import (
    chi2_cdf,
    chi2_quantile,
    combine,
    normalise_where,
    spots_of_survey,
)
from triage.standards import load

A = load().assumptions


def spots(readings, members=None):
    s = make([storey("1", readings, members=[] if members is None else members)],
             sx="steel_moment_frame", sy="steel_moment_frame")
    return spots_of_survey(s, A)


def test_where_is_normalised():
    # NFKC folds the full-width letters and the no-break space; casefold, collapse, trim.
    assert normalise_where("  Grid\u00a0B2 ") == "grid b2"
    assert normalise_where("GRID   b2") == "grid b2"
    assert normalise_where("ｇｒｉｄ Ｂ２") == "grid b2"
    assert normalise_where("Straße") == normalise_where("STRASSE")
    assert normalise_where("   ") is None
    assert normalise_where(None) is None


def test_repeats_at_one_spot_are_averaged():
    # Three readings of 3 mm, sd 1 mm, at "grid B2" written three ways: one spot.
    # value = 3 mm = 0.0015; u = 1 mm / sqrt(3) = 0.57735 mm = 0.000288675.
    found = spots([reading("x", 3.0, where="grid B2"), reading("x", 3.0, where=" Grid  b2"),
                   reading("x", 3.0, where="GRID B2")])
    assert len(found.spots) == 1
    sp = found.spots[0]
    assert sp.value == pytest.approx(0.0015, rel=1e-12)
    assert sp.u == pytest.approx(0.0005 / math.sqrt(3), rel=1e-12)
    assert sp.readings == (0, 1, 2)
    assert (sp.where, sp.key, sp.sub, sp.method, sp.gauge_mm) == (
        "grid B2", "grid b2", 1, "offset", 2000.0)
    assert not sp.disagree and sp.chi2 == pytest.approx(0.0, abs=1e-12)
    assert found.notes == ()


def test_inverse_variance_weights():
    # 2 mm (sd 1) and 4 mm (sd 2): weights 1 and 1/4 per mm^2.
    # mean = (2*1 + 4*0.25) / 1.25 = 2.4 mm = 0.0012; u = 1/sqrt(1.25) = 0.894427 mm
    # = 0.000447214. Q = (2-2.4)^2/1 + (4-2.4)^2/4 = 0.16 + 0.64 = 0.8, under 6.63 (1 dof).
    sp = spots([reading("x", 2.0, sd_mm=1.0, where="A"),
                reading("x", 4.0, sd_mm=2.0, where="a")]).spots[0]
    assert sp.value == pytest.approx(0.0012, rel=1e-12)
    assert sp.u == pytest.approx(0.000447214, rel=1e-6)
    assert sp.chi2 == pytest.approx(0.8, rel=1e-12)
    assert not sp.disagree


def test_signed_values_are_averaged_not_their_sizes():
    # +1 mm and -1 mm at one spot, sd 1 each: mean 0 (not 1 mm); Q = 1 + 1 = 2 < 6.63.
    sp = spots([reading("x", 1.0, where="A"), reading("x", -1.0, where="A")]).spots[0]
    assert sp.value == pytest.approx(0.0, abs=1e-15)
    assert not sp.disagree


def test_disagreeing_repeats_take_the_largest_reading():
    # +2 mm and -10 mm, sd 1 each: mean -4 mm, Q = 6^2 + 6^2 = 72 > 6.63 (0.99, 1 dof): the
    # spot takes the larger in size, -10 mm = -0.005, with that reading's 1 mm = 0.0005.
    found = spots([reading("x", 2.0, where="stair"), reading("x", -10.0, where="stair")])
    sp = found.spots[0]
    assert sp.disagree and sp.chi2 == pytest.approx(72.0)
    assert sp.value == pytest.approx(-0.005)
    assert sp.u == pytest.approx(0.0005)
    assert len(found.notes) == 1
    assert "stair" in found.notes[0] and "reading 2" in found.notes[0]
    assert "6.63" in found.notes[0]


def test_baseline_uncertainty_is_added_once_per_spot():
    # Offsets 5 and 7 mm, baseline 2 mm, sd 1 mm each, baseline_sd absent (default 1 mm):
    # value = mean(3, 5) = 4 mm = 0.002; u_measure = 1/sqrt(2) mm; u_baseline = 1 mm;
    # u = sqrt(0.5 + 1) = 1.224745 mm = 0.000612372. (Adding it per reading before averaging
    # would give sqrt(2)/sqrt(2) = 1 mm instead.)
    sp = spots([reading("x", 5.0, baseline_mm=2.0, where="B"),
                reading("x", 7.0, baseline_mm=2.0, where="B")]).spots[0]
    assert sp.value == pytest.approx(0.002)
    assert sp.u_measure == pytest.approx(0.0005 / math.sqrt(2))
    assert sp.u_baseline == pytest.approx(0.0005)
    assert sp.u == pytest.approx(0.000612372, rel=1e-6)
    assert sp.has_baseline


def test_baseline_sd_given():
    # Offset 6 mm, baseline 2 mm with baseline_sd_mm 3, sd 1 over 2000:
    # value 4 mm = 0.002; u = sqrt(1 + 9) = 3.162278 mm = 0.00158114.
    sp = spots([reading("x", 6.0, baseline_mm=2.0, baseline_sd_mm=3.0, where="B")]).spots[0]
    assert sp.value == pytest.approx(0.002)
    assert sp.u == pytest.approx(0.00158114, rel=1e-5)
    # Tilt 0.5 deg, baseline -0.1 deg with baseline_sd_deg 0.2, sd 0.05: angle 0.6 deg,
    # 1/cos^2(0.6 deg) = 1.00010967; u = radians(sqrt(0.05^2 + 0.2^2)) * 1.00010967
    # = radians(0.206155) * 1.00010967 = 0.00359808 * 1.00010967 = 0.00359848.
    sp = spots([tilt("x", 0.5, baseline_deg=-0.1, baseline_sd_deg=0.2, where="B")]).spots[0]
    assert sp.value == pytest.approx(math.tan(math.radians(0.6)), rel=1e-12)
    assert sp.u == pytest.approx(0.00359848, rel=1e-5)


def test_no_baseline_adds_nothing():
    sp = spots([reading("x", 5.0, where="B")]).spots[0]
    assert (sp.u_baseline, sp.u, sp.has_baseline) == (0.0, pytest.approx(0.0005), False)


def test_tilt_with_baseline():
    # tilt 0.30 deg, baseline 0.10 deg: tan(0.20 deg); 0.20 deg = 0.003490658504 rad,
    # tan x = x + x^3/3 = 0.003490658504 + 0.0000000141779 = 0.00349067268.
    # u = radians(0.05) / cos^2(0.2 deg) = 0.000872665 * 1.0000122 = 0.000872675 (reading);
    # baseline default 0.05 deg likewise: u = 0.000872675 * sqrt(2) = 0.00123415.
    sp = spots([tilt("x", 0.30, baseline_deg=0.10, where="core")]).spots[0]
    assert sp.value == pytest.approx(0.00349067268, rel=1e-8)
    assert sp.method == "tilt" and sp.gauge_mm is None
    assert sp.u_measure == pytest.approx(0.000872675, rel=1e-6)
    assert sp.u == pytest.approx(0.00123415, rel=1e-5)


def test_sub_spots_by_method_baseline_and_gauge():
    # At "C4": an offset over 2000 mm; one over 2150 mm (7.5% longer: a repeat); one over
    # 2300 mm (15%: a sub-spot); a tilt (another method: a sub-spot); an offset over 2000 with a
    # baseline (another baseline: a sub-spot). Five readings, four spots, three notes.
    found = spots([reading("x", 2.0, where="C4"), reading("x", 2.15, gauge_mm=2150.0, where="C4"),
                   reading("x", 2.3, gauge_mm=2300.0, where="c4"), tilt("x", 0.05, where="C4"),
                   reading("x", 2.0, baseline_mm=1.0, where="C4")])
    names = [(s.where, s.sub, s.readings) for s in found.spots]
    assert names == [("C4", 1, (0, 1)), ("c4 #2", 2, (2,)), ("C4 #3", 3, (3,)),
                     ("C4 #4", 4, (4,))]
    assert len(found.notes) == 3
    assert "gauge" in found.notes[0] and "method" in found.notes[1]
    assert "baseline" in found.notes[2]


def test_a_reading_without_where_is_a_spot_of_its_own():
    found = spots([reading("x", 3.0), reading("x", 3.0, where=" "), reading("y", 1.0)])
    assert [(s.dir, s.where, s.readings) for s in found.spots] == [
        ("x", None, (0,)), ("x", None, (1,)), ("y", None, (2,))]
    assert found.spots[0].identity != found.spots[1].identity
    assert found.spots[1].name() == "reading 2"


def test_spots_come_x_first_then_in_order_of_first_reading():
    found = spots([reading("y", 1.0, where="P"), reading("x", 1.0, where="Q"),
                   reading("x", 1.0, where="R"), reading("x", 1.0, where="q")])
    assert [(s.dir, s.where, s.readings) for s in found.spots] == [
        ("x", "Q", (1, 3)), ("x", "R", (2,)), ("y", "P", (0,))]


@pytest.mark.parametrize("dof", [1, 2, 3, 5, 10, 30, 199])
def test_chi_square_against_scipy(dof):
    # The 0.99 quantile of chi-square (scipy.stats.chi2 as the independent reference; for
    # 2 dof it is -2 ln(0.01) = 9.21034 exactly, and for 1 dof 2.5758^2 = 6.63490).
    q = chi2_quantile(0.99, dof)
    assert q == pytest.approx(chi2.ppf(0.99, dof), rel=1e-9)
    for x in (0.01, 0.5, dof, 2.0 * dof + 5.0):
        assert chi2_cdf(x, dof) == pytest.approx(chi2.cdf(x, dof), abs=1e-12)
    if dof == 2:
        assert q == pytest.approx(-2.0 * math.log(0.01), rel=1e-9)
    if dof == 1:
        assert q == pytest.approx(norm.ppf(0.995) ** 2, rel=1e-9)


def test_combine_at_the_quantile():
    # Two readings 0 and d with u = 1: mean d/2, Q = d^2/2. The 0.99 point for 1 dof is
    # 6.634897, so d = sqrt(2 * 6.634897) = 3.642771 is the edge.
    edge = math.sqrt(2 * chi2.ppf(0.99, 1))
    assert not combine([0.0, edge - 1e-6], [1.0, 1.0])[3]
    assert combine([0.0, edge + 1e-6], [1.0, 1.0])[3]


def test_repeats_no_longer_lower_p_occupy():
    # Steel moment frame, IO 0.2% = 4 mm over 2000. One 3 mm reading, sd 1 mm:
    # P(occupy) = Phi((4-3)/1) - Phi((-4-3)/1) = 0.841345 - 0.0000000000013 = 0.841345.
    # The same reading three times at one spot: u = 1/sqrt(3) mm, so
    # P = Phi(1 * sqrt(3)) - Phi(-7 * sqrt(3)) = Phi(1.732051) = 0.958368.
    # (Taken as three places, as before, it was 0.841345^3 = 0.595.)
    one = assess(make([storey("1", [reading("x", 3.0, where="A")], members=[])],
                      sx="steel_moment_frame", sy="steel_moment_frame"))
    three = assess(make([storey("1", [reading("x", 3.0, where="A")] * 3, members=[])],
                        sx="steel_moment_frame", sy="steel_moment_frame"))
    assert one.tier_probability["occupy"] == pytest.approx(0.841345, abs=1e-6)
    assert three.tier_probability["occupy"] == pytest.approx(0.958368, abs=1e-6)
    assert three.storeys[0].readings == {"x": 3, "y": 0}
    assert three.storeys[0].drift_sd.x == pytest.approx(0.0005 / math.sqrt(3), rel=1e-5)


def test_separate_spots_still_multiply():
    # Two spots of 3 mm each (different places): 0.841345^2 = 0.707861.
    a = assess(make([storey("1", [reading("x", 3.0, where="A"), reading("x", 3.0, where="B")],
                            members=[])], sx="steel_moment_frame", sy="steel_moment_frame"))
    assert a.tier_probability["occupy"] == pytest.approx(0.707861, abs=1e-6)
