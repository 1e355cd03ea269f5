"""`--format json`: one object, its `format` named in docs/formats.md, the text's facts."""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest

from tests.cli.conftest import write_json
from tests.helpers import clone, two_storey_frame
from triage.model import parse_survey

DOCS = Path(__file__).resolve().parents[2] / "docs"
FORMATS = ("triage-verify/1", "triage-keys/1", "triage-import/1", "triage-merge/1",
           "triage-backup/1", "triage-summary/1", "triage-list/1")


def _json(out: str) -> dict:
    obj = json.loads(out)
    assert isinstance(obj, dict) and obj["format"] in FORMATS
    return obj


def test_each_object_is_documented_with_its_keys():
    text = (DOCS / "formats.md").read_text(encoding="utf-8")
    for name in FORMATS:
        part = text.split(f"### `{name}`", 1)
        assert len(part) == 2, name
        table = part[1].split("\n### ", 1)[0]
        assert f"| `format` | `{name}` |" in table


@pytest.fixture
def two_surveys(tmp_path: Path) -> tuple[Path, Path]:
    first = write_json(tmp_path / "frame.json", two_storey_frame())
    other = clone(two_storey_frame())
    other["building"]["name"] = "Ōtaki 商店 Stores"
    return first, write_json(tmp_path / "shop.json", other)


def test_import_json_has_every_file_with_the_text_facts(tmp_path, cli, two_surveys):
    good, shop = two_surveys
    bad = clone(two_storey_frame())
    bad["storeys"][0]["height_m"] = -1
    bad["storeys"][1]["readings"][0]["gauge_mm"] = 0
    bad_f = write_json(tmp_path / "bad.json", bad)
    text_db, json_db = str(tmp_path / "t.db"), str(tmp_path / "j.db")
    code_t, out_t, err_t = cli("--db", text_db, "import", str(good), str(bad_f), str(shop))
    code_j, out_j, err_j = cli("--db", json_db, "import", "--format", "json", str(good),
                               str(bad_f), str(shop))
    assert code_t == code_j == 1 and out_t == ""
    obj = _json(out_j)
    assert (obj["imported"], obj["unchanged"], obj["refused"]) == (2, 0, 1)
    assert [f["file"] for f in obj["files"]] == [str(good), str(bad_f), str(shop)]
    assert [f["status"] for f in obj["files"]] == ["imported", "refused", "imported"]
    # the text's lines: two imported (ids and names), the refusal's every line
    said = err_t.splitlines()
    for f in obj["files"]:
        if f["status"] == "imported":
            assert any(line.startswith(f"imported {f['survey']}  {f['building']}  ")
                       for line in said)
    refusals = [line.removeprefix("triage import: ") for line in said
                if line.startswith("triage import: ")]
    assert refusals == obj["files"][1]["errors"] and len(refusals) == 2
    # the json run's standard error carries the refusal lines, not the status lines
    assert err_j.splitlines() == [f"triage import: {e}" for e in obj["files"][1]["errors"]]
    assert obj["files"][2]["building"] == "Ōtaki 商店 Stores"
    # again: unchanged
    obj = _json(cli("--db", json_db, "import", "--format", "json", str(good))[1])
    assert obj["files"][0]["status"] == "unchanged" and obj["unchanged"] == 1


def test_backup_and_merge_json_match_their_text(tmp_path, cli, two_surveys):
    good, shop = two_surveys
    db = str(tmp_path / "f.db")
    assert cli("--db", db, "import", str(good), str(shop))[0] == 0
    code, out, err = cli("--db", db, "backup", "-o", str(tmp_path / "b1.db"))
    assert code == 0 and out == ""
    m = re.fullmatch(r"backed up (\S+) to (\S+) \(([\d,]+) bytes, checked\)\n", err)
    assert m
    code, out, err = cli("--db", db, "backup", "-o", str(tmp_path / "b2.db"), "--format",
                         "json")
    obj = _json(out)
    assert code == 0 and err == ""
    assert obj == {"format": "triage-backup/1", "database": m.group(1),
                   "backup": str(tmp_path / "b2.db"), "bytes": (tmp_path / "b2.db").stat().st_size,
                   "checked": True}
    junk = tmp_path / "junk.db"
    junk.write_bytes(b"not a database at all" * 50)
    code_t, out_t, err_t = cli("merge", str(tmp_path / "b1.db"), str(junk), "--into",
                               str(tmp_path / "t.db"))
    code_j, out_j, err_j = cli("merge", str(tmp_path / "b2.db"), str(junk), "--into",
                               str(tmp_path / "j.db"), "--format", "json")
    assert code_t == code_j == 1 and out_t == ""
    obj = _json(out_j)
    assert (obj["merged"], obj["skipped"], obj["added"]) == (1, 1, 2)
    merged, skipped = obj["sources"]
    assert merged["status"] == "merged" and skipped["status"] == "skipped"
    assert f"merged {tmp_path / 'b1.db'}: {merged['added']} added, {merged['updated']} brought " \
           f"up to date, {merged['unchanged']} unchanged" in err_t
    assert err_j == f"triage merge: {junk}: {skipped['skipped']}; skipped\n"
    assert f"triage merge: {junk}: {skipped['skipped']}; skipped" in err_t


