"""CI runs the README's test command: the same steps in the same order (the README through the
virtual environment's programs, `.ci/run` through the interpreter it installed into)."""

from __future__ import annotations

import re
from pathlib import Path

ROOT = Path(__file__).resolve().parents[2]


def _steps(command: str) -> list[str]:
    out = []
    for step in command.split("&&"):
        step = " ".join(step.replace("\\\n", " ").split())
        step = re.sub(r"^(\.venv/bin/)?python3? -m ", "", step)
        step = step.removeprefix(".venv/bin/")
        out.append(step)
    return out


def test_ci_runs_the_readme_test_command() -> None:
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    block = readme[readme.index("Install and run the checks and tests"):]
    block = block[block.index("```sh") + 5:]
    command = block[:block.index("```")].strip()
    steps = _steps(command)
    assert steps[:2] == ["venv .venv", 'pip install -e ".[test]"'], steps
    ci = (ROOT / ".ci" / "run").read_text(encoding="utf-8")
    last = ci[ci.rindex("# The README's test command"):].split("\n", 1)[1]
    assert _steps(last) == steps[2:]
    assert steps[-1].startswith(("pytest", "tests.coverage_floors"))
