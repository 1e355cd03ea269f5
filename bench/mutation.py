"""Mutation score of the code whose mistakes cost most: does a small wrong change fail a test?

    python -m bench.mutation                  # every group below, a table and the survivors
    python -m bench.mutation --json           # the same; the last line is one JSON object
    python -m bench.mutation merge edits      # only some groups
    python -m bench.mutation --list           # the groups, their modules and test files
    python -m bench.mutation merge --rescore /tmp/triage-mutation-XXXX   # a --keep run, again

A benchmark, not a test: CI never runs it. The tool is mutmut (the `mutation` extra). For each
group it copies the checkout (triage/, tests/, the data folders, pyproject.toml) into a scratch
folder under TMPDIR, writes mutmut's configuration there (the group's modules to mutate, its
test files to run) and runs `mutmut run`; the checkout itself is never touched. mutmut first
runs the group's tests once to learn which test reaches which function, then runs, for each
mutant, only the tests that reach its function (forked, `-x`), two at a time.

Each mutant ends killed (a test failed, or it ran over mutmut's time limit), survived (every
test passed), or reached by no test (counted as survived: nothing would notice it). A mutant
that cannot change behaviour (an equivalent mutant) is listed by hand in
`bench/mutation_equivalent.toml`, matched by module, function and the changed line, each with
the reason it is equivalent; or it is covered by one of the rules named and reasoned in that
file (`[[rule]]`) and applied by `bench/mutation_rules.py` (an SQL statement changed only in
the letter case SQLite does not read). Either way it is left out of the score and still listed
in the report as equivalent, with its reason:

    mutation_score = killed / (all - equivalent)

The report lists every survivor with its diff (`-` the line as written, `+` the mutant): a
survivor is either a missing test (write it) or an equivalent mutant (list it, with why).
"""

from __future__ import annotations

import argparse
import json
import os
import shutil
import subprocess
import sys
import tempfile
import time
import tomllib
from dataclasses import dataclass, field
from pathlib import Path

from bench.mutation_rules import RuleBook, check_rules

ROOT = Path(__file__).resolve().parents[1]
EQUIVALENT = Path(__file__).with_name("mutation_equivalent.toml")
COPY = ("triage", "tests", "forms", "sample_surveys", "pyproject.toml", "setup.py")


@dataclass(frozen=True)
class Group:
    """Modules mutated together and the test files that speak for them."""

    name: str
    modules: tuple[str, ...]
    tests: tuple[str, ...]


_RULES_TESTS = ("tests/unit/test_verdict_rules.py", "tests/unit/test_worked_examples.py",
                "tests/unit/test_spots.py", "tests/unit/test_capacity_engine.py",
                "tests/unit/test_capacity_tables.py", "tests/unit/test_wall_doubt.py",
                "tests/unit/test_rules_pinned_spots.py", "tests/unit/test_rules_pinned_capacity.py",
                "tests/unit/test_rules_pinned_walls.py", "tests/unit/test_rules_pinned_verdict.py",
                "tests/unit/test_rules_pinned_members.py",
                "tests/reference")

