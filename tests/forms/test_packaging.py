"""forms/ and sample_surveys/ ship inside the wheel as triage._data.forms / .sample_surveys.

Checked once by hand with a real wheel build and `pip install --target` (see the report); here,
the pieces that make it work: each folder is a regular package (a namespace package would give
importlib.resources a MultiplexedPath, not a folder) and pyproject.toml maps and includes them.
"""

from __future__ import annotations

import tomllib
from importlib import resources
from pathlib import Path

from triage.resources import forms_dir, samples_dir

ROOT = Path(__file__).resolve().parents[2]


def test_data_folders_are_regular_packages() -> None:
    assert (ROOT / "forms" / "__init__.py").is_file()
    assert (ROOT / "sample_surveys" / "__init__.py").is_file()


def test_pyproject_maps_and_includes_the_data_folders() -> None:
    conf = tomllib.loads((ROOT / "pyproject.toml").read_text(encoding="utf-8"))
    st = conf["tool"]["setuptools"]
    assert st["package-dir"]["triage._data.forms"] == "forms"
    assert st["package-dir"]["triage._data.sample_surveys"] == "sample_surveys"
    assert {"triage._data.forms", "triage._data.sample_surveys"} <= set(st["packages"])
    assert "*.toml" in st["package-data"]["triage._data.forms"]
    assert "*.json" in st["package-data"]["triage._data.sample_surveys"]


def test_resources_find_real_folders_holding_the_files() -> None:
    for folder, pattern in ((forms_dir(), "*.toml"), (samples_dir(), "*.json")):
        assert folder.is_dir() and list(folder.glob(pattern))
    try:
        found = resources.files("triage._data.forms")
    except ModuleNotFoundError:  # a plain source checkout, not installed
        return
    assert Path(str(found)).is_dir()
