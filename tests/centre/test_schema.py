"""`triage centre init`: versioned schema, two roles, append-only by the grants, the map view."""

from __future__ import annotations

import psycopg
import pytest

from tests.centre.conftest import Centre, laptop, password, synced
from triage.centre.schema import KEYS, SENT, TABLES, current_version
from triage.centre.sync import sync
from triage.store import Store

DATA_TABLES = list(TABLES)


def test_init_again_is_harmless_and_says_so(centre, cli, tmp_path):
    synced(centre, tmp_path)
    before = centre.rows("SELECT count(*) FROM triage.versions")
    code, _, err = cli("centre", "init", centre.admin)
    assert code == 0, err
    assert "schema already current" in err and "roles triage_field and triage_read present" in err
    assert centre.rows("SELECT max(version), count(*) FROM triage.schema_version") == [
        (current_version(), current_version())]
    assert centre.rows("SELECT count(*) FROM triage.versions") == before == [(8,)]


def test_a_fresh_database_gets_the_schema_and_a_newer_one_is_refused(pg, cli):
    pg.createdb("fresh")
    code, out, err = cli("centre", "init", pg.url("fresh"))
    assert code == 0, err
    assert f"schema upgraded to version {current_version()}" in err
    assert pg.sql("SELECT count(*) FROM triage.schema_version", "fresh") == str(current_version())
    pg.sql("INSERT INTO triage.schema_version (version, what) VALUES (99, 'future')", "fresh")
    code, out, err = cli("centre", "init", pg.url("fresh"))
    assert code == 1 and out == ""
    assert "newer than this triage knows" in err and len(err.splitlines()) == 1


def _refused(url: str, statement: str) -> str:
    with (psycopg.connect(url, autocommit=True) as c,
          pytest.raises(psycopg.errors.InsufficientPrivilege) as got):
        c.execute(statement)  # type: ignore[arg-type]
    return str(got.value)


def test_the_field_role_can_neither_update_delete_nor_truncate(centre, tmp_path):
    synced(centre, tmp_path)
    for table in [*DATA_TABLES, "schema_version", "survey_heads", "building_latest"]:
        col = {"schema_version": "version", "survey_heads": "tier",
               "building_latest": "tier"}.get(table) or SENT[table][-1]
        for statement in (f"UPDATE triage.{table} SET {col} = {col}",
                          f"DELETE FROM triage.{table}",
                          f"TRUNCATE triage.{table}"):
            assert "permission denied" in _refused(centre.field, statement), statement
    for table in DATA_TABLES:
        # Only the key columns are readable; never the survey or the blob itself.
        keys = ", ".join(KEYS[table])
        with psycopg.connect(centre.field) as c:
            c.execute(f"SELECT {keys} FROM triage.{table}")  # type: ignore[arg-type]
        for other in (c for c in SENT[table] if c not in KEYS[table]):
            assert "permission denied" in _refused(
                centre.field, f"SELECT {other} FROM triage.{table}")
    for view in ("survey_list", "buildings", "conflicts", "current_versions", "building_map",
                 "survey_heads", "building_latest"):
        assert "permission denied" in _refused(centre.field, f"SELECT * FROM triage.{view}")
    # Nothing changed by any of it.
    assert centre.rows("SELECT count(*) FROM triage.versions") == [(8,)]


def test_the_field_role_cannot_forge_what_the_server_records(centre):
    statement = ("INSERT INTO triage.reports (survey_id, revision, at, who, origin, sent_by) "
                 "VALUES ('x', 1, 'now', 'me', 'o', 'someone else')")
    assert "permission denied" in _refused(centre.field, statement)


