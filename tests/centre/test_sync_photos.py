"""Photos travel to the centre: every blob the server lacks is sent once, in transactions of at
most a set size, and read back from the centre checked against its name."""

from __future__ import annotations

import hashlib
import io
from pathlib import Path

from PIL import Image

import triage.centre.sync as sync_module
from tests.store.conftest import sample
from triage.centre.reader import CentreReader
from triage.centre.sync import sync
from triage.store import Store


def _jpeg(path: Path, shade: int) -> Path:
    buf = io.BytesIO()
    Image.new("RGB", (64, 48), (shade, 90, 40)).save(buf, format="JPEG")
    path.write_bytes(buf.getvalue())
    return path


def test_photos_are_sent_once_in_small_batches_and_read_back(centre, tmp_path, monkeypatch):
    db = tmp_path / "lap.db"
    files = [_jpeg(tmp_path / f"p{k}.jpg", 30 * k) for k in range(3)]
    with Store.open(db) as st:
        s = sample()
        st.add_survey(s)
        sid = str(s.survey_id)
        for k, f in enumerate(files):
            st.attach_photo(sid, "storeys[0].photos", f, caption=f"photo {k}")
    shas = sorted(hashlib.sha256(f.read_bytes()).hexdigest() for f in files)
    # a batch limit below one photo's size: one transaction per photo
    monkeypatch.setattr(sync_module, "PHOTO_BATCH_BYTES", 1)
    with Store.open(db) as st:
        r = sync(st, centre.field)
    assert r.photos == 3
    assert r.transactions == 1 + 3   # the survey's, then one per photo
    assert centre.rows("SELECT sha256 FROM triage.photos ORDER BY sha256") == [(x,) for x in shas]
    with Store.open(db) as st:
        again = sync(st, centre.field)
    assert again.photos == 0 and again.nothing
    with CentreReader.open(centre.admin) as reader:
        for f in files:
            data = f.read_bytes()
            assert reader.photo_bytes(hashlib.sha256(data).hexdigest()) == data
        assert reader.photo_bytes("0" * 64) is None
        assert reader.photo_dir(sid) is None
