"""Helpers that drive the app the way a user does: focus a field, type, press Enter."""

from __future__ import annotations

from typing import Any

from textual.pilot import Pilot

from triage.ui.widgets.field import Choice, Field


async def settle(pilot: Pilot[Any]) -> None:
    """Let messages, workers and the redraw finish."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
    if pilot.app.workers:  # a worker started by what the last one finished (the database)
        await pilot.app.workers.wait_for_complete()
        await pilot.pause()


def field(pilot: Pilot[Any], fid: str) -> Field:
    """A field of the screen in view."""
    return pilot.app.screen.query_one(f"#{fid}", Field)


async def type_in(pilot: Pilot[Any], fid: str, text: str, enter: bool = True) -> Field:
    """Clear a field, type text into it, and press Enter.

    Short text is pressed key by key; long text (paths, names) goes in as the Input's own
    key handler puts it, in one insertion, to keep the tests quick.
    """
    f = field(pilot, fid)
    f.input.focus()
    await pilot.pause()
    f.input.value = ""
    if len(text) <= 12:
        keys = ["space" if ch == " " else ch for ch in text]
        if keys:
            await pilot.press(*keys)
    else:
        f.input.insert_text_at_cursor(text)
    if enter:
        await pilot.press("enter")
    await settle(pilot)
    return f


async def pick(pilot: Pilot[Any], cid: str, value: Any) -> Choice:
    """Pick a value in a choice."""
    c = pilot.app.screen.query_one(f"#{cid}", Choice)
    c.select.value = value
    await settle(pilot)
    return c


def verdict_text(pilot: Pilot[Any]) -> str:
    """The verdict line's text."""
    return str(pilot.app.screen.query_one("#verdict-line").render())
