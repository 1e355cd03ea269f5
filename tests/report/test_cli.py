"""`triage key`, `triage report` and `triage verify` as a user runs them (in process)."""

from __future__ import annotations

import json
import stat
from pathlib import Path

import pytest

from tests.report.conftest import clinic_dict


@pytest.fixture
def survey_file(tmp_path: Path) -> Path:
    p = tmp_path / "clinic.json"
    p.write_text(json.dumps(clinic_dict(), ensure_ascii=False), encoding="utf-8")
    return p


@pytest.fixture
def keyfile(tmp_path: Path, cli, monkeypatch) -> Path:
    monkeypatch.setenv("TRIAGE_KEY_PASSPHRASE", "harbour light")
    k = tmp_path / "aroha.key"
    code, out, err = cli("key", "new", "--name", "Aroha Ngāti", "--id", "R-77", "-o",
                         str(k))
    assert code == 0, err
    assert out == "" and "fingerprint" in err and "trusted on this laptop" in err
    return k


def test_key_new_list_trust(keyfile: Path, cli, tmp_path: Path, monkeypatch):
    assert stat.S_IMODE(keyfile.stat().st_mode) == 0o600
    assert (tmp_path / "aroha.pub").exists()
    code, out, _ = cli("key", "list")
    assert code == 0 and "Aroha Ngāti (id R-77)" in out
    # another laptop's key, trusted here from its .pub file
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "elsewhere"))
    assert cli("key", "new", "--name", "Øster", "--id", "E-2", "-o",
               str(tmp_path / "o.key"), "--no-passphrase")[0] == 0
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "home"))
    code, out, err = cli("key", "trust", str(tmp_path / "o.pub"))
    assert code == 0 and out == "" and "Øster" in err
    assert len(cli("key", "list")[1].splitlines()) == 2


def test_key_new_without_passphrase_source_refused(cli, tmp_path: Path):
    code, _, err = cli("key", "new", "--name", "A", "--id", "1", "-o",
                       str(tmp_path / "a.key"))
    assert code == 1 and "TRIAGE_KEY_PASSPHRASE" in err and len(err.splitlines()) == 1
    assert not (tmp_path / "a.key").exists()


def test_report_and_verify_codes(keyfile: Path, survey_file: Path, cli, tmp_path: Path):
    out = tmp_path / "r.pdf"
    code, text, err = cli("report", str(survey_file), "-o", str(out), "--key",
                          str(keyfile))
    assert code == 0, err
    assert text == "" and "signed with key" in err and "indicative only" in err
    code, text, _ = cli("verify", str(out))
    assert code == 0 and "Aroha Ngāti" in text and "R-77" in text
    assert cli("verify", str(out), "--expect", "0" * 32)[0] == 4
    data = out.read_bytes()
    bad = tmp_path / "bad.pdf"
    bad.write_bytes(data[:1000] + bytes([data[1000] ^ 1]) + data[1001:])
    code, _, err = cli("verify", str(bad))
    assert code == 1 and err.count("\n") == 1 and "Traceback" not in err
    unsigned = tmp_path / "u.pdf"
    assert cli("report", str(survey_file), "-o", str(unsigned))[0] == 0
    code, _, err = cli("verify", str(unsigned))
    assert code == 3 and "no signature" in err
    assert cli("verify", str(out), "--expect", "nonsense")[0] == 2


def test_wrong_passphrase_is_one_clear_line(keyfile: Path, survey_file: Path, cli,
                                            tmp_path: Path, monkeypatch):
    monkeypatch.setenv("TRIAGE_KEY_PASSPHRASE", "not it")
    out = tmp_path / "r.pdf"
    code, _, err = cli("report", str(survey_file), "-o", str(out), "--key",
                       str(keyfile))
    assert code == 1
    assert err == f"triage report: wrong passphrase for {keyfile}\n"
    assert not out.exists()


def test_report_refusals(cli, tmp_path: Path, survey_file: Path):
    bad = tmp_path / "bad.json"
    bad.write_text('{"format": "triage-survey/1"}')
    code, _, err = cli("report", str(bad), "-o", str(tmp_path / "x.pdf"))
    # every missing field named, one a line, each with the file
    lines = err.splitlines()
    assert code == 1 and len(lines) == 3 and all(str(bad) in line for line in lines)
    assert [line.split(": ")[2] for line in lines] == ["building", "inspection", "storeys"]
    code, _, err = cli("report", str(tmp_path / "absent.json"), "-o",
                       str(tmp_path / "x.pdf"))
    assert code == 1 and "no such file" in err
    code, _, err = cli("report", str(survey_file), "-o", str(survey_file))
    assert code == 1 and "survey file itself" in err
    assert json.loads(survey_file.read_text(encoding="utf-8"))["format"] == "triage-survey/1"
    code, _, err = cli("report", str(survey_file), "-o",
                       str(tmp_path / "nofolder" / "x.pdf"))
    assert code == 1 and "folder does not exist" in err
    assert not list(tmp_path.glob("*.pdf"))


