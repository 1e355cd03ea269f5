"""The field forms: complete against the one sign table and the hazard kinds, and refused, with
one line naming file, key and rule, when a file is malformed or incomplete."""

from __future__ import annotations

import shutil
import subprocess
import sys
from pathlib import Path

import pytest

from tests.helpers import unmeasured_env
from tests.wording import BORROWED
from triage import standards
from triage.forms import (
    HAZARD_GROUPS,
    Form,
    FormError,
    check_forms,
    load_form,
    load_forms,
)
from triage.resources import forms_dir


def test_one_form_per_structural_system() -> None:
    keys = set(standards.system_keys())
    assert {p.stem for p in forms_dir().glob("*.toml")} == keys
    forms = load_forms()
    assert set(forms) == keys
    for key, form in forms.items():
        assert isinstance(form, Form)
        assert form.system == key
        assert form.member_kinds and len(set(form.member_kinds)) == len(form.member_kinds)


def test_every_sign_key_exists_and_fits_its_kind_and_system() -> None:
    table = standards.load().signs
    for key, form in load_forms().items():
        for kind in form.member_kinds:
            for sign, hint in form.signs_for(kind):
                assert sign in table, (key, kind, sign)
                assert kind in table[sign].kinds, (key, kind, sign)
                assert key in table[sign].systems, (key, kind, sign)
                assert hint.strip()


def test_every_sign_the_table_gives_a_system_is_on_its_form() -> None:
    table = standards.load().signs
    for key, form in load_forms().items():
        for sign_key, sign in table.items():
            if key not in sign.systems:
                continue
            kinds = [k for k in form.member_kinds
                     if sign_key in {s for s, _ in form.signs_for(k)}]
            assert kinds, f"{key}: {sign_key} is on no kind of the form"
            assert all(k in sign.kinds for k in kinds)


def test_hazard_check_list_is_complete_grouped_and_in_walking_order() -> None:
    hazards = standards.load().hazards
    for key, form in load_forms().items():
        listed = form.hazard_keys()
        assert sorted(listed) == sorted(hazards), key
        groups = [g for g, _ in form.hazard_groups]
        assert groups == [g for g in HAZARD_GROUPS if g in groups], key
        for group, items in form.hazard_groups:
            for hk, hint in items:
                assert hazards[hk].group == group and hint.strip()


def test_class_text_describes_each_class_in_our_words() -> None:
    jbdpa = standards.load().capacity.classes
    for form in load_forms().values():
        assert list(form.class_text) == ["I", "II", "III", "IV", "V"]
        for c, text in form.class_text.items():
            assert len(text) > 20
            assert text != jbdpa[c].signs  # ours, not the table's paraphrase


def test_forms_use_no_forbidden_words() -> None:
    banned = BORROWED
    for p in forms_dir().glob("*.toml"):
        text = p.read_text(encoding="utf-8").lower()
        assert not [w for w in banned if w in text], p.name


def test_specific_api_values() -> None:
    f = load_form("steel_braced_frame")
    assert f.member_kinds[0] == "brace"
    assert [s for s, _ in f.signs_for("brace")] == [
        "brace_buckled", "connection_fractured", "local_buckling"]
    assert f.label_of("connection") == "joints"
    with pytest.raises(KeyError, match="no member kind 'slab'"):
        f.signs_for("slab")


def test_unknown_system_is_refused_with_the_known_ones() -> None:
    with pytest.raises(FormError) as err:
        load_form("bamboo_frame")
    msg = str(err.value)
    assert "'bamboo_frame' is not a structural system" in msg
    assert "rc_frame" in msg and "wood_stud_wall" in msg and "\n" not in msg


# --- broken files ----------------------------------------------------------------------------

@pytest.fixture()
def folder(tmp_path: Path) -> Path:
    dest = tmp_path / "forms"
    shutil.copytree(forms_dir(), dest)
    return dest


