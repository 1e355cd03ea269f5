"""Store speeds (issues 3 and 7), each against its baseline, as functions returning numbers.

    python -m bench.store_bench            # prints every figure

- store_write_ratio: one field edit of a 10-storey survey (4 readings per storey and direction,
  10 member groups per storey) through `Store.set_value` (validation, the survey row and its
  change-log row in one durable transaction), over bare sqlite3 writing the same two rows in one
  BEGIN IMMEDIATE transaction with the same pragmas on the same schema. Target: at most 2.0.
  store_write_overhead_ms: the same edit's time beyond the bare write, milliseconds (the
  ratio depends on what a flush costs on the disk: where fsync is nearly free, as on some
  virtual disks, this Python work shows; on a laptop SSD the flush dominates).
- list_10k_ms: `triage list` (open, read, format) of 10,000 surveys, in process. Under 1000.
- merge_ratio: 200 source databases of 50 surveys each merged with `merge_into`, over plain
  ATTACH with INSERT ... SELECT of the same rows (surveys, changes, assessments). At most 3.
- summary_10k_ms: `triage summary` (open, query, text) of 10,000 buildings. Under 1000.
- edit_300_storeys_ms: one edit of a 300-storey survey (the most a survey holds) that runs the
  whole-survey rule check (`model_rules.survey_rules`: labels, storey order, hazards' storeys,
  years): a storey's notes, a hazard's place, the building's name, in turn; median ms through
  `Store.set_value` (validation, rules, row, change log, one durable transaction). Under 50.
  edit_300_rules_ms: the rule check alone on that survey (median ms).

Files go to a temporary folder on the disk the system gives (`TMPDIR`); put it on a real disk,
not tmpfs, or fsync costs nothing and the ratios say little.
"""

from __future__ import annotations

import json
import sqlite3
import statistics
import tempfile
import time
import uuid
from pathlib import Path
from typing import Any

from bench import timing
from bench.generate import big_survey_dict
from bench.timing import run_cli
from triage.model import ID_NAMESPACE, canonical_json, parse_survey
from triage.store import Store
from triage.store.connect import set_pragmas


def _ten_storey() -> dict[str, Any]:
    return big_survey_dict(storeys=10, groups=10, readings=4, seed=10)


def store_write_times(edits: int = 400) -> tuple[float, float]:
    """Median seconds of one store field edit and of the bare sqlite3 baseline, side by side.

    The baseline writes exactly the rows the store wrote (captured from a scratch run of the
    same edits): the survey row's new JSON and revision, and the change-log row.
    """
    survey = parse_survey(_ten_storey())
    sid = str(survey.survey_id)
    steps = [(f"storeys[{i % 10}].readings[{i % 8}].offset_mm", round(1.0 + (i % 50) * 0.1, 1))
             for i in range(edits)]
    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp:
        scratch = Store.open(Path(tmp) / "scratch.db", who="bench")
        scratch.add_survey(survey, assess=False)
        rows = []
        for path, value in steps:
            scratch.set_value(sid, path, value)
            doc, rev, upd = scratch.conn.execute(
                "SELECT doc, revision, updated_at FROM surveys").fetchone()
            change = scratch.conn.execute(
                "SELECT uid, survey_id, revision, op, path, old, new, at, who FROM changes "
                "ORDER BY seq DESC LIMIT 1").fetchone()
            rows.append((doc, rev, upd, change))
        scratch.close()
        st = Store.open(Path(tmp) / "store.db", who="bench")
        st.add_survey(survey, assess=False)
        Store.open(Path(tmp) / "base.db", who="bench").close()
        conn = sqlite3.connect(str(Path(tmp) / "base.db"), isolation_level=None)
        set_pragmas(conn)
        first = st.conn.execute("SELECT * FROM surveys").fetchone()
        conn.execute("INSERT INTO surveys VALUES (" + ", ".join("?" * len(first)) + ")", first)
        ours: list[float] = []
        bare: list[float] = []
        def store_edit(path: str, value: float) -> None:
            t0 = time.perf_counter()
            st.set_value(sid, path, value, "bench")
            ours.append(time.perf_counter() - t0)

        def bare_write(doc: str, rev: int, upd: str, change: tuple[Any, ...]) -> None:
            t0 = time.perf_counter()
            conn.execute("BEGIN IMMEDIATE")
            conn.execute("UPDATE surveys SET doc = ?, revision = ?, updated_at = ? WHERE id = ?",
                         (doc, rev, upd, sid))
            conn.execute("INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, "
                         "who) VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)", change)
            conn.execute("COMMIT")
            bare.append(time.perf_counter() - t0)

        # Side by side, taking turns at going first: a write right after another is cheaper
        # on some disks, which would favour whichever always came second.
        for k, ((path, value), (doc, rev, upd, change)) in enumerate(
                zip(steps, rows, strict=True)):
            if k % 2:
                bare_write(doc, rev, upd, change)
                store_edit(path, value)
            else:
                store_edit(path, value)
                bare_write(doc, rev, upd, change)
        conn.close()
        st.close()
    return statistics.median(ours), statistics.median(bare)