def test_summary_json_has_the_rows_and_counts_of_the_text(tmp_path, cli, two_surveys):
    db = str(tmp_path / "f.db")
    assert cli("--db", db, "import", *map(str, two_surveys))[0] == 0
    text = cli("--db", db, "summary")[1]
    obj = _json(cli("--db", db, "summary", "--format", "json")[1])
    assert obj["count"] == 2 and obj["tiers"] == {"occupy": 0, "hold": 2, "evacuate": 0}
    assert obj["not_assessed"] == 0 and obj["conflicts"] == 0
    assert "2 buildings: ○ occupy 0, ◐ hold 2, ● evacuate 0, not assessed 0; 0 with a " \
           "conflict to resolve" in text
    assert obj["caution"] in text
    for b in obj["buildings"]:
        row = next(line for line in text.splitlines() if line.startswith(b["building"][:8]))
        assert b["tier_words"] in row and b["inspected_at"] in row and b["inspector"] in row


def test_key_list_json_has_the_keys_the_text_lists(tmp_path, cli):
    code, out, err = cli("key", "list", "--format", "json")
    assert code == 0 and _json(out)["keys"] == [] and err == ""
    code, out, err = cli("key", "list")
    assert out == "" and err.startswith("no trusted keys yet")
    for name, who in (("a", "Aroha Ngāti"), ("b", "Ōtaki 商店")):
        assert cli("key", "new", "--name", who, "--id", name.upper(), "-o",
                   str(tmp_path / f"{name}.key"), "--no-passphrase")[0] == 0
    text = cli("key", "list")[1].splitlines()
    obj = _json(cli("key", "list", "--format", "json")[1])
    assert obj["folder"] == str(tmp_path / "home")
    assert [f"{k['fingerprint']}  {k['name']} (id {k['id']})" for k in obj["keys"]] == text
    assert {k["algorithm"] for k in obj["keys"]} == {"ecdsa-p256"}


def test_verify_json_for_each_verdict_with_the_texts_message(tmp_path, cli, two_surveys):
    key = tmp_path / "t.key"
    assert cli("key", "new", "--name", "Tess Tester", "--id", "T-1", "-o", str(key),
               "--no-passphrase")[0] == 0
    signed, unsigned = tmp_path / "s.pdf", tmp_path / "u.pdf"
    assert cli("report", str(two_surveys[0]), "-o", str(signed), "--key", str(key))[0] == 0
    assert cli("report", str(two_surveys[0]), "-o", str(unsigned))[0] == 0
    code, text, _ = cli("verify", str(signed))
    code_j, out, err = cli("verify", str(signed), "--format", "json")
    obj = _json(out)
    assert code == code_j == obj["status"] == 0 and err == ""
    assert obj["message"] == text.rstrip("\n") and obj["result"] == "verified"
    assert obj["signer"] == {"name": "Tess Tester", "id": "T-1"} and obj["signed"]
    assert obj["scheme"] == "PAdES B-B" and obj["fingerprint"] in text
    code, text, said = cli("verify", str(unsigned))
    code_j, out, err = cli("verify", str(unsigned), "--format", "json")
    obj = _json(out)
    assert code == code_j == obj["status"] == 3 and obj["result"] == "unsigned"
    assert not obj["signed"] and obj["signer"] is None and obj["scheme"] is None
    assert said == err == f"triage verify: {obj['message']}\n"
    code, _, _ = cli("verify", str(signed), "--expect", "0" * 32, "--format", "json")
    assert code == 4


def test_list_json_names_its_format_and_has_the_rows_of_the_text(tmp_path, cli, two_surveys):
    db = str(tmp_path / "f.db")
    assert cli("--db", db, "import", *map(str, two_surveys))[0] == 0
    obj = _json(cli("--db", db, "list", "--format", "json")[1])
    assert obj["format"] == "triage-list/1" and obj["count"] == 2
    rows = obj["surveys"]
    assert {r["building"] for r in rows} == {"Test House", "Ōtaki 商店 Stores"}
    assert str(parse_survey(two_storey_frame()).survey_id) in {r["id"] for r in rows}
    text = cli("--db", db, "list")[1]
    assert obj["caution"] in text
    for r in rows:   # the text's row starts with the code, the id's first 8 characters
        assert r["code"] == r["id"][:8]
        row = next(line for line in text.splitlines() if line.startswith(r["code"] + "  "))
        assert r["at"] in row and r["building"][:6] in row
