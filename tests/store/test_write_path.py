"""What the store writes with every edit, made the cheap way: change id, time stamp, JSON text."""

from __future__ import annotations

import multiprocessing
import re
import sqlite3
import uuid
from datetime import UTC, datetime, timedelta
from multiprocessing.connection import Connection

import pytest
from hypothesis import given
from hypothesis import strategies as st

from triage.store import store as store_module
from triage.store.store import _RUNS, _doc_pieces, _update_doc_sql, _UtcStamp, new_uid


def _uids(n: int) -> list[str]:
    return [new_uid() for _ in range(n)]


def _send_uids(conn: Connection, n: int) -> None:
    conn.send(_uids(n))
    conn.close()


def test_change_ids_are_distinct_version_4_uuids():
    ids = _uids(20_000)
    assert len(set(ids)) == len(ids)
    for u in ids[:500]:
        parsed = uuid.UUID(u)
        assert parsed.version == 4
        assert parsed.variant == uuid.RFC_4122
        assert str(parsed) == u


def test_forked_children_do_not_repeat_each_others_change_ids():
    # Two processes forked from one parent start from its generator state; the generator is
    # reseeded in every child, so their ids differ (a crash test and the UI's workers fork).
    ctx = multiprocessing.get_context("fork")
    got = []
    for _ in range(2):
        mine_end, child_end = ctx.Pipe()
        child = ctx.Process(target=_send_uids, args=(child_end, 200))
        child.start()
        got.append(mine_end.recv())
        child.join()
    a, b = got
    mine = _uids(200)
    assert not set(a) & set(b)
    assert not (set(a) | set(b)) & set(mine)


def _expected(ns: int) -> str:
    t = datetime(1970, 1, 1, tzinfo=UTC) + timedelta(microseconds=ns // 1000)
    return t.isoformat(timespec="milliseconds")


@pytest.mark.parametrize("ns", [
    0,
    1_796_000_000_999_999_999,          # the last millisecond of a second ...
    1_796_000_001_000_000_000,          # ... and the first of the next
    1_796_000_001_000_999_999,
    1_830_297_599_123_456_789,          # 2027-12-31T23:59:59.123
    1_830_297_600_000_000_001,          # a new year
])
def test_the_stamp_reads_as_datetime_isoformat_does(monkeypatch, ns):
    stamp = _UtcStamp()
    monkeypatch.setattr(store_module.time, "time_ns", lambda: ns)
    assert stamp() == _expected(ns)
    # The date part is kept per second: a step back and forth still reads right.
    monkeypatch.setattr(store_module.time, "time_ns", lambda: ns + 1_500_000_000)
    assert stamp() == _expected(ns + 1_500_000_000)
    monkeypatch.setattr(store_module.time, "time_ns", lambda: ns)
    assert stamp() == _expected(ns)


def test_the_stamp_is_now_in_utc():
    stamp = _UtcStamp()
    before = datetime.now(UTC).replace(microsecond=0)
    text = stamp()
    after = datetime.now(UTC)
    assert re.fullmatch(r"\d{4}-\d\d-\d\dT\d\d:\d\d:\d\d\.\d{3}\+00:00", text)
    assert before <= datetime.fromisoformat(text) <= after


_STOREY = st.one_of(st.text(alphabet="abc{}:,", max_size=6), st.text(max_size=6))


@given(st.lists(_STOREY, max_size=12), st.text(max_size=5), st.text(max_size=5))
def test_sqlite_joins_the_pieces_into_the_survey_text(storeys, head, tail):
    pieces = _doc_pieces(head, storeys, tail)
    assert pieces[0] is head and pieces[-1] is tail
    # Storeys that are not ASCII go as the very strings given (their UTF-8 is kept with them).
    ids = {id(p) for p in pieces}
    assert all(id(t) in ids for t in storeys if not t.isascii())
    conn = sqlite3.connect(":memory:")
    conn.execute("CREATE TABLE surveys (id TEXT, doc TEXT, revision INT, updated_at TEXT)")
    conn.execute("INSERT INTO surveys VALUES ('s', '', 1, '')")
    cur = conn.execute(_update_doc_sql(len(pieces) - 2), (*pieces, 2, "now", "s", 1))
    assert cur.rowcount == 1
    assert conn.execute("SELECT doc FROM surveys").fetchone()[0] == head + ",".join(storeys) + tail


def test_many_storeys_that_are_not_ascii_are_joined_in_python():
    storeys = [f"ō{i}" for i in range(_RUNS + 5)]
    pieces = _doc_pieces("[", storeys, "]")
    assert pieces == ["[", ",".join(storeys), "]"]
