"""`triage import`, `export`, `list`, `backup`: surveys in and out, refusals one line each."""

from __future__ import annotations

import json
import sqlite3
import threading
import time
from pathlib import Path
from typing import Any

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from tests.store.conftest import sample_dict, write_json
from triage.model import parse_survey, parse_survey_text
from triage.resources import samples_dir
from triage.store import Store


def test_import_prints_each_survey_after_commit_and_goes_on_past_bad_files(tmp_path, cli):
    db = tmp_path / "f.db"
    good = write_json(tmp_path / "good.json", sample_dict())
    other = write_json(tmp_path / "other.json", sample_dict("Wharf Store"))
    bad = tmp_path / "bad.json"
    bad.write_text("{not json", encoding="utf-8")
    wrong = sample_dict()
    wrong["storeys"][0]["height_m"] = -3
    wrong_f = write_json(tmp_path / "wrong.json", wrong)
    code, out, err = cli("--db", str(db), "import", str(good), str(bad), str(wrong_f),
                         str(other))
    assert code == 1
    ids = [str(parse_survey(sample_dict()).survey_id),
           str(parse_survey(sample_dict("Wharf Store")).survey_id)]
    # status lines and refusals on standard error, in the order the files came; no data
    assert out == ""
    lines = err.splitlines()
    assert len(lines) == 4
    assert lines[0].startswith("imported ") and ids[0] in lines[0]
    assert str(bad) in lines[1] and "not JSON" in lines[1]
    assert str(wrong_f) in lines[2] and "storeys[0].height_m" in lines[2]
    assert lines[3].startswith("imported ") and ids[1] in lines[3]
    with Store.open(db) as stq:
        assert sorted(r.id for r in stq.list_surveys()) == sorted(ids)


def test_reimport_is_a_no_op_and_a_changed_survey_under_its_id_is_refused(tmp_path, cli):
    db = tmp_path / "f.db"
    d = parse_survey(sample_dict()).to_json_dict()
    f = write_json(tmp_path / "s.json", d)
    assert cli("--db", str(db), "import", str(f))[0] == 0
    code, out, err = cli("--db", str(db), "import", str(f))
    assert code == 0 and out == "" and err.startswith("unchanged") and "stored already" in err
    d["building"]["name"] = "Not The Same"
    g = write_json(tmp_path / "changed.json", d)
    before = Store.open(db).survey_json(d["id"])
    code, out, err = cli("--db", str(db), "import", str(g))
    assert code == 1 and out == ""
    assert d["id"] in err and "already stored" in err and len(err.splitlines()) == 1
    assert Store.open(db).survey_json(d["id"]) == before


def test_a_pdf_without_an_embedded_survey_is_refused_in_one_line(tmp_path, cli):
    pdf = tmp_path / "scan.pdf"
    pdf.write_bytes(b"%PDF-1.4\n1 0 obj << >> endobj\ntrailer << >>\n%%EOF\n")
    code, out, err = cli("--db", str(tmp_path / "f.db"), "import", str(pdf))
    assert code == 1 and out == ""
    assert len(err.splitlines()) == 1 and "scan.pdf" in err


def _roundtrip(tmp_path: Path, cli: Any, data: dict[str, Any]) -> None:
    db = tmp_path / "rt.db"
    src = write_json(tmp_path / "in.json", data)
    assert cli("--db", str(db), "import", str(src))[0] == 0
    original = parse_survey(data)
    out = tmp_path / "out.json"
    code, _, err = cli("--db", str(db), "export", str(original.survey_id), "-o", str(out))
    assert code == 0, err
    back = parse_survey_text(out.read_text(encoding="utf-8"))
    assert back == original
    assert back.canonical() == original.canonical()
    # ... and it imports back into a fresh database as the same survey, and here as a no-op.
    code, _, text = cli("--db", str(db), "import", str(out))
    assert code == 0 and text.startswith("unchanged")
    fresh = tmp_path / "fresh.db"
    assert cli("--db", str(fresh), "import", str(out))[0] == 0
    with Store.open(fresh) as f:
        assert f.load_survey(original.survey_id) == original
    for p in (db, fresh):
        for extra in ("", "-wal", "-shm"):
            Path(str(p) + extra).unlink(missing_ok=True)


def test_every_sample_survey_round_trips(tmp_path, cli):
    files = sorted(samples_dir().glob("*.json"))
    assert files, "no sample surveys found"
    for f in files:
        _roundtrip(tmp_path, cli, json.loads(f.read_text(encoding="utf-8")))


