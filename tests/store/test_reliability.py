"""Nothing acknowledged is lost: a writer killed at random moments, two writers on one file.

The children are forked from the test process (cheap, so the kill can come dozens of times in
a few seconds) and open their own connection after the fork; each writes one line to a pipe
only after its edit's transaction has committed.
"""

from __future__ import annotations

import os
import random
import select
import signal
import sys
import time
from pathlib import Path

import pytest

from tests.store.conftest import sample
from triage.store import Store

pytestmark = pytest.mark.skipif(sys.platform == "win32", reason="needs fork and SIGKILL")


def _writer(db: Path, sid: str, start: int, out: int, storey: int = 0,
            until: float | None = None, pause: float = 0.0) -> None:
    """Edit in a loop; after each commit write `k op rev change-id` to the pipe."""
    st = Store.open(db, refresh=False)
    k = start
    while until is None or time.monotonic() < until:
        if k % 3 == 0:
            change = st.edit(sid, "add", f"storeys[{storey}].readings",
                             {"dir": "x", "tilt_deg": 0.01, "where": f"k{k}"})
            rev, uid, op = change.revision, change.uid, "add"
        elif k % 17 == 1:
            st.assess_now(sid)   # the recompute the screens run after an edit
            rev, uid, op = st.revision(sid), "-", "assess"
        else:
            change = st.edit(sid, "set", f"storeys[{storey}].notes", f"k{k}")
            rev, uid, op = change.revision, change.uid, "set"
        os.write(out, f"{k} {op} {rev} {uid}\n".encode())
        k += 1
        if pause:
            time.sleep(pause)
    st.close()


def _fork(fn, *args) -> tuple[int, int]:
    r, w = os.pipe()
    pid = os.fork()
    if pid == 0:  # the child
        os.close(r)
        code = 0
        try:
            fn(*args, w)
        except BaseException:
            code = 1
        finally:
            os._exit(code)
    os.close(w)
    return pid, r


def _read_all(fd: int) -> str:
    chunks = []
    while True:
        b = os.read(fd, 65536)
        if not b:
            break
        chunks.append(b)
    os.close(fd)
    return b"".join(chunks).decode()


def test_sigkill_at_random_moments_loses_no_acknowledged_edit(tmp_path):
    db = tmp_path / "crash.db"
    s = sample(storeys=2)
    sid = str(s.survey_id)
    with Store.open(db) as st:
        st.add_survey(s)
    rnd = random.Random(20261127)
    acked: list[tuple[int, str, int, str]] = []
    kills = 0
    t_end = time.monotonic() + 25
    for cycle in range(60):
        pid, fd = _fork(lambda out, c=cycle: _writer(db, sid, c * 100_000, out))
        # Wait for the first acknowledgement, then kill at a random moment after it.
        buf = b""
        ready, _, _ = select.select([fd], [], [], 10)
        assert ready, "the writer never acknowledged an edit"
        buf += os.read(fd, 65536)
        time.sleep(rnd.uniform(0, 0.03))
        os.kill(pid, signal.SIGKILL)
        os.waitpid(pid, 0)
        kills += 1
        text = buf.decode() + _read_all(fd)
        for line in text.splitlines():
            parts = line.split()
            if len(parts) == 4:   # a line cut by the kill was never acknowledged in full
                acked.append((int(parts[0]), parts[1], int(parts[2]), parts[3]))
        if time.monotonic() > t_end:
            break
    assert kills >= 50
    with Store.open(db) as st:
        assert st.integrity() == "ok"
        survey = st.load_survey(sid)   # validates whole
        wheres = {r.where for r in survey.storeys[0].readings}
        log = st.change_log(sid)
        set_values = {c.new for c in log if c.op == "set"}
        logged = {c.uid: c for c in log}
        for k, op, rev, uid in acked:
            if op == "add":
                assert f"k{k}" in wheres
            elif op == "set":
                assert f"k{k}" in set_values
            if uid != "-":
                assert logged[uid].revision == rev
        last_set = next(c for c in log if c.op == "set")
        assert survey.storeys[0].notes == last_set.new
        assert st.revision(sid) >= max(rev for _, _, rev, _ in acked)
        assert st.stale_ids() == []   # refreshed on this open
    assert len(acked) > kills


def test_two_writers_on_one_file_lose_nothing(tmp_path):
    db = tmp_path / "two.db"
    s = sample(storeys=2)
    sid = str(s.survey_id)
    with Store.open(db) as st:
        st.add_survey(s)
    until = time.monotonic() + 2.5
    a = _fork(lambda out: _writer(db, sid, 0, out, 0, until, 0.001))
    b = _fork(lambda out: _writer(db, sid, 1_000_000, out, 1, until, 0.001))
    outputs = []
    for pid, fd in (a, b):
        outputs.append(_read_all(fd))
        _, status = os.waitpid(pid, 0)
        assert os.waitstatus_to_exitcode(status) == 0
    acks = [[line.split() for line in text.splitlines()] for text in outputs]
    assert all(len(x) > 20 for x in acks), [len(x) for x in acks]
    with Store.open(db) as st:
        assert st.integrity() == "ok"
        survey = st.load_survey(sid)
        log = st.change_log(sid)
        for storey, lines in enumerate(acks):
            wheres = {r.where for r in survey.storeys[storey].readings}
            adds = {f"k{k}" for k, op, _, _ in lines if op == "add"}
            assert adds <= wheres
            assert len(wheres - {None}) == len(adds)
        # Every acknowledged change of both is in the log, each revision once.
        acked_sets = {f"k{k}" for lines in acks for k, op, _, _ in lines if op == "set"}
        assert acked_sets <= {c.new for c in log if c.op == "set"}
        assert {uid for lines in acks for _, _, _, uid in lines if uid != "-"} <= {
            c.uid for c in log}
        revs = [c.revision for c in log if c.op in ("set", "add")]
        assert len(revs) == len(set(revs))
