"""Photos kept in the store, and never read from outside the survey's folder."""

from __future__ import annotations

import io
import json
import sqlite3
import struct
import zlib
from pathlib import Path

import pytest
from PIL import Image
from pypdf import PdfReader

from tests.report.conftest import clinic_dict
from triage.photos import PhotoRefused, sha256_hex
from triage.store import Store


def _img(fmt: str = "JPEG", size: tuple[int, int] = (320, 240), shade: int = 90) -> bytes:
    buf = io.BytesIO()
    Image.new("RGB", size, (shade, 100, 110)).save(buf, format=fmt)
    return buf.getvalue()


def _bomb() -> bytes:
    def chunk(kind: bytes, data: bytes) -> bytes:
        return (struct.pack(">I", len(data)) + kind + data
                + struct.pack(">I", zlib.crc32(kind + data) & 0xFFFFFFFF))
    return (b"\x89PNG\r\n\x1a\n" + chunk(b"IHDR", struct.pack(">IIBBBBB", 20000, 20000, 8, 2,
                                                                0, 0, 0))
            + chunk(b"IDAT", zlib.compress(b"\0" * 64)) + chunk(b"IEND", b""))


def _survey(folder: Path, photos: dict[str, list[str]], name: str = "clinic.json") -> Path:
    """A survey file in `folder` whose first member group of storey 1 and first hazard have
    these photo paths."""
    d = clinic_dict()
    d["storeys"][1]["members"][1]["photos"] = [{"path": p, "caption": f"c {p}"}
                                               for p in photos.get("member", [])]
    d["hazards"][0]["photos"] = [{"path": p} for p in photos.get("hazard", [])]
    f = folder / name
    f.write_text(json.dumps(d, ensure_ascii=False), encoding="utf-8")
    return f


def _images(pdf: Path) -> int:
    return len([i for p in PdfReader(pdf).pages for i in p.images])


def _rows(db: Path) -> tuple[int, int, int]:
    if not db.exists():
        return (0, 0, 0)
    c = sqlite3.connect(db)
    try:
        return tuple(c.execute(f"SELECT count(*) FROM {t}").fetchone()[0]   # type: ignore
                     for t in ("surveys", "changes", "photos"))
    finally:
        c.close()


def test_import_copies_photos_into_the_store_and_reports_show_them_once_files_are_gone(
        tmp_path, cli):
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    jpeg, png = _img("JPEG"), _img("PNG", shade=30)
    (field / "img" / "c3.jpg").write_bytes(jpeg)
    (field / "img" / "parapet.png").write_bytes(png)
    src = _survey(field, {"member": ["img/c3.jpg", "img/gone.jpg"],
                          "hazard": ["img/parapet.png"]})
    db = tmp_path / "field.db"
    code, out, err = cli("--db", str(db), "import", str(src))
    assert code == 0, err
    assert out == "" and "2 photos stored" in err.splitlines()[0]
    assert err.count("\n") == 2 and "warning" in err and "img/gone.jpg" in err
    assert "listed as missing" in err
    with Store.open(db) as st:
        (row,) = st.list_surveys()
        doc = st.survey_json(row.id)
        ph = doc["storeys"][1]["members"][1]["photos"]
        assert ph[0] == {"path": "img/c3.jpg", "caption": "c img/c3.jpg",
                         "sha256": sha256_hex(jpeg)}
        assert "sha256" not in ph[1]
        assert st.photo_bytes(sha256_hex(png)) == png
        assert st.missing_photos(row.id) == [("storeys[1].members[1].photos[1]",
                                              "img/gone.jpg")]
        sid = row.id
    # importing the same file again changes nothing
    code, _, err = cli("--db", str(db), "import", str(src))
    assert code == 0 and err.startswith("unchanged")
    # the originals go; a report made from the database still shows both photos
    for f in field.rglob("*"):
        if f.is_file():
            f.unlink()
    pdf = tmp_path / "r.pdf"
    code, _, err = cli("--db", str(db), "report", sid[:8], "-o", str(pdf))
    assert code == 0, err
    assert _images(pdf) == 2
    text = " ".join(p.extract_text() for p in PdfReader(pdf).pages)
    assert "img/gone.jpg (not found)" in " ".join(text.split())