def test_the_read_role_cannot_insert(centre, tmp_path):
    synced(centre, tmp_path)
    for table in DATA_TABLES:
        cols = SENT[table]
        assert "permission denied" in _refused(
            centre.reader, f"INSERT INTO triage.{table} ({', '.join(cols)}) SELECT "
            f"{', '.join(cols)} FROM triage.{table} LIMIT 1")
        col = cols[-1]
        for statement in (f"UPDATE triage.{table} SET {col} = {col}",
                          f"DELETE FROM triage.{table}", f"TRUNCATE triage.{table}"):
            assert "permission denied" in _refused(centre.reader, statement)
        with psycopg.connect(centre.reader) as c:
            n = c.execute(f"SELECT count(*) FROM triage.{table}").fetchone()  # type: ignore
            # what the synced areas hold: no report and no photo was made in them
            assert n is not None and (n[0] == 0) == (table in ("reports", "photos")), (table, n)
    with psycopg.connect(centre.reader) as c:
        assert c.execute("SELECT count(*) FROM triage.survey_list").fetchone() == (8,)
    assert centre.rows("SELECT count(*) FROM triage.versions") == [(8,)]


def test_a_login_in_no_role_is_told_in_one_line(centre, pg, tmp_path, cli):
    pg.sql(f"CREATE ROLE stranger LOGIN PASSWORD '{password('stranger')}'")
    laptop(tmp_path / "lap.db", 2)
    code, out, err = cli("--db", str(tmp_path / "lap.db"), "sync", "--to",
                         centre.url("stranger"))
    assert code == 1 and out == ""
    assert "may not use the triage schema" in err and len(err.splitlines()) == 1


def test_the_map_view_is_a_postgis_layer_with_a_spatial_index(centre, tmp_path):
    synced(centre, tmp_path)
    cols = dict(centre.rows("SELECT attname, format_type(atttypid, atttypmod) FROM "
                            "pg_attribute WHERE attrelid = 'triage.building_map'::regclass "
                            "AND attnum > 0"))
    assert cols["geom"] == "geometry(Point,4326)"
    for c in ("tier", "performance_level", "provisional", "conflict", "inspected_at",
              "inspector"):
        assert c in cols
    # A view of the table the triggers keep, its point indexed there: nothing to refresh.
    assert centre.rows("SELECT relkind FROM pg_class WHERE oid = "
                       "'triage.building_map'::regclass") == [("v",)]
    idx = centre.rows("SELECT indexname, indexdef FROM pg_indexes WHERE tablename = "
                      "'building_latest'")
    assert any(n == "building_map_geom" and "USING gist" in d for n, d in idx)
    # A GIS finds it as a layer, and a box query uses the index.
    assert centre.rows("SELECT type, srid FROM geometry_columns WHERE f_table_schema = "
                       "'triage' AND f_table_name = 'building_map'") == [("POINT", 4326)]
    rows = centre.rows("SELECT building, ST_X(geom), ST_Y(geom), lon, lat "
                       "FROM triage.building_map")
    assert len(rows) == 7   # eight surveys, two of them of one building (Mariner Court)
    assert all(abs(x - lon) < 1e-9 and abs(y - lat) < 1e-9 for _, x, y, lon, lat in rows)
    with psycopg.connect(centre.reader) as c:
        c.execute("SET enable_seqscan = off")
        plan = c.execute("EXPLAIN SELECT building FROM triage.building_map WHERE geom && "
                         "ST_MakeEnvelope(174.1, -41.3, 174.2, -41.2, 4326)").fetchall()
    assert any("building_map_geom" in r[0] for r in plan)


def test_without_postgis_the_map_view_has_lat_lon(pg, tmp_path, cli):
    # The database's owner may not create extensions: PostGIS stays off, init says why.
    pg.sql("CREATE DATABASE plain OWNER owner")
    code, out, err = cli("centre", "init", pg.url("plain", "owner", password("owner")))
    assert code == 0, err
    assert "with lat/lon" in err and "PostGIS" in err and password("owner") not in out + err
    cols = {r for r in pg.sql("SELECT attname FROM pg_attribute WHERE attrelid = "
                              "'triage.building_map'::regclass AND attnum > 0",
                              "plain").split()}
    assert {"lat", "lon", "tier", "conflict"} <= cols and "geom" not in cols
    assert pg.sql("SELECT count(*) FROM pg_extension WHERE extname = 'postgis'", "plain") == "0"
    laptop(tmp_path / "lap.db", 8)
    with Store.open(tmp_path / "lap.db") as st:
        sync(st, pg.url("plain", "field2", password("field2")))
    assert pg.sql("SELECT count(*) FROM triage.building_map", "plain") == "7"


