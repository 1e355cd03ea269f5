"""The folder of the user's triage data, shared by the database and the keys."""

from __future__ import annotations

import os
from pathlib import Path


def data_home() -> Path:
    """`$TRIAGE_HOME` when set, else the platform's data folder (e.g. ~/.local/share/triage)."""
    env = os.environ.get("TRIAGE_HOME")
    if env:
        return Path(env)
    import platformdirs

    return Path(platformdirs.user_data_dir("triage", appauthor=False))
