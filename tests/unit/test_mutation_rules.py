"""The mutation benchmark's equivalence rule `sql-letter-case` (bench/mutation_rules.py).

The rule leaves a mutant out of the score, so a false "equivalent" would hide a missing test:
these tests hold it to refusing whatever SQLite (or Python) could read differently.
"""

from __future__ import annotations

import ast
import sqlite3
import textwrap
from pathlib import Path

import pytest

from bench.mutation import load_rules
from bench.mutation_rules import (
    RULES,
    Mutated,
    RuleBook,
    check_rules,
    rule_sql_letter_case,
    sql_case_only,
)

ROOT = Path(__file__).resolve().parents[2]

# (before, after): SQLite reads both the same.
SAME = [
    ("SELECT value FROM src.meta WHERE key = 'db_id'",
     "select value from src.meta where key = 'db_id'"),
    ("SELECT DISTINCT t.id, name FROM t WHERE id IN (SELECT id FROM t) ORDER BY id",
     "SELECT DISTINCT T.ID, NAME FROM T WHERE ID IN (SELECT ID FROM T) ORDER BY ID"),
    ("SELECT t.* FROM t WHERE name = ? AND id > 0", "SELECT T.* FROM T WHERE NAME = ? AND ID > 0"),
    ("UPDATE t SET name = 'Kōwhai Bay' WHERE id = ?",
     "update t set name = 'Kōwhai Bay' where id = ?"),
    ("INSERT INTO t (id, name) SELECT count(*) + 10, 'x' FROM t",
     "INSERT INTO T (ID, NAME) SELECT COUNT(*) + 10, 'x' FROM T"),
    ("DELETE FROM t WHERE id = ?", "delete from t where id = ?"),
]

# (before, after, why the rule must refuse)
REFUSED = [
    ("SELECT value FROM src.meta WHERE key = 'db_id'",
     "SELECT VALUE FROM SRC.META WHERE KEY = 'DB_ID'", "case inside a quoted literal"),
    ('SELECT id FROM t WHERE name = "abc"', 'SELECT ID FROM T WHERE NAME = "ABC"',
     "case inside a double-quoted name"),
    ("no such file", "NO SUCH FILE", "not SQL"),
    ("updated", "UPDATED", "not SQL"),
    ("SELECT id FROM t", "XXSELECT id FROM tXX", "text added, not case"),
    ("SELECT count(*) FROM t", "SELECT COUNT(*) FROM T", "an expression names its column"),
    ("SELECT id AS n FROM t", "SELECT ID AS N FROM T", "an alias names its column"),
    ("SELECT NULL, id FROM t", "select null, id from t", "a value names its column"),
    ("SELECT id FROM t WHERE name = :name", "SELECT ID FROM T WHERE NAME = :NAME",
     "a named parameter's case"),
    ("SELECT id FROM t WHERE name = %s", "SELECT ID FROM T WHERE NAME = %S",
     "another driver's placeholder"),
    ("CREATE TABLE t (id TEXT)", "create table t (id text)", "declares a name"),
    ("ATTACH DATABASE ? AS src", "ATTACH DATABASE ? AS SRC", "declares a name"),
    ("WITH w AS (SELECT id FROM t) SELECT id FROM w", "with w as (select id from t) "
     "select id from w", "a common table declares names"),
    ("INSERT INTO t (id) VALUES (1) RETURNING id", "insert into t (id) values (1) returning id",
     "returns rows from a write"),
    ("SELECT id FROM t WHERE name = 'it''s", "select id from t where name = 'it''s",
     "a quote left open"),
    ("SELECT id FROM t", "SELECT id FROM t", "no change at all"),
    ("SELECT id FROM t", "SELECT id FROM t ", "not the same text"),
]


@pytest.fixture
def db() -> sqlite3.Connection:
    conn = sqlite3.connect(":memory:")
    conn.execute("ATTACH DATABASE ':memory:' AS src")
    conn.execute("CREATE TABLE src.meta (key TEXT, value TEXT)")
    conn.execute("INSERT INTO src.meta VALUES ('db_id', 'laptop-1')")
    conn.execute("CREATE TABLE t (id INTEGER, name TEXT)")
    conn.executemany("INSERT INTO t VALUES (?, ?)", [(1, "a"), (2, "b")])
    conn.commit()
    return conn


def _read(conn: sqlite3.Connection, sql: str) -> tuple[object, object, object]:
    args = ("a",) if "?" in sql else ()
    cur = conn.execute(sql, args)
    names = [d[0] for d in cur.description] if cur.description else None
    rows = cur.fetchall()
    table = conn.execute("SELECT * FROM t ORDER BY id, name").fetchall()
    conn.rollback()
    return names, rows, table


@pytest.mark.parametrize(("before", "after"), SAME)
def test_rule_accepts_a_statement_that_sqlite_reads_the_same(db: sqlite3.Connection,
                                                              before: str, after: str) -> None:
    assert sql_case_only(before, after)
    assert _read(db, before) == _read(db, after)


@pytest.mark.parametrize(("before", "after", "why"), REFUSED)
def test_rule_refuses_what_could_read_differently(before: str, after: str, why: str) -> None:
    assert not sql_case_only(before, after), why


@pytest.mark.parametrize(("before", "after"), [
    ("SELECT value FROM src.meta WHERE key = 'db_id'",
     "SELECT VALUE FROM SRC.META WHERE KEY = 'DB_ID'"),
    ("SELECT count(*) FROM t", "SELECT COUNT(*) FROM T"),
    ("SELECT id AS n FROM t", "SELECT ID AS N FROM T"),
])
def test_refused_case_changes_do_read_differently_in_sqlite(db: sqlite3.Connection,
                                                            before: str, after: str) -> None:
    assert not sql_case_only(before, after)
    assert _read(db, before) != _read(db, after)


