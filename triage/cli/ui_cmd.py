"""Commands that open the screens: `triage` alone (the default database) and `triage demo`."""

from __future__ import annotations

import argparse
import tempfile
from pathlib import Path

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register the commands of this module."""
    p = sub.add_parser("demo", help="open the screens on a scratch database loaded with the "
                       "demo surveys (an invented town and event)")
    p.set_defaults(func=run)


def _open(db: Path) -> int:
    from triage.ui.app import build_app
    from triage.ui.data import Refused

    try:
        app = build_app(db)
    except Refused as err:
        raise UserError(str(err)) from None
    app.run()
    return 0


def prepare_demo(folder: Path | None = None) -> Path:
    """A scratch database in a new temporary folder, loaded with the sample surveys."""
    from triage.resources import samples_dir
    from triage.ui.data import FieldData, Refused

    folder = folder or Path(tempfile.mkdtemp(prefix="triage-demo-"))
    db = folder / "demo.db"
    try:
        data = FieldData(db)
    except Refused as err:
        raise UserError(str(err)) from None
    try:
        data.load_samples(samples_dir(), "demo")
        if not data.setting("last_inspector_name"):
            data.remember("last_inspector_name", "Demo Inspector")
    finally:
        data.close()
    return db


def run(args: argparse.Namespace) -> int:
    """`triage demo`: the screens on a scratch copy of the sample surveys."""
    return _open(prepare_demo())


def run_default(args: argparse.Namespace) -> int:
    """`triage`: the screens on the default database (or --db PATH)."""
    from triage.store import default_db_path

    db = Path(args.db) if getattr(args, "db", None) else default_db_path()
    return _open(db)
