"""A photo missing when its survey was imported, present when the same file is imported again:
the same survey, the photo attached (its digest set, its blob stored, one change logged)."""

from __future__ import annotations

import io
import json
from pathlib import Path

import pytest
from PIL import Image

from tests.store.conftest import sample_dict
from triage.model import parse_survey
from triage.photos import sha256_hex
from triage.store import Store, SurveyConflict


def _jpeg(shade: int = 90) -> bytes:
    buf = io.BytesIO()
    Image.new("RGB", (64, 48), (shade, 100, 110)).save(buf, format="JPEG")
    return buf.getvalue()


def _file(folder: Path, name: str = "Harbour Flats") -> Path:
    d = sample_dict(name)
    d["id"] = "3f2b9c1e-7d4a-4e6b-9c8d-1a2b3c4d5e6f"
    d["storeys"][1]["photos"] = [{"path": "img/stair.jpg", "caption": "stair"}]
    d["storeys"][2]["members"][1]["photos"] = [{"path": "img/w2.jpg"}]
    f = folder / "survey.json"
    f.write_text(json.dumps(d, ensure_ascii=False), encoding="utf-8")
    return f


def test_a_photo_found_later_is_attached_to_the_same_survey(tmp_path, cli):
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    w2 = _jpeg(30)
    (field / "img" / "w2.jpg").write_bytes(w2)
    src = _file(field)
    db = tmp_path / "field.db"
    code, out, err = cli("--db", str(db), "import", str(src))
    assert code == 0 and out == "" and err.startswith("imported") and "img/stair.jpg" in err
    with Store.open(db) as st:
        (row,) = st.list_surveys()
        sid = row.id
        assert st.missing_photos(sid) == [("storeys[1].photos[0]", "img/stair.jpg")]
    # the photo turns up (copied off the camera late): import the same file again
    stair = _jpeg(200)
    (field / "img" / "stair.jpg").write_bytes(stair)
    code, out, err = cli("--db", str(db), "import", str(src))
    assert code == 0, err
    assert out == "" and err.startswith(f"photos added {sid}")
    assert "missing at import now found" in err
    with Store.open(db) as st:
        assert st.missing_photos(sid) == []
        assert st.photo_bytes(sha256_hex(stair)) == stair
        doc = st.survey_json(sid)
        assert doc["storeys"][1]["photos"] == [{"path": "img/stair.jpg", "caption": "stair",
                                                "sha256": sha256_hex(stair)}]
        changes = st.conn.execute("SELECT op, path, old, new, revision FROM changes "
                                  "WHERE survey_id = ? ORDER BY seq", (sid,)).fetchall()
        assert changes == [("import", "", None, changes[0][3], 1),
                           ("set", "storeys[1].photos[0].sha256", None,
                            json.dumps(sha256_hex(stair)), 2)]
        r = st.survey_row(sid)
        assert r is not None and r.revision == 2 and not r.stale
    # and once more: nothing left to do
    code, out, err = cli("--db", str(db), "import", str(src))
    assert code == 0 and out == "" and err.startswith("unchanged")


def test_a_photo_found_with_another_change_is_still_a_different_survey(tmp_path):
    field = tmp_path / "field"
    (field / "img").mkdir(parents=True)
    (field / "img" / "w2.jpg").write_bytes(_jpeg(30))
    from triage.photos import gather

    src = _file(field)
    with Store.open(tmp_path / "f.db") as st:
        got = gather(parse_survey(json.loads(src.read_text(encoding="utf-8"))), field,
                     have=st.has_photo)
        assert st.add_survey(got.survey, photos=got.photos) == "added"
        stair = _jpeg(200)
        (field / "img" / "stair.jpg").write_bytes(stair)
        d = json.loads(src.read_text(encoding="utf-8"))
        d["storeys"][0]["notes"] = "added later"
        later = gather(parse_survey(d), field, have=st.has_photo)
        with pytest.raises(SurveyConflict):
            st.add_survey(later.survey, photos=later.photos)
        # nothing was stored by the refusal
        assert st.missing_photos(str(got.survey.survey_id)) == [
            ("storeys[1].photos[0]", "img/stair.jpg")]
        assert st.photo_bytes(sha256_hex(stair)) is None
        assert st.survey_row(str(got.survey.survey_id)).revision == 1


def test_photos_found_names_only_digests_filled_at_the_same_place():
    from triage.model import canonical_json
    from triage.store.texts import photos_found

    stored = {"storeys": [{"photos": [{"path": "img/a.jpg"}, {"path": "img/b.jpg"}]}]}
    sha = "ab" * 32
    new = {"storeys": [{"photos": [{"path": "img/a.jpg", "sha256": sha},
                                   {"path": "img/b.jpg"}]}]}
    assert photos_found(stored, canonical_json(new)) == [("storeys[0].photos[0]", sha)]
    # one photo more, another path at that place, or nothing found: not the same survey
    more = {"storeys": [{"photos": [*new["storeys"][0]["photos"], {"path": "img/c.jpg"}]}]}
    assert photos_found(stored, canonical_json(more)) is None
    moved = {"storeys": [{"photos": [{"path": "img/z.jpg", "sha256": sha},
                                     {"path": "img/b.jpg"}]}]}
    assert photos_found(stored, canonical_json(moved)) is None
    assert photos_found(stored, canonical_json(stored)) is None
