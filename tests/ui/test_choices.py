"""What the screens offer to pick: storey labels each way of naming, the next label on top,
and the forms' lists when a system has no form (nothing offered from it, the tables still)."""

from __future__ import annotations

from triage.model import MEMBER_KINDS
from triage.standards import load
from triage.ui.choices import (
    class_texts,
    hazard_choices,
    member_kinds,
    next_label,
    sign_choices,
    storey_labels,
)


def test_storey_labels_both_namings():
    assert storey_labels(3, 2) == ["B2", "B1", "G", "1", "2"]
    assert storey_labels(3, 0, "1") == ["1", "2", "3"]
    assert storey_labels(1, 1, "1") == ["B1", "1"]


def test_the_next_label_on_top():
    assert next_label([]) == "G"
    assert next_label(["B1"]) == "G"          # basements only: the ground storey next
    assert next_label(["G"]) == "1"
    assert next_label(["B1", "G", "1", "2"]) == "3"
    assert next_label(["1", "2", "4"]) == "5"
    assert next_label(["G", "Mezz"]) == "1"


def test_a_system_without_a_form_offers_the_tables_only():
    assert class_texts(("no_such_system",)) == {}
    assert member_kinds(("no_such_system",)) == list(MEMBER_KINDS)
    signs = dict(sign_choices(("no_such_system",), "column"))
    # the table's description stands in for a form's hint
    assert signs["cover_spalling"] == load().signs["cover_spalling"].description
    keys = [k for _, k, _ in hazard_choices(("no_such_system",))]
    assert "falling_hazard" in keys and len(keys) == len(set(keys))


def test_a_form_first_then_the_rest():
    kinds = member_kinds(("rc_frame",))
    assert kinds[0] == "column" and sorted(kinds) == sorted(MEMBER_KINDS)
    texts = class_texts(("rc_frame", "urm_wall"))
    assert sorted(texts) == ["I", "II", "III", "IV", "V"]


def test_a_wall_is_offered_only_the_signs_of_its_material():
    # An unreinforced masonry wall has no cover or bars: its form's signs and no concrete ones
    urm = [k for k, _ in sign_choices(("urm_wall",), "wall")]
    assert sorted(urm) == ["core_crushed", "out_of_plane", "vertical_shortening"]
    assert urm[0] == "out_of_plane"          # the form's own order first
    signs = load().signs
    for system in ("urm_wall", "urm_infill", "rc_wall", "wood_stud_wall"):
        offered = {k for k, _ in sign_choices((system,), "wall")}
        assert offered == {k for k, s in signs.items() if "wall" in s.kinds
                           and system in s.systems}, system
    # a concrete wall still gets the concrete signs; a building of both materials, both
    assert "cover_spalling" in dict(sign_choices(("rc_wall",), "wall"))
    assert "cover_spalling" in dict(sign_choices(("urm_wall", "rc_frame"), "wall"))
