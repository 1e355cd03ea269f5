"""The centre's schema on PostgreSQL: versioned migrations, the two roles, the views.

Everything lives in the schema `triage` of the database the URL names. `init` (run by the
centre's administrator, a role that may create schemas and roles):

1. takes an advisory lock, so two inits never interleave;
2. creates `triage.schema_version` and runs each migration this tool knows and the database
   lacks, each recorded in that table in the same transaction (re-running is harmless; a
   database of a newer version is refused, unchanged);
3. creates the roles `triage_field` and `triage_read` when missing (NOLOGIN: a login per
   laptop or coordinator is made `IN ROLE` one of them) and grants again what each may do;
4. makes the summary's cells function of this triage (rewriting the rows' cells when it
   changed: `summary_sql`) and the map view: with PostGIS a `geometry(Point, 4326)` column,
   else lat/lon.

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
and `building_map` for GIS (spatially indexed). The list and the buildings are tables kept
current by triggers (`survey_heads`, `building_latest`; see `heads` and `schema_v5`), the
views read them; the migrations are in `migrations`, the data tables' columns in `tables`.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import TYPE_CHECKING

from .connect import CentreError, redact
from .migrations import MIGRATIONS, Migration
from .summary_sql import relayout_sql
from .tables import FIELD_SELECT, KEYS, SENT, TABLES

if TYPE_CHECKING:
    import psycopg

FIELD_ROLE = "triage_field"
READ_ROLE = "triage_read"
LOCK_KEY = 0x7472696167650001   # advisory lock of `init` ("triage" and 1)

__all__ = ["FIELD_ROLE", "FIELD_SELECT", "KEYS", "MIGRATIONS", "READ_ROLE", "SENT", "TABLES",
           "InitResult", "Migration", "check_schema", "current_version", "init"]


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
           # The triggers' functions run as the owner; nobody calls them, nor heads_of.
           "REVOKE ALL ON ALL FUNCTIONS IN SCHEMA triage FROM PUBLIC"]
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


def _map_sql(gis: str | None) -> str:
    """The map layer: a view of `building_latest`, one row per located building, a point.

    The spatial index is on `building_latest` (the point as an expression), which triggers
    keep current row by row; the view's `geom` is the same expression, so a box query on the
    view uses it.
    """
    located = "WHERE lat IS NOT NULL AND lon IS NOT NULL"
    point = (f"{gis}.ST_SetSRID({gis}.ST_MakePoint(lon, lat), 4326)"
             f"::{gis}.geometry(Point, 4326)" if gis else "")
    if gis:
        index = (f"DROP INDEX IF EXISTS triage.building_map_lonlat;\n"
                 f"CREATE INDEX IF NOT EXISTS building_map_geom ON triage.building_latest "
                 f"USING gist (({point})) {located};")
    else:
        index = ("DROP INDEX IF EXISTS triage.building_map_geom;\n"
                 f"CREATE INDEX IF NOT EXISTS building_map_lonlat ON triage.building_latest "
                 f"(lon, lat) {located};")
    geom = f", {point} AS geom" if gis else ""
    return f"""
DROP VIEW IF EXISTS triage.building_map;
{index}
CREATE VIEW triage.building_map AS
SELECT building_id, survey_id, building, address, tier, level AS performance_level,
       provisional, conflict, inspected_at, inspector, lat, lon{geom}
FROM triage.building_latest
{located};
"""


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
            conn.execute(_map_sql(gis))
            if conn.execute("SELECT to_regclass('triage.text_layout')").fetchone() != (None,):
                conn.execute(relayout_sql())
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
