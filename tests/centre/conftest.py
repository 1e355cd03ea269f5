"""A real throwaway PostgreSQL cluster for the centre tests (no mock), and laptops to sync.

The cluster is started once per session (initdb in a temporary folder, 127.0.0.1 on a free
port; as root the server runs as the `postgres` system user) and stopped after. Each test gets
its own database, initialised by `triage centre init`. Logins: `admin` (the cluster's
superuser), `field1`..`field10` in triage_field, `reader` in triage_read, each with a password
of its own (PASSWORD below, different per login).
"""

from __future__ import annotations

import atexit
import itertools
import os
import shutil
import subprocess
import sys
import tempfile
from collections.abc import Iterator
from dataclasses import dataclass
from pathlib import Path
from typing import Any

import pytest

from bench.centre_bench import demo_laptop
from tests.helpers import cli  # noqa: F401  (the fixture: the command in this process)
from triage.centre.cluster import Cluster, find_bindir
from triage.resources import samples_dir
from triage.store import Store

ROOT = Path(__file__).resolve().parents[2]
SECRET = "Sw0rdf1sh-kowhai-7731"   # a distinctive part of every test password


def password(login: str) -> str:
    return f"{SECRET}-{login}"


@pytest.fixture(scope="session")
def pg() -> Iterator[Cluster]:
    if find_bindir() is None:   # CI installs PostgreSQL (.ci/run); never skipped silently
        pytest.fail("PostgreSQL server binaries (initdb) not found: install postgresql "
                    "(.ci/run does)", pytrace=False)
    # fsync off: these tests kill clients, never the server, and need no durability.
    logins = {f"field{i}": (password(f"field{i}"), "triage_field") for i in range(1, 11)}
    logins["reader"] = (password("reader"), "triage_read")
    with Cluster.start_centre({"fsync": "off", "synchronous_commit": "off",
                               "full_page_writes": "off"}, logins) as cluster:
        cluster.sql(f"CREATE ROLE owner LOGIN CREATEROLE PASSWORD '{password('owner')}'")
        yield cluster


_names = itertools.count(1)


@dataclass
class Centre:
    """One initialised database of the session's cluster."""

    pg: Cluster
    name: str

    @property
    def admin(self) -> str:
        return self.pg.url(self.name)

    def url(self, login: str) -> str:
        return self.pg.url(self.name, login, password(login))

    @property
    def field(self) -> str:
        return self.url("field1")

    @property
    def reader(self) -> str:
        return self.url("reader")

    def sql(self, statement: str) -> str:
        return self.pg.sql(statement, self.name)

    def rows(self, statement: str) -> list[tuple[Any, ...]]:
        import psycopg

        with psycopg.connect(self.admin) as c:
            return [tuple(r) for r in c.execute(statement)]  # type: ignore[arg-type]

    def check_maintained(self) -> int:
        """The tables the triggers keep equal what version 2's views compute from scratch.

        The version 2 views are made again in a schema `ref` of this database (their SQL as
        it shipped) and compared row for row with `survey_list` and `buildings`, which read
        `survey_heads` and `building_latest`. Returns the number of buildings.
        """
        from triage.centre.migrations import VIEWS_V2

        views = VIEWS_V2[VIEWS_V2.index("CREATE VIEW"):].replace("triage.survey_list",
                                                                  "ref.survey_list")
        views = views.replace("CREATE VIEW triage.", "CREATE VIEW ref.")
        self.sql(f"DROP SCHEMA IF EXISTS ref CASCADE; CREATE SCHEMA ref; {views}")
        for view, key in (("survey_list", "id, first_id, state"), ("buildings", "building_id")):
            cols = ", ".join(r[0] for r in self.rows(
                "SELECT column_name FROM information_schema.columns WHERE table_schema = 'ref' "
                f"AND table_name = '{view}' ORDER BY ordinal_position"))
            got = self.rows(f"SELECT {cols} FROM triage.{view} ORDER BY {key}")
            want = self.rows(f"SELECT {cols} FROM ref.{view} ORDER BY {key}")
            assert got == want, view
        self.sql("DROP SCHEMA ref CASCADE")
        # The counts kept with the rows (schema 5) are the rows' counts; nothing left pending.
        counted = ("SELECT tier, count(*), count(*) FILTER (WHERE conflict), count(*) FILTER "
                   "(WHERE long_key), count(*) FILTER (WHERE line IS NULL) FROM "
                   "triage.building_latest GROUP BY tier ORDER BY tier")
        assert self.rows("SELECT * FROM triage.building_tally ORDER BY tier") == \
            self.rows(counted)
        assert self.rows("SELECT (SELECT count(*) FROM triage.heads_pending) + "
                         "(SELECT count(*) FROM triage.heads_due)") == [(0,)]
        return len(want)


@pytest.fixture
def centre(pg: Cluster) -> Centre:
    """A database as `triage centre init` leaves it (a copy of one made so, for speed)."""
    name = f"c{next(_names)}"
    pg.centre_db(name)
    return Centre(pg, name)


def samples() -> list[str]:
    """The demo surveys' texts."""
    return [p.read_text(encoding="utf-8") for p in sorted(samples_dir().glob("*.json"))]


_made: dict[tuple[int, str, str], tuple[Path, list[str]]] = {}
_KEEP = Path(tempfile.mkdtemp(prefix="triage-laptops-"))
atexit.register(shutil.rmtree, _KEEP, True)


def laptop(path: Path, n: int = 8, seed: str = "", who: str = "Tess Tester") -> list[str]:
    """`demo_laptop`, copied from the first one made alike in this session (same db_id)."""
    key = (n, seed, who)
    if key in _made and _made[key][0].exists():
        shutil.copyfile(_made[key][0], path)
        return list(_made[key][1])
    ids = demo_laptop(path, n, seed, who)
    keep = _KEEP / f"{len(_made)}.db"
    shutil.copyfile(path, keep)
    _made[key] = (keep, ids)
    return ids


def synced(centre: Centre, tmp_path: Path, n: int = 8) -> None:
    """A laptop of `n` demo-size surveys (`lap.db` in `tmp_path`) synced into the centre."""
    from triage.centre.sync import sync

    laptop(tmp_path / "lap.db", n)
    with Store.open(tmp_path / "lap.db") as st:
        assert sync(st, centre.field).versions == n


def triage(*argv: str, env: dict[str, str] | None = None,
           timeout: float = 120) -> subprocess.CompletedProcess[str]:
    """The `triage` command in a process of its own."""
    return subprocess.run([sys.executable, "-m", "triage", *argv], capture_output=True,
                          text=True, cwd=ROOT, timeout=timeout,
                          env={**os.environ, **(env or {})}, check=False)
