"""Where the shipped data folders are, installed or in a source checkout."""

from __future__ import annotations

from importlib import resources
from pathlib import Path


def _folder(package: str, repo_name: str) -> Path:
    try:
        found = Path(str(resources.files(package)))
        if found.is_dir():
            return found
    except (ModuleNotFoundError, TypeError):
        pass
    # A source checkout run without installing: the folder sits at the top of the repository.
    return Path(__file__).resolve().parent.parent / repo_name


def forms_dir() -> Path:
    """The folder of field-form definitions (one TOML file per structural system)."""
    return _folder("triage._data.forms", "forms")


def samples_dir() -> Path:
    """The folder of demo surveys (an invented town and event)."""
    return _folder("triage._data.sample_surveys", "sample_surveys")