# A module as mutmut writes it: the original function and its mutants side by side.
MODULE = '''
import sqlite3

def x_f__mutmut_orig(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "AND op = 'hide' ORDER BY seq", (sid,))
    c.execute("UPDATE t SET hidden = 1 WHERE id = ?", (sid,))
    return "updated" if c.total_changes else "unchanged"

def x_f__mutmut_1(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "and op = 'hide' order by seq", (sid,))
    c.execute("UPDATE t SET hidden = 1 WHERE id = ?", (sid,))
    return "updated" if c.total_changes else "unchanged"

def x_f__mutmut_2(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "AND OP = 'HIDE' ORDER BY SEQ", (sid,))
    c.execute("UPDATE t SET hidden = 1 WHERE id = ?", (sid,))
    return "updated" if c.total_changes else "unchanged"

def x_f__mutmut_3(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "AND op = 'hide' ORDER BY seq", (sid,))
    c.execute("UPDATE t SET hidden = 1 WHERE id = ?", (sid,))
    return "UPDATED" if c.total_changes else "unchanged"

def x_f__mutmut_4(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "and op = 'hide' order by seq", (sid,))
    c.execute("UPDATE t SET hidden = 2 WHERE id = ?", (sid,))
    return "updated" if c.total_changes else "unchanged"

def x_f__mutmut_5(c, cols, sid):
    c.execute(f"SELECT {cols} FROM src.changes WHERE survey_id = ? "
              "AND op = 'hide' ORDER BY seq", (sid,))
    c.execute("update t set hidden = 1 where id = ?", (sid,))
    return "updated" if c.total_changes else "unchanged"

def x_g__mutmut_orig(c, key):
    sql = "SELECT value FROM meta WHERE key = ?"
    return c.execute(sql, (key,)).fetchone(), f"WHERE name = '{key}'"

def x_g__mutmut_1(c, key):
    sql = "select value from meta where key = ?"
    return c.execute(sql, (key,)).fetchone(), f"WHERE name = '{key}'"

def x_h__mutmut_orig(c, key):
    return c.execute(f"SELECT id FROM t WHERE name = '{key}" "' AND id > 0")

def x_h__mutmut_1(c, key):
    return c.execute(f"SELECT id FROM t WHERE name = '{key}" "' and id > 0")
'''


@pytest.mark.parametrize(("mutant", "equivalent", "case"), [
    ("x_f__mutmut_1", True, "keywords of an f-string statement in lower case"),
    ("x_f__mutmut_5", True, "a whole statement in lower case"),
    ("x_f__mutmut_2", False, "a quoted literal in upper case"),
    ("x_f__mutmut_3", False, "a string Python compares, not SQL"),
    ("x_f__mutmut_4", False, "a number changed beside a case change"),
    ("x_g__mutmut_1", False, "SQL held in a variable, not handed to execute here"),
    ("x_h__mutmut_1", False, "an f-string value inside a quoted literal"),
    ("x_f__mutmut_orig", False, "the original itself"),
    ("x_f__mutmut_9", False, "a mutant not in the module"),
])
def test_rule_on_mutmuts_module(mutant: str, equivalent: bool, case: str) -> None:
    module = Mutated(textwrap.dedent(MODULE))
    assert rule_sql_letter_case(module, f"triage.store.merge.{mutant}") is equivalent, case


@pytest.mark.parametrize("imports", ["import json", "import sqlite3\nimport psycopg",
                                     "import sqlite3\nfrom psycopg import sql"])
def test_rule_only_where_sqlite_is_the_only_driver(imports: str) -> None:
    source = textwrap.dedent(MODULE).replace("import sqlite3", imports)
    assert not rule_sql_letter_case(Mutated(source), "triage.store.merge.x_f__mutmut_5")


def test_rule_book_names_the_rule_and_its_reason(tmp_path: Path) -> None:
    mutated = tmp_path / "merge.py"
    mutated.write_text(textwrap.dedent(MODULE), encoding="utf-8")
    book = RuleBook(load_rules())
    why = book.why(mutated, "triage.store.merge.x_f__mutmut_5")
    assert why is not None and why.startswith("rule sql-letter-case: ") and "SQLite" in why
    assert book.why(mutated, "triage.store.merge.x_f__mutmut_2") is None
    assert book.why(tmp_path / "missing.py", "triage.store.merge.x_f__mutmut_5") is None
    assert RuleBook([]).why(mutated, "triage.store.merge.x_f__mutmut_5") is None


@pytest.mark.parametrize("row", [{"name": "sql-case", "why": "a reason"},
                                 {"name": "sql-letter-case", "why": "  "},
                                 {"name": "sql-letter-case"}])
def test_a_rule_needs_a_known_name_and_a_reason(row: dict[str, str]) -> None:
    with pytest.raises(SystemExit, match="a rule needs a name"):
        check_rules([row], "mutation_equivalent.toml")


def test_the_toml_names_every_rule_it_applies_with_a_reason() -> None:
    rows = load_rules()
    assert [r["name"] for r in rows] == list(RULES)
    assert all(len(r["why"]) > 40 for r in rows)


def test_no_module_of_ours_defines_its_own_execute() -> None:
    # The rule takes `.execute(...)` to be the sqlite3 driver's: no method of ours may read
    # the statement's text on its way there.
    names = {"execute", "executemany", "executescript"}
    for path in (ROOT / "triage").rglob("*.py"):
        tree = ast.parse(path.read_text(encoding="utf-8"))
        defined = {n.name for n in ast.walk(tree) if isinstance(n, ast.FunctionDef)}
        assert not defined & names, path
