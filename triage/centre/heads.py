"""Schema version 4: the survey list and the buildings as tables kept current by triggers.

Versions 1-3 computed every survey's current version, conflicts and latest assessment in views
at each read: about 4 s for 100,000 buildings (EXPLAIN figures in docs/centre.md), so version 3
kept a snapshot refreshed by each sync, read only while nothing had arrived since. A sync in
progress or killed before its refresh left the readers on the slow live view.

Version 4 keeps the same rows in two tables that every insert brings up to date in its own
transaction, so a reader always sees them current and never computes the whole area:

- `survey_heads`: one row per row of `survey_list` (without the conflict flags, which depend on
  other surveys and are read through indexes): `heads_of(ids)` computes them for some survey
  ids with the version 2 view's rules, restricted to those ids;
- `building_latest`: one row per building, the latest visible survey, as the `buildings` view
  gave it, the conflict flag included.

After each INSERT statement on `versions`, `assessments` or `reports` (a statement trigger with
its transition table), `refresh_heads` recomputes the heads of the survey ids inserted, then
the rows of every building those heads were or are in, or whose surveys name one of them in
`conflict_of`. The trigger runs as the schema's owner (SECURITY DEFINER): the field role
writes no derived table itself.

Two transactions computing heads from rows the other has not committed would each leave the
other's out. So every INSERT statement on the four data tables a sync writes first takes one
transaction-level advisory lock (a BEFORE statement trigger): writers to the centre take turns,
transaction by transaction, each sees every earlier one committed, and since the lock is the
first thing a writing transaction holds, waiting for it never closes a cycle (no deadlock).
Readers never wait. A transaction that is not READ COMMITTED is refused (its snapshot would
miss what the lock waited for).
"""

from __future__ import annotations

from .v4_cells import CELLS_FUNCTION_V4 as CELLS_FUNCTION
from .v4_cells import LAYOUT_V4 as LAYOUT

WRITE_LOCK = 0x7472696167650003   # advisory lock of writers ("triage" and 3)

_HEAD_COLUMNS = """
  id text NOT NULL, first_id text NOT NULL, rank bigint NOT NULL, conflict_of text,
  seq bigint NOT NULL, state text NOT NULL, doc_sha256 text NOT NULL,
  revision integer NOT NULL, hidden boolean NOT NULL, building_id text NOT NULL,
  building text NOT NULL, address text NOT NULL, lat double precision,
  lon double precision, inspector text NOT NULL, at text NOT NULL, at_utc text NOT NULL,
  source text, origin text NOT NULL, created_at text NOT NULL, updated_at text NOT NULL,
  tier text, level text, gov_storey text, gov_dir text, gov_basis text,
  provisional boolean, engine text, assessed_revision integer, reported_revision integer"""

