"""Where the default database lives: the user's data folder (platformdirs)."""

from __future__ import annotations

from pathlib import Path

import platformdirs


def default_db_path() -> Path:
    """The default survey database, e.g. ~/.local/share/triage/triage.db on Linux."""
    return Path(platformdirs.user_data_dir("triage", appauthor=False)) / "triage.db"
