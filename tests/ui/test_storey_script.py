"""One typical storey logged the way the benchmark does it (bench/ui_bench.py STOREY_SCRIPT):
key by key, and as one burst typed ahead; the storey as stored is checked after each, and the
keys other than typed characters stay within the promise."""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[2]))

from drive import burst, press, started

from bench.ui_bench import STOREY_SCRIPT, _check_storey, _log_storey, storey_survey
from triage.model import parse_survey
from triage.store import Store

SID = "44444444-4444-4444-8444-444444444444"


def _db(tmp_path: Path) -> Path:
    db = tmp_path / "storey.db"
    with Store.open(db) as st:
        st.add_survey(parse_survey(storey_survey()), "test", "test")
    return db


async def test_the_storey_script_logs_the_storey_within_25_keys(tmp_path: Path) -> None:
    keys, chars = await _log_storey(_db(tmp_path), SID)  # checks the storey as stored
    assert keys == sum(1 for what, _ in STOREY_SCRIPT if what == "key") == 24
    assert chars == 48


async def test_the_storey_typed_ahead_in_one_burst(tmp_path: Path, make_app) -> None:
    db = _db(tmp_path)
    app = make_app(db, open_survey=SID)
    parts = [f"<{text}>" if what == "key" else text for what, text in STOREY_SCRIPT]
    async with started(app) as pilot:
        await press(pilot, "f5")
        await burst(pilot, *parts)
    with Store.open(db) as st:
        _check_storey(st.load_survey(SID))


def test_a_wrong_storey_is_caught_by_the_check() -> None:
    s = storey_survey()
    s["storeys"][0]["readings"] = [{"dir": "x", "offset_mm": 12.0, "gauge_mm": 2000.0,
                                    "where": "grid A1"}]
    try:
        _check_storey(parse_survey(s))
    except AssertionError as err:
        assert "readings" in str(err)
    else:  # pragma: no cover - the check must refuse it
        raise AssertionError("a storey with one reading passed the check")
