"""Equivalence rules for `bench.mutation`: a kind of mutant that cannot change behaviour.

A rule is named and reasoned in `bench/mutation_equivalent.toml` (a `[[rule]]` table: name,
why) and applied here, by code, to each surviving mutant; a rule named there must exist here
(`RULES`), and only the rules named there are applied. A mutant a rule covers is still listed in
the report, as equivalent, with the rule's name and reason. Rules are strict: a mutant they
cannot prove equivalent stays a survivor (a missed equivalent costs a line in the TOML file; a
false one hides a missing test).

One rule so far, `sql-letter-case`: mutmut turns a string literal into upper or lower case. In
an SQL statement handed to SQLite, the letter case of keywords, table, column and schema names,
function and type names is not read (SQLite folds ASCII letters when it compares them); the
case inside a quoted literal or quoted name is. So a mutant is equivalent when:

- the mutant function differs from the original only in string literals, each of them a part
  of the first argument (the statement) of a call to `.execute`, `.executemany` or
  `.executescript`, in a module that imports `sqlite3` and no other database driver;
- the statement before and after, read as SQL tokens, differ only in the ASCII letter case of
  unquoted words: quoted text ('...', "...", `...`, [...]), parameters (:name, @name, $name)
  and anything after a `%` are compared exactly, and anything unterminated refuses;
- each statement starts with a keyword that declares no name (not CREATE, ALTER, ATTACH,
  WITH: those keep the case of the names they declare, which SQLite gives back), and none
  has RETURNING;
- in a statement that starts with SELECT (the only kind whose result rows carry column names
  a caller could read from `cursor.description`), a select list whose case changed holds only
  plain column references (`col`, `t.col`, `*`, `t.*`): SQLite names such a column by its
  declaration, while an expression or an alias is named as written.
"""

from __future__ import annotations

import ast
import re
from collections.abc import Callable, Iterator
from pathlib import Path

SQL_CALLS = frozenset({"execute", "executemany", "executescript"})
OTHER_DRIVERS = ("psycopg", "psycopg2", "pymysql", "MySQLdb", "apsw", "duckdb")
# Statements whose first keyword declares no name (CREATE, ALTER, ATTACH and WITH do).
_STARTS = frozenset({"SELECT", "INSERT", "UPDATE", "DELETE", "REPLACE", "PRAGMA", "DETACH",
                     "BEGIN", "COMMIT", "END", "ROLLBACK", "SAVEPOINT", "RELEASE", "VACUUM",
                     "ANALYZE", "REINDEX", "DROP"})
# Words that name a value, not a column: SQLite names such a result column as written.
_VALUE_WORDS = frozenset({"NULL", "TRUE", "FALSE", "CURRENT_TIME", "CURRENT_DATE",
                          "CURRENT_TIMESTAMP"})
_HOLE = "\x00"   # stands for an f-string's {value} in a statement's text

_TOKEN = re.compile(r"""
    (?P<quoted>'(?:[^']|'')*'|"(?:[^"]|"")*"|`(?:[^`]|``)*`|\[[^\]]*\])
  | (?P<param>[:@$%][A-Za-z0-9_]*)
  | (?P<word>[A-Za-z0-9_$]+)
  | (?P<space>\s+)
  | (?P<other>.)
""", re.VERBOSE | re.DOTALL)

Token = tuple[str, str]   # (kind, text)


def sql_tokens(sql: str) -> list[Token] | None:
    """The statement as tokens, or None when a quote is left open or a value sits in one."""
    out: list[Token] = []
    for m in _TOKEN.finditer(sql):
        kind = m.lastgroup or "other"
        text = m.group()
        if kind == "other" and text in "'\"`[":
            return None
        if kind == "quoted" and _HOLE in text:
            return None
        out.append((kind, text))
    return out


