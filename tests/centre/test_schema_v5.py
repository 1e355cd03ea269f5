"""Schema version 5: migrations as released, one refresh per transaction, an upgrade from 4."""

from __future__ import annotations

import hashlib

import psycopg

from tests.centre.conftest import Centre, laptop, password
from tests.centre.test_schema import _old_map
from triage.centre.sync import sync
from triage.store import Store

# Each migration's SQL as it shipped: a migration replays as released, so a change here is a
# new migration, never an edit (docs/centre.md).
RELEASED = {
    1: "90249124a790d251ebe69bd9ebdf812cbc1533206cf25bc6aaac7bb9cdf9d8fb",
    2: "d2450ee42756cb4766ca2774db755f2dd543c2125493392c62683ed0e99fb541",
    3: "b8e8613738359ccad273592a7f53198071908092fe5d9b7a6805cfd118c0be92",
    4: "d6caafa71dbbd3cb537bd06d5bef5dc4b967a58291fbe73f247ee2bf5d652922",
    5: "014de75614acd1c15562969dc9b54135f36649b102fc9c54d6ccc3c80d7f8008",
}


def test_every_released_migration_replays_the_sql_it_shipped_with():
    from triage.centre import migrations as m
    from triage.centre.schema_v5 import SCHEMA_V5

    sql = {1: m.SCHEMA_V1, 2: m.VIEWS_V2, 3: m.SUMMARY_V3, 4: m.SCHEMA_V4, 5: SCHEMA_V5}
    assert [x.version for x in m.MIGRATIONS] == [1, 2, 3, 4, 5]
    for version, digest in RELEASED.items():
        assert hashlib.sha256(sql[version].encode()).hexdigest() == digest, version
    # Version 5 names nothing the summary's layout decides (init makes the cells function).
    assert "building_cells(" in SCHEMA_V5 and "CREATE OR REPLACE FUNCTION triage.building_cells" \
        not in SCHEMA_V5 and "occupy" not in SCHEMA_V5


_COPY = """
INSERT INTO triage.versions (survey_id, state, doc_sha256, alt_id, changes, revision, hidden,
  building_id, building, address, lat, lon, inspector, at, at_utc, conflict_of, source,
  created_at, updated_at, origin, doc)
SELECT 'new-' || survey_id, state, doc_sha256, alt_id, changes, revision, hidden,
  'nb-' || building_id, building || ' again', address, lat, lon, inspector, at, at_utc,
  conflict_of, source, created_at, updated_at, origin, doc FROM triage.versions;
"""
_COPY_ASSESSMENTS = """
INSERT INTO triage.assessments (survey_id, doc_sha256, engine, tier, level, gov_storey, gov_dir,
  gov_basis, provisional, json, computed_by, origin)
SELECT 'new-' || survey_id, doc_sha256, engine, tier, level, gov_storey, gov_dir, gov_basis,
  provisional, json, computed_by, origin FROM triage.assessments;
"""


def test_the_derived_tables_are_brought_up_to_date_once_at_commit(centre, tmp_path):
    laptop(tmp_path / "lap.db", 8)
    with Store.open(tmp_path / "lap.db") as st:
        sync(st, centre.field)
    with psycopg.connect(centre.admin) as c:
        c.execute("SET track_functions = 'all'")
        with c.transaction():
            c.execute(_COPY)
            c.execute(_COPY_ASSESSMENTS)
            c.execute("INSERT INTO triage.reports (survey_id, revision, at, who, origin) "
                      "SELECT 'new-' || survey_id, 1, 'now', 'me', 'o' FROM triage.versions "
                      "WHERE survey_id NOT LIKE 'new-%' LIMIT 2")
            # Three statements: the ids are noted, nothing computed yet.
            assert c.execute("SELECT count(*) FROM triage.heads_pending").fetchone() == (8,)
            assert c.execute("SELECT count(*) FROM triage.survey_heads WHERE first_id LIKE "
                             "'new-%'").fetchone() == (0,)
            c.execute("SET CONSTRAINTS ALL IMMEDIATE")   # what commit does, seen from inside
            calls = c.execute("SELECT funcname, calls FROM pg_stat_xact_user_functions "
                              "WHERE funcname IN ('refresh_heads', 'heads_changed', "
                              "'heads_at_commit')").fetchall()
            assert dict(calls) == {"heads_changed": 3, "heads_at_commit": 1, "refresh_heads": 1}
            assert c.execute("SELECT count(*) FROM triage.survey_heads WHERE first_id LIKE "
                             "'new-%' AND tier IS NOT NULL").fetchone() == (8,)
    assert Centre(centre.pg, centre.name).check_maintained() == 14


def test_a_version_4_centre_is_upgraded_its_lines_written_and_read(pg, tmp_path, cli,
                                                                   monkeypatch):
    from triage.centre import schema
    from triage.centre.v4_cells import CELLS_FUNCTION_V4

    pg.createdb("fourth")
    with monkeypatch.context() as m:    # init as version 4's triage ran it
        m.setattr(schema, "MIGRATIONS", schema.MIGRATIONS[:4])
        m.setattr(schema, "_map_sql", _old_map)
        m.setattr(schema, "relayout_sql", lambda: CELLS_FUNCTION_V4)
        schema.init(pg.url("fourth"))
        lap = tmp_path / "lap.db"
        laptop(lap, 12)
        with Store.open(lap) as st:
            st.set_value(st.list_surveys()[0].id, "building.name", "高松ビル")
            assert sync(st, pg.url("fourth", "field5", password("field5"))).versions == 12
    assert pg.sql("SELECT count(*) FROM triage.building_latest", "fourth") == "11"
    code, _, err = cli("centre", "init", pg.url("fourth"))
    assert code == 0 and "schema upgraded to version 5" in err, err
    centre = Centre(pg, "fourth")
    assert centre.check_maintained() == 11
    assert pg.sql("SELECT count(*) FROM triage.building_latest WHERE line IS NULL", "fourth") \
        == "1"                               # the wide name: laid out by the command
    reader = pg.url("fourth", "reader", password("reader"))
    for fmt in ("text", "geojson"):
        assert cli("--db", reader, "summary", "--format", fmt) == \
            cli("--db", str(lap), "summary", "--format", fmt)
    assert pg.sql("SELECT count(*) FROM triage.building_map", "fourth") == "11"
