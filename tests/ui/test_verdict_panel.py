"""The verdict panel says what it knows: repairability as on the report, borderline with the
other tiers' chances, that no reading can change the tier where the engine says so, plumbness
beside its reason; the caution wherever a tier is shown."""

from __future__ import annotations

import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from helpers import make, reading, storey, two_storey_frame

from triage.assess import CAUTION, assess, tier_words
from triage.model import parse_survey
from triage.ui.messages import CAUTION_SHORT
from triage.ui.widgets.verdict import (
    borderline_text,
    measure_next_text,
    verdict_lines,
    verdict_summary,
)


def _borderline():
    # 4.4 mm over 2 m: 0.22%, just over IO (0.20%) with 1 mm uncertainty, inside the
    # concrete plumbness band (0.30%)
    s = make([storey("G", [reading("x", 4.4), reading("y", 1.0)]),
              storey("1", [reading("x", 1.0), reading("y", 1.0)])])
    return s, assess(s)


def test_borderline_names_the_other_tiers_chance() -> None:
    s, a = _borderline()
    assert a.tier == "hold" and a.borderline
    occupy = a.tier_probability["occupy"]
    assert borderline_text(a) == f"borderline: occupy {occupy:.3f}"
    assert verdict_summary(a).endswith(f"· borderline: occupy {occupy:.3f}")
    panel = verdict_lines(s, a).plain
    assert f"BORDERLINE: hold has only {a.tier_probability['hold']:.3f}; occupy {occupy:.3f}" \
        in panel


def test_not_borderline_says_so_and_no_chance_is_listed() -> None:
    s = make([storey("G", [reading("x", 60.0), reading("y", 3.0)])])
    a = assess(s)
    assert a.borderline is False
    assert borderline_text(a) == ""
    assert "borderline" not in verdict_summary(a)
    assert "not borderline: evacuate has > 0.999" in verdict_lines(s, a).plain


def test_plumbness_stands_beside_its_reason() -> None:
    s, a = _borderline()
    assert a.plumbness
    lines = verdict_lines(s, a).plain.splitlines()
    at = next(i for i, line in enumerate(lines) if line.startswith(" • storey G, x:"))
    assert lines[at + 1].startswith("   plumbness: storey G, x: 0.22% is within the as-built "
                                    "plumbness band (0.30%)")


def test_no_reading_can_change_the_tier_where_the_engine_says_so() -> None:
    s = parse_survey(two_storey_frame())
    a = assess(s)
    assert a.measure_next is None and a.settled_by
    text = measure_next_text(a, s)
    assert text.startswith("no reading can change this tier (no spot or crack width lies "
                           "within 3 sd of a threshold); it rests on: storey 2, y: residual "
                           "drift 0.60%")
    assert "no reading can change this tier" in verdict_lines(s, a).plain
    # where a reading can change it, the panel names that reading instead
    s2, b = _borderline()
    assert b.measure_next is not None
    assert measure_next_text(b, s2).startswith("storey G, x: 0.22% is 0.4 sd over the IO")
    assert "no reading can change" not in verdict_lines(s2, b).plain


def test_repairability_as_on_the_report() -> None:
    s = parse_survey(two_storey_frame())
    a = assess(s)
    panel = verdict_lines(s, a).plain
    assert "Repairability (named alternatives)" in panel
    assert len(a.repairability) == 3
    for r in a.repairability:
        assert f"  {r.name}: {r.probability:.3f} ({r.source})" in panel
    assert ("applied to the largest storey drift ratio, 0.60%; the published figures disagree, "
            "so each is shown on its own") in panel


def test_the_tier_word_stands_apart_and_the_caution_is_there() -> None:
    s, a = _borderline()
    panel = verdict_lines(s, a).plain
    first = panel.splitlines()[0]
    assert first.startswith(f" {tier_words('hold')}   level LS")
    assert CAUTION in panel and panel.rstrip().endswith(CAUTION)


async def test_the_verdict_line_keeps_a_space_after_the_tier(db: Path, make_app) -> None:
    from conftest import SID
    from drive import started, verdict_text

    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        text = verdict_text(pilot)
        assert text.startswith(f"{tier_words('occupy')}  · level IO"), text
        assert CAUTION_SHORT in text
