"""`SurveyReader`: the local store is one, and the reading commands need nothing else of it.

A centre backend will be dropped in behind the same five commands (list, export, report,
compare, summary); these tests run four of them through a wrapper that lets through only the
protocol's methods, and check they print exactly what they print on the plain store.
"""

from __future__ import annotations

import argparse
from collections.abc import Callable
from pathlib import Path
from typing import Any

import pytest

from tests.store.conftest import sample, sample_dict
from triage.cli import common
from triage.model import parse_survey
from triage.store import Store
from triage.store.reader import ReportLog, SurveyReader

PROTOCOL = {"location", "has_survey", "match_ids", "list_surveys", "survey_row",
            "load_survey", "load_assessment", "revision", "photo_dir", "photo_bytes",
            "building_rows", "close"}
# `triage.store.area.AreaLines`: a reader may lay the summary out itself (the centre does);
# this one does not, and the command must then do with the protocol alone.
OPTIONAL = {"summary_lines", "summary_features"}


class OnlyReader:
    """A store seen through the protocol only: any other attribute is an error."""

    def __init__(self, store: Store) -> None:
        self._store = store
        self.used: set[str] = set()

    def __getattr__(self, name: str) -> Any:
        if name in OPTIONAL:
            raise AttributeError(name)
        if name not in PROTOCOL:
            raise AssertionError(f"a reading command used {name!r}, not in SurveyReader")
        self.used.add(name)
        return getattr(self._store, name)


def test_store_is_a_reader_and_report_log(store: Store) -> None:
    reader: SurveyReader = store      # checked by mypy too
    log: ReportLog = store
    assert isinstance(reader, SurveyReader) and isinstance(log, ReportLog)
    assert not isinstance(object(), SurveyReader)
    assert reader.location == str(store.path)


def test_the_protocol_lists_exactly_these_methods() -> None:
    names = {n for n in vars(SurveyReader) if not n.startswith("_")}
    assert names == PROTOCOL
    assert {n for n in vars(ReportLog) if not n.startswith("_")} == {"record_report"}


def test_match_ids(store: Store) -> None:
    a = sample("Harbour Flats")
    store.add_survey(a)
    sid = str(a.survey_id)
    assert store.match_ids(sid) == [sid]
    assert store.match_ids(sid[:6].upper()) == [sid]
    assert store.match_ids("ffffffff-0000") == []
    store.hide_survey(sid)
    assert store.match_ids(sid[:6]) == [sid]


def test_reading_commands_use_only_the_protocol(db: Path, monkeypatch: pytest.MonkeyPatch,
                                                cli: Callable[..., tuple[int, str, str]],
                                                tmp_path: Path) -> None:
    with Store.open(db) as st:
        first = parse_survey(sample_dict("Tidewater Clinic"))
        st.add_survey(first)
        again = sample_dict("Tidewater Clinic")
        again["building"]["id"] = str(first.building_id)
        again["inspection"]["at"] = "2026-11-29T16:30:00+13:00"
        again["inspection"]["previous"] = str(first.survey_id)
        second = parse_survey(again)
        st.add_survey(second)
    old, new = str(first.survey_id), str(second.survey_id)
    runs = [("list",), ("list", "--format", "json"), ("summary",), ("summary", "--format", "csv"),
            ("summary", "--format", "geojson"),
            ("compare", old[:8], new), ("export", new[:8], "-o", str(tmp_path / "out.json"))]
    plain = [cli("--db", str(db), *argv) for argv in runs]
    assert all(code == 0 for code, _, _ in plain), plain

    wrapped: list[OnlyReader] = []
    real_open = common.open_reader

    def only(args: argparse.Namespace, **kw: Any) -> Any:
        w = OnlyReader(real_open(args, **kw))  # type: ignore[arg-type]
        wrapped.append(w)
        return w

    for mod in ("surveys", "compare", "summary"):
        monkeypatch.setattr(f"triage.cli.{mod}.open_reader", only)
    again_runs = [cli("--db", str(db), *argv) for argv in runs]
    assert again_runs == plain
    used = set().union(*(w.used for w in wrapped))
    assert {"list_surveys", "building_rows", "match_ids", "load_survey", "load_assessment",
            "survey_row", "close"} <= used
