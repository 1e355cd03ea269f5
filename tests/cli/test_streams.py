"""`-` for standard input and output, data on standard output, status lines on standard error."""

from __future__ import annotations

import io
import json
import sqlite3
from pathlib import Path

import pytest

from tests.cli.conftest import triage
from tests.helpers import two_storey_frame
from triage.model import parse_survey, parse_survey_text


def test_assess_reads_standard_input_as_it_reads_the_file(survey_file):
    data = survey_file.read_bytes()
    for fmt in ("text", "json"):
        from_file = triage("assess", str(survey_file), "--format", fmt)
        from_stdin = triage("assess", "-", "--format", fmt, stdin=data)
        assert from_file.returncode == from_stdin.returncode == 0, from_stdin.stderr
        assert from_stdin.stdout == from_file.stdout and from_stdin.stderr == b""
    assert json.loads(from_stdin.stdout)["tier"] == "hold"


def test_a_refusal_on_standard_input_names_it_as_dash():
    got = triage("assess", "-", stdin=b"{not json")
    assert got.returncode == 1 and got.stdout == b""
    assert got.stderr.decode().startswith("triage assess: -: (file): not JSON")
    got = triage("assess", "-", stdin=b"\xff\xfe")
    assert got.returncode == 1 and b"-: not UTF-8 text" in got.stderr


def test_export_to_dash_writes_the_survey_json_only_and_it_imports_back(tmp_path, survey_file):
    db = str(tmp_path / "f.db")
    assert triage("--db", db, "import", str(survey_file)).returncode == 0
    sid = str(parse_survey(two_storey_frame()).survey_id)
    got = triage("--db", db, "export", sid[:8], "-o", "-")
    assert got.returncode == 0
    assert parse_survey_text(got.stdout.decode()) == parse_survey(two_storey_frame())
    assert got.stderr.decode() == f"exported {sid} to standard output\n"
    # the same bytes as -o FILE writes
    assert triage("--db", db, "export", sid, "-o", str(tmp_path / "e.json")).stdout == b""
    assert (tmp_path / "e.json").read_bytes() == got.stdout
    # and back in through standard input, into this database (unchanged) and a fresh one
    again = triage("--db", db, "import", "-", stdin=got.stdout)
    assert again.returncode == 0 and again.stdout == b""
    assert again.stderr.decode().startswith(f"unchanged {sid}")
    fresh = triage("--db", str(tmp_path / "g.db"), "import", "-", stdin=got.stdout)
    assert fresh.returncode == 0 and fresh.stderr.decode().startswith(f"imported {sid}")


def test_report_to_dash_is_the_pdf_a_file_gets_and_reads_its_survey_from_stdin(tmp_path,
                                                                               survey_file):
    to_file = tmp_path / "r.pdf"
    assert triage("report", str(survey_file), "-o", str(to_file)).returncode == 0
    got = triage("report", str(survey_file), "-o", "-")
    assert got.returncode == 0, got.stderr
    assert got.stdout == to_file.read_bytes()     # unsigned reports are reproducible
    assert got.stderr.decode().startswith("report written to standard output (")
    from_stdin = triage("report", "-", "-o", "-", stdin=survey_file.read_bytes())
    assert from_stdin.returncode == 0 and from_stdin.stdout == got.stdout
    # verify reads it from standard input too: unsigned (3), the file named as -
    checked = triage("verify", "-", stdin=got.stdout)
    assert checked.returncode == 3 and checked.stdout == b""
    assert checked.stderr.decode() == ("triage verify: -: unsigned: the report carries no "
                                       "signature\n")
    # and a report PDF on standard input imports its survey
    imported = triage("--db", str(tmp_path / "f.db"), "import", "-", stdin=got.stdout)
    assert imported.returncode == 0 and imported.stderr.decode().startswith("imported ")
    assert "triage import: warning: -: imported with a warning: unsigned" in \
        imported.stderr.decode()


