"""Words, not keys, on the screens (from the one vocabulary); a refusal clears on change."""

from __future__ import annotations

import re
from pathlib import Path

from conftest import SID
from drive import field, open_tab, pick, press, settle, started, type_in

KEY = re.compile(r"\b[a-z]+_[a-z_]+\b|\w+\[\d+\]")


async def test_signs_kinds_hazards_in_words(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        prompts = [str(o.prompt) for o in pane.signs.checks.options]
        assert prompts and not any(KEY.search(p) for p in prompts), prompts
        # the whole hint from the form, not cut short
        spall = next(p for p in prompts if p.startswith("cover spalled: "))
        assert spall.endswith("and at mid-height of a short column")
        pane.signs.checks.highlighted = 0
        await settle(pilot)
        assert "implies class III" in str(pane.signs.sign_note.render())
        kinds = [t for t, _ in pane.form["kind"].select._options]
        assert "floor slab" in [str(k) for k in kinds]
        hz = await open_tab(pilot, "f8", "hazards-pane")
        texts = [str(t) for t, _ in hz.form["kind"].select._options]
        assert any(t.startswith("falling hazard (") for t in texts)
        assert not any(KEY.search(t) for t in texts), texts


async def test_refusal_clears_when_the_value_changes(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        await press(pilot, "f5")
        f = await type_in(pilot, "s-height", "-3")
        assert f.status_text.startswith("✗")
        assert not KEY.search(f.status_text), f.status_text
        field(pilot, "s-height").focus_input()
        await press(pilot, "backspace")
        assert not f.status_text.startswith("✗")


async def test_a_refused_pick_says_its_rule_in_words(db: Path, make_app) -> None:
    app = make_app(db, open_survey=SID)
    async with started(app) as pilot:
        pane = await open_tab(pilot, "f7", "members-pane")
        pane.edit(0)
        await settle(pilot)
        c = await pick(pilot, "m-class", "IV")
        assert c.status_text.startswith("✗") and "override reason" in c.status_text
        assert not KEY.search(c.status_text), c.status_text
