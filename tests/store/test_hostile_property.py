"""Hostile surveys drawn from the survey's own JSON Schema: never an internal error.

Each example is a survey document built by walking `triage schema` (every object, array, enum,
bound and pattern it states), then, more often than not, given a hostile twist: NaN or
Infinity, a number of thousands of digits, nesting far past 20 levels, a lone surrogate,
control and bidi characters, text over its limit, a year 9999 with an offset, a wrong type, a
missing or unknown key. The properties: `import`, `assess` and `export` (and `report`, for some)
end with exit 0 or 1 and never "internal error"; a refused import is one line and leaves the
database as it was; a valid survey is imported, or "unchanged" when the database holds it
already, or refused when it holds another survey under its id (the examples share one
database); an imported survey exports to a file that imports back as "unchanged".

Examples: 300 under the "ci" profile (the suite's default), of which 50 also make the report.
"""

from __future__ import annotations

import contextlib
import hashlib
import io
import itertools
import json
import os
import random
import sqlite3
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from triage.cli import main
from triage.model import canonical_json, json_schema

EXAMPLES = 30 if os.environ.get("HYPOTHESIS_PROFILE") == "dev" else 300
REPORTS = 5 if os.environ.get("HYPOTHESIS_PROFILE") == "dev" else 50

REPORTED = itertools.count()
SCHEMA = json_schema()
DEFS = SCHEMA.get("$defs", {})

NICE = st.text(st.characters(codec="utf-8", exclude_categories=("Cs", "Cc")), max_size=12)
HOSTILE_TEXT = st.sampled_from([
    "\x1b[2J", "\x1b]0;all clear\x07", "\u202eetaucave", "\x9b31m", "=1+1", "a\x00b",
    "x" * 2001, "y" * 20001, "\r\n", "'; DROP TABLE surveys; --", "../../etc/passwd",
    "\u2066\u2069", "Kōwhai Bay ☃",
])


def _resolve(node: dict[str, Any]) -> dict[str, Any]:
    while "$ref" in node:
        node = DEFS[node["$ref"].rsplit("/", 1)[-1]]
    return node


def from_schema(node: dict[str, Any], depth: int = 0) -> st.SearchStrategy[Any]:
    """Values that the JSON Schema node describes (bounds kept small, so surveys stay small)."""
    node = _resolve(node)
    if "anyOf" in node:
        return st.one_of([from_schema(n, depth) for n in node["anyOf"]])
    if "const" in node:
        return st.just(node["const"])
    if "enum" in node:
        return st.sampled_from(node["enum"])
    kind = node.get("type")
    if kind == "object" or "properties" in node:
        props = node.get("properties", {})
        required = set(node.get("required", ()))
        if depth > 4:
            props = {k: v for k, v in props.items() if k in required}
        return st.fixed_dictionaries(
            {k: from_schema(v, depth + 1) for k, v in props.items() if k in required},
            optional={k: from_schema(v, depth + 1) for k, v in props.items()
                      if k not in required})
    if kind == "array":
        items = node.get("items", {})
        lo = node.get("minItems", 0)
        return st.lists(from_schema(items, depth + 1), min_size=lo, max_size=max(lo, 3))
    if kind == "string":
        fmt = node.get("format")
        if fmt == "uuid":
            return st.uuids().map(str)
        if fmt == "date-time":
            return st.datetimes(timezones=st.timezones()).map(lambda d: d.isoformat())
        if "pattern" in node:
            return st.from_regex(node["pattern"], fullmatch=True)
        lo = node.get("minLength", 0)
        return NICE.filter(lambda s: len(s) >= lo) if lo else NICE
    if kind == "integer":
        lo = node.get("minimum", node.get("exclusiveMinimum", -10) + 1
                      if "exclusiveMinimum" in node else -10)
        hi = node.get("maximum", lo + 30)
        return st.integers(lo, min(hi, lo + 30))
    if kind == "number":
        lo = node.get("minimum", node.get("exclusiveMinimum", -100.0))
        hi = node.get("maximum", node.get("exclusiveMaximum", 100.0))
        return st.floats(lo, hi, allow_nan=False, allow_infinity=False,
                         exclude_min="exclusiveMinimum" in node,
                         exclude_max="exclusiveMaximum" in node)
    if kind == "boolean":
        return st.booleans()
    if kind == "null":
        return st.none()
    return st.none()


# Raw JSON tokens json.dumps cannot write (or would not): put in as markers, then replaced.
RAW = {
    "@@NAN@@": "NaN", "@@INF@@": "-Infinity", "@@BIG@@": "7" * 5000,
    "@@DEEP@@": "[" * 5000 + "]" * 5000, "@@SURROGATE@@": '"note \\ud800 alone"',
    "@@FLOATBIG@@": "1e400", "@@DIGITS@@": "1234567890123456789",
}
HOSTILE_VALUES = st.one_of(
    st.sampled_from([*RAW, True, None, [], {}, -1, 0, 10**6, "9999-12-31T23:59:59-12:00",
                     "0001-01-01T00:00:00+14:00", "not a date", 1e308, -0.0]),
    HOSTILE_TEXT)


def _paths(doc: Any, here: tuple[Any, ...] = ()) -> list[tuple[Any, ...]]:
    out = [here]
    if isinstance(doc, dict):
        for k, v in doc.items():
            out += _paths(v, (*here, k))
    elif isinstance(doc, list):
        for i, v in enumerate(doc):
            out += _paths(v, (*here, i))
    return out


