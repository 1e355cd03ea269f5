"""Readings to spots, pinned at their edges: the gauge tolerance, tilts repeating, the wording of
each sub-spot note and of each defaulted uncertainty, the chi-square quantile away from 0.99.

Offsets over a 2000 mm gauge unless stated. Values worked by hand in the comments; scipy is the
independent reference for the chi-square distribution.
"""

from __future__ import annotations

import math

import pytest
from scipy.stats import chi2

from tests.helpers import make, reading, storey, tilt
from triage.assess import assess
from triage.assess.drift import figures, level_index, pct
from triage.assess.repair import repairability
from triage.assess.spots import chi2_quantile, spots_of_survey
from triage.standards import load

STD = load()
A = STD.assumptions


def _spots(readings):
    s = make([storey("1", readings, members=[])], sx="steel_moment_frame",
             sy="steel_moment_frame")
    return spots_of_survey(s, A)


@pytest.mark.parametrize(("gauge", "repeat"), [
    (2200.0, True),     # exactly 10% longer: |2200 - 2000| = 200 = 0.10 * 2000, still a repeat
    (1800.0, True),     # exactly 10% shorter
    (2200.5, False),    # 200.5 mm apart: over the tolerance by half a millimetre
    (1799.5, False),
])
def test_a_gauge_at_the_ten_percent_edge(gauge, repeat):
    found = _spots([reading("x", 2.0, where="C4"), reading("x", 2.0, gauge_mm=gauge, where="C4")])
    assert [s.readings for s in found.spots] == ([(0, 1)] if repeat else [(0,), (1,)])
    assert len(found.notes) == (0 if repeat else 1)


def test_tilts_at_one_spot_with_one_baseline_are_repeats():
    # Two tilts of 0.10 and 0.20 deg, sd 0.05 each, at "core": one spot, value the mean angle's
    # tangent to first order: (tan 0.1 deg + tan 0.2 deg) / 2 = 0.00261801; u = radians(0.05)
    # / sqrt(2) (the slopes 1/cos^2 are 1.000003 and 1.000012).
    found = _spots([tilt("x", 0.10, where="core"), tilt("x", 0.20, where="Core")])
    assert len(found.spots) == 1 and found.notes == ()
    sp = found.spots[0]
    assert sp.readings == (0, 1) and sp.method == "tilt"
    want = (math.tan(math.radians(0.1)) + math.tan(math.radians(0.2))) / 2
    assert sp.value == pytest.approx(want, rel=1e-5)
    assert sp.u == pytest.approx(math.radians(0.05) / math.sqrt(2), rel=1e-4)


def test_tilts_with_different_baselines_are_sub_spots():
    found = _spots([tilt("x", 0.10, where="core"), tilt("x", 0.20, where="core", baseline_deg=0.1)])
    assert [s.where for s in found.spots] == ["core", "core #2"]


def test_each_sub_spot_note_names_what_differs():
    found = _spots([reading("x", 2.0, where="C4"), reading("x", 2.0, gauge_mm=2300.0, where="C4"),
                    tilt("x", 0.05, where="C4"), reading("x", 2.0, baseline_mm=1.0, where="C4")])
    assert found.notes == (
        "storey 1, x, C4: reading 2 differs from reading 1 at the same spot in gauge (more than "
        "10% apart), so it is kept as a spot of its own, 'C4 #2'",
        "storey 1, x, C4: reading 3 differs from reading 1 at the same spot in method (offset or "
        "tilt), so it is kept as a spot of its own, 'C4 #3'",
        "storey 1, x, C4: reading 4 differs from reading 1 at the same spot in baseline, so it is "
        "kept as a spot of its own, 'C4 #4'",
    )


def test_each_defaulted_uncertainty_is_worded_in_full():
    # The instrument defaults: 1 mm for an offset, 0.05 deg for a tilt (assumptions.toml).
    a = assess(make([storey("1", [reading("x", 1.0, sd_mm=None, where="A"),
                                  tilt("y", 0.01, sd_deg=None, baseline_deg=0.0),
                                  reading("y", 1.0, baseline_mm=0.5)])]))
    assert a.defaulted == (
        "storey 1, x, reading 1 (A): uncertainty 1 mm (instrument default, common practice)",
        "storey 1, y, reading 2: uncertainty 0.05° (instrument default, common practice)",
        "storey 1, y, reading 2: as-built uncertainty 0.05° (instrument default, common "
        "practice)",
        "storey 1, y, reading 3: as-built uncertainty 1 mm (instrument default, common practice)",
    )


@pytest.mark.parametrize(("p", "dof"), [
    (0.5, 1),            # the median of 1 dof, 0.454936: under the bracket's floor of 1
    (0.1, 2),            # -2 ln(0.9) = 0.210721
    (1.0 - 1e-12, 1),    # 50.844: over the first bracket (35.1), so the bracket is doubled
])
def test_chi_square_quantile_off_the_agreement_point(p, dof):
    assert chi2_quantile(p, dof) == pytest.approx(chi2.ppf(p, dof), rel=1e-5)


# --- drift levels, percentages and repairability at their edges ----------------------------------

@pytest.mark.parametrize(("v", "text"), [
    (0.0099, "0.99%"), (0.00999, "1.00%"), (0.01, "1.0%"), (0.0125, "1.2%"), (-0.0099, "-0.99%"),
    (-0.02, "-2.0%"), (0.0, "0.00%")])
def test_a_drift_ratio_in_percent_two_decimals_under_one_percent(v, text):
    assert pct(v) == text


def test_a_drift_at_a_figure_meets_that_level():
    f = figures("rc_frame", STD, A)   # IO 0.2% (ours for 'negligible'), LS 1.0%, CP 4.0%
    assert (f.IO, f.LS, f.CP) == pytest.approx((0.002, 0.01, 0.04))
    got = [level_index(d, f) for d in (0.0, f.IO, f.IO * 1.0001, f.LS, f.LS * 1.0001, f.CP,
                                       f.CP * 1.0001)]
    assert got == [0, 0, 1, 1, 2, 2, 3]


@pytest.mark.parametrize(("largest", "over"), [(0.005, 0.0), (0.0050001, 1.0), (0.001, 0.0)])
def test_the_japanese_threshold_counts_only_drift_over_it(largest, over):
    # McCormick et al. (2008), 1/200 = 0.5% (tests/reference/test_repairability_fragilities.py):
    # "over the threshold", so exactly 0.5% is not over it
    got = {r.key: r.probability for r in repairability(largest, STD)}
    assert got["repair_threshold_jp"] == over


def test_the_fragilities_at_their_medians_and_at_zero():
    # FEMA P-58 irreparable (median 1.0%) and Ramirez & Miranda demolition (median 1.5%): one
    # half at the median; no drift, no chance (the logarithm is not taken of 0)
    assert {r.key: r.probability for r in repairability(0.01, STD)}["irreparable"] == 0.5
    assert {r.key: r.probability for r in repairability(0.015, STD)}["demolition"] == 0.5
    assert all(r.probability == 0.0 for r in repairability(0.0, STD))
    assert all(r.probability is None for r in repairability(None, STD))