def test_report_from_the_database(cli, tmp_path: Path, survey_file: Path):
    store = pytest.importorskip("triage.store")
    from pypdf import PdfReader

    from triage.model import parse_survey

    db = tmp_path / "t.db"
    s = parse_survey(clinic_dict())
    with store.Store.open(db) as st:
        st.add_survey(s, "Tess Tester")
        rev = st.revision(str(s.survey_id))
    out = tmp_path / "db.pdf"
    code, text, err = cli("--db", str(db), "report", str(s.survey_id), "-o", str(out))
    assert code == 0, err
    assert text == "" and f"store revision {rev}" in err
    first = " ".join(PdfReader(out).pages[0].extract_text().split())
    assert f"store revision {rev}" in first
    with store.Store.open(db) as st:
        row = next(r for r in st.list_surveys() if r.id == str(s.survey_id))
        assert row.edited_since_report is False
        st.set_value(str(s.survey_id), "building.use", "clinic", "Tess Tester")
        row = next(r for r in st.list_surveys() if r.id == str(s.survey_id))
        assert row.edited_since_report is True
    code, _, err = cli("--db", str(db), "report", "6f1c0c3e-0000-5d4e-9a61-7d2f0b8e4c11",
                       "-o", str(tmp_path / "none.pdf"))
    assert code == 1 and len(err.splitlines()) == 1


def test_a_report_of_a_stored_survey_shows_its_photos_after_the_files_are_gone(
        tmp_path: Path, cli):
    from PIL import Image
    from pypdf import PdfReader

    (tmp_path / "img").mkdir()
    Image.new("RGB", (800, 600), (120, 130, 140)).save(tmp_path / "img" / "c3.jpg")
    d = clinic_dict()
    d["storeys"][1]["members"][1]["photos"] = [{"path": "img/c3.jpg", "caption": "C3 face"}]
    d["id"] = "0c4e9a61-5b2d-4f8e-a7c3-9d1b6e2f4a80"
    src = tmp_path / "clinic.json"
    src.write_text(json.dumps(d, ensure_ascii=False), encoding="utf-8")
    db = str(tmp_path / "field.db")
    assert cli("--db", db, "import", str(src))[0] == 0
    out = tmp_path / "from-db.pdf"
    # The start of the id, as `triage list` shows it, names the survey as well.
    code, _, said = cli("--db", db, "report", d["id"][:8], "-o", str(out))
    assert code == 0, said
    assert "store revision 1" in said
    assert len([i for p in PdfReader(out).pages for i in p.images]) == 1
    # The photo was copied into the database: with the survey file and the photo gone, the
    # report made from the database still shows it.
    src.unlink()
    (tmp_path / "img" / "c3.jpg").unlink()
    code, _, err = cli("--db", db, "report", d["id"], "-o", str(out))
    assert code == 0, err
    assert len([i for p in PdfReader(out).pages for i in p.images]) == 1


def test_a_borrowed_name_is_refused_from_the_command(keyfile: Path, survey_file: Path, cli,
                                                     tmp_path: Path):
    """A key trusted as Aroha whose file header was edited to say Mere: a P-256 key refuses to
    sign; an Ed25519 key of the first round signs, and verify exits 4 naming both."""
    from triage.report.keys import new_key

    text = keyfile.read_text(encoding="utf-8")
    keyfile.write_text(text.replace('"Aroha Ngāti"', '"Mere Kōwhai"').replace('"R-77"', '"M-1"'),
                       encoding="utf-8")
    out = tmp_path / "r.pdf"
    code, _, err = cli("report", str(survey_file), "-o", str(out), "--key",
                       str(keyfile))
    assert code == 1 and len(err.splitlines()) == 1 and not out.exists()
    assert "Mere Kōwhai (id M-1)" in err and "made for Aroha Ngāti (id R-77)" in err

    old = tmp_path / "old.key"
    new_key("Aroha Ngāti", "R-77", old, None, algorithm="ed25519")
    text = old.read_text(encoding="utf-8")
    old.write_text(text.replace('"Aroha Ngāti"', '"Mere Kōwhai"').replace('"R-77"', '"M-1"'),
                   encoding="utf-8")
    code, _, err = cli("report", str(survey_file), "-o", str(out), "--key", str(old))
    assert code == 0, err
    code, _, err = cli("verify", str(out))
    assert code == 4 and len(err.splitlines()) == 1
    assert "the report names the signer Mere Kōwhai (id M-1)" in err
    assert "is trusted here as Aroha Ngāti (id R-77)" in err


def test_pdf_readers_see_the_signer_of_a_command_made_report(keyfile: Path, survey_file: Path,
                                                              cli, tmp_path: Path):
    from tests.report.test_pdfsig import run_pdfsig

    out = tmp_path / "r.pdf"
    assert cli("report", str(survey_file), "-o", str(out), "--key", str(keyfile))[0] == 0
    text = run_pdfsig(out)
    assert "Signer Certificate Common Name: Aroha Ngāti" in text
    assert "Signature is Valid." in text


def test_key_list_names_first_round_keys(cli, tmp_path: Path):
    from triage.report.keys import new_key

    new_key("Aroha Ngāti", "R-77", tmp_path / "n.key", None)
    old, _ = new_key("Tess Tester", "T-1", tmp_path / "o.key", None, algorithm="ed25519")
    code, out, _ = cli("key", "list")
    lines = out.splitlines()
    assert code == 0 and len(lines) == 2
    assert lines[0].endswith("Aroha Ngāti (id R-77)")
    assert lines[1] == f"{old.fingerprint}  Tess Tester (id T-1)  (Ed25519, signs the first way)"
