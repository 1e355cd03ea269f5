"""`summary` from the centre, written by the server, equals the merged local database's.

At a scale where order, cuts, escapes and counts have room to go wrong: thousands of
buildings, names that tie once ASCII letters are folded, names and addresses longer than their
columns, quotes, backslashes and non-ASCII letters, wide (CJK) and combining characters, a
control character, names longer than the index's keys that tie on them, buildings without a
location or at whole degrees, hidden surveys and a conflict.
"""

from __future__ import annotations

import json
import random

import pytest

from tests.centre.conftest import laptop
from triage.store import Store

N = 2400

NAMES = ["apple", "Apple", "APPLE", "Äpple", "apple ", "_apple", "Zed", "zed", "Kōwhai Hall",
         'The "Quoted" Hall', "Back\\slash House",
         "A building whose name runs well past the twenty-four characters of its column",
         "Ōtaki Street Flats, the long north wing with the stair core",
         "高松ビル", "港の倉庫 East Wharf Store", "Mo\u0304ana House", "Bell\u0007 Tower"]
# Longer than the index's keys (100 characters), equal over them: only the whole names order
# these two, and their addresses would order them the other way round.
LONG = "Long Wharf Shed " * 8
# A name and an address of 2,000 characters the index entry could not hold whole.
WIDE = "".join(chr(0x4E00 + (i * 7919) % 20000) for i in range(2000))


@pytest.fixture(scope="module")
def area(pg, tmp_path_factory):
    """(merged local database, centre URL for a reader, the Centre) of two laptops."""
    from tests.centre.conftest import Centre, _names
    from triage.centre.sync import sync
    from triage.cli import main

    tmp = tmp_path_factory.mktemp("summary")
    name = f"c{next(_names)}"
    pg.centre_db(name)
    centre = Centre(pg, name)
    a, b, merged = tmp / "ana.db", tmp / "ben.db", tmp / "area.db"
    ids = laptop(a, N, seed="big", who="Ana")
    laptop(b, 8, seed="big", who="Ben")
    rng = random.Random(7)
    with Store.open(a) as st:
        picked = rng.sample(ids[8:], 200)
        for i, sid in enumerate(picked[:60]):
            st.set_value(sid, "building.name", NAMES[i % len(NAMES)])
            if i % 3 == 0:
                st.set_value(sid, "building.address", "1 " + "Long Road " * 4)
        for sid in picked[60:70]:
            st.set_value(sid, "building.location", None)
        for sid, (lat, lon) in zip(picked[70:76], [(-41.0, 174.0), (0.0, 0.00001), (-0.0, -180),
                                                   (-90, 179.999999), (12.5, -0.000123456789),
                                                   (-41.287645, 174.776235)], strict=True):
            st.set_value(sid, "building.location", {"lat": lat, "lon": lon})
        for sid in picked[76:120]:
            st.hide_survey(sid)
        for sid, name, address in ((picked[120], LONG + "b", "1 A Street"),
                                   (picked[121], LONG + "a", "1 B Street"),
                                   (picked[122], WIDE, WIDE[::-1])):
            st.set_value(sid, "building.name", name)
            st.set_value(sid, "building.address", address)
        st.set_value(ids[0], "storeys[0].notes", "Ana looked again")
        st.record_report(ids[3], 1, "report.pdf", None)
    with Store.open(b) as st:
        st.set_value(ids[0], "storeys[0].notes", "Ben looked again")
    assert main(["merge", str(a), str(b), "--into", str(merged)]) == 0
    for db in (a, b):
        with Store.open(db) as st:
            sync(st, centre.field)
    return merged, centre.reader, centre


@pytest.mark.parametrize("fmt", ["text", "geojson", "csv"])
def test_summary_of_thousands_is_the_same_from_the_centre(area, cli, fmt):
    merged, url, _ = area
    local = cli("--db", str(merged), "summary", "--format", fmt)
    remote = cli("--db", url, "summary", "--format", fmt)
    assert local[0] == remote[0] == 0, remote[2]
    assert remote == local
    if fmt == "geojson":
        got = json.loads(remote[1])
        assert len(got["features"]) > 2000
        assert "10 buildings without a location" in remote[2]
    if fmt == "text":
        assert "1 with a conflict to resolve" in remote[1]
        assert '"Quoted"' in remote[1] and "Back\\slash" in remote[1] and "…" in remote[1]
        text = remote[1]
        assert text.index("1 B Street") < text.index("1 A Street")   # LONG + "a" first
        assert "Bell\\u0007 Tower" in text


def test_wide_names_are_padded_by_display_width_as_on_a_laptop(area, cli):
    """A CJK name takes two cells a character: the columns after it start where they do on
    every other row (padding by characters would push them two cells right per character)."""
    from rich.cells import cell_len

    _, url, centre = area
    assert centre.sql("SELECT count(*) FROM triage.building_latest WHERE line IS NULL "
                      "AND building = '高松ビル'") != "0"     # laid out by the command
    lines = [line for line in cli("--db", url, "summary")[1].splitlines() if "  2026-" in line]
    starts = {cell_len(line[:line.index("  2026-")]) for line in lines}
    assert len(lines) > 2000 and len(starts) == 1, starts
    assert any(line.startswith("高松ビル") for line in lines)


