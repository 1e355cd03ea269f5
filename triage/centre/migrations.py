"""The centre schema's numbered migrations, oldest first; `schema.init` runs those missing.

A migration is plain SQL run in `init`'s one transaction with its row in
`triage.schema_version`. Never edit one that has shipped: add the next (a test pins each one's
SQL). Version 4's SQL lives in `heads` (the tables kept current by triggers), version 5's in
`schema_v5`, each with its reasons.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass
from typing import TYPE_CHECKING

from .heads import SCHEMA_V4
from .schema_v5 import SCHEMA_V5
from .tables import create_tables

if TYPE_CHECKING:
    import psycopg

SCHEMA_V1 = create_tables() + """
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


def _v4(conn: psycopg.Connection) -> None:
    conn.execute(SCHEMA_V4)


def _v5(conn: psycopg.Connection) -> None:
    conn.execute(SCHEMA_V5)


MIGRATIONS: list[Migration] = [
    Migration(1, "tables, current versions, conflicts, buildings", _v1),
    Migration(2, "views: byte order of text, hidden flag of the same text sent last", _v2),
    Migration(3, "building_summary: a snapshot of buildings, refreshed with the map", _v3),
    Migration(4, "survey_heads and building_latest kept current by triggers; views read "
                 "them", _v4),
    Migration(5, "each building's summary line and Feature kept with it, one index-only "
                 "reading; derived tables brought up to date once per transaction; the map "
                 "a view of building_latest", _v5),
]
