"""The verdict's rules pinned at their edges: levels and tiers read back from their words, and
what the assessment says, word for word, for one survey of each kind of verdict.

Each survey below states its case; what it must say follows in WANT: the verdict (tier,
performance level, governing basis, storey and direction, provisional, borderline), every
reason in order, every note, every defaulted uncertainty, and what settles the tier or what to
measure next. A change of wording is a change of what the inspector reads: it fails here first.
Offsets are over a 2000 mm gauge (1 mm = 0.05%).
"""

from __future__ import annotations

from typing import NamedTuple

import pytest

from tests.helpers import make, reading, storey, two_storey_frame
from triage.assess import assess
from triage.assess.levels import Level, Tier
from triage.model import parse_survey

OV = {"override_reason": "seen"}
TWO = [reading("x", 0.2), reading("y", 0.2)]   # 0.01% each way: IO, far from any figure
# The note every survey of independent spots carries, and how "settled by" begins.
INDEPENDENT = ('tier probabilities: each spot taken as a separate place (independent readings), '
               'so more spots can lower P(occupy)')
SETTLED = 'no spot or crack width within 3 sd of a threshold could change the tier; it rests '


@pytest.mark.parametrize(("word", "tier"), [("occupy", Tier.OCCUPY), ("hold", Tier.HOLD),
                                            ("evacuate", Tier.EVACUATE)])
def test_a_tier_is_read_back_from_its_word(word, tier):
    assert Tier.of(word) is tier
    assert tier.word == word


@pytest.mark.parametrize(("word", "level", "tier"), [
    ("IO", Level.IO, Tier.OCCUPY), ("LS", Level.LS, Tier.HOLD), ("CP", Level.CP, Tier.EVACUATE),
    ("beyond-CP", Level.BEYOND_CP, Tier.EVACUATE)])
def test_a_level_is_read_back_and_sets_its_tier(word, level, tier):
    assert Level.of(word) is level
    assert (level.word, level.tier) == (word, tier)


# frame: the worked example of docs/method.md (storey 2, y at 0.60%: LS, hold).
# urm: occupy with a masonry direction: drift alone cannot establish IO.
# hazard: a falling hazard raises occupy to hold, with its keep-out distance (1 x 6 m).
# collapse: every vertical group class V: the all-class-V rule, beyond CP.
# mixed: a steel frame sampled, a masonry wall's mode not kept, cracks outside concrete.
# timber: systems no capacity method covers; a storey partly entered.
# empty: nothing logged: hold, no data.
# cp: drift at CP; R severe; a beam's class V floor listed after them.
# spot, crack, panels: what to measure next: a spot, a JBDPA class bound, a FEMA 306 bound.
# plumb: a spot without baseline within the plumbness band sets the tier.
# masonry: both directions masonry: both named, in order.
# falls: a collapse hazard with no storey governs; a second hazard without height.
SURVEYS = {
        "frame": parse_survey(two_storey_frame()),
        "urm": make([storey("1", TWO, [{"kind": "wall", "count": 8}])], sx="urm_wall",
                    sy="rc_frame"),
        "hazard": make([storey("1", TWO)], hazards=[
            {"kind": "falling_hazard", "where": "parapet", "storey": "1",
             "height_above_ground_m": 6.0}]),
        "collapse": make([storey("1", TWO, [
            {"kind": "column", "count": 4, "damage_class": "V", "ref": "C1", **OV},
            {"kind": "wall", "count": 2, "damage_class": "V", **OV}])]),
        "mixed": make([storey("1", [reading("x", 3.0, where="A"), reading("x", 3.5, where="B")], [
            {"kind": "connection", "count": 6, "inspected": 4, "connection_type": "G2"},
            {"kind": "wall", "count": 3, "mode": "flexure", "crack_mm": 1.0, "inspected": 2}])],
            sx="steel_moment_frame", sy="urm_wall"),
        "timber": make([storey("1", [reading("x", 2.0), reading("y", 2.0)],
                               [{"kind": "wall", "count": 5, "crack_mm": 0.5, "ref": "W1"}]),
                        storey("2", [], [], access="partial")],
                       sx="wood_stud_wall", sy="steel_braced_frame"),
        "empty": make([storey("1", [], [])]),
        "cp": make([storey("1", [reading("x", 30.0), reading("y", 2.0)], [
            {"kind": "column", "count": 10, "crack_mm": 1.95, "crack_sd_mm": 0.1, "ref": "C9"},
            {"kind": "beam", "count": 3, "signs": ["bar_fractured"]}])]),
        "spot": make([storey("1", [reading("x", 3.0, where="grid A"), reading("y", 1.0)], [])],
                     sx="steel_moment_frame", sy="steel_moment_frame"),
        "crack": make([storey("1", TWO, [
            {"kind": "column", "count": 20},
            {"kind": "column", "count": 1, "ductility": "brittle", "crack_mm": 0.9,
             "crack_sd_mm": 0.05, "ref": "C9"},
            {"kind": "column", "count": 2, "crack_mm": 0.1}])]),
        "panels": make([storey("G", [reading("x", 0.5), reading("y", 0.5)], [
            {"kind": "infill", "count": 10, "crack_mm": 6.2, "crack_sd_mm": 0.2,
             "mode": "corner_crushing"}])], sx="urm_infill", sy="urm_infill"),
        "plumb": make([storey("1", [reading("x", 5.0, where="stair"), reading("y", 1.0)])]),
        "masonry": make([storey("1", TWO, [{"kind": "wall", "count": 8}])], sx="urm_wall",
                        sy="urm_infill"),
        "falls": make([storey("1", TWO)], hazards=[
            {"kind": "collapse", "where": "east wing"},
            {"kind": "falling_hazard", "storey": "1"}]),
    }


