"""Coordination-centre speeds against a throwaway PostgreSQL cluster started here.

    python -m bench.centre_bench            # prints every figure

- sync_ratio: `sync` of a laptop database of 10,000 demo-size surveys (the sample surveys and
  copies of them with their own ids: one version, one change, one assessment each) into an
  empty centre, everything included (reading the laptop's database, hashing, comparing keys
  with the server, the inserts in transactions of 200 surveys, the server's triggers bringing
  the derived tables up to date at each commit), over `COPY` of the same rows (prepared
  beforehand) into the same tables of another empty centre, in one transaction (the same
  triggers fire at its commit). Target: at most 3. `sync_10k_s`, `copy_10k_s`: the two times.
- centre_summary_100k_ms: `triage --db postgresql://… summary` (connect, check the schema,
  the counts and lines written by the server, text on standard output) of 100,000 buildings,
  in process, median of 5. Target: at most 1000. centre_geojson_100k_ms: the same with
  `--format geojson` (median of 3; about 58 MB of JSON). Target: at most 2000.
  `centre_summary_100k_live_ms`: the text again right after one more assessment arrived (its
  building's row written again at that commit, its table page not yet vacuumed).

The cluster runs with PostgreSQL's default durability (fsync on), in a temporary folder (as
root: as the `postgres` system user), and is stopped at the end.
"""

from __future__ import annotations

import json
import statistics
import tempfile
import time
import uuid
from pathlib import Path
from typing import Any

from bench import timing
from bench.timing import run_cli
from triage.centre.cluster import Cluster
from triage.model import canonical_json, parse_survey_text
from triage.resources import samples_dir
from triage.store import Store
from triage.store.writes import import_uid

PASSWORD = "bench-field-login"


def demo_laptop(path: Path, n: int, seed: str = "bench", who: str = "bench") -> list[str]:
    """A laptop database of `n` demo-size surveys (the samples, then copies with new ids).

    The samples go through `add_survey` (and the engine); each copy is a sample's rows with its
    ids and building name changed and its assessment carried over, so thousands take seconds.
    The same `seed` gives the same ids, JSON and import change ids on every laptop (as when two
    laptops import the same files). Returns the survey ids. The centre's tests use it too.
    """
    st = Store.open(path, who=who)
    base = []
    for p in sorted(samples_dir().glob("*.json"))[:n]:
        s = parse_survey_text(p.read_text(encoding="utf-8"))
        st.add_survey(s, source="sample")
        base.append(str(s.survey_id))
    c = st.conn
    names = [r[1] for r in c.execute("PRAGMA table_info(surveys)")]
    rows = {sid: dict(zip(names, c.execute("SELECT * FROM surveys WHERE id = ?",
                                           (sid,)).fetchone(), strict=True)) for sid in base}
    ch = {sid: c.execute("SELECT op, at, who FROM changes WHERE survey_id = ?",
                         (sid,)).fetchone() for sid in base}
    aj = {sid: json.loads(c.execute("SELECT json FROM assessments WHERE survey_id = ?",
                                    (sid,)).fetchone()[0]) for sid in base}
    ids = list(base)
    c.execute("BEGIN IMMEDIATE")
    for i in range(len(base), n):
        src = base[i % len(base)]
        row = dict(rows[src])
        doc = json.loads(row["doc"])
        sid = str(uuid.uuid5(uuid.NAMESPACE_URL, f"laptop:{seed}:{i}"))
        doc["id"] = sid
        doc["building"]["id"] = str(uuid.uuid5(uuid.NAMESPACE_URL, f"building:{seed}:{i}"))
        doc["building"]["name"] = f"{doc['building']['name']} ({seed}{i})"
        text = canonical_json(doc)
        row.update(id=sid, doc=text, building_id=doc["building"]["id"],
                   building=doc["building"]["name"])
        c.execute(f"INSERT INTO surveys ({', '.join(names)}) VALUES "
                  f"({', '.join('?' for _ in names)})", [row[k] for k in names])
        op, at, by = ch[src]
        c.execute("INSERT INTO changes (uid, survey_id, revision, op, path, old, new, at, who) "
                  "VALUES (?, ?, 1, ?, '', NULL, ?, ?, ?)",
                  (import_uid(sid, text), sid, op, text, at, by))
        c.execute("INSERT INTO assessments (survey_id, revision, json) VALUES (?, 1, ?)",
                  (sid, json.dumps(dict(aj[src], survey=sid, building=doc["building"]["id"]))))
        ids.append(sid)
    c.execute("COMMIT")
    st.close()
    return ids


def _centre(pg: Cluster, name: str) -> str:
    pg.centre_db(name)
    return pg.url(name, "bench_field", PASSWORD)


def _start() -> Cluster:
    return Cluster.start_centre(logins={"bench_field": (PASSWORD, "triage_field"),
                                        "bench_read": ("bench-read", "triage_read")})


def _copy_baseline(url: str, rows: dict[str, list[tuple[Any, ...]]]) -> float:
    import psycopg

    from triage.centre.schema import SENT

    with psycopg.connect(url) as conn:
        t0 = time.perf_counter()
        with conn.transaction(), conn.cursor() as cur:
            for table, data in rows.items():
                cols = ", ".join(SENT[table])
                with cur.copy(f"COPY triage.{table} ({cols}) FROM STDIN") as cp:
                    for r in data:
                        cp.write_row(r)
        return time.perf_counter() - t0


