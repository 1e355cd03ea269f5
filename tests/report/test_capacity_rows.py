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


def test_storey_table_names_the_method_of_each_capacity_figure() -> None:
    # storey 2: JBDPA's R = (19 + 0.5) / 20 = 97.5% (the worked example of docs/method.md);
    # storey 1: nothing but sound columns, R = 100% by JBDPA
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.6)],
                     [{"kind": "column", "count": 20}]),
              storey("2", [reading("x", 2.0), reading("y", 12.0)],
                     [{"kind": "column", "count": 19},
                      {"kind": "column", "count": 1, "crack_mm": 1.4, "ref": "C3"}])],
             sx="rc_wall", sy="rc_frame")
    m = build_report_model(s, assess(s))
    assert [r.capacity for r in m.storeys] == ["100.0%\nJBDPA", "97.5%\nJBDPA"]
    assert m.capacity_caption.startswith("capacity: the storey's residual capacity ratio, its "
                                         "worse direction, with the method that gave it: "
                                         "JBDPA: the residual seismic capacity ratio R")
    assert "FEMA" not in m.capacity_caption   # only the methods this report shows
    assert m.capacity_caption.endswith("; grade: JBDPA's, from R")


def test_a_tie_names_both_methods_and_the_caption_explains_each() -> None:
    # x: ten W2 connections, all inspected: D = 6 (FEMA 352 type W2, from memory), 1 - 6/10 =
    # 40%; y: two walls, toe crushing, heavy: lambda Q 0.4 (FEMA 306, from memory), 40%
    m = _model([{"kind": "connection", "count": 10, "connection_type": "W2"},
                {"kind": "wall", "count": 2, "dir": "y", "mode": "toe_crushing",
                 "severity": "heavy"}], "steel_moment_frame", "urm_wall")
    assert [r.capacity for r in m.storeys] == ["40.0%\nFEMA 352 / FEMA 306"]
    assert "FEMA 352: 1 − D/10" in m.capacity_caption
    assert "FEMA 306: the walls' residual strength ratio" in m.capacity_caption
    methods, grade = m.capacity_caption.split("; grade: ")
    assert "JBDPA" not in methods
    assert grade == "ours, from the FEMA 306 ratio (JBDPA's bounds read onto it)"
    # a moderate wall gives the y direction more: the storey's figure is FEMA 352's alone
    m = _model([{"kind": "connection", "count": 10, "connection_type": "W2"},
                {"kind": "wall", "count": 2, "dir": "y", "mode": "toe_crushing",
                 "severity": "slight"}], "steel_moment_frame", "urm_wall")
    assert [r.capacity for r in m.storeys] == ["40.0%\nFEMA 352"]
    methods, grade = m.capacity_caption.split("; grade: ")
    assert "FEMA 306" not in methods and "FEMA 306 ratio" in grade   # its grade still shows


def test_no_method_leaves_a_dash_and_says_so() -> None:
    m = _model([{"kind": "brace", "count": 4}], "steel_braced_frame", "steel_braced_frame")
    assert [r.capacity for r in m.storeys] == ["—"]
    assert m.capacity_caption == ("capacity: residual capacity ratio where a published method "
                                  "covers the system (none here); grade: none, as no method "
                                  "here gives one")


def test_the_grade_caption_follows_the_methods_that_grade() -> None:
    # steel alone: FEMA 352 gives a level, no grade
    m = _model([{"kind": "connection", "count": 10, "connection_type": "W2"}],
               "steel_moment_frame", "steel_moment_frame")
    assert m.capacity_caption.endswith("; grade: none, as no method here gives one (FEMA 352 "
                                       "gives a level, not a grade)")
    # concrete walls with a FEMA 306 mode: JBDPA's R and FEMA 306 both grade, the worse taken
    m = _model([{"kind": "wall", "count": 2, "dir": "x", "mode": "flexure", "severity": "heavy",
                 "crack_mm": 1.4}], "rc_wall", "rc_frame")
    assert "; grade: the worse of JBDPA's, from R, and ours, from the FEMA 306 ratio" in \
        m.capacity_caption
    # every vertical member at class V: the rule of ours is named
    m = _model([{"kind": "column", "count": 4, "damage_class": "V",
                 "override_reason": "crushed"}], "rc_frame", "rc_frame")
    assert m.storeys[0].grade == "collapse"
    assert m.capacity_caption.endswith("; collapse: every vertical member of the storey logged "
                                       "at class V (two or more), or a collapse hazard there "
                                       "(rules of ours, not JBDPA grades)")


def test_the_pdf_storey_table_heads_the_column_in_words_with_its_caption() -> None:
    import io
    import re

    from pypdf import PdfReader

    from triage.report import render_report

    s = make([storey("1", [reading("x", 0.5), reading("y", 0.5)],
                     [{"kind": "connection", "count": 10, "connection_type": "W2"},
                      {"kind": "wall", "count": 2, "dir": "y", "mode": "toe_crushing",
                       "severity": "heavy"}])], sx="steel_moment_frame", sy="urm_wall")
    pdf = render_report(s, assess(s))
    text = re.sub(r"\s+", " ", " ".join(p.extract_text() for p in PdfReader(io.BytesIO(pdf)).pages))
    assert "level y capacity grade" in text and "level y R " not in text
    assert "40.0% FEMA 352 / FEMA 306" in text
    assert "with the method that gave it: FEMA 352: 1 − D/10" in text
