"""How `triage` ends a command that did not finish: interrupted, a closed pipe, the machine's
input/output failing, a bug of ours (with and without --debug), a bad form file; and the
console-script entry point."""

from __future__ import annotations

import errno
import json
import sys
from pathlib import Path

import pytest

import triage.cli.assess as assess_cmd
import triage.forms as forms
from tests.helpers import reading, storey, survey_dict
from triage.cli import entry, main


@pytest.fixture
def survey_file(tmp_path: Path) -> Path:
    p = tmp_path / "s.json"
    p.write_text(json.dumps(survey_dict([storey("G", [reading("x", 1.0)])])), encoding="utf-8")
    return p


def _failing(monkeypatch, exc: BaseException) -> None:
    def run(args: object) -> int:
        raise exc

    monkeypatch.setattr(assess_cmd, "run", run)


def test_interrupted_is_one_line(monkeypatch, capsys, survey_file, tmp_path):
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))
    _failing(monkeypatch, KeyboardInterrupt())
    assert main(["assess", str(survey_file)]) == 1
    assert capsys.readouterr().err == "triage assess: interrupted\n"


def test_a_closed_pipe_ends_quietly(monkeypatch, capsys, survey_file):
    _failing(monkeypatch, BrokenPipeError(errno.EPIPE, "Broken pipe"))
    assert main(["assess", str(survey_file)]) == 0
    assert capsys.readouterr().err == ""


def test_input_output_failing_names_the_file(monkeypatch, capsys, survey_file):
    _failing(monkeypatch, OSError(errno.EIO, "Input/output error", "/media/usb/s.json"))
    assert main(["assess", str(survey_file)]) == 1
    assert capsys.readouterr().err == (
        "triage assess: /media/usb/s.json: input/output failed (input/output error (failing "
        "disk or removed medium?)); nothing more was done\n")
    _failing(monkeypatch, OSError(errno.ENOSPC, "No space left on device"))
    assert main(["assess", str(survey_file)]) == 1
    assert capsys.readouterr().err == ("triage assess: input/output failed (the disk is full); "
                                       "nothing more was done\n")


def test_a_bug_of_ours_with_debug_prints_the_traceback_too(monkeypatch, capsys, survey_file,
                                                          tmp_path):
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))
    _failing(monkeypatch, ZeroDivisionError("a slip\nover two lines"))
    assert main(["--debug", "assess", str(survey_file)]) == 1
    err = capsys.readouterr().err
    assert "Traceback (most recent call last)" in err and "ZeroDivisionError" in err
    last = err.strip().splitlines()[-1]
    assert last.startswith("triage assess: internal error: ZeroDivisionError: a slip over two "
                           "lines (details in ")
    crash = Path(last.split("(details in ", 1)[1].split(";", 1)[0])
    assert crash.is_file() and crash.is_relative_to(tmp_path / "home")
    # without --debug: the one line only
    assert main(["assess", str(survey_file)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and "Traceback" not in err


def test_a_bad_form_file_stops_the_form_command(monkeypatch, capsys, tmp_path):
    def bad() -> None:
        raise forms.FormError("forms/rc_frame.toml: kinds[0].signs[0].sign: 'x' is no sign")

    monkeypatch.setattr(forms, "check_forms", bad)
    assert main(["form", "rc_frame", "-o", str(tmp_path / "f.pdf")]) == 1
    assert capsys.readouterr().err == (
        "triage form: forms/rc_frame.toml: kinds[0].signs[0].sign: 'x' is no sign (the tool "
        "will not start on a bad form file)\n")
    assert not (tmp_path / "f.pdf").exists()


def test_the_console_script_exits_with_the_status(monkeypatch, capsys, survey_file):
    monkeypatch.setattr(sys, "argv", ["triage", "assess", str(survey_file)])
    with pytest.raises(SystemExit) as done:
        entry()
    assert done.value.code == 0
    assert "indicative" in capsys.readouterr().out.lower()
    monkeypatch.setattr(sys, "argv", ["triage", "assess", "/no/such.json"])
    with pytest.raises(SystemExit) as done:
        entry()
    assert done.value.code == 1
