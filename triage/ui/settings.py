"""The user's screen settings (the theme), kept in `settings.json` under the data folder.

Not in the database: a setting belongs to the person at this laptop, not to the surveys, and
travels with neither a backup nor a merge. A file that cannot be read is taken as empty; one
that cannot be written leaves the setting for this session only, and says so.
"""

from __future__ import annotations

import contextlib
import json
import os
import tempfile
from pathlib import Path

from triage.paths import data_home

FILE = "settings.json"


def settings_path() -> Path:
    """Where the settings are kept."""
    return data_home() / FILE


def load_settings() -> dict[str, object]:
    """The settings saved, or none."""
    try:
        data = json.loads(settings_path().read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return {}
    return data if isinstance(data, dict) else {}


def save_setting(key: str, value: object) -> bool:
    """Save one setting (the file replaced whole); False when it could not be written."""
    path = settings_path()
    data = load_settings()
    data[key] = value
    try:
        path.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=".settings-", dir=path.parent)
        try:
            with os.fdopen(fd, "w", encoding="utf-8") as f:
                json.dump(data, f, ensure_ascii=False, indent=1)
                f.flush()
                os.fsync(f.fileno())
            os.replace(tmp, path)
        finally:
            with contextlib.suppress(OSError):
                os.unlink(tmp)
    except OSError:
        return False
    return True
