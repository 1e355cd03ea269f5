"""The coverage floors CI holds, read from the data the test run left (`.coverage`).

    pytest --cov=triage --cov-report= && python -m tests.coverage_floors

At least 95% of the lines outside triage/ui and 90% of those inside it are run by the tests;
below either floor this prints the files missing most lines and exits 1. Lines are statements
as coverage.py counts them (`[tool.coverage]` in pyproject.toml); commands the tests start as
child processes count too. `--quiet` prints only the two figures.
"""

from __future__ import annotations

import io
import sys
from dataclasses import dataclass


@dataclass(frozen=True)
class Floor:
    """A part of the package and the share of its lines the tests must run."""

    name: str
    include: tuple[str, ...]
    omit: tuple[str, ...]
    percent: float


FLOORS = (
    Floor("outside triage/ui", ("*/triage/*",), ("*/triage/ui/*",), 95.0),
    Floor("inside triage/ui", ("*/triage/ui/*",), (), 90.0),
)


def _gaps(cov: object, floor: Floor, n: int = 8) -> list[str]:
    """The files of a part missing most lines, as 'path: missed of statements'."""
    rows = []
    data = cov.get_data()   # type: ignore[attr-defined]
    for path in data.measured_files():
        rel = path.replace("\\", "/")
        if not any(_match(rel, p) for p in floor.include) or any(
                _match(rel, p) for p in floor.omit):
            continue
        _, statements, _, missing, _ = cov.analysis2(path)   # type: ignore[attr-defined]
        if missing:
            rows.append((len(missing), len(statements), rel.split("/triage/", 1)[-1]))
    rows.sort(reverse=True)
    return [f"triage/{name}: {miss} of {stmts} lines not run" for miss, stmts, name in rows[:n]]


def _match(path: str, pattern: str) -> bool:
    from fnmatch import fnmatch

    return fnmatch(path, pattern)


def main(argv: list[str] | None = None) -> int:
    """Print each part's figure against its floor; 1 when any is below."""
    from coverage import Coverage

    quiet = "--quiet" in (argv if argv is not None else sys.argv[1:])
    cov = Coverage()
    cov.load()
    below = []
    for floor in FLOORS:
        got = cov.report(include=list(floor.include), omit=list(floor.omit) or None,
                         file=io.StringIO(), ignore_errors=True)
        ok = got >= floor.percent
        print(f"coverage {floor.name}: {got:.2f}% of lines run by the tests (floor "
              f"{floor.percent:g}%){'' if ok else ': BELOW THE FLOOR'}")
        if not ok:
            below.append(floor)
    if below and not quiet:
        for floor in below:
            print(f"most lines not run, {floor.name}:")
            for line in _gaps(cov, floor):
                print(f"  {line}")
    return 1 if below else 0


if __name__ == "__main__":
    sys.exit(main())
