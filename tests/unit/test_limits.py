"""The limits and plausibility rules of the survey format, each tried three ways.

Every case is a survey at the limit (accepted) and one edit that goes just over it (refused).
The refusal is checked through `parse_survey`, through `triage assess` (exit 1, one line, no
internal error) and through the store's edit API (refused, the database unchanged), and its one
line names the field by its key path and in words, and states the limit.
"""

from __future__ import annotations

import copy
import json
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

from tests.helpers import reading, storey, survey_dict, tilt
from triage import model_rules as rules
from triage.cli import main
from triage.model import SurveyError, parse_survey, parse_survey_text
from triage.store import EditRefused, Store


def base() -> dict[str, Any]:
    """One storey G (3.2 m) with an offset and a tilt reading, two marked groups, one hazard."""
    return survey_dict([storey("G", [reading("x", 2.0), tilt("y", 0.1)], [
        {"kind": "column", "count": 10, "ref": "C1"},
        {"kind": "column", "count": 1, "ref": "C2", "crack_mm": 0.4, "crack_sd_mm": 0.1}])],
        hazards=[{"kind": "falling_hazard", "storey": "G", "height_above_ground_m": 9.0}])


@dataclass
class Case:
    """A survey at a limit, and an edit (op, path, value) that takes it just over."""

    name: str
    at_limit: Callable[[dict[str, Any]], None]
    op: str
    path: str
    value: Any
    field: str          # the key path the refusal names
    words: str          # the field in words, as the refusal says it ("": the key says it)
    limit: str          # the limit, as the refusal states it

    def over(self) -> dict[str, Any]:
        d = base()
        self.at_limit(d)
        _apply(d, self.op, self.path, self.value)
        return d


def _tokens(path: str) -> list[str | int]:
    out: list[str | int] = []
    for part in path.split("."):
        name, _, rest = part.partition("[")
        out.append(name)
        for i in rest.replace("]", "").split("[") if rest else []:
            out.append(int(i))
    return out


def _apply(d: dict[str, Any], op: str, path: str, value: Any) -> None:
    t = _tokens(path)
    node: Any = d
    for k in t[:-1]:
        node = node[k] if not isinstance(node, dict) or k in node else node.setdefault(k, [])
    if op == "set":
        node[t[-1]] = copy.deepcopy(value)
    else:
        node.setdefault(t[-1], []).append(copy.deepcopy(value)) if isinstance(node, dict) \
            else node.insert(t[-1], value)


def _set(path: str, value: Any) -> Callable[[dict[str, Any]], None]:
    return lambda d: _apply(d, "set", path, value)


def _many(path: str, make: Callable[[int], Any], n: int) -> Callable[[dict[str, Any]], None]:
    return lambda d: _apply(d, "set", path, [make(i) for i in range(n)])


def _storey(i: int) -> dict[str, Any]:
    return {"label": f"L{i}", "height_m": 3.0}


def _both(*fs: Callable[[dict[str, Any]], None]) -> Callable[[dict[str, Any]], None]:
    def run(d: dict[str, Any]) -> None:
        for f in fs:
            f(d)
    return run


R0 = "storeys[0].readings[0]"
M1 = "storeys[0].members[1]"

