"""Every command that takes a survey id takes a unique start of it (the 8-character code the
paper form asks for) and refuses an ambiguous start in one line listing the matches."""

from __future__ import annotations

from collections.abc import Callable
from pathlib import Path

import pytest

from tests.store.conftest import sample_dict, write_json
from triage.cli import common

A = "abcd1234-0000-4000-8000-00000000000a"
B = "abcd1234-0000-4000-8000-00000000000b"
C = "0f0f0f0f-0000-4000-8000-00000000000c"
Cli = Callable[..., tuple[int, str, str]]


@pytest.fixture
def db(tmp_path: Path, cli: Cli) -> Path:
    path = tmp_path / "f.db"
    for sid, name in ((A, "Harbour Flats"), (B, "Harbour Flats"), (C, "Kōwhai School")):
        f = write_json(tmp_path / f"{sid}.json", sample_dict(name, id=sid))
        assert cli("--db", str(path), "import", str(f))[0] == 0
    return path


def _commands(tmp_path: Path, given: str) -> dict[str, list[str]]:
    return {"export": ["export", given, "-o", str(tmp_path / "e.json")],
            "report": ["report", given, "-o", str(tmp_path / "r.pdf")],
            "compare old": ["compare", given, C],
            "compare new": ["compare", C, given]}


def test_an_ambiguous_start_is_refused_listing_the_matches(db: Path, tmp_path: Path,
                                                           cli: Cli) -> None:
    for name, argv in _commands(tmp_path, "ABCD1234").items():
        code, _out, err = cli("--db", str(db), *argv)
        assert code == 1, name
        line = err.strip()
        assert "\n" not in line, name
        assert f"ABCD1234: 2 surveys start with this ({A}, {B}); give more of the id" in line
        assert C not in line
    assert not (tmp_path / "e.json").exists() and not (tmp_path / "r.pdf").exists()


def test_a_unique_start_is_taken_by_every_command(db: Path, tmp_path: Path, cli: Cli) -> None:
    code, _, err = cli("--db", str(db), "export", C[:8], "-o", str(tmp_path / "e.json"))
    assert code == 0, err
    assert f'"id": "{C}"' in (tmp_path / "e.json").read_text(encoding="utf-8")
    code, _, err = cli("--db", str(db), "report", B[:-1] + "B", "-o", str(tmp_path / "r.pdf"))
    assert code == 0, err
    assert (tmp_path / "r.pdf").read_bytes().startswith(b"%PDF")
    code, _out, err = cli("--db", str(db), "compare", A, C[:8], "--force")
    assert code == 0, err
    code, _, err = cli("--db", str(db), "export", "ffffffff", "-o", str(tmp_path / "x.json"))
    assert code == 1 and "ffffffff: no survey with this id" in err


def test_a_long_list_of_matches_is_cut_short(monkeypatch: pytest.MonkeyPatch) -> None:
    ids = [f"abcd{i:04d}-0000-4000-8000-000000000000" for i in range(13)]

    class Reader:
        location = "here"

        def match_ids(self, given: str) -> list[str]:
            return [i for i in ids if i.startswith(given)]

    with pytest.raises(common.UserError) as got:
        common.resolve_id(Reader(), "abcd")   # type: ignore[arg-type]
    msg = str(got.value)
    assert msg.startswith("abcd: 13 surveys start with this (abcd0000-")
    assert ids[9] in msg and ids[10] not in msg
    assert msg.endswith(" and 3 more); give more of the id")
    assert common.resolve_id(Reader(), "abcd0012") == ids[12]


def test_survey_codes_are_8_characters_unless_two_ids_share_them() -> None:
    d = "abcd1235-1111-4000-8000-00000000000d"
    codes = common.survey_codes([A, B, C, d, A])   # a repeat counts once
    assert codes == {A: A, B: B, C: "0f0f0f0f", d: "abcd1235"}
    # one more character than the ids share, and never ending on the hyphen
    e, f = "abcd1236-2222-4000-8000-00000000000e", "abcd1236-3333-4000-8000-00000000000f"
    assert common.survey_codes([e, f]) == {e: "abcd1236-2", f: "abcd1236-3"}
    g, h = "abcd12370000", "abcd1237-000"
    assert common.survey_codes([g, h]) == {g: "abcd12370", h: "abcd1237-0"}
    assert common.survey_codes([]) == {}
