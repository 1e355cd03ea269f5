"""`triage summary [--format text|csv|geojson]`: the area picture, one row per building."""

from __future__ import annotations

import argparse
import csv
import io
import json
import sys
from typing import TYPE_CHECKING, Any

from .common import add_command, add_format, open_reader

if TYPE_CHECKING:
    from triage.store.area import AreaLines, AreaTally, BuildingRow
    from triage.store.reader import SurveyReader


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `summary`."""
    p = add_command(sub, "summary", "one row per building: latest tier, level, where",
                    description=(
                        "The area picture: one row per building, from its latest survey (by "
                        "time of inspection): the indicative tier and level, the governing "
                        "storey, whether provisional or in conflict; counts per tier at the "
                        "end."))
    add_format(p, "triage-summary/1", "a table for people", more=(
        ("csv", "one row per building, safe to open in a spreadsheet"),
        ("geojson", "an RFC 7946 FeatureCollection of the located buildings")))
    p.set_defaults(func=run)


def _words(tier: str | None) -> str:
    from triage.store.area import tier_text

    return tier_text(tier)


def _head() -> list[str]:
    from triage.assess import CAUTION
    from triage.store.area import TEXT_COLUMNS, TEXT_GAP

    return [f"CAUTION: {CAUTION}", "",
            TEXT_GAP.join(f"{h:<{w}}" if w else h for h, w, _ in TEXT_COLUMNS)]


def _foot(tally: AreaTally) -> list[str]:
    from triage.assess import CAUTION, TIERS

    n = tally.buildings
    return ["", f"{n} building{'s' if n != 1 else ''}: "
            + ", ".join(f"{_words(t)} {tally.tiers.get(t, 0)}" for t in TIERS)
            + f", not assessed {tally.tiers.get(None, 0)}; {tally.conflicts} with a conflict "
              "to resolve", f"The tiers are indicative. {CAUTION}"]


def summary_text(rows: list[BuildingRow]) -> str:
    """The text form: caution, one row per building, counts per tier at the end."""
    lines, tally = text_lines(rows)
    return "\n".join([*_head(), *lines, *_foot(tally)]) + "\n"


def text_lines(rows: list[BuildingRow]) -> tuple[list[str], AreaTally]:
    """Each building's line of the text, and the counts."""
    from triage.assess import TIERS
    from triage.store.area import TEXT_COLUMNS, TEXT_GAP, AreaTally

    from .table import NOT_PLAIN, fit

    lines: list[str] = []
    # One pass, the per-row work inlined (an area has 100,000 buildings): tier words and flag
    # words looked up; the three columns of people's text (building, address, inspector) cut
    # and padded by display width (`table.fit`: a wide character takes two cells, a combining
    # mark none, a control character is shown escaped); text of one-cell characters that fits
    # (`table.NOT_PLAIN` finds none) is padded by the format, as the centre's cells are.
    words: dict[str | None, str] = {t: _words(t) for t in TIERS}
    words[None] = _words(None)
    flags = {None: "—", True: "yes", False: "no"}
    tally: dict[str | None, int] = dict.fromkeys(TIERS, 0)
    tally[None] = 0
    conflicts = 0
    append = lines.append
    # %-formatting pads by characters as the header's f-string does, and is quicker.
    quick = TEXT_GAP.join(f"%-{w}s" if w else "%s" for _, w, _ in TEXT_COLUMNS)
    fitted = TEXT_GAP.join("%s" if people or not w else f"%-{w}s"
                           for _, w, people in TEXT_COLUMNS)
    wb, wa, wp = (w for _, w, people in TEXT_COLUMNS if people)
    not_plain = NOT_PLAIN.search
    for r in rows:
        b, a, p, t = r.building, r.address, r.inspector, r.tier
        if len(b) <= wb and len(a) <= wa and len(p) <= wp and not_plain(b + a + p) is None:
            row = quick     # one cell a character, and it fits: padded by the format
        else:
            row = fitted
            b, a, p = fit(b, wb), fit(a, wa), fit(p, wp)
        w = words.get(t)
        if w is None:
            w = words[t] = _words(t)
        if t in tally:
            tally[t] += 1
        lat, lon = r.lat, r.lon
        loc = "%.5f,%.5f" % (lat, lon) if lat is not None and lon is not None else "—"  # noqa: UP031
        if r.conflict:
            conflicts += 1
        append(row % (b, a, loc, r.at, p, w, r.level or "—", r.governing_storey or "—",
                      flags[r.provisional], "CONFLICT" if r.conflict else "—"))
    return lines, AreaTally(len(rows), tally, conflicts)


