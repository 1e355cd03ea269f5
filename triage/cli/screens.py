"""Commands that open the screens: `triage` alone (the default database) and `triage demo`."""

from __future__ import annotations

import argparse
import shutil
import sys
import tempfile
from pathlib import Path

from .common import add_command
from .errors import UserError


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register the commands of this module."""
    p = add_command(sub, "demo", "open the screens on a scratch database loaded with the "
                    "demo surveys (an invented town and event)", description=(
                        "Open the screens on a scratch database loaded with the demo surveys "
                        "of an invented town and event; the scratch database is removed on "
                        "leaving. 'triage' with no command opens the screens on your own "
                        "database."))
    p.set_defaults(func=run)


def _terminal() -> None:
    """Refuse in one line when there is no terminal to draw on (the screens draw on stderr)."""
    streams = (sys.stdin, sys.__stderr__)
    if not all(s is not None and s.isatty() for s in streams):
        raise UserError("the screens need a terminal (input and standard error are not one); "
                        "run triage in a terminal, or a command such as triage list "
                        "(triage --help lists them)")


def _open(db: Path, samples: Path | None = None) -> int:
    _terminal()
    from triage.ui.app import build_app

    app = build_app(db, demo_samples=samples)
    app.run()
    if app.refusal:
        raise UserError(app.refusal)
    return 0


def run(args: argparse.Namespace) -> int:
    """`triage demo`: the screens on a scratch database loaded with the sample surveys."""
    from triage.resources import samples_dir

    _terminal()
    folder = Path(tempfile.mkdtemp(prefix="triage-demo-"))
    try:
        return _open(folder / "demo.db", samples_dir())
    finally:
        shutil.rmtree(folder, ignore_errors=True)
        if folder.exists():
            print(f"triage demo: its scratch database is left in {folder}", file=sys.stderr)


def run_default(args: argparse.Namespace) -> int:
    """`triage`: the screens on the default database (or --db PATH)."""
    from triage.store import default_db_path

    db = Path(args.db) if getattr(args, "db", None) else default_db_path()
    return _open(db)
