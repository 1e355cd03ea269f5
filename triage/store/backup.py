"""A consistent copy of a database through SQLite's backup API, WAL content included.

The copy is read in one step under one read transaction, so other processes may keep writing
meanwhile; it is written to a `.part` file beside the destination, switched to a single file
(journal_mode DELETE, no `-wal` to forget on the USB stick), checked, and only then renamed.
"""

from __future__ import annotations

import os
import sqlite3
from pathlib import Path

from .connect import StoreError, explain


def backup_connection(src: sqlite3.Connection, src_path: Path, dest: Path) -> Path:
    """Copy the database behind `src` to `dest` (refused if `dest` exists).

    A symlink is followed (`triage.output.output_target`): a dangling one gets its target
    written, the link stays. Nothing that exists is ever replaced, so neither is a device.
    """
    from triage.output import fsync_folder, output_target

    given = dest
    if dest.is_symlink() or dest.exists():
        if dest.exists():
            raise StoreError(f"{dest}: exists already; choose a new file name for the backup")
        dest = output_target(dest)
    if dest.exists():
        raise StoreError(f"{dest}: exists already; choose a new file name for the backup")
    if dest.resolve() == src_path.resolve():
        raise StoreError(f"{dest}: is the database itself; choose another file")
    if not dest.parent.is_dir():
        raise StoreError(f"{dest.parent}: no such folder")
    part = dest.with_name(dest.name + ".part")
    try:
        if part.exists():
            part.unlink()
        out = sqlite3.connect(str(part), isolation_level=None)
        try:
            src.backup(out)
            out.execute("PRAGMA journal_mode = DELETE")
            check = out.execute("PRAGMA quick_check(1)").fetchone()[0]
        finally:
            out.close()
        if check != "ok":
            why = " ".join(str(check).split())   # SQLite's report spans lines; one line here
            raise StoreError(f"{dest}: the copy failed its check ({why}); it was not kept")
        with part.open("rb") as f:
            os.fsync(f.fileno())
        os.replace(part, dest)
        fsync_folder(dest.parent)
    except sqlite3.Error as err:
        part.unlink(missing_ok=True)
        raise explain(err, dest) from None
    except OSError as err:
        part.unlink(missing_ok=True)
        raise StoreError(f"{dest}: cannot write the backup ({err.strerror})") from None
    except StoreError:
        part.unlink(missing_ok=True)
        raise
    return given
