"""The exact member probabilities (integer loss sums, Hoeffding shortcuts) agree with plain
enumeration of every class combination, on generated storeys small enough to enumerate."""

from __future__ import annotations

import copy

import pytest
from hypothesis import given
from hypothesis import strategies as st

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
