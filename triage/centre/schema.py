"""The centre's schema on PostgreSQL: versioned migrations, the two roles, the views.

Everything lives in the schema `triage` of the database the URL names. `init` (run by the
centre's administrator, a role that may create schemas and roles):

1. takes an advisory lock, so two inits never interleave;
2. creates `triage.schema_version` and runs each migration this tool knows and the database
   lacks, each recorded in that table in the same transaction (re-running is harmless; a
   database of a newer version is refused, unchanged);
3. creates the roles `triage_field` and `triage_read` when missing (NOLOGIN: a login per
   laptop or coordinator is made `IN ROLE` one of them) and grants again what each may do;
4. rebuilds the map view: with PostGIS a `geometry(Point, 4326)` column, else lat/lon.

History is append-only by the grants: `triage_field` has INSERT on the data tables (not on the
columns the server fills: `seq`, `received_at`, `sent_by`) and SELECT only on the key columns
sync compares (ids, states, content hashes, engine versions); no UPDATE, DELETE or TRUNCATE for
anyone but the owner. `triage_read` has SELECT on the tables and views.

Tables: `versions` (one row per state of a survey a laptop sent: its JSON, list columns, the
sorted ids of the changes it holds), `changes`, `assessments` (per version's JSON and engine
version: the laptop's, then any `reassess`), `reports`, `photos` (blobs by SHA-256). Views:
`current_versions` (no other version of the same survey holds all its changes and more),
`survey_list` (what `list` shows, conflicts computed: two current versions of one survey with
different JSON are both kept, the first sent under the survey's id and the other under the id
`merge` gives it), `conflicts`, `buildings` (the latest visible survey of each building),
and the materialised `building_map` for GIS (indexed; refreshed by every sync and reassess).
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from .connect import CentreError, redact

if TYPE_CHECKING:
    import psycopg

FIELD_ROLE = "triage_field"
READ_ROLE = "triage_read"
LOCK_KEY = 0x7472696167650001   # advisory lock of `init` ("triage" and 1)

# Column of each data table: (name, SQL type and constraints, filled by the laptop).
TABLES: dict[str, list[tuple[str, str, bool]]] = {
    "versions": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("state", "text NOT NULL", True),           # sha256 of JSON, hidden flag, change ids
        ("doc_sha256", "text NOT NULL", True),
        ("alt_id", "text NOT NULL", True),          # the id kept under if it is a conflict
        ("changes", "text[] NOT NULL", True),       # sorted change ids this version holds
        ("revision", "integer NOT NULL", True),
        ("hidden", "boolean NOT NULL", True),
        ("building_id", "text NOT NULL", True),
        ("building", "text NOT NULL", True),
        ("address", "text NOT NULL", True),
        ("lat", "double precision", True),
        ("lon", "double precision", True),
        ("inspector", "text NOT NULL", True),
        ("at", "text NOT NULL", True),
        ("at_utc", "text NOT NULL", True),
        ("conflict_of", "text", True),              # as the laptop had it (from its merges)
        ("source", "text", True),
        ("created_at", "text NOT NULL", True),
        ("updated_at", "text NOT NULL", True),
        ("origin", "text NOT NULL", True),          # the laptop database's db_id
        ("doc", "text NOT NULL", True),             # canonical triage-survey JSON
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "changes": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("uid", "text NOT NULL", True),
        ("local_seq", "bigint NOT NULL", True),     # its order in the sending laptop's log
        ("revision", "integer NOT NULL", True),
        ("op", "text NOT NULL", True),
        ("path", "text NOT NULL", True),
        ("old", "text", True),
        ("new", "text", True),
        ("at", "text NOT NULL", True),
        ("who", "text NOT NULL", True),
        ("undoes", "text", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "assessments": [
        ("seq", "bigint GENERATED ALWAYS AS IDENTITY", False),
        ("survey_id", "text NOT NULL", True),
        ("doc_sha256", "text NOT NULL", True),
        ("engine", "text NOT NULL", True),          # engine version that computed it
        ("tier", "text", True),
        ("level", "text", True),
        ("gov_storey", "text", True),
        ("gov_dir", "text", True),
        ("gov_basis", "text", True),
        ("provisional", "boolean", True),
        ("json", "text NOT NULL", True),
        ("computed_by", "text NOT NULL", True),     # 'laptop' or 'centre'
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "reports": [
        ("survey_id", "text NOT NULL", True),
        ("revision", "integer NOT NULL", True),
        ("at", "text NOT NULL", True),
        ("path", "text", True),
        ("fingerprint", "text", True),
        ("who", "text NOT NULL", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
    "photos": [
        ("sha256", "text NOT NULL", True),
        ("data", "bytea NOT NULL", True),
        ("size", "bigint NOT NULL", True),
        ("origin", "text NOT NULL", True),
        ("received_at", "timestamptz NOT NULL DEFAULT now()", False),
        ("sent_by", "text NOT NULL DEFAULT current_user", False),
    ],
}

KEYS: dict[str, tuple[str, ...]] = {
    "versions": ("survey_id", "state"),
    "changes": ("survey_id", "uid"),
    "assessments": ("survey_id", "doc_sha256", "engine"),
    "reports": ("survey_id", "revision", "at"),
    "photos": ("sha256",),
}

# What the field role may read: the keys sync compares, nothing of the surveys themselves.
FIELD_SELECT = KEYS

SENT = {t: [c for c, _, laptop in cols if laptop] for t, cols in TABLES.items()}


def _create_tables() -> str:
    out = []
    for table, cols in TABLES.items():
        body = ",\n  ".join(f"{name} {typ}" for name, typ, _ in cols)
        out.append(f"CREATE TABLE triage.{table} (\n  {body},\n"
                   f"  PRIMARY KEY ({', '.join(KEYS[table])})\n)")
    return ";\n".join(out) + ";\n"


SCHEMA_V1 = _create_tables() + """
ALTER TABLE triage.versions ADD CHECK (state ~ '^[0-9a-f]{64}$' AND doc_sha256 ~ '^[0-9a-f]{64}$');
ALTER TABLE triage.changes ADD CHECK (op IN ('import', 'create', 'set', 'add', 'remove', 'undo',
                                             'hide', 'unhide'));