def test_a_changed_report_on_standard_input_is_refused_like_the_file(tmp_path, survey_file):
    key = tmp_path / "t.key"
    assert triage("key", "new", "--name", "Tess Tester", "--id", "T-1", "-o", str(key),
                  "--no-passphrase").returncode == 0
    pdf = triage("report", str(survey_file), "-o", "-", "--key", str(key)).stdout
    assert triage("verify", "-", stdin=pdf).returncode == 0
    bad = bytearray(pdf)
    bad[len(bad) // 3] ^= 0x01
    db = tmp_path / "f.db"
    got = triage("--db", str(db), "import", "-", stdin=bytes(bad))
    assert got.returncode == 1 and got.stdout == b""
    assert got.stderr.decode().startswith("triage import: -: refused, the report is changed")
    assert len(got.stderr.splitlines()) == 1


def test_form_to_dash_is_the_pdf_a_file_gets(tmp_path):
    to_file = tmp_path / "f.pdf"
    assert triage("form", "rc_frame", "-o", str(to_file), "--storeys", "2").returncode == 0
    got = triage("form", "rc_frame", "-o", "-", "--storeys", "2")
    assert got.returncode == 0 and got.stdout == to_file.read_bytes()
    assert got.stderr.decode().startswith(
        "standard output: paper form for concrete frame (rc_frame)")


def test_compare_to_dash_is_the_pdf_a_file_gets(tmp_path):
    from triage.resources import samples_dir

    flats = [str(samples_dir() / f"flats_mariner_court_{n}.json") for n in (1, 2)]
    to_file = tmp_path / "c.pdf"
    assert triage("compare", *flats, "-o", str(to_file)).returncode == 0
    got = triage("compare", *flats, "-o", "-")
    assert got.returncode == 0 and got.stdout == to_file.read_bytes()
    said = got.stderr.decode()
    assert said.startswith("comparison written to standard output (") and len(
        said.splitlines()) == 1
    # and the earlier survey may come from standard input meanwhile
    got = triage("compare", "-", flats[1], "-o", "-",
                 stdin=Path(flats[0]).read_bytes())
    assert got.returncode == 0 and got.stdout == to_file.read_bytes()


def test_backup_to_dash_streams_a_whole_database(tmp_path, survey_file):
    db = str(tmp_path / "f.db")
    assert triage("--db", db, "import", str(survey_file)).returncode == 0
    got = triage("--db", db, "backup", "-o", "-")
    assert got.returncode == 0 and got.stdout.startswith(b"SQLite format 3\x00")
    copy = tmp_path / "copy.db"
    copy.write_bytes(got.stdout)
    c = sqlite3.connect(copy)
    assert c.execute("PRAGMA integrity_check").fetchone()[0] == "ok"
    assert c.execute("SELECT count(*) FROM surveys").fetchone()[0] == 1
    c.close()
    assert f"to standard output ({len(got.stdout):,} bytes, checked)" in got.stderr.decode()


def test_key_trust_reads_a_public_key_from_standard_input(tmp_path, monkeypatch, cli):
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "other"))
    assert cli("key", "new", "--name", "Mere Kōwhai", "--id", "M-1", "-o",
               str(tmp_path / "m.key"), "--no-passphrase")[0] == 0
    monkeypatch.setenv("TRIAGE_HOME", str(tmp_path / "here"))
    pub = (tmp_path / "m.pub").read_text(encoding="utf-8")
    monkeypatch.setattr("sys.stdin", io.StringIO(pub))
    code, out, err = cli("key", "trust", "-")
    assert code == 0 and out == "" and err.startswith("trusted ") and "Mere Kōwhai" in err
    code, out, _ = cli("key", "list")
    assert code == 0 and "Mere Kōwhai (id M-1)" in out
    monkeypatch.setattr("sys.stdin", io.StringIO("not a key"))
    code, _, err = cli("key", "trust", "-")
    assert code == 1 and err == "triage key trust: -: not a triage public key (JSON)\n"


class _Terminal(io.StringIO):
    def isatty(self) -> bool:
        return True


@pytest.mark.parametrize("argv", [["report", "FILE", "-o", "-"], ["form", "rc_frame", "-o", "-"],
                                  ["backup", "-o", "-"], ["compare", "FILE", "FILE", "-o", "-"]])
