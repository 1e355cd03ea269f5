"""`triage assess` and `triage schema` as a user runs them: exit codes, one-line refusals."""

from __future__ import annotations

import json
import subprocess
import sys

from tests.helpers import clone, two_storey_frame


def triage(*args, cwd=None):
    return subprocess.run([sys.executable, "-m", "triage", *args], capture_output=True,
                          text=True, cwd=cwd)


def write(tmp_path, data, name="s.json"):
    p = tmp_path / name
    p.write_text(json.dumps(data), encoding="utf-8")
    return p


def test_json_output(tmp_path):
    p = write(tmp_path, two_storey_frame())
    out = triage("assess", str(p), "--format", "json")
    assert out.returncode == 0, out.stderr
    data = json.loads(out.stdout)
    assert data["format"] == "triage-assessment/1"
    assert (data["tier"], data["performance_level"]) == ("hold", "LS")
    assert triage("assess", str(p), "--format", "json").stdout == out.stdout


def test_text_output_starts_with_the_caution(tmp_path):
    out = triage("assess", str(write(tmp_path, two_storey_frame())))
    assert out.returncode == 0
    first = out.stdout.splitlines()[0]
    assert "Indicative" in first and "engineer of record" in first
    assert "◐ hold" in out.stdout
    assert "from measurement uncertainty only" in out.stdout


def test_bad_field_is_one_line_exit_1(tmp_path):
    d = clone(two_storey_frame())
    d["storeys"][1]["height_m"] = -2
    out = triage("assess", str(write(tmp_path, d)))
    assert out.returncode == 1
    assert out.stderr.count("\n") == 1 and "storeys[1].height_m" in out.stderr
    assert "Traceback" not in out.stderr


def test_not_json_and_missing_file(tmp_path):
    p = tmp_path / "x.json"
    p.write_text("{", encoding="utf-8")
    out = triage("assess", str(p))
    assert out.returncode == 1 and "not JSON" in out.stderr
    out = triage("assess", str(tmp_path / "nope.json"))
    assert out.returncode == 1 and "no such file" in out.stderr


def test_wrong_command_line_exit_2():
    assert triage("no-such-command").returncode == 2
    out = triage("assess", "a.json", "--format", "yaml")
    assert out.returncode == 2 and out.stderr.count("\n") == 1


def test_schema_is_json_schema():
    out = triage("schema")
    schema = json.loads(out.stdout)
    assert schema["title"] == "triage-survey/2"
    assert schema["additionalProperties"] is False
    assert "rc_frame" in json.dumps(schema["$defs"]["Systems"])
