"""What the store writes with every edit: a version 4 change id, a UTC time stamp, the JSON text."""

from __future__ import annotations

import re
import sqlite3
import uuid
from datetime import UTC, datetime

from hypothesis import given
from hypothesis import strategies as st

from tests.store.conftest import sample
from triage.store import Store
from triage.store.writes import _RUNS, _doc_pieces, _update_doc_sql


def test_change_ids_are_distinct_version_4_uuids(stored):
    store, sid = stored
    for i in range(50):
        store.set_value(sid, "storeys[0].readings[0].offset_mm", 1.0 + i / 10)
    store.undo_last(sid)
    store.hide_survey(sid)
    ids = [c.uid for c in store.change_log(sid) if c.op != "import"]
    assert len(ids) == 52 and len(set(ids)) == len(ids)
    for u in ids:
        parsed = uuid.UUID(u)
        assert parsed.version == 4
        assert parsed.variant == uuid.RFC_4122
        assert str(parsed) == u


def test_the_stamp_is_now_in_utc(db):
    before = datetime.now(UTC).replace(microsecond=0)
    with Store.open(db) as store:       # the store's own clock
        s = sample()
        store.add_survey(s)
        store.set_value(str(s.survey_id), "storeys[0].readings[0].offset_mm", 2.5)
        texts = [c.at for c in store.change_log(str(s.survey_id))]
    after = datetime.now(UTC)
    for text in texts:
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
