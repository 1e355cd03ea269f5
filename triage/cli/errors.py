"""The one exception a command raises to refuse: one line (or one per broken rule) and a status."""

from __future__ import annotations

from triage.errors import TriageError


class UserError(TriageError):
    """Input refused or a check failed: one line naming the file or field and the rule.

    A file breaking several rules gives `lines`, one per rule (each naming the file, the
    field and the rule); `str()` is the first.
    """

    def __init__(self, message: str, code: int = 1, *, lines: list[str] | None = None) -> None:
        super().__init__(message, code)
        self.lines = lines or [message]


def refusal_lines(err: BaseException) -> list[str]:
    """Every line a refusal has: a `UserError`'s lines, a survey's every broken rule, else one."""
    lines = getattr(err, "lines", None)
    if isinstance(lines, list) and lines:
        return [str(x) for x in lines]
    found = getattr(err, "all_messages", None)
    if isinstance(found, list) and len(found) > 1:
        return [str(x) for x in found]
    return [str(err)]
