"""FEMA 306 (1998), Evaluation of Earthquake Damaged Concrete and Masonry Wall Buildings, with
FEMA 307: component types, behaviour modes, crack bounds of the damage severities and the
modification factors lambda K, lambda Q, lambda D.

Status: FROM MEMORY (docs/references.md, "Residual capacity beyond reinforced concrete"). Nobody
on the project has read a copy: the values below are typed in again from the same recollection
that wrote `triage/standards/fema306_walls.toml`. This test therefore catches typos in the table
file only; it cannot show that a value is the document's. Checked here: the severities, every
component type's systems, kinds and modes, each mode's crack bounds (mm, converted from
fractions of an inch and rounded down) and its (lambda K, lambda Q, lambda D) at slight,
moderate and heavy (exact: short decimals); that "unknown" takes the worst of each.
"""

from __future__ import annotations

import pytest

from triage.standards import load

SEVERITIES = ("insignificant", "slight", "moderate", "heavy", "extreme")
# component: (systems, kinds)
COMPONENTS = {
    "concrete_wall": (("rc_wall",), ("wall",)),
    "reinforced_masonry": (("reinforced_masonry_wall",), ("wall",)),
    "urm_pier": (("urm_wall", "urm_infill"), ("wall",)),
    "infill_panel": (("urm_infill",), ("infill",)),
}
# (component, mode): (crack bounds mm, slight (k, q, d), moderate, heavy), FEMA 306 from memory.
MODES = {
    ("concrete_wall", "flexure"): ((1.5, 3.1, 6.3), (0.8, 1.0, 1.0), (0.6, 0.9, 1.0),
                                   (0.5, 0.8, 0.9)),
    ("concrete_wall", "rocking"): ((3.1, 6.3, 12.7), (0.9, 1.0, 1.0), (0.7, 1.0, 1.0),
                                   (0.5, 1.0, 0.9)),
    ("concrete_wall", "diagonal_tension"): ((0.7, 1.5, 3.1), (0.8, 1.0, 1.0), (0.6, 0.8, 0.9),
                                            (0.4, 0.4, 0.7)),
    ("concrete_wall", "web_crushing"): ((0.7, 1.5, 3.1), (0.8, 1.0, 1.0), (0.6, 0.8, 0.9),
                                        (0.4, 0.5, 0.7)),
    ("concrete_wall", "sliding_shear"): ((1.5, 3.1, 6.3), (0.9, 1.0, 1.0), (0.7, 0.9, 1.0),
                                         (0.5, 0.7, 0.8)),
    ("concrete_wall", "toe_crushing"): ((0.7, 1.5, 3.1), (0.9, 1.0, 1.0), (0.7, 0.8, 0.9),
                                        (0.5, 0.4, 0.7)),
    ("reinforced_masonry", "flexure"): ((1.5, 3.1, 6.3), (0.8, 1.0, 1.0), (0.6, 0.9, 1.0),
                                        (0.5, 0.7, 0.9)),
    ("reinforced_masonry", "diagonal_tension"): ((0.7, 1.5, 3.1), (0.8, 0.9, 1.0),
                                                 (0.6, 0.7, 0.9), (0.4, 0.4, 0.7)),
    ("reinforced_masonry", "sliding_shear"): ((1.5, 3.1, 6.3), (0.9, 1.0, 1.0),
                                              (0.7, 0.9, 1.0), (0.5, 0.7, 0.8)),
    ("reinforced_masonry", "toe_crushing"): ((0.7, 1.5, 3.1), (0.9, 1.0, 1.0), (0.7, 0.8, 0.9),
                                             (0.5, 0.4, 0.7)),
    ("urm_pier", "rocking"): ((1.5, 6.3, 12.7), (0.9, 1.0, 1.0), (0.7, 1.0, 1.0),
                              (0.5, 1.0, 0.9)),
    ("urm_pier", "bed_joint_sliding"): ((1.5, 3.1, 6.3), (0.9, 1.0, 1.0), (0.7, 1.0, 1.0),
                                        (0.5, 0.9, 0.9)),
    ("urm_pier", "diagonal_tension"): ((0.7, 1.5, 3.1), (0.8, 0.9, 1.0), (0.6, 0.7, 0.9),
                                       (0.4, 0.4, 0.7)),
    ("urm_pier", "toe_crushing"): ((0.7, 1.5, 3.1), (0.9, 1.0, 1.0), (0.7, 0.8, 0.9),
                                   (0.5, 0.4, 0.7)),
    ("infill_panel", "corner_crushing"): ((1.5, 3.1, 6.3), (0.9, 1.0, 1.0), (0.7, 0.8, 0.9),
                                          (0.5, 0.5, 0.8)),
    ("infill_panel", "bed_joint_sliding"): ((1.5, 3.1, 6.3), (0.9, 1.0, 1.0), (0.7, 1.0, 1.0),
                                            (0.5, 0.8, 0.9)),
    ("infill_panel", "diagonal_tension"): ((0.7, 1.5, 3.1), (0.8, 0.9, 1.0), (0.6, 0.7, 0.9),
                                           (0.4, 0.5, 0.7)),
}


def test_severities_and_status() -> None:
    walls = load().walls
    assert walls.severities == SEVERITIES
    assert walls.source.status == "memory"
    assert "from memory" in walls.source.cite()


@pytest.mark.parametrize("key", list(COMPONENTS))
def test_component_types(key: str) -> None:
    c = load().walls.components[key]
    assert (c.systems, c.kinds) == COMPONENTS[key]
    assert set(c.modes) == {m for k, m in MODES if k == key}


@pytest.mark.parametrize(("key", "mode"), list(MODES))
def test_mode_bounds_and_factors(key: str, mode: str) -> None:
    row = load().walls.components[key].modes[mode]
    bounds, slight, moderate, heavy = MODES[(key, mode)]
    assert row.crack_mm == bounds
    for sev, want in (("slight", slight), ("moderate", moderate), ("heavy", heavy)):
        got = row.factors(sev)
        assert (got.k, got.q, got.d) == want, (key, mode, sev)
    assert (row.factors("insignificant").k, row.factors("insignificant").q) == (1.0, 1.0)


@pytest.mark.parametrize("key", list(COMPONENTS))
def test_unknown_takes_the_worst(key: str) -> None:
    c = load().walls.components[key]
    mode, worst = c.mode(None)
    assert mode == "unknown"
    rows = [v for (k, _), v in MODES.items() if k == key]
    assert worst.crack_mm == tuple(min(r[0][i] for r in rows) for i in range(3))
    for j, sev in ((1, "slight"), (2, "moderate"), (3, "heavy")):
        f = worst.factors(sev)
        assert f.q == min(r[j][1] for r in rows)
        assert f.k == min(r[j][0] for r in rows)
    # a mode the type does not keep is taken as unknown too
    assert c.mode("no_such_mode")[0] == "unknown"


def test_rocking_keeps_strength_diagonal_tension_and_toe_crushing_lose_it_at_heavy() -> None:
    # what the reviewer recalled of the document's pattern (docs/references.md)
    c = load().walls.components["urm_pier"]
    assert c.modes["rocking"].factors("heavy").q == 1.0
    assert c.modes["rocking"].factors("heavy").k < 1.0
    assert c.modes["diagonal_tension"].factors("heavy").q < 0.5
    assert c.modes["toe_crushing"].factors("heavy").q < 0.5
