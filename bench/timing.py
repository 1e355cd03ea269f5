"""What the benchmark scripts share: timing a `triage` command in process, printing figures."""

from __future__ import annotations

import argparse
import contextlib
import io
import time
from collections.abc import Callable, Mapping


def run_cli(argv: list[str]) -> float:
    """Seconds for `triage ARGV` run in this process, its standard output kept in memory."""
    from triage.cli import main

    out = io.StringIO()
    t0 = time.perf_counter()
    with contextlib.redirect_stdout(out):
        code = main(argv)
    dt = time.perf_counter() - t0
    assert code == 0, code
    return dt


Measure = Callable[[], "float | dict[str, float]"]


def main(doc: str, figures: Mapping[str, Measure], argv: list[str] | None = None) -> None:
    """Measure the figures named on the command line (default: all) and print each.

    A measure gives one number (printed under its name) or several (each under its own).
    """
    ap = argparse.ArgumentParser(description=doc.splitlines()[0])
    ap.add_argument("names", nargs="*", metavar="NAME",
                    help=f"figures to measure (default: all of {', '.join(figures)})")
    args = ap.parse_args(argv)
    unknown = [n for n in args.names if n not in figures]
    if unknown:
        ap.error(f"unknown figure {unknown[0]!r}")
    for name in args.names or list(figures):
        t0 = time.perf_counter()
        got = figures[name]()
        for key, value in (got.items() if isinstance(got, dict) else [(name, got)]):
            print(f"{key}: {value:.3f}")
        print(f"  ({time.perf_counter() - t0:.1f} s)")
