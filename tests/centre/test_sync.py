"""`triage sync --to URL`: idempotent, whole surveys only, conflicts kept, concurrent laptops."""

from __future__ import annotations

import os
import random
import signal
import subprocess
import sys
import time
from pathlib import Path

import psycopg

from tests.centre.conftest import ROOT, Centre, laptop
from triage.centre.sync import _read_local, sha256
from triage.store import Store

WHOLE = """
SELECT
  (SELECT count(*) FROM triage.versions v WHERE EXISTS (
     SELECT 1 FROM unnest(v.changes) u WHERE NOT EXISTS (
       SELECT 1 FROM triage.changes c WHERE c.survey_id = v.survey_id AND c.uid = u))),
  (SELECT count(*) FROM triage.versions v WHERE NOT EXISTS (
     SELECT 1 FROM triage.assessments a WHERE a.survey_id = v.survey_id
     AND a.doc_sha256 = v.doc_sha256)),
  (SELECT count(*) FROM triage.changes c WHERE NOT EXISTS (
     SELECT 1 FROM triage.versions v WHERE v.survey_id = c.survey_id AND c.uid = ANY(v.changes)))
"""


def _whole(centre: Centre) -> None:
    """Every version on the server came with all its changes and its assessment, and no change
    arrived without a version holding it: nothing of a survey is ever there in part."""
    assert centre.rows(WHOLE) == [(0, 0, 0)]


def _heads(centre: Centre) -> dict[str, str]:
    return dict(centre.rows("SELECT id, doc_sha256 FROM triage.survey_list"))


def _local(db: Path) -> dict[str, str]:
    with Store.open(db) as st:
        return {r[0]: sha256(r[1]) for r in st.conn.execute("SELECT id, doc FROM surveys")}


def test_sync_twice_sends_nothing_the_second_time_and_says_so(centre, tmp_path, cli):
    db = tmp_path / "lap.db"
    ids = laptop(db, 12)
    with Store.open(db) as st:
        st.record_report(ids[0], 1, "r.pdf", None)
    code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
    assert code == 0, err
    assert "sent 12 survey versions, 12 changes, 12 assessments, 1 report records" in err
    before = centre.rows("SELECT count(*), max(seq) FROM triage.versions")
    code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
    assert code == 0, err
    assert "nothing to send; the centre holds all 12 surveys" in err
    assert centre.rows("SELECT count(*), max(seq) FROM triage.versions") == before
    assert _heads(centre) == _local(db)
    _whole(centre)
    # An edit is one new version (the old one kept: append-only), its one change, its
    # assessment recomputed by the laptop.
    with Store.open(db) as st:
        st.set_value(ids[3], "storeys[0].notes", "stair core checked again")
    code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
    assert code == 0, err
    assert "sent 1 survey version, 1 changes, 1 assessments, 0 report records" in err
    assert centre.rows("SELECT count(*) FROM triage.versions") == [(13,)]
    assert _heads(centre) == _local(db)
    rows = centre.rows(f"SELECT revision, engine FROM triage.survey_list WHERE id = '{ids[3]}'")
    from triage import __version__

    assert rows == [(2, __version__)]
    _whole(centre)


def test_a_survey_edited_on_two_laptops_is_kept_twice_and_flagged(centre, tmp_path, cli):
    a, b = tmp_path / "ana.db", tmp_path / "ben.db"
    ids = laptop(a, 8, who="Ana")
    laptop(b, 8, who="Ben")
    with Store.open(a) as st:
        st.set_value(ids[0], "storeys[0].notes", "Ana was here")
    with Store.open(b) as st:
        st.set_value(ids[0], "storeys[0].notes", "Ben was here")
        st.set_value(ids[1], "storeys[0].notes", "only Ben edited this one")
    for db in (a, b):
        code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
        assert code == 0, err
    flagged = centre.rows("SELECT id, conflict_of, conflict FROM triage.survey_list "
                          "WHERE conflict ORDER BY conflict_of NULLS FIRST")
    assert len(flagged) == 2 and flagged[0][0] == ids[0] and flagged[1][1] == ids[0]
    assert flagged[1][0] != ids[0]
    # Ben's edit of a survey Ana left alone brings it forward: no conflict.
    row = centre.rows(f"SELECT conflict, revision FROM triage.survey_list WHERE id = '{ids[1]}'")
    assert row == [(False, 2)]
    assert centre.rows("SELECT count(*) FROM triage.survey_list") == [(9,)]
    assert centre.rows("SELECT count(*) FROM triage.conflicts") == [(2,)]
    assert centre.check_maintained() == 7
    # Either laptop syncing again sends nothing.
    for db in (a, b):
        code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
        assert code == 0 and "nothing to send" in err


