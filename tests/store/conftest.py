"""Fixtures of the store tests: databases made in tmp_path, a fixed clock, a CLI runner."""

from __future__ import annotations

import sqlite3
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

import pytest

from tests.helpers import cli, reading, storey, survey_dict, write_json
from triage.model import Survey, parse_survey
from triage.store import Store

__all__ = [
    "FIXED",
    "cli",
    "db",
    "fetch",
    "fixed_clock",
    "laptop",
    "sample",
    "sample_dict",
    "store",
    "stored",
    "write_json",
]

FIXED = datetime(2026, 11, 29, 1, 0, 0, tzinfo=UTC)


def fixed_clock() -> datetime:
    return FIXED


def sample_dict(name: str = "Harbour Flats", storeys: int = 3, **kw: Any) -> dict[str, Any]:
    """A survey of Kōwhai Bay with readings and members on every storey."""
    sts = [storey(lab, [reading("x", 1.0 + i), reading("y", 2.0 + i)],
                  [{"kind": "column", "count": 12},
                   {"kind": "wall", "count": 2, "dir": "x", "crack_mm": 0.3, "ref": f"W{i}"}])
           for i, lab in enumerate(["G", "1", "2", "3", "4", "5"][:storeys])]
    return survey_dict(sts, name=name, sx="rc_wall", sy="rc_frame", **kw)


def sample(name: str = "Harbour Flats", **kw: Any) -> Survey:
    return parse_survey(sample_dict(name, **kw))


@pytest.fixture
def db(tmp_path: Path) -> Path:
    return tmp_path / "field.db"


@pytest.fixture
def store(db: Path):
    st = Store.open(db, who="Tess Tester", clock=fixed_clock)
    yield st
    st.close()


@pytest.fixture
def stored(store: Store) -> tuple[Store, str]:
    s = sample()
    assert store.add_survey(s, source="test") == "added"
    return store, str(s.survey_id)


def laptop(path: Path, *names: str) -> list[str]:
    """A laptop's database at `path` holding one sample survey per name; their ids in order."""
    with Store.open(path, who=path.stem) as st:
        ids = []
        for n in names:
            s = sample(n)
            st.add_survey(s)
            ids.append(str(s.survey_id))
    return ids


def fetch(db: Path, sql: str, *args: object) -> list[tuple[object, ...]]:
    """The rows of one query on the database file, through a connection of its own."""
    c = sqlite3.connect(db)
    try:
        return c.execute(sql, args).fetchall()
    finally:
        c.close()
