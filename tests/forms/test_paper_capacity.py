"""The paper form's residual capacity fields round-trip through the screens into a survey.

What the look-up sheet lists for a FEMA 352 damage type, a FEMA 306 behaviour mode and a
FEMA 306 severity is exactly what the screens offer to pick for that system, word for word, so
anything written on paper can be typed in; each pick then parses as a survey and comes back from
the assessment as the same words. The tables are from memory (tests/reference/test_fema352.py,
test_fema306.py); this checks the paths, not the figures.
"""

from __future__ import annotations

import re

import pytest

from tests.forms.conftest import CASES
from tests.helpers import make, reading, storey
from triage import standards
from triage.assess import assess
from triage.forms import load_form
from triage.report.paper_capacity import capacity_lookup, capacity_step
from triage.standards.vocabulary import many, words
from triage.ui.choices import connection_type_choices, severity_choices, wall_mode_choices

SYSTEMS = standards.system_keys()


def _sheet(system: str) -> dict[str, list[str]]:
    form = load_form(system)
    return {head: lines for head, lines in capacity_lookup(form.member_kinds, (system,))}


def _before_colon(lines: list[str]) -> list[str]:
    return [line.split(":")[0] for line in lines]


@pytest.mark.parametrize("system", SYSTEMS)
def test_the_look_up_sheet_lists_what_the_screens_offer(system: str) -> None:
    sheet = _sheet(system)
    form = load_form(system)
    steel = [h for h in sheet if h.startswith("FEMA 352 damage type")]
    modes = {h: v for h, v in sheet.items() if h.startswith("Behaviour mode of ")}
    sev = [h for h in sheet if h.startswith("FEMA 306 severity")]
    assert bool(steel) == (system == "steel_moment_frame")
    walls = {"urm_wall": ["wall"], "urm_infill": ["infill"], "rc_wall": ["wall"],
             "reinforced_masonry_wall": ["wall"]}.get(system, [])
    assert [h.split(" (")[0] for h in modes] == [
        f"Behaviour mode of {many('member_kinds', k)}" for k in walls]
    assert bool(sev) == bool(walls)
    if steel:
        offered = [t for t, _ in connection_type_choices()]
        assert _before_colon(sheet[steel[0]]) == offered
        assert "from memory" in steel[0]
    for kind, head in zip(walls, modes, strict=True):
        offered = [t for t, _ in wall_mode_choices(kind, (system, system))]
        assert _before_colon(modes[head]) == offered
        assert kind in form.member_kinds
    if sev:
        assert _before_colon(sheet[sev[0]]) == [t for t, _ in severity_choices()]
        assert "not a JBDPA grade" in sev[0]
    # every line in words: no key of the tables
    text = "\n".join([*sheet, *(x for v in sheet.values() for x in v)])
    assert not re.search(r"\b[a-z]+_[a-z_]+\b", text), text


@pytest.mark.parametrize("system", ["urm_wall", "urm_infill", "rc_wall",
                                    "reinforced_masonry_wall"])
def test_a_mode_and_severity_written_on_paper_come_back_in_the_same_words(system: str) -> None:
    kind = "infill" if system == "urm_infill" else "wall"
    for text, mode in wall_mode_choices(kind, (system, system)):
        for sev_text, sev in severity_choices():
            s = make([storey("1", [reading("x", 0.5), reading("y", 0.5)],
                             [{"kind": kind, "count": 3, "inspected": 2, "mode": mode,
                               "severity": sev}])], sx=system, sy=system)
            m = assess(s).storeys[0].members[0]
            assert (words("wall_modes", m.mode), words("severities", m.severity)) == (
                text, sev_text), (system, mode, sev)
            assert m.inspected == 2


def test_a_type_written_on_paper_comes_back_with_its_code() -> None:
    for text, code in connection_type_choices():
        s = make([storey("1", [reading("x", 0.5), reading("y", 0.5)],
                         [{"kind": "connection", "count": 4, "connection_type": code}])],
                 sx="steel_moment_frame", sy="steel_moment_frame")
        m = assess(s).storeys[0].members[0]
        assert words("connection_types", m.connection_type) == text
        assert text.startswith(code + " (")


def test_the_instructions_ask_for_them_only_where_the_grids_do() -> None:
    assert capacity_step([("column", ("rc_frame",)), ("wall", ("wood_stud_wall",))]) == ""
    steel = capacity_step([("connection", ("steel_moment_frame",))])
    assert "FEMA 352 damage type code" in steel and "behaviour mode" not in steel
    walls = capacity_step([("infill", ("urm_infill",))])
    assert "behaviour mode and FEMA 306 severity" in walls and "FEMA 352" not in walls
    assert "never counted as undamaged" in walls


def test_the_printed_forms_carry_the_look_up_lists(printed_forms) -> None:
    for name, (_, pages) in printed_forms.items():
        text = " ".join(" ".join(p.text.split()) for p in pages)
        systems = CASES[name]
        assert ("G4 (girder): girder flange cracked through" in text) == (
            "steel_moment_frame" in systems), name
        fema306 = {"urm_wall", "urm_infill", "rc_wall", "reinforced_masonry_wall"}
        assert ("moderate: wider cracks; stiffness down" in text) == bool(
            fema306 & set(systems)), name