def test_binary_output_to_a_terminal_is_refused_and_nothing_written(argv, tmp_path, survey_file,
                                                                   cli, monkeypatch):
    db = str(tmp_path / "f.db")
    assert cli("--db", db, "import", str(survey_file))[0] == 0
    monkeypatch.setattr("sys.stdout", _Terminal())
    argv = [str(survey_file) if a == "FILE" else a for a in argv]
    code, out, err = cli("--db", db, *argv)
    assert code == 1 and out == ""
    assert err.endswith("-o -: standard output is a terminal; a PDF is binary: redirect it to a "
                        "file or a pipe (nothing was written)\n") or "a database copy" in err
    assert len(err.splitlines()) == 1
    assert list(tmp_path.glob("*.pdf")) == []


@pytest.mark.parametrize("argv,said", [
    (["--db", "-", "list"], "--db -: a database is a file"),
    (["merge", "-", "--into", "T"], "DB -: a database is read from a file"),
    (["merge", "S", "--into", "-"], "--into -: a database is written to a file"),
    (["key", "new", "--name", "A", "--id", "1", "-o", "-", "--no-passphrase"],
     "-o -: a private key is written to a file"),
    (["import", "-", "-"], "- (standard input) given more than once"),
    (["compare", "-", "-"], "- (standard input) given for both"),
    (["backup", "-o", "-", "--format", "json"], "--format json: standard output carries the"),
])
def test_dash_where_it_makes_no_sense_is_refused_in_one_line(argv, said, tmp_path, cli,
                                                            survey_file):
    db = tmp_path / "f.db"
    assert cli("--db", str(db), "import", str(survey_file))[0] == 0
    argv = [str(tmp_path / a) if a in ("S", "T") else a for a in argv]
    if argv[0] != "--db":
        argv = ["--db", str(db), *argv]
    code, out, err = cli(*argv)
    assert code == 1 and out == "" and len(err.splitlines()) == 1 and said in err, err
    assert not (tmp_path / "T").exists() and not Path("-").exists()


def test_commands_that_write_files_print_nothing_on_standard_output(tmp_path, survey_file, cli,
                                                                   monkeypatch):
    """Each command's status lines go to standard error; standard output stays for data."""
    db = str(tmp_path / "f.db")
    sid = str(parse_survey(two_storey_frame()).survey_id)
    monkeypatch.setenv("TRIAGE_KEY_PASSPHRASE", "kelp and tide")
    runs = {
        "import": ["--db", db, "import", str(survey_file)],
        "export": ["--db", db, "export", sid, "-o", str(tmp_path / "e.json")],
        "export DIR/": ["--db", db, "export", sid, "-o", f"{tmp_path / 'dir'}/"],
        "backup": ["--db", db, "backup", "-o", str(tmp_path / "b.db")],
        "merge": ["merge", str(tmp_path / "b.db"), "--into", str(tmp_path / "m.db")],
        "key new": ["key", "new", "--name", "Tess Tester", "--id", "T-1", "-o",
                    str(tmp_path / "t.key")],
        "key trust": ["key", "trust", str(tmp_path / "t.pub")],
        "report": ["--db", db, "report", sid, "-o", str(tmp_path / "r.pdf"), "--key",
                   str(tmp_path / "t.key")],
        "form": ["form", "rc_frame", "-o", str(tmp_path / "f.pdf")],
        "compare": ["compare", str(survey_file), str(tmp_path / "e.json"), "-o",
                    str(tmp_path / "c.pdf")],
    }
    for name, argv in runs.items():
        code, out, err = cli(*argv)
        assert code == 0, (name, err)
        assert out == "", name
        assert err.strip() and "\n" in err, name    # said, on standard error
    # and the commands that answer print their answer on standard output, nothing else
    for argv in (["--db", db, "list"], ["--db", db, "summary"], ["key", "list"],
                 ["verify", str(tmp_path / "r.pdf")], ["assess", str(survey_file)],
                 ["compare", str(survey_file), str(tmp_path / "e.json")]):
        code, out, err = cli(*argv)
        assert code == 0 and out.strip() and err == "", (argv, err)
