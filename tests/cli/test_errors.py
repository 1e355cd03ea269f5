"""Every broken rule of a survey file listed, one a line naming the file, the field and the rule."""

from __future__ import annotations

import io
import json

import pytest

from tests.cli.conftest import triage, write_json
from tests.helpers import clone, two_storey_frame


def _broken() -> dict:
    d = clone(two_storey_frame())
    d["storeys"][0]["height_m"] = -2                      # a value out of range
    d["storeys"][1]["readings"][1]["dir"] = "z"           # not a direction
    d["hazards"] = [{"kind": "dragons"}]                  # not a hazard kind
    del d["building"]["address"]                          # a required field missing
    return d


FIELDS = ["building.address", "storeys[0].height_m", "storeys[1].readings[1].dir",
          "hazards[0].kind"]


def _fields(lines: list[str], prefix: str) -> list[str]:
    assert all(line.startswith(prefix) for line in lines), lines
    return [line[len(prefix):].split(": ", 1)[0] for line in lines]


@pytest.mark.parametrize("command", [["assess"], ["import"], ["report", "-o", "OUT"],
                                     ["compare", "GOOD"]])
def test_every_broken_rule_gets_its_own_line(command, tmp_path, cli):
    f = write_json(tmp_path / "broken.json", _broken())
    good = write_json(tmp_path / "good.json", two_storey_frame())
    argv = [command[0], str(f), *[str(tmp_path / "o.pdf") if a == "OUT" else
                                  str(good) if a == "GOOD" else a for a in command[1:]]]
    code, out, err = cli("--db", str(tmp_path / "f.db"), *argv)
    assert code == 1 and out == ""
    lines = err.splitlines()
    assert sorted(_fields(lines, f"triage {command[0]}: {f}: ")) == sorted(FIELDS)
    assert "more)" not in err and "Traceback" not in err
    for line in lines:
        rule = line.split(": ", 3)[3]
        assert len(rule.split()) >= 2, line          # a rule in words, not a bare key
    assert "'dragons' is not a known hazard kind" in err and "must be greater than 0" in err
    assert not (tmp_path / "o.pdf").exists()


def test_standard_input_is_named_as_dash_on_every_line():
    got = triage("assess", "-", stdin=json.dumps(_broken()).encode())
    assert got.returncode == 1 and got.stdout == b""
    lines = got.stderr.decode().splitlines()
    assert sorted(_fields(lines, "triage assess: -: ")) == sorted(FIELDS)


def test_the_json_import_lists_the_same_lines(tmp_path, cli, monkeypatch):
    monkeypatch.setattr("sys.stdin", io.StringIO(json.dumps(_broken())))
    code, out, err = cli("--db", str(tmp_path / "f.db"), "import", "--format", "json", "-")
    obj = json.loads(out)
    assert code == 1 and obj["refused"] == 1
    assert [f"triage import: {e}" for e in obj["files"][0]["errors"]] == err.splitlines()
    assert sorted(_fields(obj["files"][0]["errors"], "-: ")) == sorted(FIELDS)


def test_one_broken_rule_is_still_one_line(tmp_path, cli):
    d = clone(two_storey_frame())
    d["storeys"][1]["height_m"] = 0
    f = write_json(tmp_path / "one.json", d)
    code, _, err = cli("assess", str(f))
    assert code == 1 and err.count("\n") == 1 and "storeys[1].height_m" in err


def test_a_report_pdf_with_a_broken_embedded_survey_lists_each_rule(tmp_path, cli):
    from triage.report import read_embedded_files

    pdf = tmp_path / "r.pdf"
    assert cli("report", str(write_json(tmp_path / "g.json", two_storey_frame())), "-o",
               str(pdf))[0] == 0
    assert "survey.json" in read_embedded_files(pdf)
    # a PDF that is not a report: one line
    fake = tmp_path / "fake.pdf"
    fake.write_bytes(b"%PDF-1.4\n%%EOF\n")
    code, _, err = cli("assess", str(fake))
    assert code == 1 and err.count("\n") == 1
    code, _, err = cli("compare", str(fake), str(pdf))
    assert code == 1 and err.count("\n") == 1 and str(fake) in err
