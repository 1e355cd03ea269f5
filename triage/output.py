"""The one way a command writes the file `-o PATH` names.

`write_output(path, data)`:

- a symlink is followed: its target gets the content, the link stays a link;
- a character or block device, or a FIFO, is written in place (opened for writing, never
  replaced or truncated by rename): `-o /dev/null` as root leaves `/dev/null` a device;
- a regular file, or a new one, is written atomically: a temporary file in the same folder,
  written and fsynced, renamed over the target, then the folder fsynced; so the path holds
  the old content or the whole new one, never a part, and survives a power cut once written.
  A replaced file keeps its permission bits; a new one gets `mode` less the umask;
- a folder, a socket, a missing folder or a write that fails (disk full, read-only, no
  permission) is refused in one line (`InputRefused`, `IOFailure`), with nothing left behind.

`write_new(path, data, mode)` writes a file that must not exist yet (a key), as durably, never
over an existing one, and leaves no partial or empty file when the disk is full.
"""

from __future__ import annotations

import contextlib
import os
import secrets
import stat
from pathlib import Path

from .errors import InputRefused, IOFailure, io_failure


def _write_all(fd: int, data: bytes) -> None:
    view = memoryview(data)
    while view:
        n = os.write(fd, view)
        view = view[n:]


def fsync_folder(folder: Path) -> None:
    """Make a rename in `folder` durable (POSIX; a no-op where folders cannot be opened)."""
    try:
        fd = os.open(folder, os.O_RDONLY | getattr(os, "O_DIRECTORY", 0))
    except OSError:
        return
    try:
        with contextlib.suppress(OSError):   # some file systems refuse fsync on a folder
            os.fsync(fd)
    finally:
        os.close(fd)


def _temp_beside(target: Path, mode: int) -> tuple[int, Path]:
    """A new file beside `target`, opened exclusively for writing (mode less the umask)."""
    for _ in range(100):
        tmp = target.with_name(f".{target.name}.{secrets.token_hex(4)}.part")
        try:
            return os.open(tmp, os.O_WRONLY | os.O_CREAT | os.O_EXCL, mode), tmp
        except FileExistsError:
            continue
    raise IOFailure(f"{target.parent}: cannot make a temporary file there")


def output_target(path: str | Path) -> Path:
    """Where writing `path` lands: the symlink's final target, or the path itself.

    Refuses a folder, a socket and a path whose folder does not exist.
    """
    given = Path(path)
    target = Path(os.path.realpath(given))
    try:
        st = os.stat(target)
    except FileNotFoundError:
        st = None
    except OSError as err:
        raise io_failure(given, err, "written") from None
    if st is not None:
        if stat.S_ISDIR(st.st_mode):
            raise InputRefused(f"{given}: is a folder; give the file to write")
        if stat.S_ISSOCK(st.st_mode):
            raise InputRefused(f"{given}: is a socket, not a file to write")
        return target
    if not target.parent.is_dir():
        raise InputRefused(f"{given}: its folder does not exist")
    return target


def write_output(path: str | Path, data: bytes | str, *, mode: int = 0o666) -> Path:
    """Write `data` (text as UTF-8) to `path` as the module says; returns the path written."""
    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    given = Path(path)
    target = output_target(given)
    try:
        st: os.stat_result | None = os.stat(target)
    except FileNotFoundError:
        st = None
    except OSError as err:
        raise io_failure(given, err) from None
    if st is not None and not stat.S_ISREG(st.st_mode):
        # a device or FIFO: written in place, never replaced (nor truncated: O_TRUNC is absent)
        try:
            fd = os.open(target, os.O_WRONLY)
        except OSError as err:
            raise io_failure(given, err) from None
        try:
            _write_all(fd, raw)
        except OSError as err:
            raise io_failure(given, err) from None
        finally:
            os.close(fd)
        return given
    try:
        fd, tmp = _temp_beside(target, mode)
    except OSError as err:
        raise io_failure(given, err) from None
    try:
        try:
            _write_all(fd, raw)
            if st is not None and hasattr(os, "fchmod"):
                os.fchmod(fd, stat.S_IMODE(st.st_mode))
            os.fsync(fd)
        finally:
            os.close(fd)
        os.replace(tmp, target)
    except OSError as err:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise io_failure(given, err) from None
    except BaseException:
        with contextlib.suppress(OSError):
            tmp.unlink()
        raise
    fsync_folder(target.parent)
    return given


def write_new(path: str | Path, data: bytes | str, *, mode: int = 0o600) -> Path:
    """Write a file that must not exist yet, durably; never over an existing file.

    The content is written and fsynced under a temporary name, then linked to `path` (which
    fails if `path` exists, even one made meanwhile), so a full disk leaves neither a partial
    nor an empty file. The mode is set exactly (the umask neither widens nor narrows it).
    """
    raw = data.encode("utf-8") if isinstance(data, str) else bytes(data)
    given = Path(path)
    if not given.parent.is_dir():
        raise InputRefused(f"{given}: its folder does not exist")
    if given.exists() or given.is_symlink():
        raise InputRefused(f"{given}: already exists; it is never overwritten")
    try:
        fd, tmp = _temp_beside(given, mode)
    except OSError as err:
        raise io_failure(given, err) from None
    try:
        try:
            if hasattr(os, "fchmod"):
                os.fchmod(fd, mode)
            _write_all(fd, raw)
            os.fsync(fd)
        finally:
            os.close(fd)
        try:
            os.link(tmp, given)
        except FileExistsError:
            raise InputRefused(f"{given}: already exists; it is never overwritten") from None
        except OSError:   # no hard links here (some USB file systems): a checked rename
            if given.exists():
                raise InputRefused(f"{given}: already exists; it is never overwritten") \
                    from None
            os.replace(tmp, given)
    except OSError as err:
        raise io_failure(given, err) from None
    finally:
        with contextlib.suppress(OSError):
            tmp.unlink()
    fsync_folder(given.parent)
    return given
