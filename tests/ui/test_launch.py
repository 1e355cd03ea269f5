"""`triage` and `triage demo` as launched by the command, in process: which database the
screens open, what the demo loads and removes, and a database the screens refuse.

The command's own code runs as written (argument parsing, the terminal check, the scratch
folder, the refusal); the app is the real one, run headless at 80 x 24 by Textual's own
auto pilot in place of a terminal, which quits once the first screen is filled.
"""

from __future__ import annotations

import sys
from typing import Any

import pytest
from drive import settle

from triage.cli import main
from triage.resources import samples_dir
from triage.ui.app import TriageApp


class _Terminal:
    """stdin and the real stderr said to be terminals, as in a terminal window."""

    def isatty(self) -> bool:
        return True


@pytest.fixture
def seen(monkeypatch: pytest.MonkeyPatch) -> dict[str, Any]:
    """Run the app headless when the command runs it; record what its first screen holds."""
    got: dict[str, Any] = {}
    real_run = TriageApp.run

    async def look(pilot: Any) -> None:
        await settle(pilot)
        app = pilot.app
        got["db"] = app.db_path
        got["demo"] = app.demo_samples
        got["screen"] = type(app.screen).__name__
        got["surveys"] = sorted(r.building for r in app.data.surveys()) if app.is_open else None
        got["folder_during"] = app.db_path.parent.exists()
        if app.refusal is None:
            app.exit()

    def headless(self: TriageApp, *args: Any, **kw: Any) -> Any:
        return real_run(self, headless=True, size=(80, 24), auto_pilot=look)

    monkeypatch.setattr(TriageApp, "run", headless)
    monkeypatch.setattr(sys, "stdin", _Terminal())
    monkeypatch.setattr(sys, "__stderr__", _Terminal())
    return got


def test_plain_triage_opens_the_default_database(tmp_path, seen, capsys):
    home = tmp_path / "home"
    assert main([]) == 0, capsys.readouterr().err
    assert seen["db"] == home / "triage.db" and seen["demo"] is None
    assert seen["screen"] == "SurveyListScreen" and seen["surveys"] == []
    assert (home / "triage.db").is_file()   # made on first use, and kept


def test_triage_with_db_opens_that_file(tmp_path, seen, db, capsys):
    assert main(["--db", str(db)]) == 0, capsys.readouterr().err
    assert seen["db"] == db
    assert seen["surveys"] == ["Harbour Bakery", "Old Post Office"]


def test_the_demo_loads_every_sample_in_a_scratch_folder_it_removes(tmp_path, seen, capsys,
                                                                    monkeypatch):
    scratch = tmp_path / "tmp"
    scratch.mkdir()
    monkeypatch.setattr("tempfile.tempdir", str(scratch))
    assert main(["demo"]) == 0, capsys.readouterr().err
    assert seen["demo"] == samples_dir()
    assert seen["db"].name == "demo.db" and seen["db"].parent.parent == scratch
    assert seen["folder_during"] is True
    assert len(seen["surveys"]) == len(list(samples_dir().glob("*.json")))
    assert "Saltmarsh Road School, classroom block B" in seen["surveys"]
    assert list(scratch.iterdir()) == []   # the scratch database is gone
    assert capsys.readouterr().err == ""


def test_a_database_the_screens_refuse_is_one_line_and_status_1(tmp_path, seen, capsys):
    bad = tmp_path / "notes.db"
    bad.write_bytes(b"this is a shopping list, not a database\n" * 10)
    before = bad.read_bytes()
    assert main(["--db", str(bad)]) == 1
    err = capsys.readouterr().err
    assert err.count("\n") == 1 and str(bad) in err and "not a database file" in err, err
    assert bad.read_bytes() == before


def test_no_terminal_refuses_before_opening_anything(tmp_path, capsys, monkeypatch):
    class _NotATerminal:
        def isatty(self) -> bool:
            return False

    monkeypatch.setattr(sys, "stdin", _NotATerminal())
    for argv in (["--db", str(tmp_path / "f.db")], ["demo"]):
        assert main(argv) == 1
        err = capsys.readouterr().err
        assert err.count("\n") == 1 and "the screens need a terminal" in err, err
    assert not (tmp_path / "f.db").exists()