CASES = [
    Case("text 2,000", _set("building.name", "n" * 2000), "set", "building.name", "n" * 2001,
         "building.name", "building, name", "2,001 characters; at most 2,000"),
    Case("storey notes 20,000", _set("storeys[0].notes", "n" * 20000), "set", "storeys[0].notes",
         "n" * 20001, "storeys[0].notes", "storey G, notes", "at most 20,000"),
    Case("hazard note 20,000", _set("hazards[0].note", "n" * 20000), "set", "hazards[0].note",
         "n" * 20001, "hazards[0].note", "hazard 1 (falling hazard), note", "at most 20,000"),
    Case("storeys 300", lambda d: d["storeys"].extend(_storey(i) for i in range(299)), "add",
         "storeys", _storey(300),
         "storeys", "", "301 storeys; a survey holds at most 300"),
    Case("readings 200", _many("storeys[0].readings", lambda i: reading("x", 1.0), 200), "add",
         "storeys[0].readings", reading("y", 1.0), "storeys[0].readings", "storey G, readings",
         "201 readings; a storey holds at most 200"),
    Case("member groups 500",
         _many("storeys[0].members", lambda i: {"kind": "beam", "count": 1}, 500), "add",
         "storeys[0].members", {"kind": "beam", "count": 1}, "storeys[0].members",
         "storey G, member groups", "501 member groups; a storey holds at most 500"),
    Case("count 10,000", _set("storeys[0].members[0].count", 10000), "set",
         "storeys[0].members[0].count", 10001, "storeys[0].members[0].count",
         "storey G, member group 1 (C1), count", "less than or equal to 10000"),
    Case("count times weight 100,000",
         _both(_set("storeys[0].members[0].count", 9999),
               _set("storeys[0].members[0].weight", 10.0), _set(f"{M1}.weight", 10.0)),
         "set", f"{M1}.weight", 11.0, "storeys[0].members",
         "storey G, member groups", "is 100,001; a storey holds at most 100,000"),
    Case("hazards 500", _many("hazards", lambda i: {"kind": "blocked_egress"}, 500), "add",
         "hazards", {"kind": "blocked_egress"}, "hazards", "",
         "501 hazards; a survey holds at most 500"),
    Case("photos 50", _many("storeys[0].members[0].photos",
                            lambda i: {"path": f"img/{i}.jpg"}, 50), "add",
         "storeys[0].members[0].photos", {"path": "img/x.jpg"}, "storeys[0].members[0].photos",
         "storey G, member group 1 (C1), photos", "51 items; at most 50"),
    Case("gauge at least 100 mm", _set(f"{R0}.gauge_mm", 100.0), "set", f"{R0}.gauge_mm", 99.5,
         f"{R0}.gauge_mm", "storey G, reading 1, gauge (mm)", "under 100 mm"),
    Case("gauge at most the storey plus 5%", _set(f"{R0}.gauge_mm", 3360.0), "set",
         f"{R0}.gauge_mm", 3361.0, f"{R0}.gauge_mm", "storey G, reading 1, gauge (mm)",
         "longer than the storey (3.2 m) plus 5%, 3,360 mm"),
    Case("sd_mm at most the gauge", _set(f"{R0}.sd_mm", 2000.0), "set", f"{R0}.sd_mm", 2000.5,
         f"{R0}.sd_mm", "storey G, reading 1, uncertainty (mm)", "more than the gauge, 2000 mm"),
    Case("sd_deg at most 5", _set("storeys[0].readings[1].sd_deg", 5.0), "set",
         "storeys[0].readings[1].sd_deg", 5.01, "storeys[0].readings[1].sd_deg",
         "storey G, reading 2, uncertainty", "less than or equal to 5"),
    Case("crack_sd_mm at most 5", _set(f"{M1}.crack_sd_mm", 5.0), "set", f"{M1}.crack_sd_mm",
         5.01, f"{M1}.crack_sd_mm", "storey G, member group 2 (C2), crack uncertainty (mm)",
         "less than or equal to 5"),
    Case("baseline ratio within the largest drift", _set(f"{R0}.baseline_mm", 499.0), "set",
         f"{R0}.baseline_mm", 500.0, f"{R0}.baseline_mm",
         "storey G, reading 1, as-built offset (mm)", "25.0% is 25% or more"),
    Case("baseline tilt within the largest drift",
         _set("storeys[0].readings[1].baseline_deg", 14.0), "set",
         "storeys[0].readings[1].baseline_deg", 14.1, "storeys[0].readings[1].baseline_deg",
         "storey G, reading 2, as-built tilt", "25.1% is 25% or more"),
    Case("drift under 25% after the baseline", _set(f"{R0}.offset_mm", 499.0), "set",
         f"{R0}.offset_mm", 500.0, R0, "storey G, reading 1", "visible_lean hazard"),
    Case("height above ground 1,000 m", _set("hazards[0].height_above_ground_m", 1000.0), "set",
         "hazards[0].height_above_ground_m", 1000.5, "hazards[0].height_above_ground_m",
         "hazard 1 (falling hazard), height above ground (m)", "less than or equal to 1000"),
    Case("year built not after the inspection", _set("building.year_built", 2026), "set",
         "building.year_built", 2027, "building.year_built", "building, year built",
         "after the inspection (2026)"),
    Case("mark unique in a storey", _set("storeys[0].members[0].ref", "C1"), "set",
         f"{M1}.ref", "c1", f"{M1}.ref", "storey G, member group 2 (c1), mark",
         "also the mark of member group 1; a mark is used once in a storey"),
    Case("below-grade storeys under the others",
         _set("storeys", [{"label": "B1", "height_m": 3.0, "below_grade": True},
                          {"label": "G", "height_m": 3.2}]),
         "add", "storeys", {"label": "B2", "height_m": 3.0, "below_grade": True},
         "storeys[2].below_grade", "storey B2, below ground", "above storey 'G', which is above"),
    Case("inspection time in 1900-2100", _set("inspection.at", "2100-12-31T20:00:00+13:00"),
         "set", "inspection.at", "9999-12-31T23:00:00-05:00", "inspection.at",
         "inspection, date and time", "1900-2100"),
    Case("labels unique", lambda d: None, "add", "storeys", {"label": "G", "height_m": 3.0},
         "storeys[1].label", "storey G, label", "used twice"),
    Case("hazard names a storey", lambda d: None, "set", "hazards[0].storey", "7",
         "hazards[0].storey", "hazard 1 (falling hazard), storey", "names no storey"),
    Case("inspected at most the count", _set("storeys[0].members[0].inspected", 10), "set",
         "storeys[0].members[0].inspected", 11, "storeys[0].members[0].inspected",
         "storey G, member group 1 (C1), members inspected",
         "11 inspected of a group of 10; at most its count"),
]
IDS = [c.name for c in CASES]


