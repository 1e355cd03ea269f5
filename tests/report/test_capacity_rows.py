"""The report shows residual capacity beyond concrete: the member table names a group's FEMA 352
type or FEMA 306 mode and severity (from memory), the method page lists both tables as
unchecked and from memory."""

from __future__ import annotations

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.report.model import build_report_model


def _model(members, sx, sy):
    s = make([storey("1", [reading("x", 0.5), reading("y", 0.5)], members)], sx=sx, sy=sy)
    return build_report_model(s, assess(s))


def test_member_table_names_type_and_severity() -> None:
    m = _model([{"kind": "connection", "count": 10, "inspected": 6, "connection_type": "W2"},
                {"kind": "wall", "count": 2, "dir": "y", "mode": "toe_crushing",
                 "severity": "heavy"}], "steel_moment_frame", "urm_wall")
    conn, wall = m.members
    assert "6 of 10 inspected" in conn.seen
    assert "FEMA 352 type W2 (weld), index 6 (from memory)" in conn.seen
    assert "by FEMA 352 damage type" in conn.class_from
    assert "FEMA 306 mode toe crushing, FEMA 306 severity heavy, lambda Q 0.4" in wall.seen
    assert "by FEMA 306 severity" in wall.class_from


def test_method_page_marks_both_tables_unchecked_from_memory() -> None:
    m = _model([{"kind": "connection", "count": 10, "connection_type": "W2"},
                {"kind": "wall", "count": 2, "dir": "y", "mode": "toe_crushing",
                 "severity": "heavy"}], "steel_moment_frame", "urm_wall")
    rows = {r.source.split(",")[0]: r for r in m.method}
    assert rows["FEMA 352"].status == "memory" and "unchecked" in rows["FEMA 352"].note
    assert rows["FEMA 306"].status == "memory" and "typos only" in rows["FEMA 306"].note
