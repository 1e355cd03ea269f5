"""`triage --db URL list|export|report|compare|summary`: the same output as a merged local file.

Two laptops (one survey edited on both, one edited on one, one hidden, one reported) are
merged locally with `triage merge` and synced to the centre; every reading command then gives
the same output from either. The centre is never written by any of them.
"""

from __future__ import annotations

import csv
import io
import json

import psycopg
import pytest

from tests.centre.conftest import SECRET, laptop
from triage.centre.reader import CentreReader
from triage.store import Store
from triage.store.reader import SurveyReader

TABLES = ("versions", "changes", "assessments", "reports", "photos")


@pytest.fixture
def both(centre, tmp_path, cli):
    """(local merged database, centre URL for a reader, survey ids of laptop A)."""
    a, b, area = tmp_path / "ana.db", tmp_path / "ben.db", tmp_path / "area.db"
    ids = laptop(a, 16, who="Ana")
    laptop(b, 8, who="Ben")
    with Store.open(a) as st:
        st.set_value(ids[0], "storeys[0].notes", "Ana: stair core cracked")
        st.hide_survey(ids[2])
        st.record_report(ids[3], 1, "report.pdf", None)
    with Store.open(b) as st:
        st.set_value(ids[0], "storeys[0].notes", "Ben: stair core sound")
        st.set_value(ids[1], "storeys[0].notes", "only Ben looked again")
    code, _, err = cli("merge", str(a), str(b), "--into", str(area))
    assert code == 0, err
    for db in (a, b):
        code, _, err = cli("--db", str(db), "sync", "--to", centre.field)
        assert code == 0, err
    return area, centre.reader, ids


def _counts(centre) -> list[tuple[int, ...]]:
    return [centre.rows(f"SELECT count(*) FROM triage.{t}")[0] for t in TABLES]


def _conflicts(argv: list[str], out: str) -> set[str]:
    """The buildings an output marks as in conflict, read by its own format."""
    if argv[-1] == "csv":
        return {r["building"] for r in csv.DictReader(io.StringIO(out)) if r["conflict"] == "true"}
    if argv[-1] == "geojson":
        return {f["properties"]["building"] for f in json.loads(out)["features"]
                if f["properties"]["conflict"] is True}
    # list: the 8-character code, two spaces, the building in 28 cells; summary: 26 cells
    return {line[10:38].strip() if argv[0] == "list" else line[:26].strip()
            for line in out.splitlines() if line.rstrip().endswith(("CONFLICT",
                                                                   "CONFLICT  (hidden)"))}


@pytest.mark.parametrize("argv", [
    ["summary"], ["summary", "--format", "csv"], ["summary", "--format", "geojson"],
    ["list"], ["list", "--hidden"],
])
def test_summary_and_list_are_the_same_from_the_centre(both, centre, cli, argv):
    area, url, _ = both
    before = _counts(centre)
    local = cli("--db", str(area), *argv)
    remote = cli("--db", url, *argv)
    assert local[0] == remote[0] == 0, remote[2]
    assert remote[1] == local[1]
    # the one building synced with a conflict is marked so, in every form of output
    assert _conflicts(argv, remote[1]) == {"Tidewater Medical Centre"}
    assert SECRET not in remote[1] + remote[2]
    assert _counts(centre) == before


def test_list_json_is_the_same_but_for_where_each_row_came_from(both, cli):
    area, url, _ = both
    local = json.loads(cli("--db", str(area), "list", "--format", "json", "--hidden")[1])
    remote = json.loads(cli("--db", url, "list", "--format", "json", "--hidden")[1])
    assert local["format"] == remote["format"] == "triage-list/1"
    local, remote = local["surveys"], remote["surveys"]
    for rows in (local, remote):
        for r in rows:
            r.pop("source")
    assert remote == local
    assert sum(r["conflict"] for r in remote) == 2 and sum(r["hidden"] for r in remote) == 1
    assert any(r["reported_revision"] == 1 for r in remote)


