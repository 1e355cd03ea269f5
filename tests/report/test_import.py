"""`triage import REPORT.pdf` verifies the report first, for both kinds of signature:
changed or damaged is refused (exit 1, nothing stored); unsigned, signed by a key not trusted
here, or intact but re-assessed to another tier is imported with one warning line naming why."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.report.conftest import KINDS
from tests.report.test_signing import _replace_embedded_survey
from triage.report import read_embedded, write_report
from triage.report.keys import new_key
from triage.store import Store


def stored(db: Path) -> list[str]:
    if not db.exists():
        return []
    with Store.open(db) as st:
        return [r.id for r in st.list_surveys(include_hidden=True)]


@pytest.fixture(params=KINDS)
def kind(request) -> str:
    return request.param


def test_changed_report_is_refused(clinic_pair, kind, tmp_path: Path, cli):
    s, a = clinic_pair
    key, _ = new_key("Tess Tester", "T-1", tmp_path / "t.key", None, algorithm=kind)
    pdf = tmp_path / "r.pdf"
    write_report(s, a, pdf, key=key)
    text, _ = read_embedded(pdf)
    forged = tmp_path / "forged.pdf"
    forged.write_bytes(_replace_embedded_survey(
        pdf.read_bytes(), text.replace("Ngāti Whare Clinic", "Forged Clinic").encode()))
    db = tmp_path / "f.db"
    code, out, err = cli("--db", str(db), "import", str(forged))
    assert code == 1 and out == ""
    assert len(err.splitlines()) == 1
    assert "forged.pdf: refused, the report is changed or damaged" in err
    assert stored(db) == []
    # a damaged byte: refused too, and the intact one beside it is imported (exit 1 overall)
    damaged = tmp_path / "damaged.pdf"
    data = bytearray(pdf.read_bytes())
    data[len(data) // 3] ^= 0x01
    damaged.write_bytes(bytes(data))
    code, out, err = cli("--db", str(db), "import", str(damaged), str(pdf))
    assert code == 1 and out == "" and "damaged.pdf: refused" in err.splitlines()[0]
    assert err.splitlines()[1].startswith(f"imported {s.survey_id}")
    assert stored(db) == [str(s.survey_id)]


def test_unsigned_report_imported_with_a_warning(clinic_pair, tmp_path: Path, cli):
    s, a = clinic_pair
    pdf = tmp_path / "u.pdf"
    write_report(s, a, pdf)
    db = tmp_path / "f.db"
    code, out, err = cli("--db", str(db), "import", str(pdf))
    assert code == 0 and out == "" and err.startswith(f"imported {s.survey_id}")
    assert err.splitlines()[1:] == [f"triage import: warning: {pdf}: imported with a warning: "
                                "unsigned: nothing shows who made this report or that it is "
                                "unchanged; its survey is imported as it reads"]
    assert stored(db) == [str(s.survey_id)]


def test_untrusted_signer_imported_with_a_warning(clinic_pair, kind, tmp_path: Path, cli,
                                                 monkeypatch):
    s, a = clinic_pair
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "elsewhere"))  # a key made on another laptop
    key, _ = new_key("Mere Kōwhai", "M-1", tmp_path / "m.key", None, algorithm=kind)
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "here"))
    pdf = tmp_path / "r.pdf"
    write_report(s, a, pdf, key=key)
    code, out, err = cli("--db", str(tmp_path / "f.db"), "import", str(pdf))
    assert code == 0 and out == "" and err.startswith(f"imported {s.survey_id}")
    assert len(err.splitlines()) == 2 and "imported with a warning" in err
    assert "signed by Mere Kōwhai (id M-1)" in err and "not trusted on this laptop" in err


def test_borrowed_name_imported_with_a_warning(clinic_pair, tmp_path: Path, cli):
    s, a = clinic_pair
    from dataclasses import replace

    key, _ = new_key("Tess Tester", "T-1", tmp_path / "t.key", None)
    pdf = tmp_path / "r.pdf"
    write_report(s, a, pdf, key=replace(key, name="Mere Kōwhai", id="M-1"))
    code, _out, err = cli("--db", str(tmp_path / "f.db"), "import", str(pdf))
    assert code == 0
    assert "Mere Kōwhai (id M-1)" in err and "Tess Tester (id T-1)" in err


def test_other_tier_imported_with_a_warning(clinic_pair, kind, tmp_path: Path, cli):
    s, a = clinic_pair
    key, _ = new_key("Tess Tester", "T-1", tmp_path / "t.key", None, algorithm=kind)
    pdf = tmp_path / "r.pdf"
    write_report(s, a.model_copy(update={"tier": "occupy", "performance_level": "IO"}), pdf,
                 key=key)
    code, out, err = cli("--db", str(tmp_path / "f.db"), "import", str(pdf))
    assert code == 0 and out == "" and err.startswith(f"imported {s.survey_id}")
    assert len(err.splitlines()) == 2
    assert "re-assesses the survey to hold/LS; the report says occupy/IO" in err


def test_intact_trusted_report_imports_silently(clinic_pair, kind, tmp_path: Path, cli):
    s, a = clinic_pair
    key, _ = new_key("Tess Tester", "T-1", tmp_path / "t.key", None, algorithm=kind)
    pdf = tmp_path / "r.pdf"
    write_report(s, a, pdf, key=key)
    code, out, err = cli("--db", str(tmp_path / "f.db"), "import", str(pdf))
    assert (code, out) == (0, "") and err.startswith(f"imported {s.survey_id}")
    assert len(err.splitlines()) == 1   # no warning
