"""`--help`: every command and option described; `verify`'s exit statuses there and in docs."""

from __future__ import annotations

import argparse
import re
from collections.abc import Iterator
from pathlib import Path

import pytest

from triage.cli import build_parser

DOCS = Path(__file__).resolve().parents[2] / "docs"


def _parsers(parser: argparse.ArgumentParser, path: tuple[str, ...] = ()
             ) -> Iterator[tuple[tuple[str, ...], argparse.ArgumentParser, str | None]]:
    """Every parser under `parser` with its command words and its line in the parent's list."""
    yield path, parser, None
    for action in parser._actions:
        if isinstance(action, argparse._SubParsersAction):
            listed = {a.dest: a.help for a in action._choices_actions}
            for name, sub in action.choices.items():
                for got in _parsers(sub, (*path, name)):
                    yield got if got[0] != (*path, name) else (got[0], got[1], listed.get(name))


ALL = list(_parsers(build_parser()))
COMMANDS = [(p, sub, line) for p, sub, line in ALL if p]


def test_the_walk_finds_every_command():
    names = {" ".join(p) for p, _, _ in COMMANDS}
    assert {"assess", "schema", "import", "export", "list", "backup", "key", "key new",
            "key trust", "key list", "report", "verify", "compare", "merge", "summary",
            "centre", "centre init", "centre reassess", "sync", "form", "demo"} == names


@pytest.mark.parametrize("path,parser,line", COMMANDS, ids=[" ".join(c[0]) for c in COMMANDS])
def test_every_command_has_a_line_and_a_description(path, parser, line):
    assert line and len(line.split()) >= 3, f"triage {' '.join(path)}: no line in the list"
    assert parser.description and len(parser.description.split()) >= 5
    # the description heads `triage COMMAND --help`
    assert parser.description.split()[0] in parser.format_help()


OPTIONS = [(path, a) for path, parser, _ in ALL for a in parser._actions
           if not isinstance(a, argparse._SubParsersAction)]


@pytest.mark.parametrize("path,action", OPTIONS,
                         ids=[" ".join((*p, a.option_strings[-1] if a.option_strings
                                        else a.dest)) for p, a in OPTIONS])
def test_every_option_and_argument_has_help(path, action):
    assert action.help and action.help is not argparse.SUPPRESS
    assert len(action.help.split()) >= 3, action.help


def test_the_top_help_lists_every_command_and_the_exit_statuses(capsys):
    with pytest.raises(SystemExit):
        build_parser().parse_args(["--help"])
    text = capsys.readouterr().out
    for path, _, _ in COMMANDS:
        if len(path) == 1:
            assert re.search(rf"^    {path[0]} ", text, re.M), path
    assert "exit status:" in text
    for code in ("0", "1", "2"):
        assert re.search(rf"^  {code}  ", text, re.M), code


def _verify_help(capsys) -> str:
    with pytest.raises(SystemExit):
        build_parser().parse_args(["verify", "--help"])
    return capsys.readouterr().out


def _docs_verify_statuses() -> dict[int, str]:
    text = (DOCS / "formats.md").read_text(encoding="utf-8")
    part = text.split("### `triage verify", 1)[1].split("\n### ", 1)[0]
    return {int(m.group(1)): m.group(2) for m in re.finditer(r"^\| (\d) \| (.+) \|$", part, re.M)}


def test_verify_help_gives_the_exit_statuses_the_docs_give(capsys):
    text = _verify_help(capsys)
    shown = {int(m.group(1)) for m in re.finditer(r"^  (\d)  \S", text, re.M)}
    documented = _docs_verify_statuses()
    assert shown == set(documented) == {0, 1, 2, 3, 4, 5}
    # the same meaning, in short: the first word each gives
    lines = dict(re.findall(r"^  (\d)  (\S+)", text, re.M))
    for code, meaning in documented.items():
        assert lines[str(code)].strip(":,") in meaning, (code, lines[str(code)], meaning)


def test_the_command_page_names_every_command_and_option():
    page = (DOCS / "command.md").read_text(encoding="utf-8")
    for path, _, _ in COMMANDS:
        assert f"triage {' '.join(path)}" in page, path
    for path, action in OPTIONS:
        for opt in action.option_strings:
            if opt not in ("-h", "--help"):
                assert re.search(rf"[`\s(]{re.escape(opt)}\b", page), (path, opt)


FORMATS = [(path, a) for path, a in OPTIONS if "--format" in a.option_strings]


@pytest.mark.parametrize("path,action", FORMATS, ids=[" ".join(p) for p, _ in FORMATS])
def test_every_format_option_is_worded_the_same_way(path, action):
    # text first and the default, then the JSON object by its format name and where it goes
    assert action.choices[:2] == ("text", "json")
    assert re.match(r"text: [^;]+ \(the default\); json: one triage-[a-z]+/\d object on "
                    r"standard output \(docs/formats\.md\)", action.help), action.help
    for other in action.choices[2:]:
        assert f"; {other}: " in action.help


def test_every_command_with_json_output_has_its_format_option():
    assert {" ".join(p) for p, _ in FORMATS} == {
        "assess", "import", "list", "backup", "key list", "verify", "compare", "merge",
        "summary"}