def _spans_after_select(tokens: list[Token]) -> Iterator[tuple[int, int]]:
    """(start, end) index ranges of each select list: after SELECT up to its own FROM."""
    for i, (kind, text) in enumerate(tokens):
        if kind != "word" or text.upper() != "SELECT":
            continue
        depth = 0
        j = i + 1
        while j < len(tokens):
            k, t = tokens[j]
            if t == "(":
                depth += 1
            elif t == ")":
                depth -= 1
                if depth < 0:
                    break
            elif depth == 0 and (t == ";" or (k == "word" and t.upper() == "FROM")):
                break
            j += 1
        yield i + 1, j


def _plain_columns(tokens: list[Token]) -> bool:
    """Whether a select list holds only plain column references (`col`, `t.col`, `*`, `t.*`)."""
    items: list[list[Token]] = [[]]
    for tok in tokens:
        if tok[0] == "space":
            continue
        if tok[1] == ",":
            items.append([])
        else:
            items[-1].append(tok)
    if items[0] and items[0][0][0] == "word" and items[0][0][1].upper() in ("DISTINCT", "ALL"):
        items[0] = items[0][1:]
    for item in items:
        if [t for _, t in item] == ["*"]:
            continue
        if not 1 <= len(item) <= 5 or len(item) % 2 == 0:
            return False
        if any(t != "." for _, t in item[1::2]):
            return False
        names = item[0::2]
        if names[-1][1] == "*" and len(names) > 1:
            names = names[:-1]
        for kind, text in names:
            if kind != "word" or text[0].isdigit() or text.upper() in _VALUE_WORDS:
                return False
    return True


def sql_case_only(before: str, after: str) -> bool:
    """Whether SQLite reads the two statements the same: they differ in unquoted case only."""
    a, b = sql_tokens(before), sql_tokens(after)
    if a is None or b is None or len(a) != len(b) or a == b:
        return False
    for (ka, ta), (kb, tb) in zip(a, b, strict=True):
        if ka != kb:
            return False
        if ta != tb and (ka != "word" or ta.lower() != tb.lower()):
            return False
    words = [t.upper() for k, t in a if k == "word"]
    if "RETURNING" in words:
        return False
    starts: list[str] = []
    expect = True
    for k, t in a:
        if expect and k == "word":
            starts.append(t.upper())
            expect = False
        elif t == ";":
            expect = True
    if not starts or any(s not in _STARTS for s in starts):
        return False
    if "SELECT" in starts:
        for lo, hi in _spans_after_select(a):
            if a[lo:hi] != b[lo:hi] and not _plain_columns(a[lo:hi]):
                return False
    return True


def _statement_text(node: ast.expr) -> str | None:
    """The text of an SQL statement written as a string or an f-string ({...} as a hole)."""
    if isinstance(node, ast.Constant) and isinstance(node.value, str):
        return node.value
    if isinstance(node, ast.JoinedStr):
        parts = []
        for v in node.values:
            if isinstance(v, ast.Constant) and isinstance(v.value, str):
                parts.append(v.value)
            else:
                parts.append(_HOLE)
        return "".join(parts)
    return None


Pair = tuple[ast.AST, ast.AST]


def _string_changes(a: object, b: object, stack: list[Pair], out: list[list[Pair]]) -> bool:
    """Walk two trees side by side; collect each changed string (with its ancestors).

    False when they differ in anything but the value of a string constant.
    """
    if type(a) is not type(b):
        return False
    if isinstance(a, ast.Constant) and isinstance(b, ast.Constant):
        if type(a.value) is type(b.value) and a.value == b.value and a.kind == b.kind:
            return True
        if isinstance(a.value, str) and isinstance(b.value, str):
            out.append([*stack, (a, b)])
            return True
        return False
    if isinstance(a, ast.AST) and isinstance(b, ast.AST):
        here = [*stack, (a, b)]
        return all(_string_changes(getattr(a, f, None), getattr(b, f, None), here, out)
                   for f in a._fields)
    if isinstance(a, list) and isinstance(b, list):
        return len(a) == len(b) and all(_string_changes(x, y, stack, out)
                                        for x, y in zip(a, b, strict=True))
    return a == b