def check_line(msg: str, case: Case) -> None:
    assert "\n" not in msg
    assert case.field + ":" in msg, msg
    if case.words:   # the field in words, in brackets after the rule
        assert f"({case.words}" in msg, msg
    else:            # the key path alone names it: no words in brackets follow
        assert not msg.endswith(")"), msg
    assert case.limit in msg, msg


@pytest.mark.parametrize("case", CASES, ids=IDS)
def test_parse_survey_at_limit_and_over(case: Case) -> None:
    d = base()
    case.at_limit(d)
    parse_survey(d)
    with pytest.raises(SurveyError) as e:
        parse_survey(case.over())
    check_line(str(e.value), case)


@pytest.mark.parametrize("case", CASES, ids=IDS)
def test_assess_refuses_in_one_line(case: Case, tmp_path: Path, capsys) -> None:
    at = tmp_path / "at.json"
    d = base()
    case.at_limit(d)
    at.write_text(json.dumps(d, ensure_ascii=False), encoding="utf-8")
    over = tmp_path / "over.json"
    over.write_text(json.dumps(case.over(), ensure_ascii=False), encoding="utf-8")
    assert main(["assess", str(at), "--format", "json"]) == 0
    capsys.readouterr()
    assert main(["assess", str(over)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "internal error" not in err and "Traceback" not in err
    assert str(over) in err
    check_line(err.strip(), case)


@pytest.mark.parametrize("case", CASES, ids=IDS)
def test_store_edit_refused_and_database_unchanged(case: Case, tmp_path: Path) -> None:
    d = base()
    case.at_limit(d)
    st = Store.open(tmp_path / "t.db", who="Tess Tester")
    try:
        sid = str(parse_survey(d).survey_id)
        st.add_survey(parse_survey(d), assess=False)
        before = st.conn.execute("SELECT doc, revision FROM surveys").fetchall()
        changes = st.conn.execute("SELECT count(*) FROM changes").fetchone()
        with pytest.raises(EditRefused) as e:
            if case.op == "set":
                st.set_value(sid, case.path, case.value)
            else:
                st.add_item(sid, case.path, case.value)
        check_line(str(e.value), case)
        assert st.conn.execute("SELECT doc, revision FROM surveys").fetchall() == before
        assert st.conn.execute("SELECT count(*) FROM changes").fetchone() == changes
    finally:
        st.close()


# --- rules with no "at the limit" ------------------------------------------------------------

def test_the_baseline_is_subtracted_before_the_25_percent_rule() -> None:
    d = base()
    d["storeys"][0]["readings"][0].update(offset_mm=700.0, baseline_mm=300.0)   # 20% net
    assert abs(parse_survey(d).storeys[0].readings[0].drift_ratio() - 0.2) < 1e-12
    d["storeys"][0]["readings"][0].update(offset_mm=-300.0, baseline_mm=300.0)  # -30% net
    with pytest.raises(SurveyError, match=r"drift ratio 30\.0% \(baseline subtracted\)"):
        parse_survey(d)


@pytest.mark.parametrize("text,ok", [("a\ud800b", False), ("\udfff", False),
                                     ("a\U0001f600b", True), ("Kōwhai", True)])
def test_lone_surrogate_refused(text: str, ok: bool) -> None:
    d = base()
    d["storeys"][0]["readings"][0]["where"] = text
    if ok:
        assert parse_survey(d).storeys[0].readings[0].where == text
        return
    with pytest.raises(SurveyError) as e:
        parse_survey(d)
    msg = str(e.value)
    assert msg.startswith("storeys[0].readings[0].where: holds a lone surrogate")
    assert "\n" not in msg
    msg.encode("utf-8")   # the message itself can be printed


def test_lone_surrogate_in_a_file_refused() -> None:
    text = json.dumps(base()).replace('"Test House"', '"Test \\ud83d House"')
    with pytest.raises(SurveyError, match=r"^building\.name: holds a lone surrogate \\ud83d"):
        parse_survey_text(text)


@pytest.mark.parametrize("at", ["9999-12-31T23:00:00-05:00", "0001-01-01T00:00:00+13:00",
                                "1899-12-31T23:00:00+00:00", "2101-01-01T00:00:00+00:00"])
def test_inspection_time_out_of_range_one_line(at: str) -> None:
    d = base()
    d["inspection"]["at"] = at
    with pytest.raises(SurveyError, match=r"^inspection\.at: year \d+ is outside 1900-2100"):
        parse_survey(d)


def test_year_2100_in_its_offset_but_2101_in_utc_refused() -> None:
    d = base()
    d["inspection"]["at"] = "2100-12-31T23:00:00-05:00"   # 2101-01-01T04:00Z
    with pytest.raises(SurveyError, match="outside 1900-2100"):
        parse_survey(d)


# --- the text of a file, before parsing ------------------------------------------------------

def _nested(levels: int) -> str:
    """A survey whose building.use holds arrays nested so the deepest bracket is at `levels`."""
    d = base()
    d["building"]["use"] = "@"
    inner = "[" * (levels - 2) + "]" * (levels - 2)   # the survey and building are 2 levels
    return json.dumps(d).replace('"@"', inner)


def test_nesting_20_levels_parses_21_refused() -> None:
    with pytest.raises(SurveyError) as e:   # 20 levels: parsed, then the model refuses a list
        parse_survey_text(_nested(20))
    assert "nested" not in str(e.value) and str(e.value).startswith("building.use")
    with pytest.raises(SurveyError, match=r"^\(file\): line 1 column \d+: JSON nested over 20 "):
        parse_survey_text(_nested(21))


def test_very_deep_nesting_refused_before_parsing() -> None:
    text = "[" * 200_000 + "]" * 200_000
    with pytest.raises(SurveyError, match="nested over 20 levels"):
        parse_survey_text(text)


@pytest.mark.parametrize("number", ["1" * 5000, "-" + "9" * 16, "1" * 16 + ".5",
                                    "1" * 4301])
def test_numbers_over_15_digits_refused_in_one_line(number: str) -> None:
    text = json.dumps(base(), indent=1).replace('"offset_mm": 2.0', f'"offset_mm": {number}')
    with pytest.raises(SurveyError) as e:
        parse_survey_text(text)
    msg = str(e.value)
    assert msg.startswith("(file): line ") and "\n" not in msg
    assert f"a number of {len(number.lstrip('-').split('.')[0]):,} digits" in msg
    assert "at most 15" in msg


def test_fifteen_digits_pass_the_scan_and_the_model_names_the_field() -> None:
    text = json.dumps(base()).replace('"offset_mm": 2.0', '"offset_mm": ' + "9" * 15)
    with pytest.raises(SurveyError) as e:
        parse_survey_text(text)
    assert str(e.value).startswith("storeys[0].readings[0]: drift ratio")


def test_digits_inside_text_and_after_the_point_are_not_counted() -> None:
    d = base()
    d["building"]["name"] = "1" * 40
    text = json.dumps(d).replace('"offset_mm": 2.0', '"offset_mm": 2.' + "0" * 40)
    text = text.replace('"gauge_mm": 2000.0', '"gauge_mm": 2e3')
    assert parse_survey_text(text).storeys[0].readings[0].offset_mm == 2.0


@pytest.mark.parametrize("literal,words", [("NaN", "nan is not a number"),
                                           ("Infinity", "inf is not a number"),
                                           ("-Infinity", "-inf is not a number"),
                                           ("1e400", "inf is not a number"),
                                           ("true", "true is not a number"),
                                           ('"2.0"', "text is not a number")])
def test_nan_infinity_bool_in_a_file_name_the_field(literal: str, words: str) -> None:
    text = json.dumps(base()).replace('"offset_mm": 2.0', f'"offset_mm": {literal}')
    with pytest.raises(SurveyError) as e:
        parse_survey_text(text)
    assert str(e.value).startswith(f"storeys[0].readings[0].offset_mm: {words}")
    assert "(storey G, reading 1, offset (mm))" in str(e.value)


@pytest.mark.parametrize("value", [True, 10 ** 15, 10.0 ** 15, 2.5, "3"])
def test_count_strict_whole_number(value: Any) -> None:
    d = base()
    d["storeys"][0]["members"][0]["count"] = value
    with pytest.raises(SurveyError, match=r"^storeys\[0\]\.members\[0\]\.count: "):
        parse_survey(d)


def test_store_import_refuses_deep_and_long_files(tmp_path: Path, capsys) -> None:
    db = tmp_path / "t.db"
    good = tmp_path / "good.json"
    good.write_text(json.dumps(base()), encoding="utf-8")
    assert main(["--db", str(db), "import", str(good)]) == 0
    for name, text in [("deep.json", _nested(30)),
                       ("long.json", json.dumps(base()).replace('"offset_mm": 2.0',
                                                                '"offset_mm": ' + "7" * 5000))]:
        p = tmp_path / name
        p.write_text(text, encoding="utf-8")
        capsys.readouterr()
        assert main(["--db", str(db), "import", str(p)]) == 1
        err = capsys.readouterr().err
        assert name in err and err.count("\n") == 1 and "internal error" not in err
    st = Store.open(db)
    try:
        assert len(st.conn.execute("SELECT id FROM surveys").fetchall()) == 1
    finally:
        st.close()


# --- the short-gauge note ------------------------------------------------------------------

def test_gauge_under_a_quarter_storey_gets_a_note_not_a_refusal() -> None:
    d = base()
    d["storeys"][0]["readings"][0]["gauge_mm"] = 799.0    # 3.2 m / 4 = 800 mm
    d["storeys"][0]["readings"].append(reading("y", 1.0, gauge_mm=800.0))
    s = parse_survey(d)
    notes = rules.short_gauge_notes(s.storeys)
    assert len(notes) == 1
    assert notes[0].startswith("storey G, reading 1: gauge 799 mm is under a quarter")
    assert rules.short_gauge_notes(d["storeys"]) == notes   # JSON data reads the same


def test_lone_surrogate_in_a_key_refused() -> None:
    text = json.dumps(base()).replace('"use"', '"\\ud800"')
    with pytest.raises(SurveyError, match=r"^\(file\): a key holds a lone surrogate \\ud800"):
        parse_survey_text(text)


def test_a_label_cannot_drive_the_terminal_or_break_the_line() -> None:
    d = base()
    d["storeys"][0]["label"] = "G\x1b[2J\u202e\nX"
    d["storeys"][0]["readings"][0]["gauge_mm"] = 50.0
    with pytest.raises(SurveyError) as e:
        parse_survey(d)
    msg = str(e.value)
    assert "\n" not in msg and "\x1b" not in msg and "\u202e" not in msg
    assert "(storey G\\u001b[2J\\u202e\\u000aX, reading 1, gauge (mm))" in msg


def test_the_assessment_carries_the_short_gauge_note() -> None:
    from triage.assess import assess

    d = base()
    d["storeys"][0]["readings"][0]["gauge_mm"] = 600.0
    notes = assess(parse_survey(d)).notes
    assert sum("gauge 600 mm is under a quarter of the storey height (3.2 m)" in n
               for n in notes) == 1
    d["storeys"][0]["readings"][0]["gauge_mm"] = 800.0
    assert not any("under a quarter" in n for n in assess(parse_survey(d)).notes)
