"""Focus moves that happen at once, so that no key typed ahead lands in the wrong field.

Textual hands each key to the widget focused when the app takes the key off its queue. A focus
move made later (`Widget.focus()` defers itself with `call_later`; a handler of `Submitted` or
of a row picked runs after the keys already queued) lets keys typed after Tab or Enter land in
the old field. So every key-triggered focus move in the screens is made by a priority binding
of the app (Tab, shift+Tab, Enter), before the next key is taken, and with `focus_now`, never
with `Widget.focus()`.

Enter that adds an item reads every field of the form: `drain` first lets the focused widget
handle the keys already handed to it (the app takes no new key meanwhile), so the values read
are the ones typed before Enter, and none typed after it.
"""

from __future__ import annotations

import asyncio
import contextlib

from textual.widget import Widget


def focus_now(widget: Widget) -> None:
    """Give a widget the focus at once (not after the keys already queued)."""
    try:
        screen = widget.screen
    except Exception:  # not mounted: nothing to focus
        return
    if screen.focused is widget:
        return
    screen.set_focus(widget)


async def drain(widget: Widget, timeout: float = 1.0) -> None:
    """Wait until a widget has handled every message already queued for it.

    Runs inside a priority binding of the app, which takes no key off its queue meanwhile.
    The timeout only guards against a widget that never goes quiet.
    """
    done = asyncio.Event()
    # a callback goes on the widget's own queue, behind the keys already handed to it
    if not widget.call_later(done.set):
        return  # the widget is closing: nothing of it to wait for
    with contextlib.suppress(TimeoutError):
        await asyncio.wait_for(done.wait(), timeout)
