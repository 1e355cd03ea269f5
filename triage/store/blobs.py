"""Photos kept in the store: blobs named by their SHA-256 (table `photos`, schema 2).

Only bytes that passed `triage.photos.check_photo` are written; reading one back checks its
digest again, so a blob changed in the file (or brought by a hostile database) is never handed
to the report. A survey names its photos by `sha256`; a photo without one (its file was missing
at import) or whose blob is absent is "missing" and listed so.

Merging copies the blobs a source holds and the target lacks, each checked again on the way
in (`copy_new_blobs`); backups copy the file whole, blobs included.
"""

from __future__ import annotations

import sqlite3
from collections.abc import Iterable
from datetime import UTC, datetime
from typing import Any

from triage.photos import CheckedPhoto, PhotoRefused, check_photo, photo_fields, sha256_hex


def put_photos(c: sqlite3.Connection, photos: Iterable[CheckedPhoto]) -> int:
    """Store checked photos inside the caller's transaction; returns how many were new."""
    now = datetime.now(UTC).isoformat(timespec="seconds")
    n = 0
    for p in photos:
        cur = c.execute(
            "INSERT OR IGNORE INTO photos (sha256, format, width, height, size, added_at, data) "
            "VALUES (?, ?, ?, ?, ?, ?, ?)",
            (p.sha256, p.format, p.width, p.height, len(p.data), now, p.data))
        n += cur.rowcount
    return n


def has_photo(conn: sqlite3.Connection, sha256: str) -> bool:
    """Whether the store holds the photo with this digest."""
    return conn.execute("SELECT 1 FROM photos WHERE sha256 = ?", (sha256,)).fetchone() is not None


def photo_data(conn: sqlite3.Connection, sha256: str) -> bytes | None:
    """The photo's bytes, or None when not held or no longer matching its digest."""
    row = conn.execute("SELECT data FROM photos WHERE sha256 = ?", (sha256,)).fetchone()
    if row is None:
        return None
    data = bytes(row[0])
    return data if sha256_hex(data) == sha256 else None


def missing_photos(doc: dict[str, Any], conn: sqlite3.Connection) -> list[tuple[str, str]]:
    """(field path, photo path) of every photo of a survey's JSON the store does not hold."""
    out = []
    for field, ph in photo_fields(doc):
        sha = ph.get("sha256")
        if not sha or not has_photo(conn, sha):
            out.append((field, str(ph.get("path", ""))))
    return out


def copy_new_blobs(c: sqlite3.Connection, schema_name: str = "src") -> int:
    """Copy the attached database's photos this one lacks, each checked again; returns how many.

    A blob whose bytes do not match its name, or that fails the photo checks, is left behind
    (the survey naming it shows the photo as missing).
    """
    rows = c.execute(f"SELECT sha256 FROM {schema_name}.photos WHERE sha256 NOT IN "
                     "(SELECT sha256 FROM main.photos)").fetchall()
    n = 0
    for (sha,) in rows:
        data = c.execute(f"SELECT data FROM {schema_name}.photos WHERE sha256 = ?",
                         (sha,)).fetchone()[0]
        if not isinstance(data, bytes) or sha256_hex(data) != sha:
            continue
        try:
            checked = check_photo(data, f"photo {sha[:12]}", decode=False)
        except PhotoRefused:
            continue
        n += put_photos(c, [checked])
    return n
