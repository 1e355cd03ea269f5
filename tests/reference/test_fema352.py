"""FEMA 352 (2000), Recommended Postearthquake Evaluation and Repair Criteria for Welded Steel
Moment-Frame Buildings, chapter 4: connection damage types and their damage indices.

Status: FROM MEMORY (docs/references.md, "Residual capacity beyond reinforced concrete"). Nobody
on the project has read a copy: the values below are typed in again from the same recollection
that wrote `triage/standards/fema352_connections.toml`. This test therefore catches typos in the
table file only; it cannot show that a value is the document's. Checked here: every type code,
its family and its index (exact: short decimals), the 0-10 scale, the sample statistic's
confidence, that a type recalled as two values takes the higher, and that the engine's floor
index is the plain mean when every connection was inspected (tolerance 1e-9).
"""

from __future__ import annotations

import pytest

from triage.standards import load

# code: index, FEMA 352 chapter 4 (from memory; G girder, C column, P panel zone, S shear tab,
# W weld).
INDEX = {
    "G1": 4, "G2": 1, "G3": 8, "G4": 8, "G5": 10, "G6": 4, "G7": 10, "G8": 6,
    "C1": 2, "C2": 8, "C3": 8, "C4": 8, "C5": 8, "C6": 6, "C7": 10,
    "P1": 4, "P2": 4, "P3": 2, "P4": 6, "P5": 6, "P6": 8, "P7": 10, "P8": 8, "P9": 10,
    "S1": 4, "S2": 4, "S3": 8, "S4": 4, "S5": 8,
    "W1a": 0, "W1b": 1, "W2": 6, "W3": 6, "W4": 6, "W5": 0,
}
FAMILIES = {"G": "girder", "C": "column", "P": "panel zone", "S": "shear tab", "W": "weld"}


def test_every_type_and_nothing_else() -> None:
    assert set(load().steel.types) == set(INDEX)


@pytest.mark.parametrize("code", list(INDEX))
def test_type_index_and_family(code: str) -> None:
    t = load().steel.types[code]
    assert t.index == INDEX[code]
    assert t.family == code[0]


def test_families_and_scale() -> None:
    steel = load().steel
    assert steel.families == FAMILIES
    assert steel.scale_max == 10.0
    assert steel.source.status == "memory"
    assert "from memory" in steel.source.cite()


def test_two_values_recalled_take_the_higher() -> None:
    recalled = {k: t.recalled for k, t in load().steel.types.items() if t.recalled}
    assert recalled, "the file names the types recalled as two values"
    for code, pair in recalled.items():
        assert pair is not None and load().steel.types[code].index == max(pair), code


def test_sample_statistic_confidence() -> None:
    # upper estimate of the mean at 90% one-sided, with the finite population correction
    sample = load().steel.sample
    assert sample.confidence == pytest.approx(0.9, abs=1e-12)
    assert "sqrt(1 - n / N)" in sample.form