GROUPS = [
    Group("area", ("triage/store/area.py",),
          ("tests/store/test_summary.py", "tests/store/test_summary_utc.py",
           "tests/store/test_area_rows.py")),
    Group("signing", ("triage/report/signing.py",),
          ("tests/report/test_signing.py", "tests/report/test_first_round.py",
           "tests/report/test_keys.py", "tests/report/test_signing_parts.py")),
    Group("verify", ("triage/report/verify.py",),
          ("tests/report/test_signing.py", "tests/report/test_verify_edges.py",
           "tests/report/test_first_round.py", "tests/report/test_verify_more.py",
           "tests/report/test_verify_words.py")),
    Group("merge", ("triage/store/merge.py",),
          ("tests/store/test_merge.py", "tests/store/test_merge_cases.py",
           "tests/store/test_merge_retractions.py", "tests/store/test_merge_failures.py",
           "tests/store/test_merge_copies.py", "tests/store/test_merge_sources.py")),
    Group("edits", ("triage/store/edits.py",),
          ("tests/store/test_edits.py", "tests/store/test_write_path.py",
           "tests/unit/test_limits.py", "tests/unit/test_model_rules.py",
           "tests/store/test_edits_parts.py")),
    Group("forms", ("triage/report/paper_form.py", "triage/report/paper_sheet.py"),
          ("tests/forms/test_paper_form.py", "tests/forms/test_paper_form_grid.py",
           "tests/forms/test_paper_form_fields.py", "tests/forms/test_paper_parts.py",
           "tests/forms/test_paper_capacity.py", "tests/forms/test_paper_ops.py",
           "tests/forms/test_paper_sheet.py", "tests/forms/test_paper_form_edges.py",
           "tests/forms/test_paper_sections.py")),
    # The engine's rules, in four parts of 800 to 1,400 mutants each (the whole takes hours on
    # two cores); every part runs all of the rules' tests.
    Group("rules-drift", ("triage/assess/drift.py", "triage/assess/spots.py",
                          "triage/assess/stages/drift.py", "triage/assess/levels.py",
                          "triage/assess/repair.py"), _RULES_TESTS),
    Group("rules-members", ("triage/assess/damage.py", "triage/assess/floors.py",
                            "triage/assess/stages/members.py"), _RULES_TESTS),
    Group("rules-capacity", ("triage/assess/capacity.py", "triage/assess/steel.py",
                             "triage/assess/walls.py", "triage/assess/wall_doubt.py"),
          _RULES_TESTS),
    Group("rules-verdict", ("triage/assess/engine.py", "triage/assess/stages/level.py",
                            "triage/assess/stages/governing.py",
                            "triage/assess/stages/advice.py"), _RULES_TESTS),
]


@dataclass
class Outcome:
    """What became of one group's mutants."""

    group: str
    killed: int = 0
    survived: list[dict[str, str]] = field(default_factory=list)
    equivalent: list[dict[str, str]] = field(default_factory=list)
    other: dict[str, int] = field(default_factory=dict)
    seconds: float = 0.0

    @property
    def counted(self) -> int:
        return self.killed + len(self.survived)


def _mutmut_config(g: Group) -> str:
    tests = [t for t in g.tests if (ROOT / t).exists()]
    modules = [m for m in g.modules if (ROOT / m).exists()]
    if not modules or not tests:
        raise SystemExit(f"mutation: group {g.name}: none of its modules or tests exist here "
                         "(renamed? update GROUPS in bench/mutation.py)")
    lines = ["[mutmut]", "source_paths=triage", "only_mutate=", *(f"    {m}" for m in modules),
             "pytest_add_cli_args_test_selection=", *(f"    {t}" for t in tests),
             "pytest_add_cli_args=", "    -p", "    no:cacheprovider", "    -x",
             "use_git_change_detection=false"]
    return "\n".join(lines) + "\n"


def _scratch(g: Group, base: Path) -> Path:
    work = base / g.name
    work.mkdir(parents=True)
    ignore = shutil.ignore_patterns("__pycache__", "*.pyc", "__snapshots__", ".hypothesis")
    for name in COPY:
        src = ROOT / name
        if src.is_dir():
            shutil.copytree(src, work / name, ignore=ignore)
        else:
            shutil.copy2(src, work / name)
    (work / "setup.cfg").write_text(_mutmut_config(g), encoding="utf-8")
    return work


# Run inside the scratch folder after `mutmut run`: every mutant's status, and the diff of each
# one that was not killed, as one JSON object.
_RESULTS = """
import json
from pathlib import Path
from mutmut.__main__ import get_diff_for_mutant
from mutmut.stats import status_by_exit_code
out = []
for meta in sorted(Path("mutants").rglob("*.py.meta")):
    path = meta.relative_to("mutants").with_suffix("")
    data = json.loads(meta.read_text())
    for name, code in sorted(data["exit_code_by_key"].items()):
        status = status_by_exit_code[code]
        diff = "" if status in ("killed", "timeout") else get_diff_for_mutant(name, path=path)
        out.append({"name": name, "path": str(path), "status": status, "diff": diff})
print(json.dumps(out))
"""


