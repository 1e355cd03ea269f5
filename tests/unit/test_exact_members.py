"""The exact member probabilities (integer loss sums, Hoeffding shortcuts) agree with plain
enumeration of every class combination, on generated storeys small enough to enumerate."""

from __future__ import annotations

import copy

import pytest
from hypothesis import given

from tests.unit.strategies import surveys
from triage.assess import assess
from triage.assess import uncertainty as unc
from triage.model import parse_survey


def _with_rc(d):
    d = copy.deepcopy(d)
    d["building"]["system"] = {"x": "rc_wall", "y": "rc_frame"}
    return d


@given(surveys(max_storeys=2))
def test_exact_equals_enumeration(d):
    d = _with_rc(d)
    s = parse_survey(d)
    exact = assess(s).tier_probability
    original = unc.member_cdf_exact
    try:
        unc.member_cdf_exact = lambda *a, **k: None  # force the enumeration path
        enumerated = assess(s).tier_probability
    finally:
        unc.member_cdf_exact = original
    for t in exact:
        assert exact[t] == pytest.approx(enumerated[t], abs=1e-6)


@pytest.mark.parametrize(("loss", "probs", "cap", "want"), [
    ([[0, 10]], [[1.0, 0.0]], 5, 1),      # certain, under the cap
    ([[0, 10]], [[0.0, 1.0]], 5, 0),      # certain, over it
    ([[0, 10]], [[0.5, 0.5]], 5, None),   # a coin toss: not settled
    ([[0, 1]] * 400, [[0.99, 0.01]] * 400, 200, 1),  # mean 4, spread 400: far under 200
])
def test_hoeffding(loss, probs, cap, want):
    import numpy as np
    assert unc._hoeffding(np.array(loss), np.array(probs), cap) == want


@given(surveys(max_storeys=2))
def test_member_level_at_the_point_classes_agrees_with_the_model(d):
    # The member stage works its point level out from capacity, floor and collapse rule; the
    # vectorised model (used for probabilities and what-ifs) must say the same.
    from triage.assess import engine
    s = parse_survey(_with_rc(d))
    std = engine.load()
    ctx = engine.Context(s, std, std.assumptions,
                         {x: engine.figures(getattr(s.building.system, x), std, std.assumptions)
                          for x in "xy"}, tuple(engine.dmg.rc_dirs(s, std)), 0)
    for si in range(len(s.storeys)):
        sm = engine.member_stage(ctx, si)
        if sm.level is not None:
            assert int(sm.model.level(sm.classes.point[None, :])[0]) == int(sm.level)


def _counted(counts):
    # One rc_frame storey: ten column groups whose cracks sit near the JBDPA class bounds
    # (0.2, 1, 2 mm) with sd 0.1 mm, so every group's class is in doubt and R's grade with it.
    cracks = [0.18, 0.95, 1.05, 1.9, 2.1, 0.22, 0.98, 1.95, 0.3, 1.0]
    return {
        "format": "triage-survey/2",
        "building": {"name": "Counting House", "address": "1 Tally Lane, Kōwhai Bay",
                     "system": {"x": "rc_frame", "y": "rc_frame"}},
        "inspection": {"inspector": {"name": "T. Counter"}, "at": "2026-11-29T10:00:00+13:00"},
        "storeys": [{"label": "1", "height_m": 3.5,
                     "readings": [{"dir": "x", "offset_mm": 1.0, "gauge_mm": 2000},
                                  {"dir": "y", "offset_mm": 1.0, "gauge_mm": 2000}],
                     "members": [{"kind": "column", "count": n, "crack_mm": c,
                                  "crack_sd_mm": 0.1, "ref": f"C{k}"}
                                 for k, (n, c) in enumerate(zip(counts, cracks, strict=True))]}],
    }


def test_large_equal_counts_give_the_probabilities_of_single_members():
    # R = sum(eta * w) / sum(w) depends on the weights only through their ratios, so ten groups
    # of 10,000 columns each are ten groups of one column as far as any probability goes. The
    # exact sums divide the losses by their common divisor (10,000 here); without that, the
    # total loss reaches 20 * 100,000 grid units and the sums took over a minute.
    one = assess(parse_survey(_counted([1] * 10))).tier_probability
    many = assess(parse_survey(_counted([10_000] * 10))).tier_probability
    # in real doubt between hold and evacuate (no chance of occupy): the sums matter
    assert one["occupy"] == 0.0 and 0.3 < one["hold"] < 0.7 and 0.3 < one["evacuate"] < 0.7
    for t in one:
        assert many[t] == pytest.approx(one[t], rel=1e-9, abs=1e-12)
    # Counts in the ratio 2 : 1 are the same as 10,000 : 5,000.
    small = assess(parse_survey(_counted([2, 1] * 5))).tier_probability
    large = assess(parse_survey(_counted([10_000, 5_000] * 5))).tier_probability
    for t in small:
        assert large[t] == pytest.approx(small[t], rel=1e-9, abs=1e-12)


def test_a_storey_too_wide_to_sum_exactly_is_still_assessed():
    # Counts 10,000, 9,999, ... share no divisor: the widest total loss (about 2 million grid
    # units) is over EXACT_SUM_LIMIT, so the exact sums give way to enumeration or sampling.
    d = _counted([10_000 - k for k in range(10)])
    s = parse_survey(d)
    a = assess(s)
    assert abs(sum(a.tier_probability.values()) - 1.0) < 1e-6
    ref = assess(parse_survey(_counted([1] * 10))).tier_probability
    for t in ref:   # nearly equal counts: nearly the same answer as equal ones
        assert a.tier_probability[t] == pytest.approx(ref[t], abs=0.02)