def summary_text_of(st: AreaLines) -> list[str]:
    """The same text from a reader that writes the lines itself (rows it leaves: here).

    In pieces, written one after the other: the lines of 100,000 buildings are megabytes, and
    each copy of them costs.
    """
    tally, body = st.summary_lines(lambda rows: text_lines(rows)[0])
    return ["\n".join(_head()) + "\n", *([body, "\n"] if body else []),
            "\n".join(_foot(tally)) + "\n"]


def _props(r: BuildingRow) -> dict[str, Any]:
    from triage.assess import CAUTION

    return {"building_id": r.building_id, "building": r.building, "address": r.address,
            "inspected_at": r.at, "inspector": r.inspector, "tier": r.tier,
            "tier_words": _words(r.tier), "performance_level": r.level,
            "governing_storey": r.governing_storey, "provisional": r.provisional,
            "conflict": r.conflict, "survey_id": r.survey_id, "caution": CAUTION}


CSV_FIELDS = ("building_id", "building", "address", "lat", "lon", "inspected_at", "inspector",
              "tier", "performance_level", "governing_storey", "provisional", "conflict",
              "survey_id", "caution")


def summary_csv(rows: list[BuildingRow]) -> str:
    """CSV, one row per building; every row carries the caution in its last column.

    Every cell goes through `csv_cell`: one beginning with `= + - @`, tab or carriage return
    gets a leading `'`, so a spreadsheet never takes a building's name for a formula.
    """
    from triage.safetext import csv_cell

    buf = io.StringIO()
    w = csv.DictWriter(buf, fieldnames=CSV_FIELDS, lineterminator="\n")
    w.writeheader()
    for r in rows:
        p = _props(r)
        p.pop("tier_words")
        p["lat"], p["lon"] = r.lat, r.lon
        p["provisional"] = "" if r.provisional is None else str(r.provisional).lower()
        p["conflict"] = str(r.conflict).lower()
        w.writerow({k: csv_cell(v) for k, v in p.items()})
    return buf.getvalue()


def summary_geojson(rows: list[BuildingRow]) -> dict[str, Any]:
    """An RFC 7946 FeatureCollection of Point features (longitude first) of located buildings."""
    from triage.assess import CAUTION

    features = [{"type": "Feature", "id": r.building_id,
                 "geometry": {"type": "Point", "coordinates": [r.lon, r.lat]},
                 "properties": _props(r)} for r in rows if r.located]
    return {"type": "FeatureCollection", "caution": CAUTION, "features": features}


def _geojson_of(st: AreaLines) -> tuple[list[str], list[tuple[str, str]]]:
    """The GeoJSON in pieces, and the buildings left out: from a reader writing Features."""
    from triage.assess import CAUTION

    features, missing = st.summary_features()
    head = json.dumps({"type": "FeatureCollection", "caution": CAUTION, "features": []},
                      ensure_ascii=False)
    return [head[:-2], features, "]}\n"], missing


def summary_json(rows: list[BuildingRow]) -> dict[str, Any]:
    """The `triage-summary/1` object: every building and the counts the text ends with."""
    from triage.assess import CAUTION, TIERS

    buildings = []
    for r in rows:
        p = _props(r)
        p.pop("caution")
        p["lat"], p["lon"] = r.lat, r.lon
        buildings.append(p)
    return {"format": "triage-summary/1", "caution": CAUTION, "buildings": buildings,
            "count": len(rows), "tiers": {t: sum(1 for r in rows if r.tier == t) for t in TIERS},
            "not_assessed": sum(1 for r in rows if r.tier is None),
            "conflicts": sum(1 for r in rows if r.conflict)}


def run(args: argparse.Namespace) -> int:
    """One row per building id, its latest survey, from the stored assessments."""
    from triage.store.area import AreaLines

    st: SurveyReader = open_reader(args)
    try:
        if isinstance(st, AreaLines) and args.format in ("text", "geojson"):
            if args.format == "text":
                sys.stdout.writelines(summary_text_of(st))
                return 0
            parts, missing = _geojson_of(st)
            sys.stdout.writelines(parts)
            _say_missing(missing)
            return 0
        rows = st.building_rows()
    finally:
        st.close()
    if args.format == "csv":
        sys.stdout.write(summary_csv(rows))
    elif args.format == "json":
        sys.stdout.write(json.dumps(summary_json(rows), ensure_ascii=False, indent=1) + "\n")
    elif args.format == "geojson":
        sys.stdout.write(json.dumps(summary_geojson(rows), ensure_ascii=False) + "\n")
        _say_missing([(r.building, r.building_id) for r in rows if not r.located])
    else:
        sys.stdout.write(summary_text(rows))
    return 0


def _say_missing(missing: list[tuple[str, str]]) -> None:
    if missing:
        names = "; ".join(f"{name} ({bid})" for name, bid in missing)
        sys.stderr.write(f"triage summary: {len(missing)} building"
                         f"{'s' if len(missing) != 1 else ''} without a location, not "
                         f"in the GeoJSON: {names}\n")