def test_progress_goes_to_a_terminal_only(centre, tmp_path):
    import pty

    db = tmp_path / "lap.db"
    laptop(db, 40)
    main_fd, child_fd = pty.openpty()
    proc = subprocess.Popen([sys.executable, "-m", "triage", "--db", str(db), "sync", "--to",
                             centre.field, "--batch", "10"], cwd=ROOT, stderr=child_fd,
                            stdout=subprocess.PIPE, text=True)
    out, _ = proc.communicate(timeout=120)
    os.close(child_fd)
    shown = b""
    while True:
        try:
            chunk = os.read(main_fd, 4096)
        except OSError:
            break
        if not chunk:
            break
        shown += chunk
    os.close(main_fd)
    assert proc.returncode == 0
    assert b"sync: 40 of 40 surveys, " in shown and b"/s" in shown
    # the progress and the status line on the terminal (standard error), nothing on stdout
    assert b"sent 40 survey versions" in shown and out == ""


class Forked:
    """`triage sync` in a child process forked from this one (the imports already done, so
    it starts sending at once): its pid, exit status and output."""

    def __init__(self, db: Path, url: str, batch: int, folder: Path) -> None:
        import triage.centre.sync  # noqa: F401  (loaded before the fork)
        from triage.cli import main

        self.out = folder / f"out-{time.monotonic_ns()}"
        self.err = self.out.with_suffix(".err")
        self.code: int | None = None
        sys.stdout.flush()
        sys.stderr.flush()
        pid = os.fork()
        if pid == 0:   # the child: its own connections, output to files, never returns
            code = 70
            try:
                out = os.open(self.out, os.O_WRONLY | os.O_CREAT, 0o600)
                err = os.open(self.err, os.O_WRONLY | os.O_CREAT, 0o600)
                os.dup2(out, 1)
                os.dup2(err, 2)
                sys.stdout = open(1, "w", closefd=False)  # noqa: SIM115
                sys.stderr = open(2, "w", closefd=False)  # noqa: SIM115
                code = main(["--db", str(db), "sync", "--to", url, "--batch", str(batch)])
                sys.stdout.flush()
                sys.stderr.flush()
            finally:
                os._exit(code)
        self.pid = pid

    def poll(self) -> int | None:
        if self.code is None:
            pid, status = os.waitpid(self.pid, os.WNOHANG)
            if pid:
                self.code = os.waitstatus_to_exitcode(status)
        return self.code

    def wait(self, timeout: float = 120) -> int:
        end = time.monotonic() + timeout
        while self.poll() is None:
            if time.monotonic() > end:
                os.kill(self.pid, signal.SIGKILL)
                raise TimeoutError("sync did not finish")
            time.sleep(0.005)
        assert self.code is not None
        return self.code

    def output(self) -> tuple[str, str]:
        return self.out.read_text(), self.err.read_text()


def _start(db: Path, url: str, batch: int) -> Forked:
    return Forked(db, url, batch, db.parent)


