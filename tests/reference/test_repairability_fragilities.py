"""Residual-drift repairability fragilities.

- FEMA P-58-1 (2012, 2nd ed. 2018): irreparable damage, lognormal, median 1.0%, beta 0.3.
  Status: from memory (docs/references.md, FEMA P-58).
- Ramirez & Miranda (2012), Earthquake Engng Struct Dyn 41(11): demolition, lognormal, median
  1.5%, beta 0.3. Status: secondary.
- McCormick, Aburano, Ikenaga & Nakashima (2008), 14WCEE: repair-or-rebuild threshold 0.5%
  (1/200). Status: from memory.

Checked against scipy.stats.lognorm (s = beta, scale = median), tolerance 1e-6 absolute after
the engine's 6-significant-digit rounding (relative 1e-5).
"""

from __future__ import annotations

import pytest
from scipy.stats import lognorm

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.standards import load


def _alt(key):
    return next(a for a in load().repairability if a.key == key)


def test_table_values():
    assert (_alt("irreparable").median_pct, _alt("irreparable").beta) == (1.0, 0.3)
    assert (_alt("demolition").median_pct, _alt("demolition").beta) == (1.5, 0.3)
    assert _alt("repair_threshold_jp").threshold_pct == 0.5
    assert _alt("irreparable").source.status == "memory"
    assert _alt("demolition").source.status == "secondary"


@pytest.mark.parametrize("offset_mm", [1.0, 6.0, 12.0, 20.0, 30.0, 45.0])
def test_fragilities_against_scipy_lognorm(offset_mm):
    drift = offset_mm / 2000.0
    s = make([storey("1", [reading("x", offset_mm), reading("y", 0.5)])])
    rep = {r.key: r.probability for r in assess(s).repairability}
    assert rep["irreparable"] == pytest.approx(lognorm.cdf(drift, s=0.3, scale=0.010), rel=1e-5,
                                               abs=1e-12)
    assert rep["demolition"] == pytest.approx(lognorm.cdf(drift, s=0.3, scale=0.015), rel=1e-5,
                                              abs=1e-12)
    assert rep["repair_threshold_jp"] == (1.0 if drift > 0.005 else 0.0)


def test_design_example_values():
    # docs/method.md's worked example: largest drift 0.60% gives 0.0443 and 0.00113.
    s = make([storey("1", [reading("x", 12.0), reading("y", 0.0)])])
    rep = {r.key: r.probability for r in assess(s).repairability}
    assert rep["irreparable"] == pytest.approx(0.0443, abs=5e-5)
    assert rep["demolition"] == pytest.approx(0.00113, abs=5e-6)


def test_alternatives_stay_separate_and_named():
    s = make([storey("1", [reading("x", 12.0), reading("y", 0.0)])])
    reps = assess(s).repairability
    assert [r.key for r in reps] == ["irreparable", "demolition", "repair_threshold_jp"]
    assert "from memory" in reps[0].source and "Ramirez & Miranda" in reps[1].source


def test_no_drift_no_probability():
    s = make([storey("1", [], [{"kind": "column", "count": 4}])])
    assert all(r.probability is None for r in assess(s).repairability)
