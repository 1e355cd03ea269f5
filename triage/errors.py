"""The one exception tree of triage: everything it raises on purpose derives from `TriageError`.

    TriageError                  one line for the person (`str()`), an exit status (`code`)
    ├── InputRefused             bad input: a file, field, value or rule (exit 1)
    ├── CheckFailed              a check did not pass: a changed report, a photo's digest (exit 1)
    └── IOFailure                the machine failed us: disk full, read-only, no permission (exit 1)

Subsystems derive their own errors from these (the survey model's `SurveyError` and the forms'
`FormError` are `InputRefused`; the store's `StoreError` is a `TriageError`, with its disk and
permission cases told as `IOFailure`; the command line's `UserError` is a `TriageError` with
the status it is given). An `IOFailure` is never a `ValueError`: code that catches `ValueError`
for a refused value does not swallow a full disk. Anything else that escapes a command is a bug
of ours: the command writes a crash file (`triage.crash`) and says where in one line.

This module imports nothing of triage and no library, so every layer may use it.
"""

from __future__ import annotations

import errno


class TriageError(Exception):
    """Something triage refuses or cannot do, said in one line naming the file or field."""

    code: int = 1

    def __init__(self, message: str = "", code: int | None = None) -> None:
        super().__init__(message)
        if code is not None:
            self.code = code


class InputRefused(TriageError):
    """Input refused: the one line names the file or field and the rule it breaks."""


class CheckFailed(TriageError):
    """A check did not pass (a report changed after signing, a photo unlike its digest)."""


class IOFailure(TriageError):
    """Reading or writing failed for a reason outside the data: disk full, read-only, access."""

    def __init__(self, message: str = "", code: int | None = None,
                 errno_: int | None = None) -> None:
        super().__init__(message, code)
        self.errno = errno_


def io_failure(path: object, err: OSError, doing: str = "written") -> IOFailure:
    """A one-line `IOFailure` for an `OSError` met while `doing` something with `path`."""
    why = {errno.ENOSPC: "the disk is full",
           errno.EDQUOT: "the disk quota is used up",
           errno.EROFS: "the disk is read-only",
           errno.EACCES: "permission denied",
           errno.EPERM: "permission denied",
           errno.ENOENT: "no such file or folder",
           errno.ENOTDIR: "a part of the path is not a folder",
           errno.EISDIR: "is a folder",
           errno.EIO: "input/output error (failing disk or removed medium?)"}.get(
        err.errno or 0, err.strerror or type(err).__name__)
    return IOFailure(f"{path}: cannot be {doing} ({why})", errno_=err.errno)