def test_the_list_of_thousands_is_the_same_from_the_centre(area, cli):
    merged, url, centre = area
    assert cli("--db", url, "list", "--hidden") == cli("--db", str(merged), "list", "--hidden")
    assert centre.check_maintained() > 2000


def test_numbers_are_written_as_python_writes_them(area):
    import psycopg

    from triage.centre.summary_sql import fixed5, number

    rng = random.Random(16)
    values = [-41.0, 174.0, 0.0, -0.0, 1e-05, 0.000005, -0.000005, 0.00001234, 0.0000049999,
              -0.000123456789, 90.0, -180.0, 179.999999, 179.999995, -179.999995, 0.1, 1 / 3,
              12.5, 1e-300, 5e-324, -41.287645, 174.776235, 12.345675]
    values += [rng.uniform(-180, 180) for _ in range(1000)]
    values += [round(rng.uniform(-90, 90), rng.randint(0, 8)) for _ in range(1000)]
    values += [rng.uniform(-1e-3, 1e-3) for _ in range(200)]
    # Six places ending in 5: halfway in decimal, never in binary (rounded either way).
    ties = [float(f"{rng.randint(-18_000_000, 18_000_000) * 10 + 5}e-6") for _ in range(2000)]
    ties += [round(rng.uniform(-180, 180), 5) + rng.choice([-1, 1]) * 5e-6 for _ in range(500)]
    values += ties
    with psycopg.connect(area[1]) as c:
        c.execute("SET extra_float_digits = 1")
        got = c.execute(f"SELECT {number('x')}, {fixed5('x')} "
                        "FROM unnest(%s::float8[]) AS t(x)", (values,)).fetchall()
    assert [r[0] for r in got] == [json.dumps(v) for v in values]
    assert [r[1] for r in got] == ["%.5f" % v for v in values]  # noqa: UP031
    ups = sum(("%.5f" % abs(v))[-1] != ("%.6f" % abs(v))[-2] for v in ties)  # noqa: UP031
    assert 0 < ups < len(ties)      # both ways occur


def test_the_server_finds_the_characters_the_command_lays_out(area):
    """`NOT_PLAIN_SQL` finds exactly what `triage.cli.table.NOT_PLAIN` finds."""
    import psycopg

    from triage.centre.summary_sql import NOT_PLAIN_SQL
    from triage.cli.table import plain

    chars = [chr(c) for c in [*range(1, 0x3100), 0xFEFF, 0xFF21, 0x1F600, 0x10FFFD]
             if not 0xD800 <= c < 0xE000]
    with psycopg.connect(area[1]) as c:
        got = c.execute("SELECT x ~ %s FROM unnest(%s::text[]) WITH ORDINALITY AS t(x, i) "
                        "ORDER BY i", (NOT_PLAIN_SQL, chars)).fetchall()
    assert [not r[0] for r in got] == [plain(ch) for ch in chars]


def test_a_centre_with_cells_of_another_layout_is_read_the_slow_way_then_made_again(area, cli,
                                                                                     monkeypatch):
    from triage.centre import summary_sql as q
    from triage.centre.reader import CentreReader
    from triage.centre.schema import init

    merged, url, centre = area
    local = cli("--db", str(merged), "summary")
    local_geo = cli("--db", str(merged), "summary", "--format", "geojson")
    centre.sql("UPDATE triage.text_layout SET layout = 'an older layout'; "
               "UPDATE triage.building_latest SET line = 'stale', feature = 'stale'; "
               "UPDATE triage.building_tally SET buildings = 1")
    seen: list[str] = []
    real = CentreReader._query
    monkeypatch.setattr(CentreReader, "_query",
                        lambda self, sql, params=None: seen.append(sql) or real(self, sql, params))
    assert cli("--db", url, "summary") == local
    assert cli("--db", url, "summary", "--format", "geojson") == local_geo
    assert q.lines_sql(False, True) in seen and q.features_sql(False, True) in seen
    assert q.TALLY_MADE in seen and q.TALLY not in seen
    init(centre.admin)      # remakes every row's cells, and counts again
    assert centre.sql("SELECT count(*) FROM triage.building_latest WHERE line = 'stale' "
                      "OR feature = 'stale'") == "0"
    seen.clear()
    assert cli("--db", url, "summary") == local and q.lines_sql(True, True) in seen
    assert cli("--db", url, "summary", "--format", "geojson") == local_geo
    assert q.TALLY in seen


def test_lines_left_to_the_command_are_filled_in_order_or_refused():
    from triage.centre.connect import CentreError
    from triage.centre.reader import _fill

    assert _fill("a\n\nc\n", ["B", "D"], "centre") == "a\nB\nc\nD"
    assert _fill("", ["only"], "centre") == "only"
    with pytest.raises(CentreError, match="changed while read"):
        _fill("a\n\nc", [], "centre")
