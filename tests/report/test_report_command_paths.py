"""`triage report` on the paths no other test takes: a re-inspection's survey FILE whose earlier
survey is in the database (or not, or in a database that cannot be read), an id with no
database, a damaged database or an id that names nothing, and where the PDF may not go."""

from __future__ import annotations

import shutil
from pathlib import Path

import pypdf
import pytest

from triage.resources import samples_dir

FIRST = samples_dir() / "flats_mariner_court_1.json"
SECOND = samples_dir() / "flats_mariner_court_2.json"
SINCE = "Since the previous inspection"


def _text(pdf: Path) -> str:
    return "".join(p.extract_text() for p in pypdf.PdfReader(str(pdf)).pages)


@pytest.fixture
def second(tmp_path: Path) -> Path:
    p = tmp_path / "second.json"
    shutil.copyfile(SECOND, p)
    return p


def test_a_reinspection_file_finds_its_earlier_survey_in_the_database(tmp_path, cli, second):
    db = tmp_path / "field.db"
    assert cli("--db", str(db), "import", str(FIRST))[0] == 0
    out = tmp_path / "r.pdf"
    code, said, err = cli("--db", str(db), "report", str(second), "-o", str(out))
    assert code == 0, err
    assert said == ""   # the status line goes to standard error
    assert err.startswith(f"report written to {out} (") and "store revision" not in err
    text = _text(out)
    assert SINCE in text and "worsened from class III to class V" in text


def test_a_reinspection_file_without_its_earlier_survey_has_no_such_section(tmp_path, cli,
                                                                            second):
    out = tmp_path / "r.pdf"
    # no database at all
    code, _, err = cli("--db", str(tmp_path / "none.db"), "report", str(second), "-o",
                       str(out))
    assert code == 0, err
    assert SINCE not in _text(out)
    assert not (tmp_path / "none.db").exists()   # a report of a file creates no database
    # a database that cannot be read: the report is still written, without the section
    bad = tmp_path / "bad.db"
    bad.write_bytes(b"not a database at all\n" * 20)
    before = bad.read_bytes()
    code, _, err = cli("--db", str(bad), "report", str(second), "-o", str(out))
    assert code == 0, err
    assert SINCE not in _text(out) and bad.read_bytes() == before
    # a database that holds other surveys only
    other = tmp_path / "other.db"
    assert cli("--db", str(other), "import",
               str(samples_dir() / "school_saltmarsh_road.json"))[0] == 0
    code, _, err = cli("--db", str(other), "report", str(second), "-o", str(out))
    assert code == 0, err
    assert SINCE not in _text(out)


def test_an_id_with_no_database_is_one_line(tmp_path, cli):
    db = tmp_path / "none.db"
    code, out, err = cli("--db", str(db), "report", "3b0e6f1a", "-o",
                         str(tmp_path / "r.pdf"))
    assert (code, out) == (1, "")
    assert err == f"triage report: 3b0e6f1a: no such file, and no database at {db}\n"
    assert not db.exists()


def test_an_id_in_a_damaged_database_is_one_line(tmp_path, cli):
    db = tmp_path / "bad.db"
    db.write_bytes(b"SQLite format 3\x00" + b"\xff" * 200)
    code, _, err = cli("--db", str(db), "report", "3b0e6f1a", "-o",
                       str(tmp_path / "r.pdf"))
    assert code == 1 and err.count("\n") == 1 and str(db) in err, err
    assert not (tmp_path / "r.pdf").exists()


def test_an_id_that_names_no_survey_is_one_line(tmp_path, cli):
    db = tmp_path / "field.db"
    assert cli("--db", str(db), "import", str(FIRST))[0] == 0
    code, _, err = cli("--db", str(db), "report", "abcdef12", "-o",
                       str(tmp_path / "r.pdf"))
    assert code == 1 and err.count("\n") == 1 and "abcdef12" in err, err
    assert not (tmp_path / "r.pdf").exists()


def test_where_the_pdf_may_not_go(tmp_path, cli, second):
    folder = tmp_path / "out"
    folder.mkdir()
    cases = [
        (str(folder), f"triage report: {folder}: is a folder; give the PDF file to write\n"),
        (str(tmp_path / "nowhere" / "r.pdf"),
         f"triage report: {tmp_path / 'nowhere' / 'r.pdf'}: its folder does not exist\n"),
        (str(second), f"triage report: {second}: is the survey file itself; choose another "
                      "name\n"),
    ]
    before = second.read_bytes()
    for out, line in cases:
        code, said, err = cli("report", str(second), "-o", out)
        assert (code, said, err) == (1, "", line)
    assert second.read_bytes() == before
    code, _, err = cli("report", "no-such-file.json", "-o", str(tmp_path / "r.pdf"))
    assert (code, err) == (1, "triage report: no-such-file.json: no such file (nor a survey "
                              "id or the start of one)\n")