ALTER TABLE triage.assessments ADD CHECK (computed_by IN ('laptop', 'centre'));
ALTER TABLE triage.photos ADD CHECK (sha256 = encode(sha256(data), 'hex') AND size = length(data));
CREATE INDEX versions_building ON triage.versions (building_id);
CREATE INDEX versions_changes ON triage.versions USING gin (changes);

-- A version is current when no other version of the same survey holds all its changes and
-- more (equal sets: the first sent stands).
CREATE VIEW triage.current_versions AS
SELECT v.* FROM triage.versions v
WHERE NOT EXISTS (
  SELECT 1 FROM triage.versions w
  WHERE w.survey_id = v.survey_id AND w.seq <> v.seq AND w.changes @> v.changes
    AND (NOT v.changes @> w.changes OR w.seq < v.seq));

-- The surveys as `list` shows them. Current versions of one survey with the same JSON are one
-- (the first sent); with different JSON, all are kept: the one whose history starts earliest
-- (then the first sent) under the survey's id, each other under its alt_id, linked by
-- conflict_of, as `triage merge` keeps them. `conflict` as in the local store: the survey it
-- is a copy of is visible, or a visible copy names it.
CREATE VIEW triage.survey_list AS
WITH firsts AS (
  SELECT DISTINCT ON (survey_id, doc_sha256) *
  FROM triage.current_versions ORDER BY survey_id, doc_sha256, seq
), counted AS (
  SELECT f.*, count(*) OVER (PARTITION BY f.survey_id) AS n FROM firsts f
), ranked AS (
  SELECT c.*, row_number() OVER (PARTITION BY c.survey_id ORDER BY
      CASE WHEN c.n > 1 THEN (SELECT min(w.seq) FROM triage.versions w
                              WHERE w.survey_id = c.survey_id AND c.changes @> w.changes)
           ELSE c.seq END, c.seq) AS rank
  FROM counted c
), heads AS (
  SELECT CASE WHEN r.rank = 1 THEN r.survey_id ELSE r.alt_id END AS id,
         r.survey_id AS first_id, r.rank,
         CASE WHEN r.rank = 1 THEN r.conflict_of ELSE r.survey_id END AS conflict_of,
         r.seq, r.state, r.doc_sha256, r.revision, r.hidden, r.building_id, r.building,
         r.address, r.lat, r.lon, r.inspector, r.at, r.at_utc, r.source, r.origin,
         r.created_at, r.updated_at
  FROM ranked r
), latest_assessment AS (
  SELECT DISTINCT ON (survey_id, doc_sha256) survey_id, doc_sha256, tier, level, gov_storey,
         gov_dir, gov_basis, provisional, engine, seq
  FROM triage.assessments ORDER BY survey_id, doc_sha256, seq DESC
), visible AS (
  SELECT id, conflict_of FROM heads WHERE NOT hidden
)
SELECT h.*,
       a.tier, a.level, a.gov_storey, a.gov_dir, a.gov_basis, a.provisional, a.engine,
       CASE WHEN a.survey_id IS NULL THEN NULL ELSE h.revision END AS assessed_revision,
       coalesce(h.conflict_of IN (SELECT id FROM visible), false) AS conflict_up,
       (coalesce(h.conflict_of IN (SELECT id FROM visible), false)
        OR h.id IN (SELECT conflict_of FROM visible WHERE conflict_of IS NOT NULL)) AS conflict,
       CASE WHEN h.rank = 1 THEN (SELECT max(r.revision) FROM triage.reports r
                                  WHERE r.survey_id = h.id) END AS reported_revision
