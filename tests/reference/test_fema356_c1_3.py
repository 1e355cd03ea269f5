"""FEMA 356 (2000), Prestandard and Commentary for the Seismic Rehabilitation of Buildings,
Table C1-3 "Structural Performance Levels and Damage - Vertical Elements" (same values in
FEMA 273 (1997) Table 2-4 and ASCE 41-06 Table C1-3).

Status: from memory (docs/references.md, FEMA 356), consistent with a secondary source for the steel
moment frame transient values. Checked here: every system's IO, LS and CP figures as the table
gives them, the number used for "negligible" (our assumption, 0.2% capped at the IO transient
figure), and that the engine places drifts just under and just over each figure on the right
level. Tolerance: exact (the figures are short decimals), 1e-12 on ratios.
"""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.drift import figures
from triage.standards import load

# (system, IO transient %, IO permanent %, LS transient %, LS permanent %, CP %), FEMA 356 C1-3.
TABLE_C1_3 = [
    ("rc_frame", 1.0, "negligible", 2.0, 1.0, 4.0),
    ("steel_moment_frame", 0.7, "negligible", 2.5, 1.0, 5.0),
    ("steel_braced_frame", 0.5, "negligible", 1.5, 0.5, 2.0),
    ("rc_wall", 0.5, "negligible", 1.0, 0.5, 2.0),
    ("urm_infill", 0.1, "negligible", 0.5, 0.3, 0.6),
    ("urm_wall", 0.3, 0.3, 0.6, 0.6, 1.0),
    ("reinforced_masonry_wall", 0.2, "negligible", 0.6, 0.6, 1.5),
    ("wood_stud_wall", 1.0, 0.25, 2.0, 1.0, 3.0),
]


def test_table_has_every_system_of_the_survey_format():
    assert set(load().drift.systems) == {row[0] for row in TABLE_C1_3}
    assert load().drift.source.table == "Table C1-3"
    assert load().drift.source.status == "memory"


@pytest.mark.parametrize(("system", "io_t", "io_p", "ls_t", "ls_p", "cp"), TABLE_C1_3)
def test_row_matches_fema356_table_c1_3(system, io_t, io_p, ls_t, ls_p, cp):
    row = load().drift.systems[system]
    assert row.io_transient_pct == io_t
    assert row.io_permanent_pct == io_p
    assert row.ls_transient_pct == ls_t
    assert row.ls_permanent_pct == ls_p
    assert row.cp_pct == cp


@pytest.mark.parametrize(("system", "io_t", "io_p", "ls_t", "ls_p", "cp"), TABLE_C1_3)
def test_figures_used_for_levels(system, io_t, io_p, ls_t, ls_p, cp):
    std = load()
    f = figures(system, std, std.assumptions)
    # "negligible" is our 0.2%, never more than the IO transient figure (docs/references.md).
    io = min(0.002, io_t / 100) if io_p == "negligible" else io_p / 100
    assert pytest.approx(io, abs=1e-12) == f.IO
    assert pytest.approx(ls_p / 100, abs=1e-12) == f.LS
    assert pytest.approx(cp / 100, abs=1e-12) == f.CP


def test_urm_infill_negligible_is_capped_at_its_io_transient_figure():
    std = load()
    assert pytest.approx(0.001) == figures("urm_infill", std, std.assumptions).IO


@pytest.mark.parametrize(("system", "io_t", "io_p", "ls_t", "ls_p", "cp"), TABLE_C1_3)
def test_engine_places_drifts_either_side_of_each_figure(system, io_t, io_p, ls_t, ls_p, cp):
    # The figures typed in from the table above, not read back from the engine.
    io = min(0.002, io_t / 100) if io_p == "negligible" else io_p / 100
    gauge = 10_000.0
    expect = [(io, "IO", "LS"), (ls_p / 100, "LS", "CP"), (cp / 100, "CP", "beyond-CP")]
    for figure, at, over in expect:
        for offset, want in ((figure * gauge, at), (figure * gauge * 1.01, over)):
            s = make([storey("1", [reading("x", offset, gauge_mm=gauge), reading("y", 0.0)],
                              height_m=10.0)],  # a 10 m gauge needs a storey that tall
                     sx=system, sy=system)
            got = assess(s).storeys[0].performance_level.x
            assert got == want, f"{system}: drift {offset / gauge:.4%} should be {want}"