def store_write_ratio(edits: int = 400) -> float:
    """Median store field edit over the median bare sqlite3 write of the same two rows."""
    ours, bare = store_write_times(edits)
    return ours / bare


def store_write_overhead_ms(edits: int = 400) -> float:
    """Milliseconds a store field edit takes beyond the bare write of its two rows."""
    ours, bare = store_write_times(edits)
    return (ours - bare) * 1000


def _storeys_300() -> dict[str, Any]:
    d = big_survey_dict(storeys=300, groups=10, readings=4, seed=300)
    d["hazards"] = [{"kind": "falling_hazard", "where": f"parapet {i}", "storey": str(i * 15 + 1),
                     "height_above_ground_m": 3.0 * (i * 15 + 1)} for i in range(20)]
    return d


def edit_300_storeys_times(edits: int = 300) -> dict[str, float]:
    """Median ms of one whole-survey-checked edit of a 300-storey survey, and of the check."""
    from triage.model_rules import survey_rules

    data = _storeys_300()
    survey = parse_survey(data)
    sid = str(survey.survey_id)
    labels = [s["label"] for s in data["storeys"]]
    steps = []
    for i in range(edits):
        k = i % 3
        if k == 0:
            steps.append((f"storeys[{(i * 7) % 300}].notes", f"checked {i}"))
        elif k == 1:
            steps.append((f"hazards[{i % 20}].where", f"parapet, bay {i}"))
        else:
            steps.append(("building.name", f"Tall Building {i}"))
    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp:
        st = Store.open(Path(tmp) / "tall.db", who="bench")
        st.add_survey(survey, assess=False)
        times = []
        for path, value in steps:
            t0 = time.perf_counter()
            st.set_value(sid, path, value, "bench")
            times.append((time.perf_counter() - t0) * 1000)
        doc = json.loads(st.conn.execute("SELECT doc FROM surveys").fetchone()[0])
        st.close()
    assert [s["label"] for s in doc["storeys"]] == labels
    rules = []
    for _ in range(50):
        t0 = time.perf_counter()
        survey_rules(doc)
        rules.append((time.perf_counter() - t0) * 1000)
    return {"edit_300_storeys_ms": statistics.median(times),
            "edit_300_rules_ms": statistics.median(rules)}


def edit_300_storeys_ms(edits: int = 300) -> float:
    """Median ms of one whole-survey-checked edit of a 300-storey survey."""
    return edit_300_storeys_times(edits)["edit_300_storeys_ms"]