def _changed(diff: str) -> tuple[str, str]:
    """The line as written and as mutated, from a mutant's diff (first changed pair)."""
    minus = [ln[1:].strip() for ln in diff.splitlines()
             if ln.startswith("-") and not ln.startswith("---")]
    plus = [ln[1:].strip() for ln in diff.splitlines()
            if ln.startswith("+") and not ln.startswith("+++")]
    return " / ".join(minus), " / ".join(plus)


def _function(name: str) -> str:
    """`triage.store.area.x_building_rows__mutmut_2` -> `building_rows` (method: `Cls.meth`)."""
    short = name.partition("__mutmut_")[0].rpartition(".")[2]
    if "ǁ" in short:   # mutmut writes a method as xǁClassǁmethod
        _, cls, meth = short.split("ǁ")
        return f"{cls}.{meth}"
    return short.removeprefix("x_")


def load_rules(path: Path = EQUIVALENT) -> list[dict[str, str]]:
    """The equivalence rules named in the file (`[[rule]]`: name, why), each known in code."""
    if not path.exists():
        return []
    rows = tomllib.loads(path.read_text(encoding="utf-8")).get("rule", [])
    return check_rules(rows, str(path))


def load_equivalent(path: Path = EQUIVALENT) -> list[dict[str, str]]:
    """The mutants judged equivalent by hand: module, function, before, after, why."""
    if not path.exists():
        return []
    rows = tomllib.loads(path.read_text(encoding="utf-8")).get("equivalent", [])
    for r in rows:
        missing = {"module", "function", "before", "after", "why"} - set(r)
        if missing or not str(r.get("why", "")).strip():
            raise SystemExit(f"{path}: an entry needs module, function, before, after and a "
                             f"reason (why): {r}")
    return rows


def _is_equivalent(m: dict[str, str], known: list[dict[str, str]]) -> str | None:
    before, after = _changed(m["diff"])
    for r in known:
        if (r["module"] == m["path"] and r["function"] == _function(m["name"])
                and r["before"].strip() == before and r["after"].strip() == after):
            return r["why"]
    return None


def _env() -> dict[str, str]:
    env = dict(os.environ)
    env.pop("PYTHONPATH", None)
    env.setdefault("HYPOTHESIS_PROFILE", "dev")
    return env


def run_group(g: Group, base: Path, children: int, known: list[dict[str, str]],
              rules: list[dict[str, str]] | None = None) -> Outcome:
    """Mutate one group's modules and run its tests against each mutant."""
    work = _scratch(g, base)
    started = time.perf_counter()
    run = subprocess.run([sys.executable, "-m", "mutmut", "run", "--max-children", str(children)],
                         cwd=work, env=_env(), capture_output=True, text=True)
    seconds = time.perf_counter() - started
    return collect(g.name, work, known, rules, seconds, run.stdout + run.stderr)


def collect(name: str, work: Path, known: list[dict[str, str]],
            rules: list[dict[str, str]] | None = None, seconds: float = 0.0,
            log: str = "") -> Outcome:
    """Sort the mutants of a group's scratch folder (after `mutmut run`) by what became of them."""
    got = subprocess.run([sys.executable, "-c", _RESULTS], cwd=work, env=_env(),
                         capture_output=True, text=True)
    if got.returncode != 0 or not got.stdout.strip():
        tail = log[-3000:] + got.stderr[-2000:]
        raise SystemExit(f"mutation: group {name}: mutmut gave no results:\n{tail}")
    out = Outcome(name, seconds=round(seconds, 1))
    book = RuleBook(rules or [])
    for m in json.loads(got.stdout.splitlines()[-1]):
        status = m["status"]
        if status in ("killed", "timeout"):
            out.killed += 1
            continue
        if status in ("survived", "no tests"):
            row = {"name": m["name"], "status": status, "diff": m["diff"]}
            why = _is_equivalent(m, known)
            if why is None:
                why = book.why(work / "mutants" / m["path"], m["name"])
            if why is not None:
                out.equivalent.append({**row, "why": why})
            else:
                out.survived.append(row)
            continue
        out.other[status] = out.other.get(status, 0) + 1
    return out