_LABELS = ["B1", "G", "1", "2", "3"]


@st.composite
def surveys(draw: Any) -> dict[str, Any]:
    n = draw(st.integers(1, 4))
    labels = _LABELS[:n]
    storeys = []
    for lab in labels:
        readings = []
        for _ in range(draw(st.integers(0, 3))):
            d = draw(st.sampled_from(["x", "y"]))
            if draw(st.booleans()):
                r: dict[str, Any] = {"dir": d, "offset_mm": draw(st.floats(-40, 40)),
                                     "gauge_mm": draw(st.sampled_from([1000, 1500.5, 2000]))}
                if draw(st.booleans()):
                    r["sd_mm"] = draw(st.floats(0.1, 3))
            else:
                r = {"dir": d, "tilt_deg": draw(st.floats(-1, 1))}
            if draw(st.booleans()):
                r["where"] = draw(st.text(max_size=8))
            readings.append(r)
        members = []
        for _ in range(draw(st.integers(0, 3))):
            kind = draw(st.sampled_from(["column", "wall", "brace", "infill"]))
            m: dict[str, Any] = {"kind": kind, "count": draw(st.integers(1, 30))}
            if draw(st.booleans()):
                m["crack_mm"] = draw(st.floats(0, 5))
            if kind == "wall" and draw(st.booleans()):
                m["dir"] = draw(st.sampled_from(["x", "y"]))
            if kind == "brace" and draw(st.booleans()):
                m["signs"] = ["brace_buckled"]
            if draw(st.booleans()):
                m["damage_class"] = draw(st.sampled_from(["I", "III", "V"]))
                m["override_reason"] = "seen on site"
            members.append(m)
        storeys.append({"label": lab, "height_m": draw(st.floats(2.4, 6)),
                        "below_grade": lab == "B1", "readings": readings, "members": members,
                        "access": draw(st.sampled_from(["full", "partial", "none"]))})
    hazards = [{"kind": draw(st.sampled_from(["falling_hazard", "visible_lean"])),
                "storey": draw(st.sampled_from(labels))}
               for _ in range(draw(st.integers(0, 2)))]
    d = sample_dict(name=draw(st.text(min_size=1, max_size=12).filter(str.strip)))
    d["storeys"] = storeys
    d["hazards"] = hazards
    if draw(st.booleans()):
        d["building"]["location"] = {"lat": draw(st.floats(-90, 90)),
                                     "lon": draw(st.floats(-180, 180))}
    return d


@settings(max_examples=25, suppress_health_check=[HealthCheck.function_scoped_fixture,
                                                  HealthCheck.too_slow], deadline=None)
@given(surveys())
def test_generated_surveys_round_trip(tmp_path, cli, data):
    _roundtrip(tmp_path, cli, data)


def test_list_text_and_json(tmp_path, cli):
    db = tmp_path / "f.db"
    f = write_json(tmp_path / "s.json", sample_dict())
    cli("--db", str(db), "import", str(f))
    code, out, _ = cli("--db", str(db), "list")
    assert code == 0
    assert out.startswith("CAUTION: Indicative only")
    sid = str(parse_survey(sample_dict()).survey_id)
    assert sid not in out   # the code, not the whole id
    row = next(line for line in out.splitlines() if line.startswith(sid[:8] + "  "))
    assert "○ occupy" in row and "Harbour Flats" in row and "no report" in row
    assert out.splitlines()[2].startswith("code      building")
    # the code shown is one export takes
    code, _, err = cli("--db", str(db), "export", row.split()[0], "-o", str(tmp_path / "e.json"))
    assert code == 0, err
    code, out, _ = cli("--db", str(db), "list", "--format", "json")
    data = json.loads(out)
    assert data["format"] == "triage-list/1" and data["count"] == 1
    (first,) = data["surveys"]
    assert first["id"] == sid and first["code"] == sid[:8] and first["tier"] == "occupy"
    assert {"id", "code", "building", "at", "tier", "provisional", "edited_since_report",
            "conflict"} <= set(first)