def _small_survey(i: int, seed: int = 0) -> dict[str, Any]:
    d: dict[str, Any] = {
        "format": "triage-survey/1",
        "id": str(uuid.uuid5(ID_NAMESPACE, f"bench-survey:{seed}:{i}")),
        "building": {"id": str(uuid.uuid5(ID_NAMESPACE, f"bench-building:{seed}:{i}")),
                     "name": f"Bench Building {seed}-{i}",
                     "address": f"{i + 1} Bench Road, Kōwhai Bay",
                     "location": {"lat": -41.2 + (i % 100) * 0.001,
                                  "lon": 174.7 + (i // 100 % 100) * 0.001},
                     "system": {"x": "rc_frame", "y": "rc_wall"}},
        "inspection": {"inspector": {"name": "Bench Mark"},
                       "at": f"2026-11-{28 + i % 2}T{8 + i % 10:02d}:00:00+13:00"},
        "storeys": [{"label": lab, "height_m": 3.2,
                     "readings": [{"dir": "x", "offset_mm": 1.0 + (i % 7), "gauge_mm": 2000,
                                   "sd_mm": 1.0},
                                  {"dir": "y", "offset_mm": 2.0 + (i % 5), "gauge_mm": 2000,
                                   "sd_mm": 1.0}],
                     "members": [{"kind": "column", "count": 12}]} for lab in ("G", "1", "2")],
    }
    return d


def fill(path: Path, n: int, seed: int = 0) -> None:
    """A store of `n` small surveys with their assessments, written in one transaction.

    One survey goes through `add_survey` (and the engine); the others are its rows with their
    ids and names changed, so a 10,000-survey file takes seconds to make, not minutes.
    """
    st = Store.open(path, who="bench", refresh=False)
    first = parse_survey(_small_survey(0, seed))
    st.add_survey(first)
    a = st.load_assessment(first.survey_id)
    assert a is not None
    rows = []
    for i in range(1, n):
        d = parse_survey(_small_survey(i, seed)).to_json_dict()
        rows.append(d)
    c = st.conn
    base = c.execute("SELECT * FROM surveys WHERE id = ?", (str(first.survey_id),)).fetchone()
    names = [r[1] for r in c.execute("PRAGMA table_info(surveys)")]
    template = dict(zip(names, base, strict=True))
    change = c.execute("SELECT uid, revision, op, path, old, new, at, who FROM changes "
                       "WHERE survey_id = ?", (str(first.survey_id),)).fetchone()
    aj = a.model_dump(mode="json")
    c.execute("BEGIN IMMEDIATE")
    for d in rows:
        text = canonical_json(d)
        row = dict(template, id=d["id"], building_id=d["building"]["id"],
                   building=d["building"]["name"], address=d["building"]["address"],
                   lat=d["building"]["location"]["lat"], lon=d["building"]["location"]["lon"],
                   at=d["inspection"]["at"], doc=text)
        c.execute(f"INSERT INTO surveys ({', '.join(names)}) VALUES "
                  f"({', '.join('?' for _ in names)})", [row[k] for k in names])
        c.execute("INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who) "
                  "VALUES (?, ?, ?, ?, ?, ?, ?, ?, ?)",
                  (str(uuid.uuid4()), d["id"], change[1], change[2], change[3], change[4],
                   text, change[6], change[7]))
        c.execute("INSERT INTO assessments (survey_id, revision, json) VALUES (?, 1, ?)",
                  (d["id"], json.dumps(dict(aj, survey=d["id"], building=d["building"]["id"]))))
    c.execute("COMMIT")
    st.close()


def list_10k_ms(n: int = 10_000) -> float:
    """Milliseconds for `triage list` of `n` surveys (open, query, format), in process."""
    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp:
        db = Path(tmp) / "list.db"
        fill(db, n)
        run_cli(["--db", str(db), "list"])   # warm-up: imports, page cache
        return statistics.median(run_cli(["--db", str(db), "list"]) for _ in range(5)) * 1000


def summary_10k_ms(n: int = 10_000) -> float:
    """Milliseconds for `triage summary` of `n` buildings (open, query, text), in process."""
    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp:
        db = Path(tmp) / "area.db"
        fill(db, n)
        run_cli(["--db", str(db), "summary"])
        return statistics.median(run_cli(["--db", str(db), "summary"]) for _ in range(5)) * 1000


def _baseline_merge(target: Path, sources: list[Path]) -> float:
    Store.open(target, who="bench").close()
    conn = sqlite3.connect(str(target), isolation_level=None)
    set_pragmas(conn)
    t0 = time.perf_counter()
    for s in sources:
        conn.execute("ATTACH DATABASE ? AS src", (str(s),))
        conn.execute("BEGIN IMMEDIATE")
        conn.execute("INSERT INTO main.surveys SELECT * FROM src.surveys")
        conn.execute("INSERT INTO main.changes (uid, survey_id, revision, op, path, old, new, "
                     "at, who, undoes) SELECT uid, survey_id, revision, op, path, old, new, at, "
                     "who, undoes FROM src.changes")
        conn.execute("INSERT INTO main.assessments SELECT * FROM src.assessments")
        conn.execute("COMMIT")
        conn.execute("DETACH DATABASE src")
    dt = time.perf_counter() - t0
    conn.close()
    return dt


def merge_ratio(sources: int = 200, per_source: int = 50) -> float:
    """Time of `merge_into` over plain ATTACH + INSERT ... SELECT of the same rows."""
    from triage.store.merge import merge_into

    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp:
        paths = []
        for k in range(sources):
            p = Path(tmp) / f"laptop{k:03d}.db"
            fill(p, per_source, seed=k + 1)
            paths.append(p)
        base = _baseline_merge(Path(tmp) / "baseline.db", paths)
        st = Store.open(Path(tmp) / "merged.db", who="bench")
        t0 = time.perf_counter()
        results = merge_into(st, paths)
        ours = time.perf_counter() - t0
        assert all(r.skipped is None for r in results)
        assert st.conn.execute("SELECT count(*) FROM surveys").fetchone()[0] == sources * per_source
        st.close()
    return ours / base


FIGURES = {"store_write_ratio": store_write_ratio,
           "store_write_overhead_ms": store_write_overhead_ms, "list_10k_ms": list_10k_ms,
           "merge_ratio": merge_ratio, "summary_10k_ms": summary_10k_ms,
           "edit_300_storeys_ms": edit_300_storeys_ms}


def main() -> None:
    """Print each figure."""
    timing.main(__doc__, FIGURES)


if __name__ == "__main__":
    main()
