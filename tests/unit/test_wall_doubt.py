"""A crack width near a FEMA 306 severity bound gives a chance of the other severity.

The crack is normal with its stated uncertainty, as for its JBDPA class (docs/method.md,
section 8); the expected chances are worked here from the normal distribution (scipy), not from
the engine. Crack bounds and factors are the FEMA 306 table's (from memory: see
tests/reference/test_fema306.py); the infill panel in corner crushing is moderate up to 6.3 mm
(lambda Q 0.8) and heavy over it (lambda Q 0.5). Ten infill panels at one crack width give the
storey a ratio of 0.8 (light, IO by our link) or 0.5 (severe, CP); class IV by JBDPA's 2 mm
bound either way (a floor of LS), so the FEMA 306 severity alone moves the tier between hold
and evacuate. Tolerance 1e-6: the drift readings add a tail of about 4e-8.
"""

from __future__ import annotations

from typing import Any

import pytest
from scipy import stats

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.wall_doubt import wall_doubt
from triage.standards import load

QUIET = [reading("x", 0.5), reading("y", 0.5)]
PHI = stats.norm.cdf


def _infill(cracks: list[float], sd: float = 0.2, count: int = 10,
            extra: list[dict[str, Any]] | None = None) -> Any:
    members = [{"kind": "infill", "count": count, "crack_mm": c, "crack_sd_mm": sd,
                "mode": "corner_crushing"} for c in cracks]
    return make([storey("G", QUIET, members + (extra or []))], sx="urm_infill", sy="urm_infill")


@pytest.mark.parametrize("crack", [6.0, 6.2, 6.3, 6.4, 6.6])
def test_a_crack_near_the_heavy_bound_gives_the_chance_of_either_severity(crack) -> None:
    a = assess(_infill([crack]))
    heavy = 1.0 - PHI((6.3 - crack) / 0.2)
    assert a.tier_probability["evacuate"] == pytest.approx(heavy, abs=1e-6)
    assert a.tier_probability["hold"] == pytest.approx(1.0 - heavy, abs=1e-6)
    assert a.tier == ("evacuate" if crack > 6.3 else "hold")
    assert a.storeys[0].members[0].severity == ("heavy" if crack > 6.3 else "moderate")
    assert a.tier_probability_se["evacuate"] == 0.0   # enumerated, not sampled


def test_far_from_a_bound_the_severity_is_as_good_as_certain() -> None:
    a = assess(_infill([4.5]))
    assert a.tier_probability["hold"] == pytest.approx(1.0, abs=1e-6)


def test_a_chosen_severity_or_class_is_certain() -> None:
    chosen = _infill([6.2])
    doc = chosen.model_dump(mode="json", exclude_none=True)
    doc["storeys"][0]["members"][0]["severity"] = "moderate"
    from triage.model import parse_survey
    a = assess(parse_survey(doc))
    assert a.tier == "hold" and a.tier_probability["hold"] == pytest.approx(1.0, abs=1e-6)
    std = load()
    assert wall_doubt(parse_survey(doc), 0, _beyond(parse_survey(doc)), std,
                      std.assumptions) is None


def _beyond(survey: Any) -> Any:
    from triage.assess.capacity import storey_capacity
    std = load()
    return storey_capacity(survey, 0, std, std.assumptions)


def test_a_mode_whose_strength_factor_does_not_change_leaves_nothing_in_doubt() -> None:
    # an unreinforced masonry pier rocking keeps lambda Q 1 at every severity (from memory)
    s = make([storey("G", QUIET, [{"kind": "wall", "count": 4, "crack_mm": 6.3,
                                   "mode": "rocking"}])], sx="urm_wall", sy="urm_wall")
    std = load()
    assert wall_doubt(s, 0, _beyond(s), std, std.assumptions) is None


def test_three_groups_enumerated_exactly() -> None:
    # one panel each: CP only when all three are heavy (ratio 0.5), else at least 0.6 (LS)
    cracks = [6.2, 6.3, 6.5]
    a = assess(_infill(cracks, count=1))
    p = 1.0
    for c in cracks:
        p *= 1.0 - PHI((6.3 - c) / 0.2)
    assert a.tier_probability["evacuate"] == pytest.approx(p, abs=1e-6)
    assert a.tier_probability_se["evacuate"] == 0.0


def test_many_groups_in_doubt_are_sampled_with_their_standard_error() -> None:
    # 13 panels at the bound, each heavy with chance 1/2: 8,192 combinations, over the
    # enumeration limit. CP when the ratio is under 0.6: 9 or more heavy of 13.
    a = assess(_infill([6.3] * 13, count=1))
    want = stats.binom.sf(8, 13, 0.5)
    se = a.tier_probability_se["evacuate"]
    assert se > 0
    assert a.tier_probability["evacuate"] == pytest.approx(want, abs=4 * se + 1e-6)


def test_a_level_set_elsewhere_settles_it() -> None:
    # a panel chosen extreme carries nothing: the storey is severe (CP) whatever the crack says
    a = assess(_infill([6.2], extra=[{"kind": "infill", "count": 30, "severity": "extreme"}]))
    assert a.tier == "evacuate"
    assert a.tier_probability["evacuate"] == pytest.approx(1.0, abs=1e-6)


def test_the_same_crack_moves_class_and_severity_together() -> None:
    # Unreinforced masonry piers in diagonal tension, 1.0 +- 0.3 mm: over 1.0 mm JBDPA class
    # III (a brittle wall: floor LS); over 1.5 mm FEMA 306 moderate (lambda Q 0.7, ratio 0.7,
    # LS); over 2.0 mm class IV (CP). One draw sets both, so P(IO) is P(crack <= 1.0) = 1/2,
    # not P(<= 1.0) * P(<= 1.5) as two independent readings would give.
    s = make([storey("G", QUIET, [{"kind": "wall", "count": 10, "crack_mm": 1.0,
                                   "crack_sd_mm": 0.3, "mode": "diagonal_tension"}])],
             sx="urm_wall", sy="urm_wall")
    a = assess(s)
    assert a.tier_probability["occupy"] == pytest.approx(0.5, abs=1e-6)
    assert a.tier_probability["occupy"] != pytest.approx(0.5 * PHI(0.5 / 0.3), abs=1e-3)
    assert a.tier_probability["evacuate"] == pytest.approx(1 - PHI(1.0 / 0.3), abs=1e-6)


def test_measure_next_names_the_crack_near_a_severity_bound() -> None:
    # 6.2 +- 0.2 mm: 0.5 sd under the 6.3 mm bound, across which the tier would be evacuate
    a = assess(_infill([6.2]))
    nxt = a.measure_next
    assert nxt is not None and nxt.what == "crack" and nxt.member == "infill panel group 1"
    assert nxt.z == pytest.approx(0.5, abs=1e-6)
    assert "0.5 sd under the FEMA 306 severity bound 6.3 mm" in nxt.why
    over = assess(_infill([6.4])).measure_next
    assert over is not None and "0.5 sd over the FEMA 306 severity bound 6.3 mm" in over.why
    # 4 sd away (over the 3 sd of measure_next_max_z): nothing to measure, the tier settled
    far = assess(_infill([5.5]))
    assert far.measure_next is None and far.settled_by is not None