FROM heads h
LEFT JOIN latest_assessment a ON a.survey_id = h.first_id AND a.doc_sha256 = h.doc_sha256;

-- Every survey kept twice (or more), with the one it is a copy of.
CREATE VIEW triage.conflicts AS
SELECT id, conflict_of, building_id, building, address, inspector, at, origin, hidden
FROM triage.survey_list WHERE conflict;

-- Each building's latest visible survey, as `triage summary` shows it.
CREATE VIEW triage.buildings AS
WITH v AS (SELECT * FROM triage.survey_list WHERE NOT hidden)
SELECT DISTINCT ON (building_id)
       building_id, building, address, lat, lon, at AS inspected_at, inspector, tier, level,
       gov_storey, provisional, id AS survey_id,
       count(*) OVER (PARTITION BY building_id) AS surveys,
       bool_or(conflict_up) OVER (PARTITION BY building_id) AS conflict
FROM v
ORDER BY building_id, at_utc DESC, (conflict_of IS NULL) DESC, id;
"""


# Version 2: the views again. `buildings` picks each building's latest survey in byte order
# of the text (COLLATE "C", as the local store does, whatever the database's collation);
# current versions of one survey with the same JSON take the hidden flag of the one sent last
# (a hide or an undo made on a laptop after another laptop reached the same text).
VIEWS_V2 = """
DROP VIEW triage.buildings CASCADE;
DROP VIEW triage.conflicts;
DROP VIEW triage.survey_list;
CREATE VIEW triage.survey_list AS
WITH cur AS (
  SELECT v.*, last_value(v.hidden) OVER (PARTITION BY v.survey_id, v.doc_sha256 ORDER BY v.seq
         ROWS BETWEEN UNBOUNDED PRECEDING AND UNBOUNDED FOLLOWING) AS hidden_last
  FROM triage.current_versions v
), firsts AS (
  SELECT DISTINCT ON (survey_id, doc_sha256) *
  FROM cur ORDER BY survey_id, doc_sha256, seq
), counted AS (
  SELECT f.*, count(*) OVER (PARTITION BY f.survey_id) AS n FROM firsts f
), ranked AS (
  SELECT c.*, row_number() OVER (PARTITION BY c.survey_id ORDER BY
      CASE WHEN c.n > 1 THEN (SELECT min(w.seq) FROM triage.versions w
                              WHERE w.survey_id = c.survey_id AND c.changes @> w.changes)
           ELSE c.seq END, c.seq) AS rank
  FROM counted c
), heads AS (
  SELECT CASE WHEN r.rank = 1 THEN r.survey_id ELSE r.alt_id END AS id,
         r.survey_id AS first_id, r.rank,
         CASE WHEN r.rank = 1 THEN r.conflict_of ELSE r.survey_id END AS conflict_of,
         r.seq, r.state, r.doc_sha256, r.revision, r.hidden_last AS hidden, r.building_id,
         r.building, r.address, r.lat, r.lon, r.inspector, r.at, r.at_utc, r.source, r.origin,
         r.created_at, r.updated_at
  FROM ranked r
), latest_assessment AS (
  SELECT DISTINCT ON (survey_id, doc_sha256) survey_id, doc_sha256, tier, level, gov_storey,
         gov_dir, gov_basis, provisional, engine, seq
  FROM triage.assessments ORDER BY survey_id, doc_sha256, seq DESC
), visible AS (
  SELECT id, conflict_of FROM heads WHERE NOT hidden
)
SELECT h.*,
       a.tier, a.level, a.gov_storey, a.gov_dir, a.gov_basis, a.provisional, a.engine,
       CASE WHEN a.survey_id IS NULL THEN NULL ELSE h.revision END AS assessed_revision,
       coalesce(h.conflict_of IN (SELECT id FROM visible), false) AS conflict_up,
       (coalesce(h.conflict_of IN (SELECT id FROM visible), false)
        OR h.id IN (SELECT conflict_of FROM visible WHERE conflict_of IS NOT NULL)) AS conflict,
       CASE WHEN h.rank = 1 THEN (SELECT max(r.revision) FROM triage.reports r
                                  WHERE r.survey_id = h.id) END AS reported_revision
