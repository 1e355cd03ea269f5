"""Our own words: nothing the tool ships uses the wording of existing notices or forms."""

from __future__ import annotations

from pathlib import Path

from tests.wording import BORROWED

ROOT = Path(__file__).resolve().parents[2]


def test_shipped_text_uses_none_of_the_borrowed_words():
    found = []
    for folder in ("triage", "forms", "sample_surveys"):
        for p in (ROOT / folder).rglob("*"):
            if p.suffix in {".py", ".toml", ".json", ".tcss", ".md"}:
                text = p.read_text(encoding="utf-8").lower()
                found += [f"{p.relative_to(ROOT)}: {w}" for w in BORROWED if w in text]
    assert not found