def test_kill_9_during_sync_leaves_whole_surveys_and_the_next_run_completes(centre, tmp_path):
    db = tmp_path / "lap.db"
    ids = laptop(db, 100)
    rng = random.Random(16)
    assert _start(db, centre.field, 20).wait() == 0
    hidden: set[str] = set()

    def edit(round_: int) -> None:
        # New versions to send: some surveys edited (assessed by the laptop during sync),
        # some hidden or shown again.
        with Store.open(db, refresh=False) as st:
            for sid in rng.sample(ids, 6):
                st.set_value(sid, "storeys[0].notes", f"round {round_}")
            for sid in rng.sample(ids, 40):
                if sid in hidden:
                    st.undo_last(sid)
                    hidden.discard(sid)
                else:
                    st.hide_survey(sid)
                    hidden.add(sid)

    edit(-1)
    counts = []
    kills = 0
    with psycopg.connect(centre.admin, autocommit=True) as watch:
        def versions() -> int:
            return int(watch.execute("SELECT count(*) FROM triage.versions").fetchone()[0])

        for round_ in range(24):
            edit(round_)
            before = versions()
            with Store.open(db, refresh=False) as st:
                states = {(s.id, s.state) for s in _read_local(st.conn, st.db_id)}
            proc = _start(db, centre.field, 1)
            if round_ % 2:   # at any moment of the run, start-up included
                time.sleep(rng.uniform(0, 0.4))
            else:            # a moment after the first surveys went in
                end = time.monotonic() + 30
                while versions() == before and proc.poll() is None and time.monotonic() < end:
                    time.sleep(0.002)
                time.sleep(rng.uniform(0, 0.03))
            if proc.poll() is None:
                os.kill(proc.pid, signal.SIGKILL)
                kills += 1
            proc.wait()
            _whole(centre)
            there = set(centre.rows("SELECT survey_id, state FROM triage.versions"))
            counts.append((len(there) - before, len(states - there)))
    assert kills >= 20, kills
    # Many kills landed while versions were going in: some sent, some not yet.
    assert sum(sent > 0 and lacking > 0 for sent, lacking in counts) >= 5, counts
    assert _start(db, centre.field, 50).wait() == 0
    _whole(centre)
    assert _heads(centre) == {k: v for k, v in _local(db).items()}
    assert centre.check_maintained() > 0    # about 40 of the 100 surveys are hidden
    proc = _start(db, centre.field, 50)
    assert proc.wait() == 0 and "nothing to send" in proc.output()[1]


def test_ten_laptops_syncing_at_once_lose_nothing_and_never_deadlock(centre, tmp_path):
    laptops = []
    for k in range(10):
        db = tmp_path / f"lap{k}.db"
        shared = laptop(db, 60)            # the same 60 surveys imported on every laptop
        with Store.open(db, who=f"inspector {k}") as st:
            # ... each edits six of them alone, and the first one as all the others do
            for sid in {shared[0], *shared[k::10]}:
                st.set_value(sid, "storeys[0].notes", f"laptop {k}")
        laptops.append(db)
    procs = [_start(db, centre.url(f"field{k + 1}"), 5) for k, db in enumerate(laptops)]
    for p in procs:
        assert p.wait(300) == 0, p.output()[1]
    _whole(centre)
    want_versions = set()
    want_changes = set()
    for db in laptops:
        with Store.open(db) as st:
            for s in _read_local(st.conn, st.db_id):
                want_versions.add((s.id, s.state))
                want_changes |= {(s.id, c[1]) for c in s.changes}
    assert set(centre.rows("SELECT survey_id, state FROM triage.versions")) == want_versions
    assert set(centre.rows("SELECT survey_id, uid FROM triage.changes")) == want_changes
    # 60 surveys; the one edited on all ten laptops is kept ten times, all flagged.
    assert centre.rows("SELECT count(*), count(*) FILTER (WHERE conflict), count(DISTINCT "
                       "first_id) FILTER (WHERE conflict) FROM triage.survey_list") == [(69, 10, 1)]
    # Ten writers took turns: the tables the triggers keep are what the views would compute.
    assert centre.check_maintained() == 59
    for k, db in enumerate(laptops):
        proc = _start(db, centre.url(f"field{k + 1}"), 5)
        assert proc.wait() == 0 and "nothing to send" in proc.output()[1]