def _edit(folder: Path, system: str, old: str, new: str) -> Path:
    p = folder / f"{system}.toml"
    text = p.read_text(encoding="utf-8")
    assert old in text, old
    p.write_text(text.replace(old, new, 1), encoding="utf-8")
    return p


CASES = [
    ("rc_frame", 'title = "Reinforced concrete frame"',
     'title = "Reinforced concrete frame"\ncolour = "blue"',
     "unknown key 'colour'"),
    ("rc_frame", 'title = "Reinforced concrete frame"\n', "", "title: required key is missing"),
    ("rc_frame", '{ sign = "bar_buckled"', '{ sign = "bar_bent"',
     "kinds[0].signs[2].sign: 'bar_bent' is not a key of the sign table"),
    ("steel_braced_frame", '{ sign = "brace_buckled"', '{ sign = "vertical_shortening"',
     "kinds[0].signs[0].sign: 'vertical_shortening' is not a sign of a brace"),
    ("wood_stud_wall", '{ sign = "vertical_shortening"', '{ sign = "core_crushed"',
     "'core_crushed' is not a sign of wood_stud_wall"),
    ("urm_infill", '{ sign = "out_of_plane", hint = "panels bulged outward, gaps at the top of '
     'the panel, bricks fallen out" },', "",
     "kinds: sign 'out_of_plane' of urm_infill (sign table) is on no member kind"),
    ("rc_wall", 'kind = "beam"', 'kind = "girder"', "kinds[2].kind: must be 'column'"),
    ("rc_wall", 'kind = "beam"', 'kind = "wall"', "kinds[2].kind: 'wall' is listed twice"),
    ("urm_wall", '\nV = "', '\nVI = "', "classes.V: required key is missing"),
    ("rc_frame", '{ hazard = "ground_failure"', '{ hazard = "tsunami"',
     "hazards[0].items[1].hazard: 'tsunami' is not a hazard kind"),
    ("rc_frame", '{ hazard = "ground_failure"', '{ hazard = "blocked_egress"',
     "'blocked_egress' belongs to the group 'exits and services'"),
    ("rc_frame", 'group = "neighbours"', 'group = "next door"', "hazards[4].group: must be"),
    ("steel_moment_frame", 'system = "steel_moment_frame"', 'system = "rc_frame"',
     "system: 'rc_frame' does not match the file name"),
    ("rc_frame", 'format = "triage-form/1"', 'format = "triage-form/2"', "format: must be"),
    ("rc_frame", 'signs = [', 'signs = [[', "not valid TOML"),
]


@pytest.mark.parametrize(("system", "old", "new", "expected"), CASES,
                         ids=[c[3][:40] for c in CASES])
def test_broken_form_is_refused_naming_file_key_and_rule(
        folder: Path, system: str, old: str, new: str, expected: str) -> None:
    path = _edit(folder, system, old, new)
    with pytest.raises(FormError) as err:
        check_forms(folder)
    msg = str(err.value)
    assert msg.startswith(f"{path.resolve()}: "), msg
    assert expected in msg, msg
    assert "\n" not in msg


def test_missing_and_stray_form_files_are_refused(folder: Path) -> None:
    (folder / "urm_wall.toml").unlink()
    with pytest.raises(FormError, match="no form file for urm_wall"):
        check_forms(folder)
    shutil.copy(forms_dir() / "urm_wall.toml", folder / "urm_wall.toml")
    check_forms(folder)
    shutil.copy(forms_dir() / "urm_wall.toml", folder / "adobe_wall.toml")
    with pytest.raises(FormError, match="'adobe_wall' is not a structural system"):
        check_forms(folder)


def test_the_shipped_forms_pass() -> None:
    check_forms()


def test_loader_imports_no_screen_pdf_or_database_library() -> None:
    code = ("import sys, triage.forms; bad = [m for m in ('textual', 'reportlab', "
            "'sqlite3', 'rich') if m in sys.modules]; print(bad); "
            "raise SystemExit(1 if bad else 0)")
    done = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                          check=False, env=unmeasured_env())
    assert done.returncode == 0, done.stdout + done.stderr