def test_export_compare_and_report_are_the_same_from_the_centre(both, centre, cli, tmp_path):
    area, url, ids = both
    before = _counts(centre)
    conflict_copy = next(r["id"] for r in json.loads(cli("--db", url, "list", "--format",
                                                         "json")[1])["surveys"]
                         if r["conflict_of"])
    for sid in (ids[0], ids[1], conflict_copy, ids[3][:8]):
        outs = []
        for db, name in ((str(area), "local"), (url, "remote")):
            path = tmp_path / f"{name}.json"
            code, out, err = cli("--db", db, "export", sid, "-o", str(path))
            assert code == 0, err
            outs.append(path.read_text())
        assert outs[0] == outs[1]
    # The two inspections of Mariner Court (before and after the aftershock).
    for fmt in ("text", "json"):
        local = cli("--db", str(area), "compare", "d6b4f2a8", "2c8f5a1e", "--format", fmt)
        remote = cli("--db", url, "compare", "d6b4f2a8", "2c8f5a1e", "--format", fmt)
        assert local == remote and local[0] == 0
    pdfs = []
    for db, name in ((str(area), "local"), (url, "remote")):
        out = tmp_path / f"{name}.pdf"
        code, _, err = cli("--db", db, "report", ids[1], "-o", str(out))
        assert code == 0, err
        assert "store revision 2" in err
        pdfs.append(out.read_bytes())
    assert pdfs[0] == pdfs[1]
    assert _counts(centre) == before


def test_the_reader_is_a_survey_reader_and_read_only_even_for_the_owner(both, centre):
    _, _, ids = both
    with CentreReader.open(centre.admin) as r:
        assert isinstance(r, SurveyReader)
        assert not hasattr(r, "record_report")
        assert r.location == f"postgresql://triage_admin@127.0.0.1:{centre.pg.port}/{centre.name}"
        assert r.match_ids(ids[1][:8]) == [ids[1]] and r.revision(ids[1]) == 2
        assert r.photo_dir(ids[1]) is None and r.photo_bytes("0" * 64) is None
        a = r.load_assessment(ids[1])
        assert a is not None and str(a.survey) == ids[1]
        with pytest.raises(psycopg.errors.ReadOnlySqlTransaction):
            r.conn.execute("INSERT INTO triage.reports (survey_id, revision, at, who, origin) "
                           "VALUES ('x', 1, 'now', 'me', 'o')")


def test_reading_commands_refuse_in_one_line(centre, pg, cli):
    pg.createdb("noschema")
    code, out, err = cli("--db", pg.url("noschema"), "summary")
    assert code == 1 and out == "" and "no triage schema" in err and len(err.splitlines()) == 1
    code, out, err = cli("--db", centre.field, "list")
    assert code == 1 and "may not read the surveys" in err and SECRET not in err
    code, out, err = cli("--db", centre.reader, "export", "0000dead", "-o", "/tmp/x.json")
    assert code == 1 and "no survey with this id" in err and SECRET not in err
    for argv in (["import", "x.json"], ["backup", "-o", "x.db"], ["sync", "--to", centre.field]):
        code, out, err = cli("--db", centre.reader, *argv)
        assert code == 1 and "serves only list, export, report, compare, summary" in err
        assert SECRET not in err


def _spy(monkeypatch) -> list[str]:
    """The SQL of every query a CentreReader runs from now on."""
    seen: list[str] = []
    real = CentreReader._query

    def query(self, sql, params=None):
        seen.append(sql)
        return real(self, sql, params)
    monkeypatch.setattr(CentreReader, "_query", query)
    return seen


def test_summary_is_current_without_any_refresh(both, centre, cli, tmp_path, monkeypatch):
    from triage.centre import summary_sql as q

    area, url, _ = both
    seen = _spy(monkeypatch)
    assert cli("--db", url, "summary") == cli("--db", str(area), "summary")
    # Every line written by the server, read in the index's order in one string.
    assert seen[1:] == [q.STORED_LAYOUT, q.TALLY, q.lines_sql(True, False)]
    # Another laptop syncs: the triggers bring the tables up to date at each commit.
    cy, area2 = tmp_path / "cy.db", tmp_path / "area2.db"
    laptop(cy, 9, seed="cy", who="Cy")
    with Store.open(cy) as st:
        st.hide_survey(st.list_surveys()[0].id)
    code, _, err = cli("--db", str(cy), "sync", "--to", centre.field)
    assert code == 0, err
    code, _, err = cli("merge", str(area), str(cy), "--into", str(area2))
    assert code == 0, err
    n = centre.check_maintained()
    assert n == 16        # Cy's ninth survey is a building of its own; the rest are Ana's
    for argv in (["summary"], ["summary", "--format", "geojson"], ["list", "--hidden"]):
        remote, local = cli("--db", url, *argv), cli("--db", str(area2), *argv)
        assert remote == local, argv
    assert f"{n} buildings: " in cli("--db", url, "summary")[1]
