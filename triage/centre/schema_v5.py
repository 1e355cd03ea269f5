"""Schema version 5: lines written with each building, one refresh per transaction, no snapshot.

Three changes to what version 4 built (docs/centre.md, "Version 5", has the measurements):

1. `building_latest` keeps each building's whole summary line and GeoJSON Feature (`line`,
   `feature`, written by `triage.building_cells`, which `init` makes after the migrations:
   see `summary_sql`) and the summary's order as index keys (`sort_name`, `sort_address`:
   the first `KEY_CHARS` characters; `long_key` when either was cut). One index holds the
   keys and the line, so the text summary is an index-only scan. Version 4's index of the
   whole name and address is dropped: a 2,000-character name (the model allows it) made an
   entry larger than an index page holds, and the sync of that survey failed.
   The table is vacuumed after every thousand rows written (so the index-only scan seldom
   visits the table), not after a fifth of the table.
2. The derived tables are brought up to date once per transaction, at its commit, instead of
   after every INSERT statement: the statement triggers only note the survey ids in
   `heads_pending` and make one row in `heads_due`, whose deferred constraint trigger
   runs `refresh_heads` on the ids noted. A sync transaction inserts versions, changes,
   assessments and reports, so version 4 computed the same surveys two or three times.
3. The materialised `building_map` is gone: `init` makes `building_map` a plain view of
   `building_latest` (kept current row by row like the rest), with the spatial index on that
   table (see `schema`). No refresh after a sync, no layer a sync behind.

The SQL below never names anything the summary's layout decides, so it replays the same
whatever triage runs it.
"""

from __future__ import annotations

KEY_CHARS = 100

