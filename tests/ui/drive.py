"""Helpers that drive the app the way a user does: focus a field, type, press Enter."""

from __future__ import annotations

from collections.abc import AsyncIterator
from contextlib import asynccontextmanager
from typing import Any

from textual.app import App
from textual.pilot import Pilot
from textual.widget import Widget

from triage.ui.widgets.field import Choice, Field


async def settle(pilot: Pilot[Any]) -> None:
    """Let messages, workers and the redraw finish."""
    await pilot.pause()
    await pilot.app.workers.wait_for_complete()
    await pilot.pause()
    if pilot.app.workers:  # a worker started by what the last one finished (the database)
        await pilot.app.workers.wait_for_complete()
        await pilot.pause()


@asynccontextmanager
async def started(app: App[Any], size: tuple[int, int] = (80, 24)) -> AsyncIterator[Pilot[Any]]:
    """The app run headless at `size` (80×24 unless said), settled once it has started."""
    async with app.run_test(size=size) as pilot:
        await settle(pilot)
        yield pilot


async def press(pilot: Pilot[Any], *keys: str) -> None:
    """Press keys, then let the app settle."""
    await pilot.press(*keys)
    await settle(pilot)


async def open_tab(pilot: Pilot[Any], key: str, wid: str) -> Any:
    """Press a tab's key (f5 storey ... f10 building) and settle: the widget `#wid` in view.

    `wid` is usually the tab's pane ("readings-pane", "members-pane", "photos-pane").
    """
    await press(pilot, key)
    return pilot.app.screen.query_one(f"#{wid}", Widget)


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


def key_event(key: str) -> Any:
    """The key event a terminal sends for a key name ('a', 'tab', 'enter', 'space', 'down')."""
    import unicodedata

    from textual import events
    from textual.keys import REPLACED_KEYS, _character_to_key, _get_unicode_name_from_key

    if len(key) == 1 and not key.isalnum():
        key = _character_to_key(key)
    original = REPLACED_KEYS.get(key, key)
    char: str | None
    try:
        char = unicodedata.lookup(_get_unicode_name_from_key(original))
    except KeyError:
        char = key if len(key) == 1 else None
    return events.Key(key, char)


def keys_of(*parts: str) -> list[str]:
    """Key names from parts: a part in angle brackets is one key ('<tab>'), else its characters."""
    out: list[str] = []
    for p in parts:
        if p.startswith("<") and p.endswith(">") and len(p) > 2:
            out.append(p[1:-1])
        else:
            out.extend(p)
    return out


async def burst(pilot: Pilot[Any], *parts: str) -> None:
    """Post every key at once, as a fast typist or a paste does, then let the app settle.

    Unlike `pilot.press` (which waits for idle after each key), nothing runs between the keys
    but what the app does as it takes each one off its queue.
    """
    app = pilot.app
    for k in keys_of(*parts):
        ev = key_event(k)
        ev.set_sender(app)
        app.post_message(ev)
    await settle(pilot)
