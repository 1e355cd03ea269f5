"""How a member group's class was set, one outcome per case (the report's "class from" column).

The engine takes the worse of the crack-width class and the worst sign's class; on a tie the
crack width is named (it is the measured one). An override names the inspector's reason.
"""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.report.model import build_report_model

CASES = [
    # (crack mm, signs, override) -> (class, how)
    ((2.5, [], None), ("IV", "by crack width")),                       # over 2.0 mm: IV
    ((0.3, ["bar_buckled"], None), ("V", "by signs")),                 # a buckled bar: V
    ((1.4, ["cover_spalling"], None), ("III", "by crack width")),      # tie at III: the crack
    ((2.5, ["cover_spalling"], None), ("IV", "by crack width")),       # crack worse than sign
    ((None, ["bar_exposed"], None), ("IV", "by signs")),               # signs alone
    ((None, [], None), ("—", "undamaged")),
    ((0.3, [], ("II", "hairline only, checked by hand")),
     ("II", "set by the inspector: hairline only, checked by hand")),
]


@pytest.mark.parametrize(("seen", "want"), CASES, ids=[w[1] + " " + w[0] for _, w in CASES])
def test_one_class_and_one_way_it_was_set(seen, want):
    crack, signs, override = seen
    group: dict = {"kind": "column", "count": 1, "ref": "C9"}
    if crack is not None:
        group["crack_mm"] = crack
    if signs:
        group["signs"] = signs
    if override is not None:
        group["damage_class"], group["override_reason"] = override
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                     [{"kind": "column", "count": 11}, group])])
    row = build_report_model(s, assess(s)).members[1]
    assert row.group == "2 C9"
    assert (row.damage_class, row.class_from) == want