SCHEMA_V5 = f"""
DROP MATERIALIZED VIEW IF EXISTS triage.building_map;
DROP FUNCTION IF EXISTS triage.refresh_map();
DROP INDEX triage.building_latest_order;
ALTER TABLE triage.building_latest
  DROP COLUMN text_before, DROP COLUMN text_mid, DROP COLUMN text_end,
  ADD COLUMN sort_name text COLLATE "C", ADD COLUMN sort_address text COLLATE "C",
  ADD COLUMN long_key boolean, ADD COLUMN line text, ADD COLUMN feature text;
UPDATE triage.building_latest SET
  sort_name = left(lower(building COLLATE "C"), {KEY_CHARS}),
  sort_address = left(address, {KEY_CHARS}),
  long_key = char_length(building) > {KEY_CHARS} OR char_length(address) > {KEY_CHARS};
ALTER TABLE triage.building_latest ALTER COLUMN sort_name SET NOT NULL,
  ALTER COLUMN sort_address SET NOT NULL, ALTER COLUMN long_key SET NOT NULL;
ALTER TABLE triage.building_latest SET (
  autovacuum_vacuum_scale_factor = 0, autovacuum_vacuum_threshold = 1000,
  autovacuum_vacuum_insert_scale_factor = 0, autovacuum_vacuum_insert_threshold = 1000);
CREATE INDEX building_latest_lines ON triage.building_latest
  (sort_name, sort_address, building_id COLLATE "C") INCLUDE (line);
DROP FUNCTION triage.summary_cells(text, text, text, text, text, text, boolean, boolean);
-- `init` writes every row's cells with this triage's `building_cells`, then counts.
UPDATE triage.text_layout SET layout = 'none yet';

-- The summary's counts per tier (kept with the rows below; `init` counts again on a new
-- layout): buildings, with a conflict, with a name or address cut in the keys, without a
-- line (the command lays those out).
CREATE TABLE triage.building_tally (
  tier text, buildings bigint NOT NULL, conflicts bigint NOT NULL, long_keys bigint NOT NULL,
  unlaid bigint NOT NULL, UNIQUE NULLS NOT DISTINCT (tier));
CREATE FUNCTION triage.count_buildings() RETURNS void LANGUAGE sql VOLATILE AS $f$
DELETE FROM triage.building_tally;
INSERT INTO triage.building_tally
SELECT tier, count(*), count(*) FILTER (WHERE conflict), count(*) FILTER (WHERE long_key),
       count(*) FILTER (WHERE line IS NULL)
FROM triage.building_latest GROUP BY tier;
$f$;
-- These buildings' rows added to the counts (sign 1) or taken from them (-1).
CREATE FUNCTION triage.tally_buildings(ids text[], sign integer) RETURNS void
LANGUAGE sql VOLATILE AS $f$
INSERT INTO triage.building_tally AS t
SELECT tier, sign * count(*), sign * count(*) FILTER (WHERE conflict),
       sign * count(*) FILTER (WHERE long_key), sign * count(*) FILTER (WHERE line IS NULL)
FROM triage.building_latest WHERE building_id = ANY(ids) GROUP BY tier
ON CONFLICT (tier) DO UPDATE SET buildings = t.buildings + excluded.buildings,
  conflicts = t.conflicts + excluded.conflicts, long_keys = t.long_keys + excluded.long_keys,
  unlaid = t.unlaid + excluded.unlaid;
DELETE FROM triage.building_tally WHERE buildings = 0;
$f$;

-- Each of these buildings' latest visible survey, as version 2's `buildings` view picked it,
-- with its cells (PL/pgSQL: `building_cells` is made by `init` after the migrations).
CREATE OR REPLACE FUNCTION triage.refresh_buildings(ids text[]) RETURNS void
LANGUAGE plpgsql VOLATILE AS $f$
BEGIN
  PERFORM triage.tally_buildings(ids, -1);
  DELETE FROM triage.building_latest WHERE building_id = ANY(ids);
  INSERT INTO triage.building_latest (building_id, building, address, lat, lon, inspected_at,
    inspector, tier, level, gov_storey, provisional, survey_id, surveys, conflict, sort_name,
    sort_address, long_key, line, feature)
  SELECT b.*, left(lower(b.building COLLATE "C"), {KEY_CHARS}), left(b.address, {KEY_CHARS}),
         char_length(b.building) > {KEY_CHARS} OR char_length(b.address) > {KEY_CHARS},
         c.line, c.feature
  FROM (SELECT DISTINCT ON (building_id)
               building_id, building, address, lat, lon, at AS inspected_at, inspector, tier,
               level, gov_storey, provisional, id AS survey_id, count(*) OVER w AS surveys,
               bool_or(conflict_up) OVER w AS conflict
        FROM (SELECT h.*, EXISTS (SELECT 1 FROM triage.survey_heads x
                                  WHERE x.id = h.conflict_of AND NOT x.hidden) AS conflict_up
              FROM triage.survey_heads h WHERE h.building_id = ANY(ids) AND NOT h.hidden) v
        WINDOW w AS (PARTITION BY building_id)
        ORDER BY building_id, at_utc COLLATE "C" DESC, (conflict_of IS NULL) DESC,
                 id COLLATE "C") b,
       LATERAL triage.building_cells(b.building_id, b.building, b.address, b.lat, b.lon,
                                     b.inspected_at, b.inspector, b.tier, b.level,
                                     b.gov_storey, b.provisional, b.conflict, b.survey_id) c;
  PERFORM triage.tally_buildings(ids, 1);
END $f$;

-- The survey ids inserted in this transaction, brought up to date at its commit.
CREATE TABLE triage.heads_pending (survey_id text PRIMARY KEY);
CREATE TABLE triage.heads_due (due boolean PRIMARY KEY);

CREATE OR REPLACE FUNCTION triage.heads_changed() RETURNS trigger
LANGUAGE plpgsql SECURITY DEFINER SET search_path = pg_catalog, triage AS $f$
BEGIN
  INSERT INTO triage.heads_pending SELECT DISTINCT survey_id FROM inserted
    ON CONFLICT DO NOTHING;
  INSERT INTO triage.heads_due VALUES (true) ON CONFLICT DO NOTHING;
  RETURN NULL;
END $f$;

CREATE FUNCTION triage.heads_at_commit() RETURNS trigger
LANGUAGE plpgsql SECURITY DEFINER SET search_path = pg_catalog, triage AS $f$
DECLARE
  ids text[];
BEGIN
  DELETE FROM triage.heads_due;
  WITH done AS (DELETE FROM triage.heads_pending RETURNING survey_id)
  SELECT array_agg(survey_id ORDER BY survey_id) INTO ids FROM done;
  IF ids IS NOT NULL THEN
    PERFORM triage.refresh_heads(ids);
  END IF;
  RETURN NULL;
END $f$;

CREATE CONSTRAINT TRIGGER heads_due AFTER INSERT ON triage.heads_due
  DEFERRABLE INITIALLY DEFERRED FOR EACH ROW EXECUTE FUNCTION triage.heads_at_commit();
"""