FROM heads h
LEFT JOIN latest_assessment a ON a.survey_id = h.first_id AND a.doc_sha256 = h.doc_sha256;

CREATE VIEW triage.conflicts AS
SELECT id, conflict_of, building_id, building, address, inspector, at, origin, hidden
FROM triage.survey_list WHERE conflict;

CREATE VIEW triage.buildings AS
WITH v AS (SELECT * FROM triage.survey_list WHERE NOT hidden)
SELECT DISTINCT ON (building_id)
       building_id, building, address, lat, lon, at AS inspected_at, inspector, tier, level,
       gov_storey, provisional, id AS survey_id,
       count(*) OVER (PARTITION BY building_id) AS surveys,
       bool_or(conflict_up) OVER (PARTITION BY building_id) AS conflict
FROM v
ORDER BY building_id, at_utc COLLATE "C" DESC, (conflict_of IS NULL) DESC, id COLLATE "C";
"""


# Version 3: a snapshot of `buildings` for `summary` of a large area. The view computes every
# survey's conflicts and current version, seconds for 100,000 buildings; the snapshot is
# refreshed with the map layer (every sync and reassess that changes something) and read only
# while `summary_state` (its marker, computed before the refresh in the same transaction)
# equals `summary_mark` (the live tables' counts and last sequence numbers). The data tables
# are append-only, so an equal marker means the snapshot holds every row the view would read;
# otherwise the reader falls back to the live view.
SUMMARY_V3 = """
CREATE INDEX versions_seq ON triage.versions (seq);
CREATE INDEX assessments_seq ON triage.assessments (seq);
CREATE VIEW triage.summary_mark AS
SELECT (SELECT coalesce(max(seq), 0) FROM triage.versions) AS versions_seq,
       (SELECT count(*) FROM triage.versions) AS versions_n,
       (SELECT coalesce(max(seq), 0) FROM triage.assessments) AS assessments_seq,
       (SELECT count(*) FROM triage.assessments) AS assessments_n;
CREATE TABLE triage.summary_state AS SELECT * FROM triage.summary_mark;
CREATE MATERIALIZED VIEW triage.building_summary AS SELECT * FROM triage.buildings;
CREATE UNIQUE INDEX building_summary_id ON triage.building_summary (building_id);
"""


@dataclass(frozen=True)
class Migration:
    """One step of the schema: SQL run in one transaction with its version row."""

    version: int
    what: str
    run: Callable[[psycopg.Connection], None]


def _v1(conn: psycopg.Connection) -> None:
    conn.execute(SCHEMA_V1)


def _v2(conn: psycopg.Connection) -> None:
    conn.execute(VIEWS_V2)


def _v3(conn: psycopg.Connection) -> None:
    conn.execute(SUMMARY_V3)


MIGRATIONS: list[Migration] = [
    Migration(1, "tables, current versions, conflicts, buildings", _v1),
    Migration(2, "views: byte order of text, hidden flag of the same text sent last", _v2),
    Migration(3, "building_summary: a snapshot of buildings, refreshed with the map", _v3),
]


def current_version() -> int:
    """The schema version this tool writes."""
    return MIGRATIONS[-1].version


@dataclass
class InitResult:
    """What `init` did."""

    applied: list[int]
    roles_created: list[str]
    postgis: bool
    postgis_note: str | None


_ROLES = f"""
DO $$ BEGIN
  IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = '{FIELD_ROLE}') THEN
    CREATE ROLE {FIELD_ROLE} NOLOGIN;
  END IF;
  IF NOT EXISTS (SELECT 1 FROM pg_roles WHERE rolname = '{READ_ROLE}') THEN
    CREATE ROLE {READ_ROLE} NOLOGIN;
  END IF;