def _old_map(gis: str | None) -> str:
    """The map as an init of versions 1 to 4 made it: a materialised view of `buildings`."""
    return """
DROP MATERIALIZED VIEW IF EXISTS triage.building_map;
CREATE MATERIALIZED VIEW triage.building_map AS
SELECT building_id, survey_id, building, address, tier, level AS performance_level,
       provisional, conflict, inspected_at, inspector, lat, lon
FROM triage.buildings WHERE lat IS NOT NULL AND lon IS NOT NULL;
CREATE UNIQUE INDEX building_map_id ON triage.building_map (building_id);
CREATE OR REPLACE FUNCTION triage.refresh_map() RETURNS void LANGUAGE sql SECURITY DEFINER
AS 'REFRESH MATERIALIZED VIEW CONCURRENTLY triage.building_map';
"""


def test_an_older_schema_is_upgraded_in_place_keeping_every_row(pg, tmp_path, cli, monkeypatch):
    from triage.centre import schema

    pg.createdb("older")
    url = pg.url("older")
    first = schema.MIGRATIONS[:1]
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", first)
        m.setattr(schema, "_map_sql", _old_map)
        schema.init(url)
        laptop(tmp_path / "lap.db", 8)
        with Store.open(tmp_path / "lap.db") as st:
            assert sync(st, pg.url("older", "field3", password("field3"))).versions == 8
    # This triage refuses to use it until it is upgraded, then upgrades it, rows kept.
    code, _, err = cli("--db", str(tmp_path / "lap.db"), "sync", "--to",
                       pg.url("older", "field3", password("field3")))
    assert code == 1 and "run 'triage centre init URL' there to upgrade" in err
    code, _, err = cli("centre", "init", url)
    assert code == 0 and f"schema upgraded to version {current_version()}" in err, err
    assert pg.sql("SELECT count(*) FROM triage.versions", "older") == "8"
    assert pg.sql("SELECT count(*) FROM triage.building_map", "older") == "7"
    code, _, err = cli("--db", str(tmp_path / "lap.db"), "sync", "--to",
                       pg.url("older", "field3", password("field3")))
    assert code == 0 and "nothing to send" in err, err


def test_a_version_3_centre_gets_its_tables_filled_and_kept_current(pg, tmp_path, cli,
                                                                     monkeypatch):
    from triage.centre import schema

    pg.createdb("third")
    url = pg.url("third")
    with monkeypatch.context() as m:
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:3])
        m.setattr(schema, "_map_sql", _old_map)
        schema.init(url)
        pg.sql("SELECT triage.refresh_map()", "third")
        laptop(tmp_path / "lap.db", 8)
        with Store.open(tmp_path / "lap.db") as st:
            st.set_value(st.list_surveys()[0].id, "storeys[0].notes", "looked again")
            assert sync(st, pg.url("third", "field4", password("field4"))).versions == 8
        assert pg.sql("SELECT to_regclass('triage.survey_heads')", "third") == ""
    code, _, err = cli("centre", "init", url)
    assert code == 0 and f"schema upgraded to version {current_version()}" in err, err
    assert pg.sql("SELECT to_regclass('triage.building_summary')", "third") == ""
    centre = Centre(pg, "third")
    assert centre.check_maintained() == 7
    assert pg.sql("SELECT count(*) FROM triage.building_map", "third") == "7"
    # Rows sent after the upgrade reach the tables in their own transaction.
    laptop(tmp_path / "more.db", 9, seed="more")
    with Store.open(tmp_path / "more.db") as st:
        sync(st, pg.url("third", "field4", password("field4")))
    assert centre.check_maintained() == 8


def test_a_writer_outside_read_committed_is_refused(centre):
    with psycopg.connect(centre.admin) as c:
        c.execute("SET TRANSACTION ISOLATION LEVEL REPEATABLE READ")
        with pytest.raises(psycopg.errors.RaiseException, match="READ COMMITTED"):
            c.execute("INSERT INTO triage.reports (survey_id, revision, at, who, origin) "
                      "VALUES ('x', 1, 'now', 'me', 'o')")
    assert centre.rows("SELECT count(*) FROM triage.reports") == [(0,)]
