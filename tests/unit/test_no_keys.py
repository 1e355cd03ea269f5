"""No internal key reaches a person: the engine's lines and the text output speak the vocabulary.

Surveys are generated from the tables themselves, so that together they use every structural
system (in each direction), every damage sign on each kind it applies to, every hazard kind,
every damage floor row, every FEMA 352 connection type, every FEMA 306 behaviour mode of each
member kind at every severity (by choice, by class and by crack width), partial inspection, and
the rules each named assumption drives (uncertainty defaults,
plumbness bands, the large-drift warning, the keep-out width, the all-class-V collapse rule,
borderline, measure next, a short gauge, partial access). Every reason, note, defaulted line,
suggestion and the whole text of `triage assess` is then searched for a snake_case key, a
survey path (`storeys[0].readings[5]`) or a hyphenated key (`beyond-CP`, `no-data`).
The JSON keeps its keys (they are data): checked at the end.
"""

from __future__ import annotations

import re
from typing import Any

import pytest

from tests.helpers import make, reading, storey, tilt
from triage.assess import assess
from triage.assess.text import summary
from triage.model import MEMBER_KINDS
from triage.standards import SEVERITIES, connection_type_keys, load, wall_modes_of

STD = load()
SYSTEMS = list(STD.systems)
SNAKE = re.compile(r"\b[A-Za-z][A-Za-z0-9]*(?:_[A-Za-z0-9]+)+\b")
PATH = re.compile(r"\b[A-Za-z_]+\[\d+\]")
HYPHEN_KEYS = re.compile(r"\bbeyond-CP\b|\bno-data\b")


def _signs_for(kind: str, system: str) -> list[str]:
    return [k for k, s in STD.signs.items() if kind in s.kinds and system in s.systems]


def _hazards(top: str) -> list[dict[str, Any]]:
    return [{"kind": k, "where": f"place {i + 1}", "storey": top, "height_above_ground_m": 4.0}
            for i, k in enumerate(STD.hazards)]


def _damaged(sx: str, sy: str) -> dict[str, Any]:
    """Every kind, sign, floor row and default in one survey, evacuate by hazards and collapse."""
    readings = [
        reading("x", 3.0, sd_mm=None),                                   # sd_mm defaulted
        tilt("y", 0.2, sd_deg=None),                                      # sd_deg defaulted
        reading("x", 6.0, baseline_mm=2.0, where="grid A"),              # baseline sd defaulted
        tilt("y", 0.3, baseline_deg=0.1, where="grid B"),                # baseline sd defaulted
        reading("x", 2.0, where="grid C"), reading("x", 30.0, where="grid C"),   # disagree
        reading("y", 120.0, gauge_mm=2000.0),                             # over 5%: a warning
        reading("x", 0.5, gauge_mm=500.0),                                # a short gauge
    ]
    members: list[dict[str, Any]] = []
    for kind in MEMBER_KINDS:
        members.append({"kind": kind, "count": 2, "crack_mm": 0.5})       # crack sd defaulted
        for sign in _signs_for(kind, sx) + [s for s in _signs_for(kind, sy)
                                             if s not in _signs_for(kind, sx)]:
            members.append({"kind": kind, "count": 1, "signs": [sign],
                            "ref": f"M{len(members) + 1}"})
    members.append({"kind": "column", "count": 2, "ductility": "brittle", "crack_mm": 1.5})
    members.append({"kind": "beam", "count": 1, "damage_class": "IV",
                    "override_reason": "seen from below"})
    # one storey per kind, its one group at class IV, so each floor row gives its own reason
    per_kind = [storey(f"K{i}", [reading("x", 1.0), reading("y", 1.0)],
                       [{"kind": kind, "count": 3, "crack_mm": 2.5, "crack_sd_mm": 0.1,
                         **({"ductility": "brittle"} if kind == "column" and i % 2 else {})}])
                for i, kind in enumerate(MEMBER_KINDS)]
    collapse = storey("C", [reading("x", 1.0), reading("y", 1.0)],
                      [{"kind": "column", "count": 6, "damage_class": "V",
                        "override_reason": "crushed"}])
    by_hand = storey("H", [reading("x", 1.0), reading("y", 1.0)],
                     [{"kind": "beam", "count": 1, "damage_class": "V",
                       "override_reason": "seen from below"}])
    return make([storey("B1", [reading("x", 1.0)], below_grade=True, access="partial"),
                 storey("G", readings, members), *per_kind, by_hand, collapse,
                 storey("T", [], [], access="none")],
                sx=sx, sy=sy, hazards=_hazards("T"))


def _quiet(sx: str, sy: str, offset_mm: float, crack_mm: float | None,
           both: bool = True) -> dict[str, Any]:
    """A lightly damaged building: occupy or hold, plumbness, measure next, settled by."""
    group: dict[str, Any] = {"kind": "column", "count": 10}
    if crack_mm is not None:
        group.update(crack_mm=crack_mm, crack_sd_mm=0.05)
    readings = [reading("x", offset_mm, where="grid A")]
    if both:
        readings.append(reading("y", 1.0))
    return make([storey("G", readings, [group]), storey("1", [reading("x", 0.5)], [])],
                sx=sx, sy=sy)


