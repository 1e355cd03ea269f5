"""The one exception a command raises to refuse: a one-line message and an exit status."""

from __future__ import annotations

from triage.errors import TriageError


class UserError(TriageError):
    """Input refused or a check failed: one line naming the file or field and the rule."""

    def __init__(self, message: str, code: int = 1) -> None:
        super().__init__(message, code)
