"""Type to search in pick lists, closed or open, and in the sign list; a pick made at once.

A letter typed jumps to the next choice whose words begin with it. Enter or a click in an
open pick list picks the highlighted choice at once (`PickOverlay`), like a letter: Textual's
list sends the pick's place in the list as a message acted on later, after keys typed ahead,
so a storey key (PgUp) that refilled the list meanwhile had the pick read from the new list,
or past its end.

Letters typed quickly one after the other (within `PAUSE` seconds) search together ('ba' finds
'bars exposed' before 'beam'); the same letter again goes on to the next choice that begins with
it. A choice whose words do not begin with what was typed is found by the start of any of its
words ('spalled' finds 'cover spalled'). Space and the other keys keep their own meaning.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Iterable

from rich.console import RenderableType
from textual import events
from textual.app import ComposeResult
from textual.widgets import Select
from textual.widgets._select import SelectCurrent, SelectOverlay

from triage.ui.focus import focus_now

PAUSE = 0.8  # seconds after which a letter starts a new search


def find(texts: list[str], current: int | None, query: str, again: bool) -> int | None:
    """The index of the choice `query` finds, searching on from `current`.

    `again`: the query is one letter typed again, so the search starts after `current`;
    otherwise it starts at `current` (more letters refine the choice in view).
    """
    q = query.casefold()
    n = len(texts)
    if not q or n == 0:
        return None
    start = 0 if current is None else current + (1 if again else 0)
    order = [(start + k) % n for k in range(n)]
    for i in order:
        if texts[i].casefold().startswith(q):
            return i
    for i in order:
        if any(word.startswith(q) for word in texts[i].casefold().split()):
            return i
    return None


class Searcher:
    """The letters typed so far into one pick list."""

    def __init__(self) -> None:
        self.query = ""
        self.at = 0.0

    def next_index(self, texts: list[str], current: int | None, char: str) -> int | None:
        """Where a typed letter moves the choice (None: nothing matches)."""
        now = time.monotonic()
        fresh = now - self.at > PAUSE
        self.at = now
        if not fresh and self.query:
            found = find(texts, current, self.query + char, again=False)
            if found is not None:
                self.query += char
                return found
        self.query = char
        return find(texts, current, char, again=current is not None)

    def reset(self) -> None:
        """Another key: the next letter starts a new search."""
        self.query = ""


def searchable(character: str | None) -> bool:
    """A key that searches: a printable character but space."""
    return character is not None and len(character) == 1 and character.isprintable() \
        and not character.isspace()


class PickOverlay(SelectOverlay):
    """The open list of a `PickSelect`: Enter or a click picks the highlighted choice now."""

    def action_select(self) -> None:
        """Pick the highlighted choice at once (no message left to act on later)."""
        i = self.highlighted
        select = self.parent
        if i is None or not isinstance(select, PickSelect) or self.options[i].disabled:
            return
        select.pick_at(i)


class PickSelect(Select[object]):
    """A pick list that takes a typed letter while closed: the matching choice is picked."""

    def __init__(self, options: Iterable[tuple[RenderableType, object]], *, prompt: str,
                 allow_blank: bool, value: object, compact: bool) -> None:
        super().__init__(options, prompt=prompt, allow_blank=allow_blank, value=value,
                         compact=compact)
        self.searcher = Searcher()
        # called with the value picked by a typed letter, at once (the Changed message that
        # also follows comes later, after keys typed ahead)
        self.on_pick: Callable[[object], None] | None = None

    def compose(self) -> ComposeResult:
        """Textual's parts, with the open list that picks at once."""
        yield SelectCurrent(self.prompt)
        yield PickOverlay(type_to_search=self._type_to_search).data_bind(
            compact=Select.compact)

    def pick_at(self, index: int) -> None:
        """Pick the choice at `index` of the list as it is now, close it, focus the pick."""
        value = self._options[index][1]
        if value != self.value:
            self.value = value
        self.expanded = False
        focus_now(self)
        if value is not Select.NULL and self.on_pick is not None:
            self.on_pick(value)

    def check_consume_key(self, key: str, character: str | None) -> bool:
        """Letters are the list's own (typed in order, never a binding)."""
        return searchable(character) and not self.expanded

    def texts(self) -> list[str]:
        """The choices' words, in order."""
        return [str(prompt) for prompt, _ in self._options]

    async def _on_key(self, event: events.Key) -> None:
        if self.expanded or not searchable(event.character):
            self.searcher.reset()
            return
        event.stop()
        event.prevent_default()
        values = [v for _, v in self._options]
        current = values.index(self.value) if self.value in values else None
        i = self.searcher.next_index(self.texts(), current, event.character or "")
        if i is not None and values[i] is not Select.NULL:
            self.value = values[i]
            if self.on_pick is not None:
                self.on_pick(values[i])