@st.composite
def hostile_surveys(draw: Any) -> str:
    """A survey document from the schema, often twisted; returned as JSON text."""
    doc = draw(from_schema(SCHEMA))
    twists = draw(st.integers(0, 3))
    rnd = random.Random(draw(st.integers(0, 2**32)))
    for _ in range(twists):
        paths = [p for p in _paths(doc) if p]
        if not paths:
            break
        path = rnd.choice(paths)
        parent = doc
        for k in path[:-1]:
            parent = parent[k]
        what = draw(st.sampled_from(["replace", "delete", "unknown_key"]))
        if what == "delete":
            del parent[path[-1]]
        elif what == "unknown_key" and isinstance(parent, dict):
            parent["surprise"] = draw(HOSTILE_VALUES)
        else:
            parent[path[-1]] = draw(HOSTILE_VALUES)
    text = json.dumps(doc, ensure_ascii=draw(st.booleans()))
    for marker, raw in RAW.items():
        text = text.replace(json.dumps(marker), raw)
    return text


def _run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(list(argv))
    return code, out.getvalue(), err.getvalue()


def _state(db: Path) -> str:
    if not db.exists():
        return "absent"
    c = sqlite3.connect(db)
    try:
        h = hashlib.sha256()
        for table in ("surveys", "changes", "assessments", "photos"):
            for row in c.execute(f"SELECT * FROM {table} ORDER BY rowid"):
                h.update(repr(row).encode("utf-8", "surrogatepass"))
        return h.hexdigest()
    finally:
        c.close()


def _valid(f: Path) -> Any:
    """The survey in file `f` as the commands read it, or None when they refuse it."""
    from triage.cli.common import read_survey_file
    from triage.errors import TriageError

    try:
        return read_survey_file(str(f))
    except TriageError:
        return None


def _stored_text(db: Path, survey: Any) -> str | None:
    """The text the database holds under the survey's id, or None when it holds none."""
    if survey is None or not db.exists():
        return None
    c = sqlite3.connect(db)
    try:
        row = c.execute("SELECT doc FROM surveys WHERE id = ?", (str(survey.survey_id),)).fetchone()
        return None if row is None else str(row[0])
    finally:
        c.close()


def _names_photos(survey: Any) -> bool:
    return (any(s.photos or any(m.photos for m in s.members) for s in survey.storeys)
            or any(h.photos for h in survey.hazards))


def _no_internal_error(code: int, err: str, what: str) -> None:
    assert code in (0, 1), (what, code, err)
    assert "internal error" not in err, (what, err)


@pytest.fixture(scope="module")
def place(tmp_path_factory: pytest.TempPathFactory) -> Path:
    from tests.store.conftest import sample_dict, write_json

    d = tmp_path_factory.mktemp("hostile")
    os.environ.setdefault("TRIAGE_HOME", str(d / "home"))
    seed = write_json(d / "seed.json", sample_dict("Seed Flats"))
    assert _run("--db", str(d / "field.db"), "import", str(seed))[0] == 0
    return d


@pytest.mark.slow
@settings(max_examples=EXAMPLES, deadline=None, derandomize=False,
          suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                                 HealthCheck.function_scoped_fixture,
                                 HealthCheck.filter_too_much])
@given(text=hostile_surveys())
def test_import_assess_export_never_fail_inside_and_refusals_change_nothing(place, text):
    db = place / "field.db"
    f = place / "survey.json"
    f.write_text(text, encoding="utf-8", errors="surrogatepass")
    before = _state(db)
    survey = _valid(f)
    held = _stored_text(db, survey)
    code, out, err = _run("--db", str(db), "import", str(f))
    _no_internal_error(code, err, "import")
    # One outcome per example: the survey reader says whether the file is a valid survey;
    # assess then runs (0) or refuses (1) with it, and so does import, but for photos (a
    # valid survey naming a photo outside its folder is refused whole) and for an id the
    # database holds already (the examples share one database, and hypothesis draws the
    # same id again often): the identical survey is "unchanged", another one is refused.
    if survey is None:
        assert code == 1, (out, err)
    elif not _names_photos(survey):
        if held is None:
            assert code == 0 and err.startswith("imported "), err
        elif held == canonical_json(survey.to_json_dict()):
            assert code == 0 and err.startswith("unchanged "), err
        else:
            assert code == 1 and "a different survey is already stored under this id" in err, err
    if code == 1:   # every broken rule on a line of its own, each naming the file
        assert err and all(line.startswith(f"triage import: {f}: ")
                           for line in err.splitlines()), err
        assert _state(db) == before, "a refused import changed the database"
    code_a, _, err_a = _run("assess", str(f))
    _no_internal_error(code_a, err_a, "assess")
    assert code_a == (1 if survey is None else 0), err_a
    if code == 0:
        assert out == "", out   # the status line goes to standard error
        sid = err.split()[1]
        exported = place / "out.json"
        code, _, err = _run("--db", str(db), "export", sid, "-o", str(exported))
        _no_internal_error(code, err, "export")
        assert code == 0, err
        code, out, err = _run("--db", str(db), "import", str(exported))
        assert code == 0 and err.startswith("unchanged"), (out, err)
    if next(REPORTED) < REPORTS:
        code, _, err = _run("report", str(f), "-o", str(place / "r.pdf"))
        _no_internal_error(code, err, "report")
