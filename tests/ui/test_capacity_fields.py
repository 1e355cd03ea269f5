"""Member groups beyond concrete on the screens: a steel moment frame's connections take a
FEMA 352 damage type, a masonry building's walls a FEMA 306 behaviour mode and severity, and
both how many were inspected; offered in words, only where they apply, saved, explained."""

from __future__ import annotations

import re
from pathlib import Path
from typing import Any

from conftest import SID, URM  # a concrete frame; masonry walls, no members yet
from drive import open_tab, pick, settle, started, type_in

from triage.model import parse_survey
from triage.store import Store
from triage.ui.app import TriageApp

STEEL = "33333333-3333-4333-8333-333333333333"
KEY = re.compile(r"\b[a-z]+_[a-z_]+\b|\w+\[\d+\]")
CAPACITY = ("inspected", "connection_type", "mode", "severity")


def _add_steel(db: Path, sid: str = STEEL, sx: str = "steel_moment_frame",
               sy: str = "steel_braced_frame") -> None:
    from helpers import reading, storey, survey_dict

    d = survey_dict([storey("G", [reading("x", 1.0), reading("y", 1.0)], members=[])],
                    sx=sx, sy=sy, name="Wharf Shed")
    d["id"] = sid
    d["building"]["address"] = "9 Wharf Road, Kōwhai Bay"
    with Store.open(db) as st:
        st.add_survey(parse_survey(d), "Tess Tester", "test")


def _shown(pane: Any) -> set[str]:
    return {k for k in CAPACITY if pane.form[k].display}


def _texts(choice: Any) -> list[str]:
    """The options offered, without the blank one (nothing picked)."""
    return [str(t) for t, _ in choice.select._options if str(t).strip() not in ("", "—")]


def _stored(db: Path, sid: str) -> Any:
    with Store.open(db, refresh=False) as st:
        return st.load_survey(sid).storeys[0].members


async def test_walls_of_masonry_take_mode_and_severity_in_words(db: Path, make_app) -> None:
    app: TriageApp = make_app(db, open_survey=URM)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        await pick(pilot, "m-kind", "wall")
        assert _shown(pane) == {"inspected", "mode", "severity"}
        modes = _texts(pane.form["mode"])
        # an unreinforced masonry pier's modes (from memory), in words, "not known" last
        assert modes == ["rocking", "diagonal tension", "bed-joint sliding", "toe crushing",
                         "not known"]
        assert _texts(pane.form["severity"]) == ["insignificant", "slight", "moderate",
                                                 "heavy", "extreme"]
        labels = [str(pane.form[k].query_one("Label").render()) for k in ("mode", "severity")]
        assert labels == ["behaviour mode", "FEMA 306 severity"]   # never a bare grade
        hint = str(pane.capacity_line.render())
        assert "read from the widest crack" in hint and "worst of the wall's modes" in hint
        await pick(pilot, "m-mode", "diagonal_tension")
        await pick(pilot, "m-severity", "moderate")
        hint = str(pane.capacity_line.render())
        assert "behaviour mode diagonal tension" in hint
        assert "FEMA 306 severity moderate: wider cracks" in hint and "from memory" in hint
        assert not KEY.search(hint), hint
        await type_in(pilot, "m-inspected", "3", enter=False)
        await type_in(pilot, "m-count", "4")
        (m,) = _stored(db, URM)
        assert (m.kind, m.count, m.inspected, m.mode, m.severity) == (
            "wall", 4, 3, "diagonal_tension", "moderate")
        assert str(pane.table.get_row_at(0)[6]) == "III"   # class from the severity (ours)
        # edited: the severity saves on its own and the hint follows
        pane.edit(0)
        await settle(pilot)
        assert pane.form["mode"].value() == "diagonal_tension"
        c = await pick(pilot, "m-severity", "heavy")
        assert "✓ saved" in c.status_text
        assert "FEMA 306 severity heavy" in str(pane.capacity_line.render())
        # a kind that takes none of them hides them, and its group is added without them
        pane.edit(None)
        await settle(pilot)
        await pick(pilot, "m-kind", "beam")
        assert _shown(pane) == set() and not pane.capacity_line.display
    assert _stored(db, URM)[0].severity == "heavy"


async def test_connections_of_a_steel_moment_frame_take_a_type(db: Path, make_app) -> None:
    _add_steel(db)
    app: TriageApp = make_app(db, open_survey=STEEL)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        await pick(pilot, "m-kind", "connection")
        assert _shown(pane) == {"inspected", "connection_type"}
        types = _texts(pane.form["connection_type"])
        # G1-8, C1-7, P1-9, S1-5, W1a, W1b, W2-5
        assert types[0] == "G1 (girder)" and "W1a (weld)" in types and len(types) == 35
        assert not any(KEY.search(t) for t in types)
        hint = str(pane.capacity_line.render())
        assert "FEMA 352 damage type blank" in hint and "G4 (girder)" in hint
        await pick(pilot, "m-conn-type", "C2")
        hint = str(pane.capacity_line.render())
        assert hint.startswith("FEMA 352 type C2 (column):") and "damage index" in hint
        await type_in(pilot, "m-inspected", "6", enter=False)
        await type_in(pilot, "m-count", "20")
        (m,) = _stored(db, STEEL)
        assert (m.kind, m.count, m.inspected, m.connection_type) == ("connection", 20, 6, "C2")
        # a wall here (steel frames, no FEMA 306 type) takes none of the wall's fields
        await pick(pilot, "m-kind", "wall")
        assert _shown(pane) == set()


async def test_a_concrete_frame_asks_for_none_of_them(db: Path, make_app) -> None:
    app: TriageApp = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        for kind in ("column", "wall", "connection", "infill"):
            await pick(pilot, "m-kind", kind)
            assert _shown(pane) == set(), kind
            assert not pane.capacity_line.display


INFILL = "44444444-4444-4444-8444-444444444444"


async def test_each_kind_offers_its_own_modes(db: Path, make_app) -> None:
    _add_steel(db, INFILL, "urm_infill", "urm_infill")
    app: TriageApp = make_app(db, open_survey=INFILL)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        await pick(pilot, "m-kind", "wall")   # a masonry pier of the frame
        assert "rocking" in _texts(pane.form["mode"])
        await pick(pilot, "m-mode", "diagonal_tension")
        await pick(pilot, "m-kind", "infill")
        modes = _texts(pane.form["mode"])
        assert modes == ["diagonal tension", "bed-joint sliding", "corner crushing",
                         "not known"]
        assert pane.form["mode"].value() == "diagonal_tension"   # kept: an infill's mode too
        await pick(pilot, "m-mode", "corner_crushing")
        await pick(pilot, "m-kind", "wall")
        assert pane.form["mode"].value() is None   # not a pier's mode: cleared
        assert "worst of the wall's modes" in str(pane.capacity_line.render())
        await pick(pilot, "m-mode", "unknown")
        assert "not known (the worst mode of the wall's type is taken)" in str(
            pane.capacity_line.render())