def test_list_codes_grow_where_two_ids_share_their_first_8_characters(tmp_path, cli):
    db = str(tmp_path / "f.db")
    ids = ["0c3d2a1b-0000-4000-8000-000000000001", "0c3d2a1b-0000-4000-8000-000000000002",
           "0c3d2a1c-0000-4000-8000-000000000003"]
    for i, sid in enumerate(ids):
        d = sample_dict()
        d["id"] = sid
        assert cli("--db", db, "import", str(write_json(tmp_path / f"{i}.json", d)))[0] == 0
    out = cli("--db", db, "list")[1].splitlines()
    assert out[2].startswith("code" + " " * 34 + "building")  # 36 cells and the gap
    rows = [line for line in out if line.startswith("0c3d2a1")]
    assert sorted(r[:38].rstrip() for r in rows) == [*ids[:2], "0c3d2a1c"]
    obj = json.loads(cli("--db", db, "list", "--format", "json")[1])
    assert sorted(r["code"] for r in obj["surveys"]) == [*ids[:2], "0c3d2a1c"]
    # each code shown resolves to its own survey
    for r in obj["surveys"]:
        got = cli("--db", db, "export", r["code"], "-o", "-")
        assert got[0] == 0 and json.loads(got[1])["id"] == r["id"]


def test_export_of_an_unknown_id_is_refused(tmp_path, cli):
    db = tmp_path / "f.db"
    cli("--db", str(db), "import", str(write_json(tmp_path / "s.json", sample_dict())))
    code, _, err = cli("--db", str(db), "export", "0000", "-o", str(tmp_path / "x.json"))
    assert code == 1 and "0000: no survey" in err
    assert not (tmp_path / "x.json").exists()


def test_backup_copies_what_is_still_in_the_wal_while_another_writes(tmp_path, cli):
    db = tmp_path / "live.db"
    st_ = Store.open(db)
    s = parse_survey(sample_dict())
    st_.add_survey(s)
    sid = str(s.survey_id)
    st_.conn.execute("PRAGMA wal_autocheckpoint = 0")
    for i in range(20):
        st_.set_value(sid, "storeys[0].notes", f"note {i}")
    assert Path(str(db) + "-wal").stat().st_size > 0
    stop = threading.Event()
    written: list[int] = []

    def writer() -> None:
        w = Store.open(db, refresh=False)
        k = 0
        while not stop.is_set():
            w.set_value(sid, "storeys[1].notes", f"w{k}")
            written.append(k)
            k += 1
            time.sleep(0.002)   # an inspector's pace is slower; SQLite's busy wait is not fair
        w.close()

    t = threading.Thread(target=writer)
    t.start()
    try:
        out = tmp_path / "handover.db"
        code, text, err = cli("--db", str(db), "backup", "-o", str(out))
    finally:
        stop.set()
        t.join()
    assert code == 0, err
    assert written, "the other writer never ran"
    assert text == "" and "handover.db" in err
    assert not Path(str(out) + "-wal").exists()
    copy = sqlite3.connect(out)
    assert copy.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    notes = json.loads(copy.execute("SELECT doc FROM surveys").fetchone()[0])
    copy.close()
    assert notes["storeys"][0]["notes"] == "note 19"
    st_.close()
    # A second backup onto the same name is refused, the first left whole.
    size = out.stat().st_size
    code, _, err = cli("--db", str(db), "backup", "-o", str(out))
    assert code == 1 and "exists already" in err and out.stat().st_size == size


@pytest.mark.parametrize("command", ["list", "export", "backup"])
def test_reading_commands_do_not_create_a_database(tmp_path, cli, command):
    db = tmp_path / "none.db"
    args = {"list": ["list"], "export": ["export", "x", "-o", str(tmp_path / "o.json")],
            "backup": ["backup", "-o", str(tmp_path / "b.db")]}[command]
    code, _, err = cli("--db", str(db), *args)
    assert code == 1 and "no database there" in err and not db.exists()


def test_a_report_pdf_carrying_its_survey_imports_like_the_json(tmp_path, cli):
    from triage.assess import assess
    from triage.report import write_report

    survey = parse_survey(sample_dict("Kelp Street House"))
    pdf = tmp_path / "report.pdf"
    write_report(survey, assess(survey), pdf)
    db = tmp_path / "f.db"
    code, out, err = cli("--db", str(db), "import", str(pdf))
    assert code == 0, err
    assert out == "" and err.startswith(f"imported {survey.survey_id}")
    with Store.open(db) as st_:
        assert st_.load_survey(survey.survey_id) == survey
    code, _, err = cli("--db", str(db), "import", str(pdf))
    assert code == 0 and err.startswith("unchanged")