def sync_ratio(n: int = 10_000, repeats: int = 3) -> dict[str, float]:
    """`sync` of n demo-size surveys over COPY of the same rows (medians of `repeats`)."""
    from triage.centre.sync import _read_local, sync

    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp, _start() as pg:
        lap = Path(tmp) / "laptop.db"
        demo_laptop(lap, n)
        with Store.open(lap) as st:
            local = _read_local(st.conn, st.db_id)
        rows: dict[str, list[tuple[Any, ...]]] = {
            "versions": [(*s.version[:4], s.version[4].split(","), *s.version[5:])
                         for s in local],
            "changes": [c for s in local for c in s.changes],
            "assessments": [s.assessment for s in local if s.assessment],
        }
        ours, base = [], []
        for k in range(repeats):
            base.append(_copy_baseline(_centre(pg, f"copy{k}"), rows))
            url = _centre(pg, f"sync{k}")
            with Store.open(lap) as st:
                t0 = time.perf_counter()
                got = sync(st, url)
                ours.append(time.perf_counter() - t0)
            assert got.versions == n and got.changes == n and got.assessments == n, got
        return {"sync_ratio": statistics.median(ours) / statistics.median(base),
                "sync_10k_s": statistics.median(ours), "copy_10k_s": statistics.median(base)}


def _fill_server(pg: Cluster, name: str, n: int, tmp: Path) -> None:
    """n buildings on the server: a synced demo laptop, its rows copied with new ids in SQL."""
    from triage.centre.sync import sync

    url = _centre(pg, name)
    lap = tmp / "small.db"
    demo_laptop(lap, 8)
    with Store.open(lap) as st:
        sync(st, url)
    buildings = int(pg.sql("SELECT count(DISTINCT building_id) FROM triage.versions", name))
    more = n - buildings          # each copy a building of its own
    copies = -(-more // 8)
    pg.sql(f"""
INSERT INTO triage.versions (survey_id, state, doc_sha256, alt_id, changes, revision, hidden,
  building_id, building, address, lat, lon, inspector, at, at_utc, conflict_of, source,
  created_at, updated_at, origin, doc)
SELECT s.id, md5(s.id) || md5(s.id), v.doc_sha256, md5('alt' || s.id)::uuid::text,
  ARRAY[md5('chg' || s.id)::uuid::text], v.revision, v.hidden, md5('b' || s.id)::uuid::text,
  v.building || ' ' || g, v.address, v.lat + g * 1e-6, v.lon, v.inspector, v.at, v.at_utc,
  NULL, v.source, v.created_at, v.updated_at, v.origin, v.doc
FROM triage.versions v, generate_series(1, {copies}) g,
     LATERAL (SELECT md5(v.survey_id || ':' || g)::uuid::text AS id) s
ORDER BY g, v.seq LIMIT {more};
INSERT INTO triage.changes (survey_id, uid, local_seq, revision, op, path, old, new, at, who,
  origin)
SELECT v.survey_id, v.changes[1], 1, 1, 'import', '', NULL, NULL, v.at, 'bench', v.origin
FROM triage.versions v WHERE NOT EXISTS (SELECT 1 FROM triage.changes c
  WHERE c.survey_id = v.survey_id);
INSERT INTO triage.assessments (survey_id, doc_sha256, engine, tier, level, gov_storey,
  gov_dir, gov_basis, provisional, json, computed_by, origin)
SELECT v.survey_id, v.doc_sha256, a.engine, a.tier, a.level, a.gov_storey, a.gov_dir,
  a.gov_basis, a.provisional, a.json, a.computed_by, a.origin
FROM triage.versions v JOIN triage.versions o ON o.doc_sha256 = v.doc_sha256
  AND o.survey_id <> v.survey_id AND NOT EXISTS (SELECT 1 FROM triage.assessments x
  WHERE x.survey_id = v.survey_id)
JOIN triage.assessments a ON a.survey_id = o.survey_id AND a.doc_sha256 = o.doc_sha256
WHERE o.seq <= 8;
""", name)
    pg.sql("VACUUM ANALYZE", name)


def centre_summary_100k_ms(n: int = 100_000) -> dict[str, float]:
    """Milliseconds for `triage --db URL summary` of n buildings, in process (median of 5)."""
    with tempfile.TemporaryDirectory(prefix="triage-bench-") as tmp, _start() as pg:
        _fill_server(pg, "area", n, Path(tmp))
        got = int(pg.sql("SELECT count(*) FROM triage.buildings", "area"))
        assert got == n, got
        url = pg.url("area", "bench_read", "bench-read")
        run_cli(["--db", url, "summary"])   # warm-up: imports, server cache
        ms = statistics.median(run_cli(["--db", url, "summary"]) for _ in range(5)) * 1000
        geo = statistics.median(run_cli(["--db", url, "summary", "--format", "geojson"])
                                for _ in range(3)) * 1000
        # One assessment more, no refresh: read at once.
        pg.sql("INSERT INTO triage.assessments (survey_id, doc_sha256, engine, tier, level, "
               "gov_storey, gov_dir, gov_basis, provisional, json, computed_by, origin) "
               "SELECT survey_id, doc_sha256, 'bench-stale', tier, level, gov_storey, gov_dir, "
               "gov_basis, provisional, json, computed_by, origin FROM triage.assessments "
               "ORDER BY seq LIMIT 1", "area")
        live = statistics.median(run_cli(["--db", url, "summary"]) for _ in range(3)) * 1000
        return {"centre_summary_100k_ms": ms, "centre_geojson_100k_ms": geo,
                "centre_summary_100k_live_ms": live}


FIGURES = {"sync_ratio": sync_ratio, "centre_summary_100k_ms": centre_summary_100k_ms}


def main() -> None:
    """Print each figure."""
    timing.main(__doc__, FIGURES)


if __name__ == "__main__":
    main()
