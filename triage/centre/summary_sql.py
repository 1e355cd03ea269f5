"""The summary written by the centre's server: the text rows' cells and the GeoJSON Features.

`triage --db URL summary` of 100,000 buildings must take under a second, and formatting
100,000 rows in Python (or making 100,000 objects) takes most of that on its own. So the
server does the per-building work:

- the text cells that depend on a building's row alone (name, address, inspection, inspector,
  level, governing storey, provisional, conflict: cut and padded as `TEXT_COLUMNS` says) are
  kept in `building_latest` (`text_before`, `text_mid`, `text_end`), written by
  `triage.summary_cells` with the row. A reading joins them with the tier's words (given by
  this triage, looked up in arrays) in one index scan; Python only formats the location
  (`%.5f`, whose rounding SQL would not reproduce) and joins the strings;
- `LAYOUT` names the layout the stored cells were made with (`triage.text_layout`). `init`
  remakes the function and, when the layout differs, every row's cells; a reader that finds
  another layout there makes the cells in its query instead (slower, same text);
- GeoJSON Features are written in the query as `json.dumps` writes them (same keys, order,
  separators; strings by `to_json`, which escapes as `json.dumps(ensure_ascii=False)` does;
  numbers in the server's shortest exact form, `.0` added to a whole one, as `repr`).

The counts at the foot (buildings per tier, conflicts) are one GROUP BY.
"""

from __future__ import annotations

from triage.store.area import NONE_MARK, TEXT_COLUMNS, TEXT_GAP

LAYOUT = ";".join(f"{h}:{w}:{int(c)}" for h, w, c in TEXT_COLUMNS) + f"|{TEXT_GAP}|{NONE_MARK}"

FROM_ORDERED = """FROM triage.building_latest
ORDER BY lower(building COLLATE "C"), address COLLATE "C", building_id COLLATE "C"
"""
# One row per building, in the local summary's order (ASCII letters folded in the name, then
# byte order of name, address and id: the index `building_latest_order`).
BUILDINGS = """
SELECT building_id, building, address, lat, lon, inspected_at, inspector, tier, level,
       gov_storey, provisional, conflict, survey_id, surveys
""" + FROM_ORDERED
TALLY = ("SELECT tier, count(*), count(*) FILTER (WHERE conflict) "
         "FROM triage.building_latest GROUP BY tier")
STORED_LAYOUT = "SELECT layout FROM triage.text_layout"
# A tier's words: looked up in the arrays of the tiers the tally found (NULL: not assessed).
WORDS = "(%(words)s::text[])[array_position(%(tiers)s::text[], tier)]"

_CELLS = {
    "building": "building", "address": "address", "inspected": "inspected_at",
    "inspector": "inspector",
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


def _parts() -> tuple[str, str, str, int]:
    """SQL of the cells before the location, between it and the tier, after the tier; its width.

    Each part carries its gaps: a row is before, location, mid, tier, end.
    """
    parts: list[list[str]] = [[], [], []]
    part, tier_width = 0, 0
    for heading, width, cut in TEXT_COLUMNS:
        if heading in ("location", "tier"):
            part += 1
            tier_width = width if heading == "tier" else tier_width
            continue
        parts[part].append(_cell(f"({_CELLS[heading]})", width, cut))
    gap = f" || '{TEXT_GAP}' || "
    before = gap.join(parts[0]) + f" || '{TEXT_GAP}'"
    mid = f"'{TEXT_GAP}' || " + gap.join(parts[1]) + f" || '{TEXT_GAP}'"
    end = f"'{TEXT_GAP}' || " + gap.join(parts[2])
    return before, mid, end, tier_width


BEFORE, MID, END, TIER_WIDTH = _parts()

CELLS_FUNCTION = f"""
CREATE OR REPLACE FUNCTION triage.summary_cells(
  building text, address text, inspected_at text, inspector text, level text,
  gov_storey text, provisional boolean, conflict boolean,
  OUT text_before text, OUT text_mid text, OUT text_end text)
LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $f$
SELECT {BEFORE},
       {MID},
       {END}
$f$;
"""


def relayout_sql() -> str:
    """For `init`: the cells function of this layout, and every row's cells when it changed."""
    return CELLS_FUNCTION + f"""
DO $d$ BEGIN
  IF (SELECT layout FROM triage.text_layout) IS DISTINCT FROM '{LAYOUT}' THEN
    UPDATE triage.building_latest b SET (text_before, text_mid, text_end) =
      (SELECT * FROM triage.summary_cells(b.building, b.address, b.inspected_at, b.inspector,
                                          b.level, b.gov_storey, b.provisional, b.conflict));
    DELETE FROM triage.text_layout;
    INSERT INTO triage.text_layout VALUES ('{LAYOUT}');
  END IF;
END $d$;
"""


# The text rows from the stored cells (the layout matches), or made in the query.
TEXT_STORED = (f"SELECT text_before, lat, lon, text_mid || {WORDS} || text_end\n"
               + FROM_ORDERED)
TEXT_MADE = f"SELECT {BEFORE}, lat, lon, {MID} || {WORDS} || {END}\n" + FROM_ORDERED


def _json(expr: str) -> str:
    return f"coalesce(to_json({expr})::text, 'null')"


def _number(expr: str) -> str:
    """A float as Python's `repr` writes it (the server's shortest form, `.0` when whole)."""
    return f"CASE WHEN {expr}::text ~ '^-?[0-9]+$' THEN {expr}::text || '.0' ELSE {expr}::text END"


# A Feature as `json.dumps` writes `summary_geojson`'s: same keys, order and separators.
_PROPS = [("building_id", "building_id"), ("building", "building"), ("address", "address"),
          ("inspected_at", "inspected_at"), ("inspector", "inspector"), ("tier", "tier"),
          ("tier_words", WORDS), ("performance_level", "level"),
          ("governing_storey", "gov_storey")]
FEATURES = ("""SELECT '{"type": "Feature", "id": ' || """ + _json("building_id")
            + """ || ', "geometry": {"type": "Point", "coordinates": [' || """
            + _number("lon") + " || ', ' || " + _number("lat") + """ || ']}, "properties": {'"""
            + "".join(f" || '{', ' if i else ''}\"{k}\": ' || {_json(e)}"
                      for i, (k, e) in enumerate(_PROPS))
            + """ || ', "provisional": ' || coalesce(provisional::text, 'null')"""
            + """ || ', "conflict": ' || conflict::text || ', "survey_id": ' || """
            + _json("survey_id") + """ || ', "caution": ' || %(caution)s || '}}'\n"""
            + FROM_ORDERED.replace("ORDER BY",
                                   "WHERE lat IS NOT NULL AND lon IS NOT NULL\nORDER BY"))
MISSING = ("SELECT building, building_id " + FROM_ORDERED.replace(
    "ORDER BY", "WHERE lat IS NULL OR lon IS NULL\nORDER BY"))
