"""The summary written by the centre's server: each building's text line and GeoJSON Feature.

`triage --db URL summary` of 100,000 buildings must take under a second; formatting 100,000
rows in Python (or even making 100,000 objects) takes most of that alone. So everything that
depends on one building's row is written by the server when the row is written (schema
version 5), by `triage.building_cells`, into `building_latest`:

- `line`: the building's whole line of the text summary (cells cut and padded as
  `TEXT_COLUMNS` says, the location rounded as Python's `%.5f`, the tier's words), or NULL
  when a person's text in it (name, address, inspector) holds a character that may not take
  exactly one terminal cell or is not safe as it is (`NOT_PLAIN_SQL`, the class of
  `triage.cli.table.NOT_PLAIN`): the command lays those rows out itself, by display width;
- `feature`: the GeoJSON Feature as `json.dumps` writes it (same keys, order, separators;
  strings by `to_json`, which escapes as `json.dumps(ensure_ascii=False)` does; numbers in
  the server's shortest exact form, `.0` added to a whole one, as `repr`), NULL without a
  location.

A text reading is then one index-only scan and one string (`string_agg` of the lines in
order); a GeoJSON reading one index scan.
The words and the caution come from this triage (`tier_text`, `CAUTION`), so the cells
function is this triage's: `init` makes it again and, when its SQL differs from the one the
rows were written with (`LAYOUT`, a hash of it, kept in `triage.text_layout`), writes every
row's cells again. A reader that finds another layout there makes the cells in its query
(slower, same text).

The summary's order is the name with ASCII letters folded, then the address, then the id, all
in byte order. The index holds the first `schema_v5.KEY_CHARS` characters of the name and the
address (a key of two 2,000-character texts would not fit an index entry); when a building's
name or address is longer (`long_key`), the reading sorts by the whole texts instead.
"""

from __future__ import annotations

import hashlib
import json

from triage.assess import CAUTION, TIERS
from triage.store.area import NONE_MARK, TEXT_COLUMNS, TEXT_GAP, tier_text

# `triage.cli.table.NOT_PLAIN` as a PostgreSQL regular expression (a test checks that both
# find the same characters): anything but printable ASCII and U+00A0..U+02FF without U+00AD.
NOT_PLAIN_SQL = r"[^\u0020-\u007e\u00a0-\u00ac\u00ae-\u02ff]"


def _lit(text: str) -> str:
    """A SQL string literal."""
    return "'" + text.replace("'", "''") + "'"


def fixed5(x: str) -> str:
    """SQL of `"%.5f" % x` as Python writes it: the exact binary value correctly rounded.

    The server's shortest exact text of |x| (`extra_float_digits = 1`), as numeric, rounds to
    the same five places as the exact value unless it has six places ending in 5: then the
    exact value lies just above or below it, and which one is told by |x| × 10^6 computed
    exactly as a sum of two floats (Dekker's product: |x| split in halves of 26 bits, so each
    partial product is exact) compared with that six-place integer. No double is exactly
    halfway at the fifth place (its denominator would hold 5^5). The sign is the text's: -0.0
    and small negative values keep their minus, as in C and Python. A test checks thousands
    of values, halfway cases among them.
    """
    a = f"abs({x})"
    r = f"{a}::text::numeric"
    n6 = f"({r} * 1000000)"
    p = f"({a} * 1000000.0::float8)"
    hi = f"({a} * 134217729.0::float8 - ({a} * 134217729.0::float8 - {a}))"
    err = f"(({hi} * 1000000.0::float8 - {p}) + ({a} - {hi}) * 1000000.0::float8)"
    up = f"((({p} - {n6}::float8) + {err}) > 0)"
    value = (f"CASE WHEN scale({r}) = 6 AND mod({n6}, 10) = 5 THEN trunc({r}, 5) + "
             f"CASE WHEN {up} THEN 0.00001 ELSE 0 END ELSE round({r}, 5) END")
    return f"CASE WHEN left({x}::text, 1) = '-' THEN '-' ELSE '' END || ({value})::text"


def number(expr: str) -> str:
    """A float as Python's `repr` writes it (the server's shortest form, `.0` when whole)."""
    return f"CASE WHEN {expr}::text ~ '^-?[0-9]+$' THEN {expr}::text || '.0' ELSE {expr}::text END"


def _words() -> str:
    """SQL of a tier's words, as `tier_text` gives them (an unknown tier: '? tier')."""
    known = " ".join(f"WHEN tier = {_lit(t)} THEN {_lit(tier_text(t))}" for t in TIERS)
    return (f"CASE WHEN coalesce(tier, '') = '' THEN {_lit(tier_text(None))} {known} "
            f"ELSE '? ' || tier END")


_CELLS = {
    "building": "building", "address": "address", "inspected": "inspected_at",
    "inspector": "inspector",
    "location": (f"CASE WHEN lat IS NULL OR lon IS NULL THEN '{NONE_MARK}' "
                 f"ELSE {fixed5('lat')} || ',' || {fixed5('lon')} END"),
    "tier": _words(),
    "level": f"coalesce(nullif(level, ''), '{NONE_MARK}')",
    "governing": f"coalesce(nullif(gov_storey, ''), '{NONE_MARK}')",
    "provisional": f"CASE provisional WHEN true THEN 'yes' WHEN false THEN 'no' "
                   f"ELSE '{NONE_MARK}' END",
    "conflict": f"CASE WHEN conflict THEN 'CONFLICT' ELSE '{NONE_MARK}' END",
}


def _cell(expr: str, width: int, cut: bool) -> str:
    """A cell as `summary_text` makes it: cut to `width` with "…", padded to it with spaces."""
    if cut:
        expr = (f"CASE WHEN char_length({expr}) > {width} THEN left({expr}, {width - 1}) "
                f"|| '…' ELSE {expr} END")
    return f"({expr}) || repeat(' ', {width} - char_length({expr}))" if width else expr


