"""Every speed the project promises, each measured side by side with its baseline in this run.

    python -m bench.run            # a readable table with targets and baselines
    python -m bench.run --json     # the same; the last line is one JSON object of the figures
    python -m bench.run assess_big_ms pdf_ratio    # only some figures

Absolute times drift between machines, so each figure is a ratio to a baseline measured in the
same run, or a time with a fixed target on this 2-core machine. Medians of several repeats,
after a warm-up. Big inputs are generated here, seeded; nothing large is committed. Files go to
`TMPDIR`: keep it on a real disk (fsync on tmpfs costs nothing and the store ratios say little).
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from collections.abc import Callable
from dataclasses import dataclass


@dataclass(frozen=True)
class Figure:
    """A promised figure: how to measure it, its target, and what it compares."""

    key: str
    target: float
    better: str  # "<=" or ">="
    what: str
    measure: Callable[[], dict[str, float]]


def _assess() -> dict[str, float]:
    from bench.assess_bench import figures_of_assess

    return figures_of_assess()


def _one(module: str, name: str, key: str, **kw: int) -> Callable[[], dict[str, float]]:
    def run() -> dict[str, float]:
        mod = __import__(module, fromlist=[name])
        value = getattr(mod, name)(**kw)
        return value if isinstance(value, dict) else {key: float(value)}
    return run


def _report() -> dict[str, float]:
    from bench.report_bench import figures_of_report

    return figures_of_report()


# Both figures of the centre's reads come from one throwaway cluster filled once.
_CENTRE_READS = _one("bench.centre_bench", "centre_summary_100k_ms", "centre_summary_100k_ms")

FIGURES = [
    Figure("store_write_ratio", 2.0, "<=", "1,000 single-field edits of a 10-storey survey "
           "(validate, row, change log, one durable transaction each) / bare sqlite3 writing "
           "the same rows with the same pragmas", _one("bench.store_bench", "store_write_ratio",
                                                       "store_write_ratio", edits=1000)),
    Figure("edit_300_storeys_ms", 50.0, "<=", "median ms of an edit of a 300-storey survey "
           "that runs the whole-survey rule check (a storey's notes, a hazard's place, the "
           "building's name), validated, written and logged in one durable transaction",
           _one("bench.store_bench", "edit_300_storeys_times", "edit_300_storeys_ms")),
    Figure("assess_big_ms", 100.0, "<=", "ms to assess the 60-storey survey (50 member "
           "groups and 4 readings per storey and direction), probabilities included", _assess),
    Figure("assess_speedup", 10.0, ">=", "brute-force Monte Carlo of the same survey (10,000 "
           "samples of every reading and crack) / the engine", _assess),
    Figure("startup_ratio", 1.5, "<=", "`triage demo` start to first screen ready (headless) / "
           "a minimal Textual app with one static screen",
           _one("bench.ui_bench", "startup_ratio", "startup_ratio")),
    Figure("pdf_ratio", 2.0, "<=", "unsigned report of the 60-storey survey / a bare "
           "reportlab document with the same table rows", _report),
    Figure("merge_ratio", 3.0, "<=", "merging 200 databases of 50 surveys / ATTACH + INSERT "
           "... SELECT of the same rows", _one("bench.store_bench", "merge_ratio", "merge_ratio")),
    Figure("keystroke_ms", 16.0, "<=", "median UI-thread ms to accept a field (validate, "
           "durable save) in a 20-storey survey",
           _one("bench.ui_bench", "keystroke_ms", "keystroke_ms")),
    Figure("verdict_ms", 100.0, "<=", "median ms from an accepted field to the recomputed "
           "verdict on screen, same survey", _one("bench.ui_bench", "verdict_ms", "verdict_ms")),
    Figure("nav_keys_storey", 25.0, "<=", "keys other than typed characters to log one "
           "typical storey (4 readings at named spots, 3 member groups one with 2 signs, 1 "
           "hazard with a height) from its first tab to its last field; chars_storey beside it",
           _one("bench.ui_bench", "nav_keys_storey", "nav_keys_storey")),
    Figure("list_10k_ms", 1000.0, "<=", "listing 10,000 stored surveys",
           _one("bench.store_bench", "list_10k_ms", "list_10k_ms")),
    Figure("summary_10k_ms", 1000.0, "<=", "the area summary of 10,000 buildings",
           _one("bench.store_bench", "summary_10k_ms", "summary_10k_ms")),
    Figure("sync_ratio", 3.0, "<=", "`sync` of 10,000 demo-size surveys into an empty centre "
           "(throwaway PostgreSQL) / COPY of the same rows into the same tables",
           _one("bench.centre_bench", "sync_ratio", "sync_ratio")),
    Figure("centre_summary_100k_ms", 1000.0, "<=", "`triage --db postgresql://… summary` of "
           "100,000 buildings", _CENTRE_READS),
    Figure("centre_geojson_100k_ms", 2000.0, "<=", "`triage --db postgresql://… summary "
           "--format geojson` of 100,000 buildings (about 58 MB)", _CENTRE_READS),
    Figure("report_limits_s", 10.0, "<=", "`triage report FILE` of a typical survey with one "
           "size limit at its bound (texts, storeys, readings, groups, counts, hazards, "
           "photos): the slowest case, s", _one("bench.limits_bench", "report_limits",
                                                "report_limits_s")),
]


def main(argv: list[str] | None = None) -> int:
    """Measure, print, and return 1 when a figure misses its target."""
    keys = [f.key for f in FIGURES]
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("names", nargs="*", default=[], help=f"figures to measure (default: all "
                    f"of {', '.join(keys)})")
    ap.add_argument("--json", action="store_true", help="end with one JSON object of figures")
    args = ap.parse_args(argv)
    unknown = [n for n in args.names if n not in keys]
    if unknown:
        ap.error(f"unknown figure {unknown[0]!r}; known: {', '.join(keys)}")
    wanted = args.names or keys
    results: dict[str, float] = {}
    extra: dict[str, float] = {}
    done: set[int] = set()
    t_all = time.perf_counter()
    for f in FIGURES:
        if f.key not in wanted:
            continue
        if id(f.measure) in done and f.key in results:
            continue
        t0 = time.perf_counter()
        try:
            got = f.measure()
        except Exception as err:  # a figure that cannot be measured is reported, not hidden
            print(f"{f.key}: could not be measured: {type(err).__name__}: {err}",
                  file=sys.stderr)
            continue
        done.add(id(f.measure))
        for k, v in got.items():
            (results if k in keys else extra)[k] = round(float(v), 4)
        print(f"  measured {', '.join(got)} in {time.perf_counter() - t0:.1f} s",
              file=sys.stderr)
    missed = []
    lines = [f"{'figure':<18} {'value':>10}  target   what"]
    for f in FIGURES:
        if f.key not in wanted:
            continue
        v = results.get(f.key)
        ok = v is not None and (v <= f.target if f.better == "<=" else v >= f.target)
        if not ok:
            missed.append(f.key)
        shown = "—" if v is None else f"{v:.3f}"
        lines.append(f"{f.key:<18} {shown:>10}  {f.better} {f.target:<6g} "
                     f"{'' if ok else 'MISSED '}{f.what}")
    if extra:
        lines.append("baselines and parts: " + ", ".join(f"{k} {v:g}" for k, v in extra.items()))
    lines.append(f"total {time.perf_counter() - t_all:.0f} s; "
                 f"{'all targets met' if not missed else 'missed: ' + ', '.join(missed)}")
    print("\n".join(lines))
    if args.json:
        print(json.dumps({**results, **{f"_{k}": v for k, v in extra.items()}}, sort_keys=True))
    return 1 if missed else 0


if __name__ == "__main__":
    raise SystemExit(main())
