"""Where the default database lives: the user's data folder, or `$TRIAGE_HOME` when set."""

from __future__ import annotations

from pathlib import Path

from triage.paths import data_home


def default_db_path() -> Path:
    """The default survey database, e.g. ~/.local/share/triage/triage.db on Linux."""
    return data_home() / "triage.db"
