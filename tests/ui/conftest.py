"""UI test fixtures: a fixed clock, no cursor blink, fixed seeds, a fresh database per test."""

from __future__ import annotations

import random
import sys
from collections.abc import Callable
from datetime import UTC, datetime, timedelta, timezone
from pathlib import Path
from typing import Any

import pytest

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from helpers import reading, storey, survey_dict

from triage.model import parse_survey
from triage.store import Store
from triage.ui.app import TriageApp, build_app

SID = "11111111-1111-4111-8111-111111111111"  # Harbour Bakery: a concrete frame, measured
URM = "22222222-2222-4222-8222-222222222222"  # Old Post Office: masonry walls, no members
KOWHAI = timezone(timedelta(hours=13))
NOW = datetime(2026, 11, 29, 10, 30, tzinfo=KOWHAI)


def clock() -> datetime:
    """The fixed time of every UI test."""
    return NOW


@pytest.fixture(autouse=True)
def _fixed(monkeypatch: pytest.MonkeyPatch, tmp_path: Path) -> None:
    random.seed(0)
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))


def two_surveys() -> list[dict[str, Any]]:
    """Two invented Kōwhai Bay buildings, one measured, one not."""
    a = survey_dict([storey("G", [reading("x", 2.0), reading("y", 3.0)]),
                     storey("1", [reading("x", 1.0)])], name="Harbour Bakery")
    a["id"] = SID
    a["building"]["address"] = "5 Quay Road, Kōwhai Bay"
    b = survey_dict([storey("G", [], members=[]), storey("1", [], members=[])],
                    sx="urm_wall", sy="urm_wall", name="Old Post Office")
    b["id"] = URM
    b["building"]["address"] = "1 Main Street, Kōwhai Bay"
    b["inspection"]["at"] = "2026-11-29T08:15:00+13:00"
    return [a, b]


@pytest.fixture
def db(tmp_path: Path) -> Path:
    """A database holding the two surveys."""
    path = tmp_path / "field.db"
    with Store.open(path, clock=lambda: NOW.astimezone(UTC)) as st:
        for d in two_surveys():
            st.add_survey(parse_survey(d), "Tess Tester", "test")
        st.settings_set("last_inspector_name", "Tess Tester")
        st.settings_set("last_inspector_id", "T-1")
    return path


@pytest.fixture
def make_app(tmp_path: Path) -> Callable[..., TriageApp]:
    """The app as the command builds it, with the test clock and no blinking."""

    def make(path: Path, **kw: Any) -> TriageApp:
        kw.setdefault("clock", clock)
        kw.setdefault("blink", False)
        kw.setdefault("report_dir", tmp_path / "reports")
        return build_app(path, **kw)

    return make