def _capacity(sx: str, sy: str) -> dict[str, Any]:
    """Every connection type, wall mode and severity, partial and no inspection, in one survey."""
    both = [reading("x", 2.0), reading("y", 2.0)]
    steel = [{"kind": "connection", "count": 2, "connection_type": t, "ref": f"J{i}"}
             for i, t in enumerate(connection_type_keys())]
    steel += [{"kind": "connection", "count": 4, "signs": ["connection_fractured"]},
              {"kind": "connection", "count": 20, "inspected": 6, "connection_type": "G4"},
              {"kind": "connection", "count": 10, "inspected": 1, "dir": "y"}]
    few = [{"kind": "connection", "count": 10, "inspected": 0, "dir": "y"},
           {"kind": "connection", "count": 10, "inspected": 1, "dir": "x"}]
    walls: list[dict[str, Any]] = []
    for kind in ("wall", "infill"):
        for mode in wall_modes_of(kind):
            walls += [{"kind": kind, "count": 1, "mode": mode, "severity": sev}
                      for sev in SEVERITIES]
            walls += [{"kind": kind, "count": 2, "mode": mode, "crack_mm": w, "crack_sd_mm": 0.1}
                      for w in (0.6, 1.4, 3.0, 9.0, 20.0)]
            walls.append({"kind": kind, "count": 1, "mode": mode, "damage_class": "III",
                          "override_reason": "seen from the stair"})
        walls.append({"kind": kind, "count": 3, "inspected": 1, "crack_mm": 1.0})
    unseen = [{"kind": "wall", "count": 4, "inspected": 0, "mode": "rocking"},
              {"kind": "infill", "count": 4, "inspected": 0}]
    return make([storey("G", both, steel), storey("1", both, walls),
                 storey("2", both, few + unseen)], sx=sx, sy=sy)


def _cases() -> list[tuple[str, Any]]:
    out = []
    for i, sx in enumerate(SYSTEMS):
        for sy in (sx, SYSTEMS[(i + 1) % len(SYSTEMS)]):
            out.append((f"damaged {sx}/{sy}", _damaged(sx, sy)))
            out.append((f"plumb {sx}/{sy}", _quiet(sx, sy, 5.0, None)))         # 0.25% in band
            out.append((f"quiet {sx}/{sy}", _quiet(sx, sy, 0.4, 0.18)))         # crack near 0.2
            out.append((f"unmeasured {sx}/{sy}", _quiet(sx, sy, 1.0, None, both=False)))
            out.append((f"capacity {sx}/{sy}", _capacity(sx, sy)))
    out.append(("nothing logged", make([storey("G", [], [])])))
    return out


CASES = _cases()


def _lines(a: Any) -> list[str]:
    lines = [*a.reasons, *a.notes, *a.defaulted]
    if a.measure_next is not None:
        lines += [a.measure_next.text(), a.measure_next.member or ""]
    if a.settled_by:
        lines.append(a.settled_by)
    return lines


@pytest.mark.parametrize(("name", "survey"), CASES, ids=[c[0] for c in CASES])
def test_no_key_in_reasons_or_text_output(name, survey):
    a = assess(survey)
    text = "\n".join(_lines(a)) + "\n" + summary(survey, a)
    found = SNAKE.findall(text) + PATH.findall(text) + HYPHEN_KEYS.findall(text)
    assert not found, f"{name}: keys reach a person: {sorted(set(found))}"


def test_the_cases_cover_every_key_they_claim():
    """The generated surveys use every system, sign, hazard kind and floor row, and the lines
    that name them do get made (so the search above is over something)."""
    surveys = [s for _, s in CASES]
    systems = {getattr(s.building.system, d) for s in surveys for d in "xy"}
    assert systems == set(SYSTEMS)
    signs = {g for s in surveys for st in s.storeys for m in st.members for g in m.signs}
    assert signs == set(STD.signs)
    hazards = {h.kind for s in surveys for h in s.hazards}
    assert hazards == set(STD.hazards)
    groups = [m for s in surveys for st in s.storeys for m in st.members]
    assert {m.connection_type for m in groups} == {None, *connection_type_keys()}
    for kind in ("wall", "infill"):
        assert {m.mode for m in groups if m.kind == kind} == {None, *wall_modes_of(kind)}
        assert {m.severity for m in groups if m.kind == kind} == {None, *SEVERITIES}
    every = "\n".join(line for s in surveys for line in _lines(assess(s)))
    for row in ("brittle vertical member", "vertical member", "member of the lateral system",
                "member outside the vertical and lateral system"):
        assert f"damage floor of a {row}," in every
    for said in ("instrument default", "is over 5%; kept", "under a quarter of the storey",
                 "plumbness band", "keep 4 m clear", "every vertical member group is class V",
                 "partly entered; the survey is provisional", "not entered",
                 "disagree beyond their uncertainties", "no reading yet in",
                 "cannot establish IO", "crack widths are classed by the JBDPA bounds",
                 "nothing to assess yet", "set by hand", "from signs seen", "from crack width",
                 # residual capacity beyond concrete: every kind of line it makes
                 "FEMA 352 floor damage index D =", "layer by layer", "too few to estimate",
                 "no connection inspected", "FEMA 306 residual strength ratio",
                 "behaviour mode not known at FEMA 306 severity extreme", "no wall inspected",
                 "is not among the FEMA 306 modes", "is read for steel moment frames only",
                 "infill panel group", "those not seen never counted as undamaged",
                 "from FEMA 352 damage type", "from FEMA 306 severity",
                 "beyond Collapse Prevention"):
        assert said in every, said
    for key in ("falling hazard", "concrete frame", "timber stud walls", "floor slab"):
        assert key in every or key in "\n".join(summary(s, assess(s)) for s in surveys[:4]), key


def test_the_json_keeps_its_keys():
    survey = dict(CASES)["damaged rc_frame/rc_frame"]
    data = assess(survey).model_dump(mode="json")
    assert {h["kind"] for h in data["hazards"]} == set(STD.hazards)
    assert data["performance_level"] == "beyond-CP"
    assert {m["kind"] for st in data["storeys"] for m in st["members"]} == set(MEMBER_KINDS)