def _statement_pair(chain: list[Pair]) -> tuple[str, str] | None:
    """The statement before and after, when the changed string is part of one."""
    nodes = list(reversed(chain))   # the changed constant first, then its ancestors
    arg = nodes[0]
    rest = nodes[1:]
    if rest and isinstance(rest[0][0], ast.JoinedStr):
        arg, rest = rest[0], rest[1:]
    if not rest:
        return None
    call_a, call_b = rest[0]
    if not (isinstance(call_a, ast.Call) and isinstance(call_b, ast.Call)
            and isinstance(call_a.func, ast.Attribute) and call_a.func.attr in SQL_CALLS
            and call_a.args and call_a.args[0] is arg[0] and call_b.args[0] is arg[1]):
        return None
    before, after = _statement_text(call_a.args[0]), _statement_text(call_b.args[0])
    if before is None or after is None:
        return None
    return before, after


def sql_case_mutant(orig: ast.FunctionDef, mutant: ast.FunctionDef) -> bool:
    """Whether `mutant` is `orig` with SQL statements changed only in letter case."""
    changes: list[list[Pair]] = []
    for f in orig._fields:
        if f != "name" and not _string_changes(getattr(orig, f), getattr(mutant, f),
                                               [(orig, mutant)], changes):
            return False
    if not changes:
        return False
    for chain in changes:
        pair = _statement_pair(chain)
        if pair is None or not sql_case_only(*pair):
            return False
    return True


class Mutated:
    """mutmut's mutated module (`mutants/...`): its functions by name and its imports."""

    def __init__(self, source: str) -> None:
        tree = ast.parse(source)
        self.functions: dict[str, ast.FunctionDef] = {}
        self.imports: set[str] = set()
        for node in ast.walk(tree):
            if isinstance(node, ast.FunctionDef):
                self.functions[node.name] = node
            elif isinstance(node, ast.Import):
                self.imports.update(a.name.partition(".")[0] for a in node.names)
            elif isinstance(node, ast.ImportFrom) and node.module and not node.level:
                self.imports.add(node.module.partition(".")[0])

    def pair(self, mutant_name: str) -> tuple[ast.FunctionDef, ast.FunctionDef] | None:
        """The original function and the mutant (`pkg.mod.x_f__mutmut_3`), if both are here."""
        short = mutant_name.rpartition(".")[2]
        orig_name = short.partition("__mutmut_")[0] + "__mutmut_orig"
        if short == orig_name or short not in self.functions or orig_name not in self.functions:
            return None
        return self.functions[orig_name], self.functions[short]


def rule_sql_letter_case(module: Mutated, mutant_name: str) -> bool:
    """The `sql-letter-case` rule (module docstring)."""
    if "sqlite3" not in module.imports or module.imports.intersection(OTHER_DRIVERS):
        return False
    pair = module.pair(mutant_name)
    return pair is not None and sql_case_mutant(*pair)


RULES: dict[str, Callable[[Mutated, str], bool]] = {
    "sql-letter-case": rule_sql_letter_case,
}


class RuleBook:
    """The rules named in the TOML file, applied to mutants of the mutated modules."""

    def __init__(self, rules: list[dict[str, str]]) -> None:
        self.rules = rules
        self._modules: dict[Path, Mutated | None] = {}

    def _module(self, path: Path) -> Mutated | None:
        if path not in self._modules:
            try:
                self._modules[path] = Mutated(path.read_text(encoding="utf-8"))
            except (OSError, SyntaxError):
                self._modules[path] = None
        return self._modules[path]

    def why(self, mutated_module: Path, mutant_name: str) -> str | None:
        """"rule NAME: why" for the first rule that covers the mutant, else None."""
        module = self._module(mutated_module)
        if module is None:
            return None
        for r in self.rules:
            if RULES[r["name"]](module, mutant_name):
                return f"rule {r['name']}: {r['why']}"
        return None


def check_rules(rows: list[dict[str, str]], where: str) -> list[dict[str, str]]:
    """The `[[rule]]` entries, each a known rule with a reason; SystemExit otherwise."""
    for r in rows:
        if r.get("name") not in RULES or not str(r.get("why", "")).strip():
            raise SystemExit(f"{where}: a rule needs a name among {', '.join(RULES)} and a "
                             f"reason (why): {r}")
    return rows
