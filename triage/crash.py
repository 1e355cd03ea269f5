"""Crash files: what a bug of ours leaves behind for whoever fixes it.

An exception that is not a `TriageError` (nor an interrupt) ends a command as "internal error"
in one line that names a crash file: the traceback, triage's version, the command line
(passwords in URLs masked), Python and the platform. The file goes to the data folder's
`crash/` (`$TRIAGE_HOME/crash` or the platform's data folder), or to `triage-crash/` in the
temporary folder when that cannot be written (a read-only home, a full disk).
"""

from __future__ import annotations

import contextlib
import os
import platform
import re
import sys
import tempfile
import traceback
from datetime import UTC, datetime
from pathlib import Path

_URL_PASSWORD = re.compile(r"(?P<head>[a-zA-Z][a-zA-Z0-9+.-]*://[^/\s:@]*:)[^@\s/]*@")


def masked(argv: list[str]) -> list[str]:
    """The command line with any password in a URL (`scheme://user:PASSWORD@`) masked."""
    out = []
    for a in argv:
        a = _URL_PASSWORD.sub(lambda m: m.group("head") + "***@", a)
        a = re.sub(r"(?i)(password=)[^&\s]*", r"\1***", a)
        out.append(a)
    return out


def crash_text(err: BaseException, argv: list[str]) -> str:
    """The crash report: when, version, command, platform, then the traceback."""
    from triage import __version__

    tb = "".join(traceback.format_exception(type(err), err, err.__traceback__))
    return (f"triage crash report\n"
            f"time: {datetime.now(UTC).isoformat(timespec='seconds')}\n"
            f"version: triage {__version__}\n"
            f"command: {' '.join(masked(['triage', *argv]))}\n"
            f"python: {sys.version.split()[0]} ({platform.python_implementation()})\n"
            f"platform: {platform.platform()}\n"
            f"\n{tb}")


def _folders() -> list[Path]:
    from triage.paths import data_home

    out = []
    with contextlib.suppress(Exception):   # no data folder: the temporary folder follows
        out.append(data_home() / "crash")
    out.append(Path(tempfile.gettempdir()) / "triage-crash")
    return out


def write_crash(err: BaseException, argv: list[str]) -> Path | None:
    """Write the crash file; return its path (None if no folder could take it)."""
    text = crash_text(err, argv)
    stamp = datetime.now(UTC).strftime("%Y%m%dT%H%M%SZ")
    for folder in _folders():
        try:
            folder.mkdir(parents=True, exist_ok=True)
            path = folder / f"crash-{stamp}-{os.getpid()}.txt"
            fd = os.open(path, os.O_WRONLY | os.O_CREAT | os.O_TRUNC, 0o600)
            try:
                data = text.encode("utf-8", "backslashreplace")
                view = memoryview(data)
                while view:
                    view = view[os.write(fd, view):]
            finally:
                os.close(fd)
            return path
        except OSError:
            continue
    return None
