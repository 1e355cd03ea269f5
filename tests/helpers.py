"""Builders of survey data for tests: small, explicit, invented (no real place or person); and
the fixtures several test folders share, which a folder's conftest takes in by importing them
(`triage_home`, private keys for every test; `cli`, the command in this process)."""

from __future__ import annotations

import copy
import io
import json
import os
import re
import shutil
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from triage.model import Survey, parse_survey

Run = Callable[..., tuple[int, str, str]]


@pytest.fixture(autouse=True)
def triage_home(tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> Path:
    """Keys and trusted keys of each test live in its own folder; no passphrase from outside."""
    home = tmp_path / "home"
    home.mkdir()
    monkeypatch.setenv("TRIAGE_HOME", str(home))
    monkeypatch.delenv("TRIAGE_KEY_PASSPHRASE", raising=False)
    return home


@pytest.fixture
def cli(capsys: pytest.CaptureFixture[str]) -> Run:
    """`triage ARGS` in this process: (status, stdout, stderr)."""
    from triage.cli import main

    def run(*argv: str) -> tuple[int, str, str]:
        code = main(list(argv))
        got = capsys.readouterr()
        return code, got.out, got.err
    return run


def program(name: str, package: str) -> str:
    """The path of a program some tests run (poppler's, tmux). Missing, it fails the test under
    CI (`CI` set, as `.ci/run` sets it, which installs them all) and skips it elsewhere."""
    found = shutil.which(name)
    if found is None:
        if os.environ.get("CI"):
            pytest.fail(f"{name} ({package}) is required when CI is set; .ci/run installs it")
        pytest.skip(f"{name} ({package}) is not installed; CI requires it")
    return found


def unmeasured_env() -> dict[str, str]:
    """This environment without the coverage measurement that `pytest --cov` hands on to child
    processes: coverage loads sqlite3 itself, so a child checking which modules an import loads
    runs without it (the walls stay exact under the README's test command)."""
    return {k: v for k, v in os.environ.items() if not k.startswith("COVERAGE_")}


def flat(text: str) -> str:
    """Text with each run of white space (a PDF's line breaks among them) as one space."""
    return re.sub(r"\s+", " ", text)


def pdf_pages(pdf: bytes | Path) -> list[str]:
    """The text of each page of a PDF (its bytes or its file), white space `flat`."""
    from pypdf import PdfReader

    return [flat(p.extract_text()) for p in PdfReader(io.BytesIO(pdf) if isinstance(pdf, bytes)
                                                      else pdf).pages]


def write_json(path: Path, data: Any) -> Path:
    """`data` as a UTF-8 JSON file (characters kept), returning the path."""
    path.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
    return path


def reading(d: str, offset_mm: float, gauge_mm: float = 2000.0, sd_mm: float | None = 1.0,
            **extra: Any) -> dict[str, Any]:
    """An offset reading over a gauge."""
    r: dict[str, Any] = {"dir": d, "offset_mm": offset_mm, "gauge_mm": gauge_mm}
    if sd_mm is not None:
        r["sd_mm"] = sd_mm
    r.update(extra)
    return r


def tilt(d: str, tilt_deg: float, sd_deg: float | None = 0.05, **extra: Any) -> dict[str, Any]:
    """A tilt reading."""
    r: dict[str, Any] = {"dir": d, "tilt_deg": tilt_deg}
    if sd_deg is not None:
        r["sd_deg"] = sd_deg
    r.update(extra)
    return r


def storey(label: str, readings: list[dict[str, Any]] | None = None,
           members: list[dict[str, Any]] | None = None, height_m: float = 3.2,
           **extra: Any) -> dict[str, Any]:
    """A storey; by default with one sound group of 12 columns."""
    s: dict[str, Any] = {"label": label, "height_m": height_m,
                         "readings": readings or [],
                         "members": [{"kind": "column", "count": 12}] if members is None
                         else members}
    s.update(extra)
    return s


def survey_dict(storeys: list[dict[str, Any]], sx: str = "rc_frame", sy: str = "rc_frame",
                hazards: list[dict[str, Any]] | None = None, name: str = "Test House",
                **extra: Any) -> dict[str, Any]:
    """A whole survey of the invented town of Kōwhai Bay."""
    d: dict[str, Any] = {
        "format": "triage-survey/1",
        "building": {"name": name, "address": "1 Test Lane, Kōwhai Bay", "use": "test",
                     "system": {"x": sx, "y": sy}},
        "inspection": {"inspector": {"name": "Tess Tester", "id": "T-1"},
                       "at": "2026-11-29T09:00:00+13:00"},
        "storeys": storeys,
        "hazards": hazards or [],
    }
    d.update(extra)
    return d


def make(storeys: list[dict[str, Any]], **kw: Any) -> Survey:
    """A validated survey."""
    return parse_survey(survey_dict(storeys, **kw))


def two_storey_frame() -> dict[str, Any]:
    """The worked example of docs/method.md: storey 2 y at 0.60% in a concrete frame, one cracked
    column."""
    return survey_dict([
        storey("1", [reading("x", 1.0), reading("y", 1.6)], [{"kind": "column", "count": 20}]),
        storey("2", [reading("x", 2.0), reading("y", 12.0)],
               [{"kind": "column", "count": 19},
                {"kind": "column", "count": 1, "crack_mm": 1.4, "ref": "C3"}]),
    ], sx="rc_wall", sy="rc_frame")


def clone(d: dict[str, Any]) -> dict[str, Any]:
    """A deep copy to mutate."""
    return copy.deepcopy(d)
