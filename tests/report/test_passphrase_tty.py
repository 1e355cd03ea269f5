"""A key's passphrase typed at a terminal: `triage key new` asks twice, `triage report --key`
asks once; never echoed; a wrong, empty or differing entry is one line and writes nothing.

The first tests run the command in a real pseudo-terminal (its controlling terminal, where
getpass reads); the others run it in process with the terminal's answers scripted, to reach
every branch quickly.
"""

from __future__ import annotations

import getpass
import json
import os
import pty
import select
import sys
import time
from pathlib import Path

import pytest

from tests.report.conftest import clinic_dict
from triage.cli import main
from triage.report.keys import key_is_encrypted
from triage.report.verify import verify_report

ROOT = Path(__file__).resolve().parents[2]
SECRET = "kōwhai tide 7"

pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="needs a pseudo-terminal")


def _at_a_terminal(argv: list[str], answers: list[tuple[str, str]], cwd: Path,
                   home: Path) -> tuple[int, str]:
    """Run `triage ARGV` on a new pseudo-terminal; answer each prompt as it appears."""
    env = {k: v for k, v in os.environ.items() if k != "TRIAGE_KEY_PASSPHRASE"}
    env.update(TRIAGE_HOME=str(home), PYTHONPATH=str(ROOT), TERM="dumb")
    pid, fd = pty.fork()
    if pid == 0:   # the child: its stdin, stdout and controlling terminal are the pty
        os.chdir(cwd)
        os.execve(sys.executable, [sys.executable, "-m", "triage", *argv], env)
    seen = b""
    pending = list(answers)
    deadline = time.monotonic() + 60
    while time.monotonic() < deadline:
        ready, _, _ = select.select([fd], [], [], 0.5)
        if ready:
            try:
                chunk = os.read(fd, 4096)
            except OSError:   # the child closed the terminal
                break
            if not chunk:
                break
            seen += chunk
        if pending and seen.decode("utf-8", "replace").rstrip().endswith(
                pending[0][0].rstrip()):
            os.write(fd, (pending.pop(0)[1] + "\n").encode("utf-8"))
    _, status = os.waitpid(pid, 0)
    os.close(fd)
    assert not pending, f"never asked {pending[0][0]!r}; the terminal showed {seen!r}"
    return os.waitstatus_to_exitcode(status), seen.decode("utf-8", "replace")


def test_a_new_key_and_a_signed_report_with_the_passphrase_typed(tmp_path: Path):
    home = tmp_path / "home"
    code, screen = _at_a_terminal(
        ["key", "new", "--name", "Aroha Ngāti", "--id", "R-77", "-o", "k.key"],
        [("passphrase for the new key: ", SECRET), ("the same passphrase again: ", SECRET)],
        tmp_path, home)
    assert code == 0, screen
    assert SECRET not in screen   # never echoed
    assert "trusted on this laptop" in screen
    key = tmp_path / "k.key"
    assert key_is_encrypted(key)
    survey = tmp_path / "clinic.json"
    survey.write_text(json.dumps(clinic_dict(), ensure_ascii=False), encoding="utf-8")
    code, screen = _at_a_terminal(
        ["report", "clinic.json", "--key", "k.key", "-o", "r.pdf"],
        [("passphrase for k.key: ", SECRET)], tmp_path, home)
    assert code == 0, screen
    assert SECRET not in screen
    os.environ["TRIAGE_HOME"] = str(home)
    assert verify_report(tmp_path / "r.pdf").code == 0


def test_two_different_entries_write_no_key(tmp_path: Path):
    code, screen = _at_a_terminal(
        ["key", "new", "--name", "Aroha Ngāti", "--id", "R-77", "-o", "k.key"],
        [("passphrase for the new key: ", SECRET), ("the same passphrase again: ", "other")],
        tmp_path, tmp_path / "home")
    assert code == 1
    assert "triage key new: passphrase: the two entries differ; no key was written" in screen
    assert not (tmp_path / "k.key").exists() and not (tmp_path / "k.pub").exists()


# In process: the terminal's answers scripted (getpass), stdin said to be a terminal.

def _scripted(monkeypatch, *answers: str) -> list[str]:
    asked: list[str] = []
    queue = list(answers)

    def fake(prompt: str = "") -> str:
        asked.append(prompt)
        return queue.pop(0)

    monkeypatch.delenv("TRIAGE_KEY_PASSPHRASE", raising=False)
    monkeypatch.setattr(getpass, "getpass", fake)
    monkeypatch.setattr(sys.stdin, "isatty", lambda: True)
    return asked


def _key_new(capsys, out: Path) -> tuple[int, str]:
    code = main(["key", "new", "--name", "Aroha Ngāti", "--id", "R-77", "-o", str(out)])
    return code, capsys.readouterr().err


def test_an_empty_passphrase_is_refused(tmp_path, capsys, monkeypatch):
    asked = _scripted(monkeypatch, "")
    code, err = _key_new(capsys, tmp_path / "k.key")
    assert (code, err) == (1, "triage key new: passphrase: must not be empty (or use "
                              "--no-passphrase)\n")
    assert asked == ["passphrase for the new key: "]
    assert not (tmp_path / "k.key").exists()


def test_differing_entries_are_refused(tmp_path, capsys, monkeypatch):
    asked = _scripted(monkeypatch, SECRET, SECRET + " ")
    code, err = _key_new(capsys, tmp_path / "k.key")
    assert (code, err) == (1, "triage key new: passphrase: the two entries differ; no key was "
                              "written\n")
    assert asked == ["passphrase for the new key: ", "the same passphrase again: "]
    assert not (tmp_path / "k.key").exists()


def test_the_passphrase_typed_twice_protects_the_key_and_opens_it(tmp_path, capsys,
                                                                  monkeypatch):
    _scripted(monkeypatch, SECRET, SECRET)
    code, err = _key_new(capsys, tmp_path / "k.key")
    assert code == 0, err
    assert key_is_encrypted(tmp_path / "k.key")
    survey = tmp_path / "clinic.json"
    survey.write_text(json.dumps(clinic_dict(), ensure_ascii=False), encoding="utf-8")
    # a wrong passphrase at the prompt: one line, no report
    asked = _scripted(monkeypatch, "wrong")
    code = main(["report", str(survey), "--key", str(tmp_path / "k.key"), "-o",
                 str(tmp_path / "r.pdf")])
    err = capsys.readouterr().err
    assert code == 1 and err.count("\n") == 1 and "passphrase" in err, err
    assert asked == [f"passphrase for {tmp_path / 'k.key'}: "]
    assert not (tmp_path / "r.pdf").exists()
    _scripted(monkeypatch, SECRET)
    code = main(["report", str(survey), "--key", str(tmp_path / "k.key"), "-o",
                 str(tmp_path / "r.pdf")])
    assert code == 0, capsys.readouterr().err
    assert verify_report(tmp_path / "r.pdf").code == 0


def test_no_terminal_and_no_variable_is_one_line(tmp_path, capsys, monkeypatch):
    monkeypatch.delenv("TRIAGE_KEY_PASSPHRASE", raising=False)
    monkeypatch.setattr(sys.stdin, "isatty", lambda: False)
    code, err = _key_new(capsys, tmp_path / "k.key")
    assert (code, err) == (1, "triage key new: no passphrase: set TRIAGE_KEY_PASSPHRASE, or use "
                              "--no-passphrase\n")
