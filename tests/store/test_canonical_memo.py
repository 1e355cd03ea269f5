"""The kept canonical text of a very tall survey: right after every edit, and not walked whole
on every edit (a 300-storey survey holds more items than the memo's first bound)."""

from __future__ import annotations

from typing import Any

from triage.model import canonical_json
from triage.store.canonical import CanonicalText


def _tall(storeys: int = 300) -> dict[str, Any]:
    return {"format": "triage-survey/2", "id": "s", "building": {"name": "Tall", "address": "1"},
            "inspection": {"at": "2026-11-29T09:00:00+13:00"}, "hazards": [],
            "storeys": [{"label": str(i), "height_m": 3.2,
                         "readings": [{"dir": "xy"[r % 2], "offset_mm": float(r),
                                       "gauge_mm": 2000.0} for r in range(8)],
                         "members": [{"kind": "column", "count": g + 1} for g in range(10)]}
                        for i in range(storeys)]}


def _edit(doc: dict[str, Any], i: int) -> dict[str, Any]:
    """A reading's offset set, copy on write (as the store's edits do)."""
    s = (i * 37) % len(doc["storeys"])
    st = dict(doc["storeys"][s])
    readings = list(st["readings"])
    readings[i % 8] = {**readings[i % 8], "offset_mm": float(i % 50) / 10}
    st["readings"] = readings
    storeys = list(doc["storeys"])
    storeys[s] = st
    return {**doc, "storeys": storeys}


def test_a_tall_survey_is_pruned_seldom_and_its_text_stays_right(monkeypatch):
    walks = []
    prune = CanonicalText._prune

    def counted(self: CanonicalText, doc: dict[str, Any]) -> None:
        walks.append(len(self._memo))
        prune(self, doc)

    monkeypatch.setattr(CanonicalText, "_prune", counted)
    text = CanonicalText()
    doc = _tall()
    live = 300 * (1 + 2 + 18)   # per storey: itself, its two lists and their 18 items
    assert live > CanonicalText.LIMIT
    assert text.text(doc) == canonical_json(doc)
    for i in range(1, 601):
        doc = _edit(doc, i)
        got = text.text(doc)
        if i % 50 == 0:
            assert got == canonical_json(doc)
        # bounded: never more than twice what the survey holds, plus what one edit makes
        assert len(text._memo) <= 2 * (live + 4) + 4
    # 600 edits of 4 new entries each: a walk every ~live/4 edits at most, not one per edit
    # (before, every edit past the first bound walked all 6,300 items)
    assert 1 <= len(walks) <= 600 * 4 // live + 2, walks
