"""Hypothesis strategies for valid surveys (shared by property and round-trip tests)."""

from __future__ import annotations

from typing import Any

from hypothesis import strategies as st

SYSTEMS = ["rc_frame", "rc_wall", "steel_moment_frame", "steel_braced_frame", "urm_infill",
           "urm_wall", "reinforced_masonry_wall", "wood_stud_wall"]
SIGNS_FOR = {"column": ["cover_spalling", "bar_exposed", "bar_buckled", "core_crushed",
                        "local_buckling", "vertical_shortening"],
             "wall": ["cover_spalling", "bar_exposed", "out_of_plane", "vertical_shortening"],
             "brace": ["brace_buckled", "connection_fractured", "local_buckling"]}


@st.composite
def readings(draw: Any, d: str) -> dict[str, Any]:
    gauge = draw(st.sampled_from([1000.0, 1500.0, 2000.0, 2500.0]))
    return {"dir": d, "offset_mm": draw(st.floats(-40, 40, allow_nan=False).map(
        lambda v: round(v, 1))), "gauge_mm": gauge,
        "sd_mm": draw(st.sampled_from([0.5, 1.0, 2.0]))}


@st.composite
def members(draw: Any) -> dict[str, Any]:
    kind = draw(st.sampled_from(["column", "wall", "brace"]))
    m: dict[str, Any] = {"kind": kind, "count": draw(st.integers(1, 20))}
    if draw(st.booleans()):
        m["crack_mm"] = draw(st.floats(0, 4, allow_nan=False).map(lambda v: round(v, 2)))
        m["crack_sd_mm"] = draw(st.sampled_from([0.05, 0.1, 0.2]))
    if draw(st.integers(0, 3)) == 0:
        m["signs"] = draw(st.lists(st.sampled_from(SIGNS_FOR[kind]), max_size=2, unique=True))
    if kind == "column" and draw(st.booleans()):
        m["ductility"] = "brittle"
    if kind == "wall" and draw(st.booleans()):
        m["dir"] = draw(st.sampled_from(["x", "y"]))
        m["weight"] = draw(st.sampled_from([1.0, 2.0, 4.0]))
    return m


@st.composite
def surveys(draw: Any, max_storeys: int = 3) -> dict[str, Any]:
    n = draw(st.integers(1, max_storeys))
    storeys = []
    for i in range(n):
        rs = draw(st.lists(readings("x"), max_size=3)) + draw(st.lists(readings("y"), max_size=3))
        ms = draw(st.lists(members(), max_size=4))
        storeys.append({"label": str(i + 1), "height_m": 3.2, "readings": rs, "members": ms})
    hazards = draw(st.lists(st.sampled_from(
        [{"kind": "falling_hazard", "height_above_ground_m": 9.0}, {"kind": "blocked_egress"}]),
        max_size=1))
    return {
        "format": "triage-survey/1",
        "id": "0b6e2a4c-8f1d-4c3b-9a2e-5d7f6c8b9a01",
        "building": {"id": "7d3c1b2a-4e5f-4a6b-8c7d-9e0f1a2b3c4d", "name": "Generated",
                     "address": "9 Hypothesis Row, Kōwhai Bay",
                     "system": {"x": draw(st.sampled_from(SYSTEMS)),
                                "y": draw(st.sampled_from(SYSTEMS))}},
        "inspection": {"inspector": {"name": "Gen Erator"}, "at": "2026-11-28T10:00:00+13:00"},
        "storeys": storeys, "hazards": hazards}