# The line of one building (NULL when a person's text is not plain), over a row's columns.
LINE = (f"CASE WHEN (building || address || inspector) ~ '{NOT_PLAIN_SQL}' THEN NULL ELSE "
        + f" || '{TEXT_GAP}' || ".join(_cell(f"({_CELLS[h]})", w, cut)
                                       for h, w, cut in TEXT_COLUMNS) + " END")


def _json(expr: str) -> str:
    return f"coalesce(to_json({expr})::text, 'null')"


# A Feature as `json.dumps` writes `summary_geojson`'s: same keys, order and separators.
_PROPS = [("building_id", "building_id"), ("building", "building"), ("address", "address"),
          ("inspected_at", "inspected_at"), ("inspector", "inspector"), ("tier", "tier"),
          ("tier_words", _words()), ("performance_level", "level"),
          ("governing_storey", "gov_storey")]
FEATURE = ("CASE WHEN lat IS NULL OR lon IS NULL THEN NULL ELSE "
           + """'{"type": "Feature", "id": ' || """ + _json("building_id")
           + """ || ', "geometry": {"type": "Point", "coordinates": [' || """
           + number("lon") + " || ', ' || " + number("lat") + """ || ']}, "properties": {'"""
           + "".join(f" || '{', ' if i else ''}\"{k}\": ' || {_json(e)}"
                     for i, (k, e) in enumerate(_PROPS))
           + """ || ', "provisional": ' || coalesce(provisional::text, 'null')"""
           + """ || ', "conflict": ' || conflict::text || ', "survey_id": ' || """
           + _json("survey_id") + " || ', \"caution\": ' || "
           + _lit(json.dumps(CAUTION, ensure_ascii=False)) + " || '}}' END")

CELLS_FUNCTION = f"""
CREATE OR REPLACE FUNCTION triage.building_cells(
  building_id text, building text, address text, lat double precision, lon double precision,
  inspected_at text, inspector text, tier text, level text, gov_storey text,
  provisional boolean, conflict boolean, survey_id text, OUT line text, OUT feature text)
LANGUAGE sql IMMUTABLE PARALLEL SAFE SET extra_float_digits = 1 AS $f$
SELECT {LINE},
       {FEATURE}
$f$;
"""

# The layout the stored cells follow: the cells function's SQL, hashed.
LAYOUT = "v5:" + hashlib.sha256(CELLS_FUNCTION.encode()).hexdigest()[:32]

CELLS_OF_ROW = ("triage.building_cells(b.building_id, b.building, b.address, b.lat, b.lon, "
                "b.inspected_at, b.inspector, b.tier, b.level, b.gov_storey, b.provisional, "
                "b.conflict, b.survey_id)")


def relayout_sql() -> str:
    """For `init`: the cells function of this layout, and every row's cells when it changed."""
    return CELLS_FUNCTION + f"""
DO $d$ BEGIN
  IF (SELECT layout FROM triage.text_layout) IS DISTINCT FROM '{LAYOUT}' THEN
    UPDATE triage.building_latest b SET (line, feature) = (SELECT * FROM {CELLS_OF_ROW});
    PERFORM triage.count_buildings();
    DELETE FROM triage.text_layout;
    INSERT INTO triage.text_layout VALUES ('{LAYOUT}');
  END IF;
END $d$;
"""


STORED_LAYOUT = "SELECT layout FROM triage.text_layout"
# Counts per tier: buildings, with a conflict, with a name or address longer than the index's
# keys, without a line (laid out by the command): kept by the server, or counted here.
TALLY = "SELECT tier, buildings, conflicts, long_keys, unlaid FROM triage.building_tally"
TALLY_MADE = ("SELECT tier, count(*), count(*) FILTER (WHERE conflict), "
              "count(*) FILTER (WHERE long_key), "
              f"count(*) FILTER (WHERE ({LINE}) IS NULL) FROM triage.building_latest GROUP BY tier")

_BY_INDEX = 'ORDER BY sort_name, sort_address, building_id COLLATE "C"'
_EXACT = 'ORDER BY lower(building COLLATE "C"), address COLLATE "C", building_id COLLATE "C"'


def _order(exact: bool) -> str:
    return _EXACT if exact else _BY_INDEX


def lines_sql(stored: bool, exact: bool) -> str:
    """Every building's line in order, as one text ('' for a line the command lays out)."""
    line = "line" if stored else LINE
    return (f"SELECT string_agg(coalesce(l, ''), E'\\n') FROM (SELECT {line} AS l "
            f"FROM triage.building_latest {_order(exact)}) s")


def features_sql(stored: bool, exact: bool) -> str:
    """Every located building's Feature, in order."""
    feature = "feature" if stored else FEATURE
    return (f"SELECT {feature} FROM triage.building_latest "
            f"WHERE lat IS NOT NULL AND lon IS NOT NULL {_order(exact)}")


_ROW = """building_id, building, address, lat, lon, inspected_at, inspector, tier, level,
       gov_storey, provisional, conflict, survey_id, surveys"""
# One row per building, in the summary's order.
BUILDINGS = f"SELECT {_ROW} FROM triage.building_latest {_EXACT}"


def unlaid_sql(stored: bool) -> str:
    """The rows whose line the command lays out, in order."""
    where = "line IS NULL" if stored else f"({LINE}) IS NULL"
    return f"SELECT {_ROW} FROM triage.building_latest WHERE {where} {_EXACT}"


MISSING = ("SELECT building, building_id FROM triage.building_latest "
           f"WHERE lat IS NULL OR lon IS NULL {_EXACT}")
