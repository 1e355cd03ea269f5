"""Schema version 4's text cells, frozen as that version shipped them.

Version 4's migration created `triage.summary_cells` and the layout mark from the summary's
layout of its day; a migration replays as released, so both are written out here from that
layout, apart from today's (`summary_sql`, version 5 on). Only `heads.SCHEMA_V4` uses them.
"""

from __future__ import annotations

_COLUMNS = (("building", 24, True), ("address", 28, True), ("location", 19, False),
            ("inspected", 25, False), ("inspector", 16, True), ("tier", 12, False),
            ("level", 9, False), ("governing", 9, False), ("provisional", 11, False),
            ("conflict", 0, False))
_GAP = "  "
_NONE = "—"

LAYOUT_V4 = ";".join(f"{h}:{w}:{int(c)}" for h, w, c in _COLUMNS) + f"|{_GAP}|{_NONE}"

_CELLS = {
    "building": "building", "address": "address", "inspected": "inspected_at",
    "inspector": "inspector",
    "level": f"coalesce(nullif(level, ''), '{_NONE}')",
    "governing": f"coalesce(nullif(gov_storey, ''), '{_NONE}')",
    "provisional": f"CASE provisional WHEN true THEN 'yes' WHEN false THEN 'no' "
                   f"ELSE '{_NONE}' END",
    "conflict": f"CASE WHEN conflict THEN 'CONFLICT' ELSE '{_NONE}' END",
}


def _cell(expr: str, width: int, cut: bool) -> str:
    if cut:
        expr = (f"CASE WHEN char_length({expr}) > {width} THEN left({expr}, {width - 1}) "
                f"|| '…' ELSE {expr} END")
    return f"({expr}) || repeat(' ', {width} - char_length({expr}))" if width else expr


def _parts() -> tuple[str, str, str]:
    parts: list[list[str]] = [[], [], []]
    part = 0
    for heading, width, cut in _COLUMNS:
        if heading in ("location", "tier"):
            part += 1
            continue
        parts[part].append(_cell(f"({_CELLS[heading]})", width, cut))
    gap = f" || '{_GAP}' || "
    return (gap.join(parts[0]) + f" || '{_GAP}'",
            f"'{_GAP}' || " + gap.join(parts[1]) + f" || '{_GAP}'",
            f"'{_GAP}' || " + gap.join(parts[2]))


_BEFORE, _MID, _END = _parts()

CELLS_FUNCTION_V4 = f"""
CREATE OR REPLACE FUNCTION triage.summary_cells(
  building text, address text, inspected_at text, inspector text, level text,
  gov_storey text, provisional boolean, conflict boolean,
  OUT text_before text, OUT text_mid text, OUT text_end text)
LANGUAGE sql IMMUTABLE PARALLEL SAFE AS $f$
SELECT {_BEFORE},
       {_MID},
       {_END}
$f$;
"""