SCHEMA_V4 = f"""
DROP MATERIALIZED VIEW IF EXISTS triage.building_map;
DROP MATERIALIZED VIEW IF EXISTS triage.building_summary;
DROP TABLE IF EXISTS triage.summary_state;
DROP VIEW IF EXISTS triage.summary_mark;
DROP INDEX IF EXISTS triage.versions_seq;
DROP INDEX IF EXISTS triage.assessments_seq;
DROP VIEW triage.buildings;
DROP VIEW triage.conflicts;
DROP VIEW triage.survey_list;

CREATE TABLE triage.survey_heads ({_HEAD_COLUMNS});
CREATE INDEX survey_heads_first ON triage.survey_heads (first_id);
CREATE INDEX survey_heads_id ON triage.survey_heads (id);
CREATE INDEX survey_heads_conflict_of ON triage.survey_heads (conflict_of)
  WHERE conflict_of IS NOT NULL;
CREATE INDEX survey_heads_building ON triage.survey_heads (building_id);

CREATE TABLE triage.building_latest (
  building_id text PRIMARY KEY, building text NOT NULL, address text NOT NULL,
  lat double precision, lon double precision, inspected_at text NOT NULL,
  inspector text NOT NULL, tier text, level text, gov_storey text, provisional boolean,
  survey_id text NOT NULL, surveys bigint NOT NULL, conflict boolean NOT NULL,
  text_before text NOT NULL, text_mid text NOT NULL, text_end text NOT NULL);
-- The text summary's cells of each row (see `summary_sql`), and the layout they follow.
CREATE TABLE triage.text_layout (layout text NOT NULL);
INSERT INTO triage.text_layout VALUES ('{LAYOUT}');
{CELLS_FUNCTION}
-- The summary's order (ASCII letters folded in the name, then byte order), read by index.
CREATE INDEX building_latest_order ON triage.building_latest
  (lower(building COLLATE "C"), address COLLATE "C", building_id COLLATE "C");

-- The rows of `survey_list` (version 2's rules) of these survey ids, conflict flags aside.
CREATE FUNCTION triage.heads_of(ids text[]) RETURNS SETOF triage.survey_heads
LANGUAGE sql STABLE AS $f$
WITH vs AS (
  SELECT * FROM triage.versions WHERE survey_id = ANY(ids)
), cur AS (
  SELECT v.*, last_value(v.hidden) OVER (PARTITION BY v.survey_id, v.doc_sha256 ORDER BY v.seq
         ROWS BETWEEN UNBOUNDED PRECEDING AND UNBOUNDED FOLLOWING) AS hidden_last
  FROM vs v
  WHERE NOT EXISTS (
    SELECT 1 FROM vs w
    WHERE w.survey_id = v.survey_id AND w.seq <> v.seq AND w.changes @> v.changes
      AND (NOT v.changes @> w.changes OR w.seq < v.seq))
), firsts AS (
  SELECT DISTINCT ON (survey_id, doc_sha256) *
  FROM cur ORDER BY survey_id, doc_sha256, seq
), counted AS (
  SELECT f.*, count(*) OVER (PARTITION BY f.survey_id) AS n FROM firsts f
), ranked AS (
  SELECT c.*, row_number() OVER (PARTITION BY c.survey_id ORDER BY
      CASE WHEN c.n > 1 THEN (SELECT min(w.seq) FROM vs w
                              WHERE w.survey_id = c.survey_id AND c.changes @> w.changes)
           ELSE c.seq END, c.seq) AS rank
  FROM counted c
)
SELECT CASE WHEN r.rank = 1 THEN r.survey_id ELSE r.alt_id END, r.survey_id, r.rank,
       CASE WHEN r.rank = 1 THEN r.conflict_of ELSE r.survey_id END,
       r.seq, r.state, r.doc_sha256, r.revision, r.hidden_last, r.building_id,
       r.building, r.address, r.lat, r.lon, r.inspector, r.at, r.at_utc, r.source, r.origin,
       r.created_at, r.updated_at,
       a.tier, a.level, a.gov_storey, a.gov_dir, a.gov_basis, a.provisional, a.engine,
       CASE WHEN a.found THEN r.revision END,
       CASE WHEN r.rank = 1 THEN (SELECT max(p.revision) FROM triage.reports p
                                  WHERE p.survey_id = r.survey_id) END
FROM ranked r
LEFT JOIN LATERAL (
  SELECT true AS found, x.tier, x.level, x.gov_storey, x.gov_dir, x.gov_basis, x.provisional,
         x.engine
  FROM triage.assessments x WHERE x.survey_id = r.survey_id AND x.doc_sha256 = r.doc_sha256
  ORDER BY x.seq DESC LIMIT 1) a ON true
$f$;

-- Each of these buildings' latest visible survey, as version 2's `buildings` view picked it.
CREATE FUNCTION triage.refresh_buildings(ids text[]) RETURNS void
LANGUAGE sql VOLATILE AS $f$
DELETE FROM triage.building_latest WHERE building_id = ANY(ids);
INSERT INTO triage.building_latest
SELECT b.*, c.text_before, c.text_mid, c.text_end
FROM (SELECT DISTINCT ON (building_id)
             building_id, building, address, lat, lon, at, inspector, tier, level,
             gov_storey, provisional, id, count(*) OVER w, bool_or(conflict_up) OVER w AS conflict
      FROM (SELECT h.*, EXISTS (SELECT 1 FROM triage.survey_heads x
                                WHERE x.id = h.conflict_of AND NOT x.hidden) AS conflict_up
            FROM triage.survey_heads h WHERE h.building_id = ANY(ids) AND NOT h.hidden) v
      WINDOW w AS (PARTITION BY building_id)
      ORDER BY building_id, at_utc COLLATE "C" DESC, (conflict_of IS NULL) DESC,
               id COLLATE "C") b,
     LATERAL triage.summary_cells(b.building, b.address, b.at, b.inspector, b.level,
                                  b.gov_storey, b.provisional, b.conflict) c;
$f$;

-- The heads of these survey ids again, then every building they touch (see the module).
CREATE FUNCTION triage.refresh_heads(ids text[]) RETURNS void
LANGUAGE plpgsql VOLATILE AS $f$
DECLARE
  old_ids text[];
  old_buildings text[];
BEGIN
  SELECT array_agg(id), array_agg(building_id) INTO old_ids, old_buildings
  FROM triage.survey_heads WHERE first_id = ANY(ids);
  DELETE FROM triage.survey_heads WHERE first_id = ANY(ids);
  INSERT INTO triage.survey_heads SELECT * FROM triage.heads_of(ids);
  PERFORM triage.refresh_buildings(ARRAY(
    SELECT unnest(old_buildings)
    UNION SELECT building_id FROM triage.survey_heads WHERE first_id = ANY(ids)
    UNION SELECT n.building_id FROM triage.survey_heads n
          WHERE n.conflict_of = ANY(old_ids || ARRAY(SELECT id FROM triage.survey_heads
                                                     WHERE first_id = ANY(ids)))));
END $f$;

CREATE FUNCTION triage.writer_turn() RETURNS trigger
LANGUAGE plpgsql SECURITY DEFINER SET search_path = pg_catalog, triage AS $f$
BEGIN
  IF current_setting('transaction_isolation') <> 'read committed' THEN
    RAISE EXCEPTION 'the triage centre takes its data in READ COMMITTED transactions only';
  END IF;
  PERFORM pg_advisory_xact_lock({WRITE_LOCK});
  RETURN NULL;
END $f$;

CREATE FUNCTION triage.heads_changed() RETURNS trigger
LANGUAGE plpgsql SECURITY DEFINER SET search_path = pg_catalog, triage AS $f$
BEGIN
  PERFORM triage.refresh_heads(ARRAY(SELECT DISTINCT survey_id FROM inserted));
  RETURN NULL;
END $f$;

CREATE TRIGGER versions_turn BEFORE INSERT ON triage.versions
  FOR EACH STATEMENT EXECUTE FUNCTION triage.writer_turn();
CREATE TRIGGER changes_turn BEFORE INSERT ON triage.changes
  FOR EACH STATEMENT EXECUTE FUNCTION triage.writer_turn();
CREATE TRIGGER assessments_turn BEFORE INSERT ON triage.assessments
  FOR EACH STATEMENT EXECUTE FUNCTION triage.writer_turn();
CREATE TRIGGER reports_turn BEFORE INSERT ON triage.reports
  FOR EACH STATEMENT EXECUTE FUNCTION triage.writer_turn();
CREATE TRIGGER versions_heads AFTER INSERT ON triage.versions REFERENCING NEW TABLE AS inserted
  FOR EACH STATEMENT EXECUTE FUNCTION triage.heads_changed();
CREATE TRIGGER assessments_heads AFTER INSERT ON triage.assessments
  REFERENCING NEW TABLE AS inserted FOR EACH STATEMENT EXECUTE FUNCTION triage.heads_changed();
CREATE TRIGGER reports_heads AFTER INSERT ON triage.reports REFERENCING NEW TABLE AS inserted
  FOR EACH STATEMENT EXECUTE FUNCTION triage.heads_changed();

-- What is there already, once.
SELECT triage.refresh_heads(ARRAY(SELECT DISTINCT survey_id FROM triage.versions));

-- The views keep their names and columns, read from the tables.
CREATE VIEW triage.survey_list AS
SELECT h.id, h.first_id, h.rank, h.conflict_of, h.seq, h.state, h.doc_sha256, h.revision,
       h.hidden, h.building_id, h.building, h.address, h.lat, h.lon, h.inspector, h.at,
       h.at_utc, h.source, h.origin, h.created_at, h.updated_at, h.tier, h.level,
       h.gov_storey, h.gov_dir, h.gov_basis, h.provisional, h.engine, h.assessed_revision,
       coalesce(h.conflict_of IN (SELECT id FROM triage.survey_heads WHERE NOT hidden), false)
         AS conflict_up,
       (coalesce(h.conflict_of IN (SELECT id FROM triage.survey_heads WHERE NOT hidden), false)
        OR h.id IN (SELECT conflict_of FROM triage.survey_heads
                    WHERE NOT hidden AND conflict_of IS NOT NULL)) AS conflict,
       h.reported_revision
FROM triage.survey_heads h;

CREATE VIEW triage.conflicts AS
SELECT id, conflict_of, building_id, building, address, inspector, at, origin, hidden
FROM triage.survey_list WHERE conflict;

CREATE VIEW triage.buildings AS
SELECT building_id, building, address, lat, lon, inspected_at, inspector, tier, level,
       gov_storey, provisional, survey_id, surveys, conflict
FROM triage.building_latest;
"""
