"""`import -` (standard input) refusals, and `export ID -o DIR/` when its img folder cannot be
made or a photo the survey names is not in the database."""

from __future__ import annotations

import io
import json
import sys
from pathlib import Path

from tests.store.conftest import sample_dict, write_json
from triage.store import Store


def _stdin(monkeypatch, data: bytes) -> None:
    monkeypatch.setattr(sys, "stdin", io.TextIOWrapper(io.BytesIO(data), encoding="utf-8"))


def test_import_from_standard_input(tmp_path, cli, monkeypatch):
    db = tmp_path / "f.db"
    _stdin(monkeypatch, b"\xff\xfe{}")
    code, out, err = cli("--db", str(db), "import", "-")
    assert (code, out, err) == (1, "", "triage import: -: not UTF-8 text (a survey file is "
                                       "JSON)\n")
    d = sample_dict()
    d["storeys"][0]["height_m"] = -1
    _stdin(monkeypatch, json.dumps(d).encode("utf-8"))
    code, out, err = cli("--db", str(db), "import", "-")
    assert code == 1 and err.startswith("triage import: -: storeys[0].height_m: ")
    assert err.count("\n") == 1
    _stdin(monkeypatch, json.dumps(sample_dict()).encode("utf-8"))
    code, out, err = cli("--db", str(db), "import", "-")
    assert code == 0, err
    with Store.open(db) as st:
        assert [r.building for r in st.list_surveys()] == ["Harbour Flats"]


def _with_missing_photo(tmp_path: Path, cli) -> tuple[Path, str]:
    d = sample_dict()
    d["storeys"][0]["photos"] = [{"path": "img/gone.jpg", "caption": "north face"}]
    (tmp_path / "src").mkdir()
    f = write_json(tmp_path / "src" / "s.json", d)
    db = tmp_path / "f.db"
    code, _, err = cli("--db", str(db), "import", str(f))
    assert code == 0 and "img/gone.jpg" in err   # a warning: the file is missing
    with Store.open(db) as st:
        return db, st.list_surveys()[0].id


def test_export_to_a_folder_names_photos_not_in_the_database(tmp_path, cli):
    db, sid = _with_missing_photo(tmp_path, cli)
    out = tmp_path / "out"
    code, said, err = cli("--db", str(db), "export", sid, "-o", f"{out}/")
    assert code == 0
    assert said == ""   # the status line goes to standard error
    done = f"exported {sid} to {out / 'survey.json'} with 0 photos in {out / 'img'}\n"
    assert err.startswith(done) or err.endswith(done), err
    err = err.replace(done, "")
    assert err == ("triage export: 1 photo not in the database, named in survey.json without a "
                   "file: storeys[0].photos[0] (img/gone.jpg)\n")
    data = json.loads((out / "survey.json").read_text(encoding="utf-8"))
    assert data["storeys"][0]["photos"] == [{"path": "img/gone.jpg", "caption": "north face"}]
    assert list((out / "img").iterdir()) == []


def test_export_to_a_folder_whose_img_cannot_be_made(tmp_path, cli):
    db, sid = _with_missing_photo(tmp_path, cli)
    out = tmp_path / "out"
    out.mkdir()
    (out / "img").write_text("a file where the folder goes")
    code, said, err = cli("--db", str(db), "export", sid, "-o", f"{out}/")
    assert (code, said) == (1, "")
    assert err == f"triage export: {out / 'img'}: cannot be made (File exists)\n"
    assert not (out / "survey.json").exists()