END $$;
"""


def _grants() -> list[str]:
    out = ["REVOKE ALL ON SCHEMA triage FROM PUBLIC",
           f"GRANT USAGE ON SCHEMA triage TO {FIELD_ROLE}, {READ_ROLE}",
           f"REVOKE ALL ON ALL TABLES IN SCHEMA triage FROM PUBLIC, {FIELD_ROLE}, {READ_ROLE}",
           f"GRANT SELECT ON ALL TABLES IN SCHEMA triage TO {READ_ROLE}",
           f"GRANT SELECT (version) ON triage.schema_version TO {FIELD_ROLE}",
           "REVOKE ALL ON FUNCTION triage.refresh_map() FROM PUBLIC",
           f"GRANT EXECUTE ON FUNCTION triage.refresh_map() TO {FIELD_ROLE}, {READ_ROLE}"]
    for table, cols in SENT.items():
        out.append(f"GRANT INSERT ({', '.join(cols)}) ON triage.{table} TO {FIELD_ROLE}")
        out.append(f"GRANT SELECT ({', '.join(FIELD_SELECT[table])}) ON triage.{table} "
                   f"TO {FIELD_ROLE}")
    return out


def _postgis(conn: psycopg.Connection) -> tuple[str | None, str | None]:
    """The schema PostGIS lives in (enabled here if the server has it), and a note if not."""
    import psycopg

    row = conn.execute("SELECT extnamespace::regnamespace::text FROM pg_extension "
                       "WHERE extname = 'postgis'").fetchone()
    if row:
        return str(row[0]), None
    if not conn.execute("SELECT 1 FROM pg_available_extensions "
                        "WHERE name = 'postgis'").fetchone():
        return None, "PostGIS is not installed on this server: the map view has lat/lon columns"
    try:
        with conn.transaction():
            conn.execute("CREATE EXTENSION IF NOT EXISTS postgis")
    except psycopg.Error as err:
        return None, (f"PostGIS is installed but could not be enabled by this role "
                      f"({' '.join(str(err).split())}); the map view has lat/lon columns; "
                      "a superuser can run CREATE EXTENSION postgis in this database, then "
                      "run init again")
    row = conn.execute("SELECT extnamespace::regnamespace::text FROM pg_extension "
                       "WHERE extname = 'postgis'").fetchone()
    return (str(row[0]) if row else None), None


def _map_sql(gis: str | None, summary: bool = True) -> str:
    """The materialised map layer: one row per building, its latest survey, a point.

    With the snapshot (`summary`, version 3 on), `refresh_map` refreshes it first and the map
    is read from it, so a sync runs the buildings view once.
    """
    geom = (f", {gis}.ST_SetSRID({gis}.ST_MakePoint(lon, lat), 4326)"
            f"::{gis}.geometry(Point, 4326) AS geom" if gis else "")
    index = ("CREATE INDEX building_map_geom ON triage.building_map USING gist (geom);"
             if gis else "CREATE INDEX building_map_lonlat ON triage.building_map (lon, lat);")
    return f"""
DROP MATERIALIZED VIEW IF EXISTS triage.building_map;
CREATE MATERIALIZED VIEW triage.building_map AS
SELECT building_id, survey_id, building, address, tier, level AS performance_level,
       provisional, conflict, inspected_at, inspector, lat, lon{geom}