class Said(NamedTuple):
    """What an assessment says about itself."""

    verdict: tuple
    reasons: tuple[str, ...]
    notes: tuple[str, ...]
    defaulted: tuple[str, ...]
    settled_by: str | None
    measure_next: str | None


WANT = {
    'frame': Said(
        verdict=('hold', 'LS', 'drift', '2', 'y', False, False),
        reasons=(
            "storey 2, y: residual drift 0.60% is over 0.20% (our value for 'negligible', IO) "
            'and within 1.0% (LS) for concrete frames (FEMA 356 Table C1-3, from memory)',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(
            'storey 2, column group 2 C3: crack uncertainty 0.05 mm (instrument default, common '
            'practice)',
        ),
        settled_by=(
            SETTLED
            + "on: storey 2, y: residual drift 0.60% is over 0.20% (our value for 'negligible', "
            'IO) and within 1.0% (LS) for concrete frames (FEMA 356 Table C1-3, from memory)'
        ),
        measure_next=None,
    ),
    'urm': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'y', False, False),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, y: '
            "residual drift 0.01% is within 0.20% (our value for 'negligible', IO) for concrete "
            'frames (FEMA 356 Table C1-3, from memory); for unreinforced masonry (noninfill) '
            'walls drift alone cannot establish IO: the cracking and out-of-plane state of the '
            'masonry decide',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=(
            SETTLED
            + "on: storey 1, y: residual drift 0.01% is within 0.20% (our value for 'negligible', "
            'IO) for concrete frames (FEMA 356 Table C1-3, from memory)'
        ),
        measure_next=None,
    ),
    'hazard': Said(
        verdict=('hold', 'IO', 'hazard', '1', None, False, False),
        reasons=(
            'hazard: falling hazard at parapet (storey 1): a parapet, chimney, cladding panel, '
            'glass or sign that could fall; at least hold; keep 6 m clear around it',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=(
            SETTLED
            + 'on: hazard: falling hazard at parapet (storey 1): a parapet, chimney, cladding '
            'panel, glass or sign that could fall; at least hold; keep 6 m clear around it'
        ),
        measure_next=None,
    ),
    'collapse': Said(
        verdict=('evacuate', 'beyond-CP', 'damage', '1', None, False, False),
        reasons=(
            'storey 1: every vertical member group is class V, all 6 of the 6 vertical members '
            'logged: grade collapse, beyond Collapse Prevention (a rule of ours, not a JBDPA '
            'grade)',
            'storey 1, x: residual seismic capacity ratio R = 0.0% is damage grade severe '
            '(JBDPA 2001, from memory), taken as Collapse Prevention (CP) (our link of grade to '
            'level); walls counted at weight 1 each, as a column (a wall is usually worth '
            'several)',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=(
            SETTLED
            + 'on: storey 1: every vertical member group is class V, all 6 of the 6 vertical '
            'members logged: grade collapse, beyond Collapse Prevention (a rule of ours, not a '
            'JBDPA grade)'
        ),
        measure_next=None,
    ),
    'mixed': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'x', True, True),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, x: '
            "residual drift 0.18% at B is within 0.20% (our value for 'negligible', IO) for "
            'steel moment frames (FEMA 356 Table C1-3, from memory); for unreinforced masonry '
            '(noninfill) walls drift alone cannot establish IO: the cracking and out-of-plane '
            'state of the masonry decide',
        ),
        notes=(
            'storey 1, connection group 1: 4 of 6 inspected; ratios are over the members seen, '
            'those not seen never counted as undamaged; the survey is provisional',
            'storey 1, wall group 2: 2 of 3 inspected; ratios are over the members seen, those '
            'not seen never counted as undamaged; the survey is provisional',
            'storey 1, wall group 2: behaviour mode flexure is not among the FEMA 306 modes the '
            'tool keeps for its component type (unreinforced masonry wall or pier): taken as '
            "not known (the worst of its type's modes)",
            'crack widths are classed by the JBDPA bounds for reinforced concrete (0.2, 1 and 2 '
            'mm); on members of steel moment frame and unreinforced masonry walls that is an '
            'indication of ours, not a published rule',
            INDEPENDENT,
            'tier probabilities: measured parts only (unmeasured parts count as IO)',
        ),
        defaulted=(
            'storey 1, wall group 2: crack uncertainty 0.05 mm (instrument default, common '
            'practice)',
        ),
        settled_by=None,
        measure_next=(
            'storey 1, y: no reading yet in y; the level of this storey is unknown there'
        ),
    ),
    'timber': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'y', True, False),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, y: '
            "residual drift 0.10% is within 0.20% (our value for 'negligible', IO) for braced "
            'steel frames (FEMA 356 Table C1-3, from memory)',
            'residual capacity: not computed for braced steel frame or timber stud walls; the '
            "tool's methods cover reinforced concrete (JBDPA), steel moment frames (FEMA 352) "
            'and concrete and masonry walls (FEMA 306)',
        ),
        notes=(
            'storey 2: partly entered; the survey is provisional',
            'crack widths are classed by the JBDPA bounds for reinforced concrete (0.2, 1 and 2 '
            'mm); on members of braced steel frame and timber stud walls that is an indication '
            'of ours, not a published rule',
            INDEPENDENT,
            'tier probabilities: measured parts only (unmeasured parts count as IO)',
        ),
        defaulted=(
            'storey 1, wall group 1 W1: crack uncertainty 0.05 mm (instrument default, common '
            'practice)',
        ),
        settled_by=None,
        measure_next=(
            'storey 2, x: no reading yet in x; the level of this storey is unknown there'
        ),
    ),
    'empty': Said(
        verdict=('hold', None, 'no-data', None, None, True, None),
        reasons=(
            'no reading and no member group logged: nothing to assess yet; hold until the '
            'building has been surveyed',
        ),
        notes=(
            'repairability: no residual drift measured, so no probability is given',
        ),
        defaulted=(),
        settled_by=None,
        measure_next=(
            'storey 1, x: no reading yet in x; the level of this storey is unknown there'
        ),
    ),
    'cp': Said(
        verdict=('evacuate', 'CP', 'drift', '1', 'x', False, False),
        reasons=(
            'storey 1, x: residual drift 1.5% is over 1.0% (LS) and within 4.0% (CP) for '
            'concrete frames (FEMA 356 Table C1-3, from memory)',
            'storey 1, x: residual seismic capacity ratio R = 50.0% is damage grade severe '
            '(JBDPA 2001, from memory), taken as Collapse Prevention (CP) (our link of grade to '
            'level)',
            'storey 1: beam group (3) is class V (from signs seen), which holds the structure '
            'to Life Safety (LS) at best (damage floor of a member outside the vertical and '
            'lateral system, a rule of ours)',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=(
            SETTLED
            + 'on: storey 1, x: residual drift 1.5% is over 1.0% (LS) and within 4.0% (CP) for '
            'concrete frames (FEMA 356 Table C1-3, from memory)'
        ),
        measure_next=None,
    ),
    'spot': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'x', True, False),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, x: '
            "residual drift 0.15% at grid A is within 0.20% (our value for 'negligible', IO) "
            'for steel moment frames (FEMA 356 Table C1-3, from memory)',
        ),
        notes=(
            INDEPENDENT,
            'tier probabilities: measured parts only (unmeasured parts count as IO)',
        ),
        defaulted=(),
        settled_by=None,
        measure_next=(
            'storey 1, x (grid A): 0.15% is 1.0 sd under the IO value 0.20%; across it the tier '
            'would change'
        ),
    ),
    'crack': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'x', False, False),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, x: '
            "residual drift 0.01% is within 0.20% (our value for 'negligible', IO) for concrete "
            'frames (FEMA 356 Table C1-3, from memory)',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(
            'storey 1, column group 3: crack uncertainty 0.05 mm (instrument default, common '
            'practice)',
        ),
        settled_by=None,
        measure_next=(
            'storey 1, column group C9: crack 0.9 mm is 2.0 sd under the class bound 1 mm; '
            'across it the tier would change'
        ),
    ),
    'panels': Said(
        verdict=('hold', 'LS', 'damage', 'G', None, False, True),
        reasons=(
            'storey G: infill panel group (10) is class IV (from crack width), which holds the '
            'structure to Life Safety (LS) at best (damage floor of a member of the lateral '
            'system, a rule of ours)',
        ),
        notes=(
            'crack widths are classed by the JBDPA bounds for reinforced concrete (0.2, 1 and 2 '
            'mm); on members of frame with unreinforced masonry infill that is an indication of '
            'ours, not a published rule',
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=None,
        measure_next=(
            'storey G, infill panel group 1: crack 6.2 mm is 0.5 sd under the FEMA 306 severity '
            'bound 6.3 mm; across it the tier would change'
        ),
    ),
    'plumb': Said(
        verdict=('hold', 'LS', 'drift', '1', 'x', False, False),
        reasons=(
            'storey 1, x: residual drift 0.25% at stair is over 0.20% (our value for '
            "'negligible', IO) and within 1.0% (LS) for concrete frames (FEMA 356 Table C1-3, "
            'from memory); with no as-built baseline at stair, 0.25% lies within the plumbness '
            'band of reinforced concrete (0.30%, ACI 117-10, from memory) and cannot be told '
            'from construction lean',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=None,
        measure_next=(
            'storey 1, x (stair): 0.25% is 1.0 sd over the IO value 0.20%; across it the tier '
            'would change'
        ),
    ),
    'masonry': Said(
        verdict=('occupy', 'IO', 'drift', '1', 'y', False, False),
        reasons=(
            'no permanent drift distinguishable from construction tolerance: storey 1, y: '
            "residual drift 0.01% is within 0.10% (our value for 'negligible', IO) for "
            'unreinforced masonry infill walls (FEMA 356 Table C1-3, from memory); for '
            'unreinforced masonry infill walls and unreinforced masonry (noninfill) walls drift '
            'alone cannot establish IO: the cracking and out-of-plane state of the masonry '
            'decide',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=None,
        measure_next=(
            'storey 1, y: 0.01% is 1.8 sd under the IO value 0.10%; across it the tier would '
            'change'
        ),
    ),
    'falls': Said(
        verdict=('evacuate', 'beyond-CP', 'hazard', None, None, False, False),
        reasons=(
            'hazard: collapse at east wing: the building or a storey has come down; the '
            'structure is beyond CP',
            'hazard: falling hazard (storey 1): a parapet, chimney, cladding panel, glass or '
            'sign that could fall; at least hold',
        ),
        notes=(
            INDEPENDENT,
        ),
        defaulted=(),
        settled_by=(
            SETTLED
            + 'on: hazard: collapse at east wing: the building or a storey has come down; the '
            'structure is beyond CP'
        ),
        measure_next=None,
    ),
}


def _said(name: str) -> Said:
    a = assess(SURVEYS[name])
    g = a.governing
    return Said((a.tier, a.performance_level, g.basis, g.storey, g.dir, a.provisional,
                 a.borderline), a.reasons, a.notes, a.defaulted, a.settled_by,
                a.measure_next.text() if a.measure_next is not None else None)


@pytest.mark.parametrize("name", list(WANT))
@pytest.mark.parametrize("part", Said._fields)
def test_what_the_assessment_says_word_for_word(name, part):
    assert getattr(_said(name), part) == getattr(WANT[name], part)


def test_nothing_to_measure_and_nothing_logged_rests_on_nothing_logged():
    # A storey below grade and one not entered: no reading can be asked for (measure next skips
    # both), so what settles hold is that nothing is logged yet.
    a = assess(make([storey("B1", [], [], below_grade=True), storey("1", [], [], access="none")]))
    assert (a.tier, a.governing.basis, a.measure_next) == ("hold", "no-data", None)
    assert a.settled_by == ("no spot or crack width within 3 sd of a threshold could change the "
                            "tier; it rests on: nothing logged yet")
    assert a.notes == ("storey 1: not entered; the survey is provisional",
                       "repairability: no residual drift measured, so no probability is given")