@pytest.mark.parametrize("bad, rule", [
    (lambda: _img("GIF"), "not a JPEG or PNG image"),
    (lambda: b"%PDF-1.7 pretending", "not a JPEG or PNG image"),
    (_bomb, "pixels is over the 40-megapixel limit"),
    (lambda: _img("PNG")[:120], "damaged or truncated"),
])
def test_a_photo_breaking_a_rule_refuses_its_survey_whole(tmp_path, cli, bad, rule):
    (tmp_path / "img").mkdir()
    (tmp_path / "img" / "ok.jpg").write_bytes(_img())
    (tmp_path / "img" / "bad.jpg").write_bytes(bad())
    src = _survey(tmp_path, {"member": ["img/ok.jpg"], "hazard": ["img/bad.jpg"]})
    db = tmp_path / "field.db"
    code, out, err = cli("--db", str(db), "import", str(src))
    assert code == 1 and out == "" and err.count("\n") == 1
    assert "hazards[0].photos[0] (img/bad.jpg)" in err and rule in err
    assert _rows(db) == (0, 0, 0)            # nothing stored, not even the good photo


@pytest.mark.parametrize("how", ["absolute", "dotdot", "symlink"])
def test_photo_paths_leaving_the_folder_are_refused_on_import_and_report(tmp_path, cli,
                                                                         how):
    secret = tmp_path / "secret.png"
    secret.write_bytes(_img("PNG", shade=5))
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    path = {"absolute": str(secret), "dotdot": "../secret.png", "symlink": "img/nice.png"}[how]
    if how == "symlink":
        (field / "img" / "nice.png").symlink_to(secret)
    src = _survey(field, {"member": [path]})
    pdf = tmp_path / "r.pdf"
    code, _, err = cli("report", str(src), "-o", str(pdf))
    assert code == 1 and err.count("\n") == 1 and not pdf.exists()
    assert "storeys[1].members[1].photos[0]" in err and "inside" in err
    db = tmp_path / "field.db"
    code, _, err = cli("--db", str(db), "import", str(src))
    assert code == 1 and err.count("\n") == 1 and "storeys[1].members[1].photos[0]" in err
    assert _rows(db) == (0, 0, 0)


def test_a_survey_on_standard_input_has_no_folder_for_photos(tmp_path, cli, monkeypatch):
    src = _survey(tmp_path, {"member": ["img/c3.jpg"]})
    db = tmp_path / "field.db"
    monkeypatch.setattr("sys.stdin", io.StringIO(src.read_text(encoding="utf-8")))
    code, _, err = cli("--db", str(db), "import", "-")
    assert code == 1 and "standard input has no folder" in err
    plain = _survey(tmp_path, {}, "plain.json")
    monkeypatch.setattr("sys.stdin", io.StringIO(plain.read_text(encoding="utf-8")))
    code, out, err = cli("--db", str(db), "import", "-")
    assert code == 0 and out == "" and err.startswith("imported"), err


