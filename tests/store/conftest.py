"""Fixtures of the store tests: databases made in tmp_path, a fixed clock, a CLI runner."""

from __future__ import annotations

import json
from collections.abc import Callable
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

import pytest

from tests.helpers import reading, storey, survey_dict
from triage.cli import main
from triage.model import Survey, parse_survey
from triage.store import Store

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


@pytest.fixture
def cli(capsys: pytest.CaptureFixture[str]) -> Callable[..., tuple[int, str, str]]:
    def run(*argv: str) -> tuple[int, str, str]:
        code = main(list(argv))
        out, err = capsys.readouterr()
        return code, out, err
    return run


def write_json(path: Path, data: Any) -> Path:
    path.write_text(json.dumps(data, ensure_ascii=False), encoding="utf-8")
    return path