def _print_group(o: Outcome) -> None:
    score = o.killed / o.counted if o.counted else float("nan")
    print(f"{o.group:<8} killed {o.killed:>5}  survived {len(o.survived):>4}  "
          f"equivalent {len(o.equivalent):>3}  score {score:.3f}  ({o.seconds:.0f} s)"
          + (f"  other {o.other}" if o.other else ""), flush=True)


def _short(why: str) -> str:
    """A rule's reason as its name (the report prints each rule's reason once)."""
    return why.partition(":")[0] if why.startswith("rule ") else why


def main(argv: list[str] | None = None) -> int:
    """Run the chosen groups and print their scores and survivors."""
    ap = argparse.ArgumentParser(prog="python -m bench.mutation", description=__doc__.split(
        "\n", 1)[0])
    ap.add_argument("groups", nargs="*", help="groups to run (default: all)")
    ap.add_argument("--json", action="store_true", help="end with one JSON object")
    ap.add_argument("--list", action="store_true", help="list the groups and stop")
    ap.add_argument("--children", type=int, default=2, help="mutants run at once (2)")
    ap.add_argument("--keep", action="store_true", help="keep the scratch folders")
    ap.add_argument("--rescore", metavar="DIR", type=Path,
                    help="run nothing: sort again the mutants of a folder kept by --keep "
                         "(after listing equivalents)")
    args = ap.parse_args(argv)
    by_name = {g.name: g for g in GROUPS}
    if args.list:
        for g in GROUPS:
            print(f"{g.name}: {', '.join(g.modules)}\n    tests: {', '.join(g.tests)}")
        return 0
    unknown = [n for n in args.groups if n not in by_name]
    if unknown:
        ap.error(f"unknown group {', '.join(unknown)}; groups: {', '.join(by_name)}")
    chosen = [by_name[n] for n in args.groups] if args.groups else GROUPS
    known = load_equivalent()
    rules = load_rules()
    outcomes = []
    kept = args.rescore
    if kept is not None:
        for g in chosen:
            if (kept / g.name / "mutants").is_dir():
                outcomes.append(collect(g.name, kept / g.name, known, rules))
                _print_group(outcomes[-1])
        if not outcomes:
            ap.error(f"{kept}: no kept group folder with mutmut's results")
    else:
        base = Path(tempfile.mkdtemp(prefix="triage-mutation-"))
        try:
            for g in chosen:
                o = run_group(g, base, args.children, known, rules)
                _print_group(o)
                outcomes.append(o)
        finally:
            if args.keep:
                print(f"scratch folders kept in {base}")
            else:
                shutil.rmtree(base, ignore_errors=True)
    killed = sum(o.killed for o in outcomes)
    counted = sum(o.counted for o in outcomes)
    score = killed / counted if counted else 0.0
    print(f"\nmutation_score {score:.3f}  (killed {killed} of {counted}; "
          f"{sum(len(o.equivalent) for o in outcomes)} equivalent left out; aim >= 0.85)")
    for r in rules:
        print(f"\nrule {r['name']}: {r['why']}")
    for o in outcomes:
        for e in o.equivalent:
            print(f"# {o.group}: {e['name']} equivalent ({_short(e['why'])}): "
                  f"{_changed(e['diff'])[1]}")
    for o in outcomes:
        for s in o.survived:
            print(f"\n# {o.group}: {s['name']} ({s['status']})\n{s['diff'].rstrip()}")
    if args.json:
        print(json.dumps({
            "mutation_score": round(score, 4), "killed": killed, "counted": counted,
            "groups": {o.group: {"killed": o.killed, "survived": len(o.survived),
                                 "equivalent": len(o.equivalent), "other": o.other,
                                 "score": round(o.killed / o.counted, 4) if o.counted else None,
                                 "seconds": o.seconds,
                                 "survivors": [s["name"] for s in o.survived],
                                 "equivalents": {e["name"]: _short(e["why"])
                                                 for e in o.equivalent}}
                       for o in outcomes},
            "rules": {r["name"]: r["why"] for r in rules}}))
    return 0


if __name__ == "__main__":
    sys.exit(main())
