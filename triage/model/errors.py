"""A refused survey in words: `SurveyError`, and one line per rule broken.

Each line reads `field.path: the rule (the field in words)`, from pydantic's errors or from a
rule of `triage.model_rules`.
"""

from __future__ import annotations

from typing import Any

from pydantic import ValidationError

from triage import model_rules as rules
from triage.errors import InputRefused
from triage.model_rules import RuleBroken

from .fields import FORMAT


class SurveyError(InputRefused, ValueError):
    """A survey broke a rule; `str()` is one line naming the field path and the rule."""

    def __init__(self, message: str, all_messages: list[str] | None = None) -> None:
        super().__init__(message)
        self.all_messages = all_messages or [message]


def _loc(loc: tuple[int | str, ...]) -> tuple[int | str, ...]:
    """A pydantic location without the names of validators and unions."""
    return tuple(p for p in loc if not (isinstance(p, str) and p.startswith(
        ("function-", "tagged-union", "json-or-python", "lax-or-strict"))))


def _rule(e: Any) -> tuple[tuple[int | str, ...], str]:
    """(path, rule) of one pydantic error, the rule in our words with its limit."""
    loc = _loc(tuple(e.get("loc", ())))
    kind = e.get("type", "")
    ctx = e.get("ctx") or {}
    cause = ctx.get("error")
    if isinstance(cause, RuleBroken):
        return loc + cause.path, cause.rule
    if kind == "extra_forbidden":
        return loc, f"unknown key {loc[-1]!r} (not part of {FORMAT})"
    if kind == "missing":
        return loc, "required field is missing"
    if kind == "string_too_long":
        n = len(e["input"]) if isinstance(e.get("input"), str) else 0
        return loc, f"{n:,} characters; at most {ctx.get('max_length', 0):,}"
    if kind == "too_long":
        return loc, (f"{ctx.get('actual_length', 0):,} items; at most "
                     f"{ctx.get('max_length', 0):,}")
    msg = str(e.get("msg", ""))
    for prefix in ("Value error, ", "Assertion failed, "):
        if msg.startswith(prefix):
            msg = msg[len(prefix):]
    if msg.startswith("Input should"):
        msg = "must" + msg[len("Input should"):]
    return loc, (msg[0].lower() + msg[1:]) if msg else kind


def error_lines(err: ValidationError, doc: Any = None,
                prefix: tuple[int | str, ...] = ()) -> list[str]:
    """One line per pydantic error: `field.path: the rule (the field in words)`.

    `doc` is the whole survey's data, for naming storeys by label; `prefix` the path of the
    part validated when it is not the whole survey (the store validates one item at a time).
    """
    lines = []
    errors = err.errors(include_url=False)
    locs = [_loc(tuple(e.get("loc", ()))) for e in errors]
    for e, loc in zip(errors, locs, strict=True):
        # A list left short only because its items failed is a consequence, not a rule broken.
        if e.get("type") == "too_short" and any(
                other[:len(loc)] == loc and len(other) > len(loc) for other in locs):
            continue
        path, rule = _rule(e)
        lines.append(rules.line(prefix + path, rule, doc))
    return lines


def rule_error(err: RuleBroken, doc: Any = None, prefix: tuple[int | str, ...] = ()) -> str:
    """A rule broken outside pydantic (the store's edit API calls the rules) as one line."""
    return rules.line(prefix + err.path, err.rule, doc)
