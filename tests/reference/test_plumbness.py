"""As-built plumbness tolerances (docs/references.md, as-built plumbness) and the rule.

- AISC 303-16 Code of Standard Practice, section 7.13.1.1: column out-of-plumb at most 1/500
  between working points = 0.2%. Status: checked.
- ACI 117-10: vertical elements, lesser of 0.3% of height or 1 in. Status: from memory.
- EN 1090-2: column inclination per storey h/300 = 0.33%. Status: from memory.
- TMS 602: out of plumb 1/4 in per 10 ft = 0.25/120 = 0.208%. Status: from memory, unsure.

Checked: the tabled ratios (tolerance 1e-6 in percent), the bands per material (our assumption
plumbness_bands: steel 0.2%, concrete 0.3%, masonry 0.2%, timber 0.3% ours), and the rule: a
spot with no baseline, within its band, that sets or raises the tier is listed under
`plumbness`, said so in its reason line, with what would settle it.
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


def test_bands_per_material():
    bands = load().assumptions.plumbness_bands
    assert bands == {"steel": 0.002, "reinforced concrete": 0.003, "masonry": 0.002,
                     "timber": 0.003}
    t = {x.source.document: x for x in load().plumbness}
    assert t["TMS 602"].drift_pct == pytest.approx(100 * 0.25 / 120, abs=1e-6)
    assert t["TMS 602"].source.status == "memory"
    assert bands["steel"] * 100 == t["AISC 303-16 Code of Standard Practice"].drift_pct
    assert bands["reinforced concrete"] * 100 == t["ACI 117-10"].drift_pct


def test_a_spot_in_its_band_that_sets_the_tier_is_listed():
    # Concrete frame: x 5/2000 = 0.25% with no baseline: over IO 0.20% (LS, hold) but within the
    # concrete band 0.3%. Set to 0, storey 1 would be IO (y 1/2000 = 0.05%): occupy. Listed.
    s = make([storey("1", [reading("x", 5.0, where="grid B2"), reading("y", 1.0)])])
    a = assess(s)
    assert a.tier == "hold"
    assert [p.model_dump() for p in a.plumbness] == [
        {"storey": "1", "dir": "x", "where": "grid B2", "drift": 0.0025, "band": 0.003}]
    assert "plumbness band of reinforced concrete (0.30%, ACI 117-10, from memory)" in \
        a.reasons[0]
    assert "cannot be told from construction lean" in a.reasons[0]
    from triage.assess.text import plumbness_words
    assert plumbness_words(a) == [
        "storey 1, x (grid B2): 0.25% is within the as-built plumbness band (0.30%) and sets the "
        "tier; an as-built baseline at that spot (drawings, a lift shaft, facade lines) or a "
        "second method would settle it"]


def test_a_baseline_or_a_material_with_a_tighter_band_is_not_listed():
    # The same 0.25% with an as-built baseline of 0 measured at that spot: it is drift.
    s = make([storey("1", [reading("x", 5.0, baseline_mm=0.0), reading("y", 1.0)])])
    assert assess(s).plumbness == ()
    # A steel moment frame: band 0.2% (AISC 303, checked); 0.25% is outside it.
    s2 = make([storey("1", [reading("x", 5.0), reading("y", 1.0)])],
              sx="steel_moment_frame", sy="steel_moment_frame")
    a2 = assess(s2)
    assert a2.tier == "hold" and a2.plumbness == ()


def test_a_spot_that_does_not_set_the_tier_is_not_listed():
    # x 0.25% in band, but y 12/2000 = 0.60% (LS, out of band) holds the tier at hold anyway:
    # setting x to 0 changes nothing.
    s = make([storey("1", [reading("x", 5.0), reading("y", 12.0)])])
    assert assess(s).plumbness == ()


def test_two_spots_in_band_that_set_the_tier_together():
    # x and y both 0.25% in band: neither alone lowers hold (the other stays LS), but together
    # they do: both listed (our extension of the single-spot rule).
    s = make([storey("1", [reading("x", 5.0), reading("y", 5.0)])])
    a = assess(s)
    assert [(p.dir, p.drift) for p in a.plumbness] == [("x", 0.0025), ("y", 0.0025)]


def test_occupy_says_no_drift_distinguishable_and_urm_says_drift_alone_cannot():
    s = make([storey("1", [reading("x", 1.0), reading("y", 1.0)])])
    a = assess(s)
    assert a.tier == "occupy"
    assert a.reasons[0].startswith("no permanent drift distinguishable from construction "
                                   "tolerance")
    # URM infill IO is 0.1% (negligible capped at the IO transient figure): 1/2000 = 0.05%.
    s2 = make([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                      [{"kind": "infill", "count": 4}])], sx="urm_infill", sy="rc_frame")
    a2 = assess(s2)
    assert a2.tier == "occupy"
    assert "drift alone cannot establish IO" in a2.reasons[0]