FROM triage.{"building_summary" if summary else "buildings"}
WHERE lat IS NOT NULL AND lon IS NOT NULL;
CREATE UNIQUE INDEX building_map_id ON triage.building_map (building_id);
{index}
CREATE OR REPLACE FUNCTION triage.refresh_map() RETURNS void
LANGUAGE plpgsql SECURITY DEFINER SET search_path = pg_catalog, triage SET jit = off
SET work_mem = '64MB' AS $f$
BEGIN
  PERFORM pg_advisory_xact_lock({LOCK_KEY + 1});{_REFRESH_SUMMARY if summary else ""}
  REFRESH MATERIALIZED VIEW CONCURRENTLY triage.building_map;
END $f$;
"""


# The marker first: rows committed between it and the refresh make the snapshot look stale
# (read live), never fresh while missing rows.
_REFRESH_SUMMARY = """
  DELETE FROM triage.summary_state;
  INSERT INTO triage.summary_state SELECT * FROM triage.summary_mark;
  REFRESH MATERIALIZED VIEW CONCURRENTLY triage.building_summary;"""


def init(url: str) -> InitResult:
    """Create or upgrade the schema, the roles and their grants, and the map view."""
    import psycopg

    from .connect import connect, first_line

    conn = connect(url)
    try:
        created: list[str] = []
        applied: list[int] = []
        with conn.transaction():
            conn.execute("SELECT pg_advisory_xact_lock(%s)", (LOCK_KEY,))
            conn.execute("CREATE SCHEMA IF NOT EXISTS triage")
            conn.execute("CREATE TABLE IF NOT EXISTS triage.schema_version (version integer "
                         "PRIMARY KEY, what text NOT NULL, applied_at timestamptz NOT NULL "
                         "DEFAULT now(), applied_by text NOT NULL DEFAULT current_user)")
            have = conn.execute("SELECT coalesce(max(version), 0) FROM "
                                "triage.schema_version").fetchone()
            version = int(have[0]) if have else 0
            if version > current_version():
                raise CentreError(f"{redact(url)}: its schema is version {version}, newer than "
                                  f"this triage knows ({current_version()}); it was left as "
                                  "it is; update triage")
            for m in MIGRATIONS:
                if m.version > version:
                    m.run(conn)
                    conn.execute("INSERT INTO triage.schema_version (version, what) "
                                 "VALUES (%s, %s)", (m.version, m.what))
                    applied.append(m.version)
            for role in (FIELD_ROLE, READ_ROLE):
                if not conn.execute("SELECT 1 FROM pg_roles WHERE rolname = %s",
                                    (role,)).fetchone():
                    created.append(role)
            conn.execute(_ROLES)
            gis, note = _postgis(conn)
            summary = conn.execute("SELECT to_regclass('triage.building_summary')").fetchone()
            conn.execute(_map_sql(gis, bool(summary and summary[0])))
            for g in _grants():
                conn.execute(g)
        return InitResult(applied, created, gis is not None, note)
    except psycopg.Error as err:
        raise CentreError(f"{redact(url)}: init refused ({first_line(err, url)}); the "
                          "schema was left as it was (init runs in one transaction)") from None
    finally:
        conn.close()


def check_schema(conn: psycopg.Connection, url: str) -> int:
    """The schema's version; a `CentreError` when missing, newer, or not readable by this role."""
    import psycopg

    from .connect import first_line

    try:
        with conn.transaction():
            row = conn.execute("SELECT max(version) FROM triage.schema_version").fetchone()
    except psycopg.errors.UndefinedTable:
        raise CentreError(f"{redact(url)}: no triage schema in this database; run "
                          "'triage centre init URL' there first (as its administrator)") from None
    except psycopg.errors.InsufficientPrivilege:
        raise CentreError(f"{redact(url)}: this login may not use the triage schema; grant it "
                          f"{FIELD_ROLE} (laptops) or {READ_ROLE} (coordinators)") from None
    except psycopg.Error as err:
        raise CentreError(f"{redact(url)}: {first_line(err, url)}") from None
    version = int(row[0]) if row and row[0] is not None else 0
    if version == 0:
        raise CentreError(f"{redact(url)}: the triage schema is empty; run 'triage centre "
                          "init URL' there")
    if version > current_version():
        raise CentreError(f"{redact(url)}: its schema is version {version}, newer than this "
                          f"triage knows ({current_version()}); update triage")
    if version < current_version():
        raise CentreError(f"{redact(url)}: its schema is version {version}; this triage needs "
                          f"{current_version()}: run 'triage centre init URL' there to upgrade")
    return version
