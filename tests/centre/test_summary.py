"""`summary` from the centre, written by the server, equals the merged local database's.

At a scale where order, cuts, escapes and counts have room to go wrong: thousands of
buildings, names that tie once ASCII letters are folded, names and addresses longer than their
columns, quotes, backslashes and non-ASCII letters, buildings without a location or at whole
degrees, hidden surveys and a conflict.
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
         "Ōtaki Street Flats, the long north wing with the stair core"]


@pytest.fixture(scope="module")
def area(pg, tmp_path_factory):
    """(merged local database, centre URL for a reader, the Centre) of two laptops."""
    from tests.centre.conftest import Centre, _names
    from triage.centre.sync import sync
    from triage.cli import main

    tmp = tmp_path_factory.mktemp("summary")
    name = f"c{next(_names)}"
    pg.sql(f"CREATE DATABASE {name} TEMPLATE template_centre STRATEGY FILE_COPY")
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


def test_the_list_of_thousands_is_the_same_from_the_centre(area, cli):
    merged, url, centre = area
    assert cli("--db", url, "list", "--hidden") == cli("--db", str(merged), "list", "--hidden")
    assert centre.check_maintained() > 2000


def test_numbers_are_written_as_python_writes_them(area):
    import psycopg

    from triage.centre.summary_sql import _number

    rng = random.Random(16)
    values = [-41.0, 174.0, 0.0, -0.0, 1e-05, 0.00001234, -0.000123456789, 90.0, -180.0,
              179.999999, 0.1, 1 / 3, 12.5, 1e-300, 5e-324]
    values += [rng.uniform(-180, 180) for _ in range(500)]
    values += [round(rng.uniform(-90, 90), rng.randint(0, 8)) for _ in range(500)]
    values += [rng.uniform(-1e-3, 1e-3) for _ in range(100)]
    with psycopg.connect(area[1]) as c:
        c.execute("SET extra_float_digits = 1")
        got = c.execute(f"SELECT {_number('x')} FROM unnest(%s::float8[]) AS t(x)",
                        (values,)).fetchall()
    assert [r[0] for r in got] == [json.dumps(v) for v in values]


def test_a_centre_with_cells_of_another_layout_is_read_the_slow_way_then_made_again(area, cli,
                                                                                     monkeypatch):
    from triage.centre import summary_sql as q
    from triage.centre.reader import CentreReader
    from triage.centre.schema import init

    merged, url, centre = area
    local = cli("--db", str(merged), "summary")
    centre.sql("UPDATE triage.text_layout SET layout = 'an older layout'; "
               "UPDATE triage.building_latest SET text_before = 'stale'")
    seen: list[str] = []
    real = CentreReader._query
    monkeypatch.setattr(CentreReader, "_query",
                        lambda self, sql, params=(): seen.append(sql) or real(self, sql, params))
    assert cli("--db", url, "summary") == local
    assert q.TEXT_MADE in seen and q.TEXT_STORED not in seen
    init(centre.admin)      # remakes every row's cells
    assert centre.sql("SELECT count(*) FROM triage.building_latest WHERE text_before = "
                      "'stale'") == "0"
    seen.clear()
    assert cli("--db", url, "summary") == local and q.TEXT_STORED in seen
