"""The canonical JSON text of a survey, re-encoding only what an edit replaced.

`CanonicalText` gives the same string as `triage.model.canonical_json` (sorted keys, no
spaces, UTF-8 kept as is), kept by the store per survey between edits; `scalar_json` is the
text of one plain value. No SQL here.
"""

from __future__ import annotations

import json
import math
from typing import Any

# The same text as triage.model.canonical_json, with the encoder made once.
_encode = json.JSONEncoder(sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode
_string = json.encoder.encode_basestring   # what that encoder writes for a str


def scalar_json(v: Any) -> str:
    """`_encode(v)` for the plain values of a storey, without building an encoder."""
    if v is None:
        return "null"
    if v is True:
        return "true"
    if v is False:
        return "false"
    t = type(v)
    if t is str:
        return _string(v)
    if t is int:
        return int.__repr__(v)
    if t is float and math.isfinite(v):
        return float.__repr__(v)
    return _encode(v)



class CanonicalText:
    """`canonical_json(doc)` of one survey, re-encoding only what an edit replaced.

    Edits copy on write, so a block, storey, reading or member group no edit touched is the
    very same object as before; its text is kept by identity (the memo holds the object, so
    its id cannot be reused). `parts` gives the text in pieces (what comes before the storeys,
    each storey, what comes after), the same string objects as long as they do not change, so
    SQLite can be handed the pieces and Python's cached UTF-8 of each is reused. Joined, they
    are the string `triage.model.canonical_json` gives (a test checks it).
    """

    LIMIT = 1024   # entries kept before pruning to what the current survey holds

    def __init__(self) -> None:
        self._memo: dict[int, tuple[Any, str]] = {}
        # Pruned when the memo passes this: LIMIT, or twice what the survey held at the last
        # pruning, so a survey holding more than LIMIT items (300 storeys of readings and
        # member groups) is not walked whole on every edit (amortised: one walk per that many
        # entries made).
        self._bound = self.LIMIT
        self._doc: dict[str, Any] | None = None   # the survey the last head and tail are of
        self._ends = ("", "")
        self._storeys: list[Any] = []             # its storeys, and their texts
        self._texts: list[str] = []

    def _cached(self, obj: Any, make: Any) -> str:
        hit = self._memo.get(id(obj))
        if hit is not None and hit[0] is obj:
            return hit[1]
        t: str = make(obj)
        self._memo[id(obj)] = (obj, t)
        return t

    def _items(self, items: list[Any]) -> str:
        """A list of readings or member groups, each item's text kept by identity."""
        memo = self._memo
        texts = []
        for x in items:   # inlined `_cached`: this loop runs on every keystroke
            hit = memo.get(id(x))
            if hit is not None and hit[0] is x:
                texts.append(hit[1])
            else:
                t = _encode(x)
                memo[id(x)] = (x, t)
                texts.append(t)
        return "[" + ",".join(texts) + "]"

    def _storey(self, st: Any) -> str:
        if not isinstance(st, dict):
            return _encode(st)
        memo = self._memo
        parts = []
        for key in sorted(st):
            value = st[key]
            if type(value) is list:
                # A list no edit replaced (the members, when a reading changed) is kept whole.
                hit = memo.get(id(value))
                if hit is not None and hit[0] is value:
                    encoded = hit[1]
                else:
                    encoded = self._items(value)
                    memo[id(value)] = (value, encoded)
            else:
                encoded = scalar_json(value)
            parts.append(_string(key) + ":" + encoded)
        return "{" + ",".join(parts) + "}"

    def _same_ends(self, doc: dict[str, Any]) -> bool:
        prev = self._doc
        if prev is None or doc.keys() != prev.keys():
            return False
        return all(value is prev[key] for key, value in doc.items() if key != "storeys")

    def parts(self, doc: dict[str, Any]) -> tuple[str, list[str], str]:
        """(head, storey texts, tail): head + ",".join(storeys) + tail is the text."""
        storeys = doc.get("storeys")
        if type(storeys) is not list:
            return _encode(doc), [], ""
        if not self._same_ends(doc):
            head, tail = "{", ""
            after = False
            for n, key in enumerate(sorted(doc)):
                sep = "," if n else ""
                if key == "storeys":
                    head += sep + '"storeys":['
                    tail = "]"
                    after = True
                    continue
                value = doc[key]
                t = type(value)
                encoded = (self._cached(value, _encode) if t is dict or t is list
                           else scalar_json(value))
                piece = sep + _string(key) + ":" + encoded
                if after:
                    tail += piece
                else:
                    head += piece
            self._ends = (head, tail + "}")
        previous = self._storeys
        self._doc = doc
        if len(previous) == len(storeys) and self._texts:
            # Only the storeys an edit replaced are looked at again.
            texts = list(self._texts)
            for i, st in enumerate(storeys):
                if st is not previous[i]:
                    texts[i] = self._cached(st, self._storey)
        else:
            texts = [self._cached(st, self._storey) for st in storeys]
        self._storeys = storeys
        self._texts = texts
        if len(self._memo) > self._bound:
            self._prune(doc)
        return self._ends[0], texts, self._ends[1]

    def text(self, doc: dict[str, Any]) -> str:
        """The canonical JSON text of `doc`."""
        head, storeys, tail = self.parts(doc)
        return head + ",".join(storeys) + tail

    def _prune(self, doc: dict[str, Any]) -> None:
        live: list[Any] = [v for v in doc.values() if isinstance(v, dict | list)]
        for st in doc.get("storeys") or ():
            live.append(st)
            if isinstance(st, dict):
                for value in st.values():
                    if type(value) is list:
                        live.append(value)
                        live.extend(value)
        keep = {id(x) for x in live}
        self._memo = {k: v for k, v in self._memo.items() if k in keep}
        self._bound = max(self.LIMIT, 2 * len(self._memo))
