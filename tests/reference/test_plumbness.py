"""As-built plumbness tolerances (docs/references.md, as-built plumbness).

- AISC 303-16 Code of Standard Practice, section 7.13.1.1: column out-of-plumb at most 1/500
  between working points = 0.2%. Status: checked.
- ACI 117-10: vertical elements, lesser of 0.3% of height or 1 in. Status: from memory.
- EN 1090-2: column inclination per storey h/300 = 0.33%. Status: from memory.

Checked: the tabled ratios (tolerance 1e-6 in percent) and that the engine notes a small drift as
within the as-built band (our plumbness_band assumption, 0.3%), and stops noting it once an
as-built baseline is given for that spot.
"""

from __future__ import annotations

import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.standards import load


def test_tolerances():
    t = {x.source.document: x for x in load().plumbness}
    assert t["AISC 303-16 Code of Standard Practice"].drift_pct == pytest.approx(100 / 500)
    assert t["AISC 303-16 Code of Standard Practice"].source.status == "checked"
    assert t["ACI 117-10"].drift_pct == pytest.approx(0.3)
    assert t["EN 1090-2"].drift_pct == pytest.approx(100 / 300, abs=1e-6)


def test_note_within_band_and_baseline_removes_it():
    s = make([storey("1", [reading("x", 4.0), reading("y", 9.0)])])
    notes = assess(s).notes
    assert any("storey 1, x" in n and "plumbness" in n for n in notes)
    assert not any("storey 1, y" in n and "plumbness" in n for n in notes)
    s2 = make([storey("1", [reading("x", 4.0, baseline_mm=1.0), reading("y", 9.0)])])
    a2 = assess(s2)
    assert a2.storeys[0].drift_ratio.x == pytest.approx(3.0 / 2000)
    assert not any("storey 1, x" in n and "plumbness" in n for n in a2.notes)