def test_export_to_a_folder_backup_and_merge_carry_the_photos(tmp_path, cli):
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    jpeg = _img("JPEG")
    (field / "img" / "c3.jpg").write_bytes(jpeg)
    (field / "photo of parapet.png").write_bytes(_img("PNG", shade=10))
    src = _survey(field, {"member": ["img/c3.jpg"], "hazard": ["photo of parapet.png"]})
    lap = tmp_path / "laptop.db"
    assert cli("--db", str(lap), "import", str(src))[0] == 0
    sid = json.loads(cli("--db", str(lap), "list", "--format", "json")[1])["surveys"][0]["id"]
    for f in field.rglob("*"):
        if f.is_file():
            f.unlink()
    # export DIR/: survey.json and img/, which import anywhere with their photos
    out = tmp_path / "handover"
    code, said, err = cli("--db", str(lap), "export", sid[:8], "-o", f"{out}/")
    assert code == 0, err
    assert said == "" and "with 2 photos" in err
    doc = json.loads((out / "survey.json").read_text(encoding="utf-8"))
    paths = [doc["storeys"][1]["members"][1]["photos"][0]["path"],
             doc["hazards"][0]["photos"][0]["path"]]
    assert paths[0] == "img/c3.jpg" and paths[1].startswith("img/") and paths[1].endswith(".png")
    assert (out / "img" / "c3.jpg").read_bytes() == jpeg
    other = tmp_path / "other.db"
    code, said, err = cli("--db", str(other), "import", str(out / "survey.json"))
    assert code == 0 and said == "" and "2 photos stored" in err, err
    # backup and merge
    copy = tmp_path / "copy.db"
    assert cli("--db", str(lap), "backup", "-o", str(copy))[0] == 0
    centre = tmp_path / "centre.db"
    assert cli("merge", str(copy), "--into", str(centre))[0] == 0
    assert _rows(centre)[2] == 2
    pdf = tmp_path / "centre.pdf"
    code, _, err = cli("--db", str(centre), "report", sid, "-o", str(pdf))
    assert code == 0, err
    assert _images(pdf) == 2


def test_merge_leaves_behind_a_blob_that_is_not_what_its_name_says(tmp_path, cli):
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    (field / "img" / "c3.jpg").write_bytes(_img())
    src = _survey(field, {"member": ["img/c3.jpg"]})
    lap = tmp_path / "laptop.db"
    assert cli("--db", str(lap), "import", str(src))[0] == 0
    c = sqlite3.connect(lap)
    c.execute("UPDATE photos SET data = ?", (_img("PNG", shade=1),))   # swapped behind our back
    c.commit()
    c.close()
    centre = tmp_path / "centre.db"
    assert cli("merge", str(lap), "--into", str(centre))[0] == 0
    assert _rows(centre)[2] == 0
    with Store.open(lap) as st:
        sid = st.list_surveys()[0].id
        sha = st.survey_json(sid)["storeys"][1]["members"][1]["photos"][0]["sha256"]
        assert st.photo_bytes(sha) is None       # read back checked against its name


def test_attach_photo_stores_blob_and_item_in_one_transaction(tmp_path):
    from tests.report.conftest import clinic_dict as d
    from triage.model import parse_survey

    pic = tmp_path / "IMG_0042.jpg"
    pic.write_bytes(_img())
    gif = tmp_path / "anim.jpg"
    gif.write_bytes(_img("GIF"))
    with Store.open(tmp_path / "f.db") as st:
        s = parse_survey(d())
        st.add_survey(s)
        sid = str(s.survey_id)
        rev = st.attach_photo(sid, "hazards[0].photos", pic, caption="parapet, north")
        assert rev == 2
        ph = st.survey_json(sid)["hazards"][0]["photos"][0]
        assert ph == {"path": "img/IMG_0042.jpg", "caption": "parapet, north",
                      "sha256": sha256_hex(pic.read_bytes())}
        before = _rows(tmp_path / "f.db")
        with pytest.raises(PhotoRefused, match="not a JPEG or PNG"):
            st.attach_photo(sid, "hazards[0].photos", gif)
        with pytest.raises(ValueError):     # the edit refused: no blob left behind either
            st.attach_photo(sid, "storeys[9].photos", tmp_path / "IMG_0042.jpg")
        assert _rows(tmp_path / "f.db") == before
        st.undo_last(sid)
        assert st.survey_json(sid)["hazards"][0].get("photos", []) == []
