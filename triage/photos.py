"""Photos: what a survey may show, checked before anything decodes or draws it.

A photo is accepted when its bytes are a JPEG or a PNG by content (Pillow opens it with only
those two formats enabled), at most `MAX_BYTES`, and width times height at most `MAX_PIXELS`,
read from the header before any pixel is decoded; then it is decoded once to be sure it is
whole. The store keeps accepted photos as blobs named by their SHA-256, and the report only
ever receives bytes that passed `check_photo`, never a path it opens itself.

Photo files are read only inside a folder (`read_inside`): the survey file's folder. An
absolute path, a `..` step, or a symlink whose target lies outside are refused, named; a
device, FIFO or folder where a photo should be is refused too; a missing file is `None` (the
caller warns and lists it as missing).

Pillow is imported inside the functions (the survey model and the engine never load it).
"""

from __future__ import annotations

import hashlib
import io
import os
import re
import stat
import warnings
from collections.abc import Callable, Iterator
from dataclasses import dataclass
from pathlib import Path, PurePath
from typing import TYPE_CHECKING, Any

from .errors import InputRefused, io_failure

if TYPE_CHECKING:
    from triage.model import Photo, Survey

MAX_BYTES = 20_000_000          # 20 MB (decimal), as docs/formats.md ("Photos") gives it
MAX_PIXELS = 40_000_000         # 40 megapixels, width times height
FORMATS = ("JPEG", "PNG")


class PhotoRefused(InputRefused):
    """A photo broke a rule; `str()` names the photo and the rule."""


@dataclass(frozen=True)
class CheckedPhoto:
    """Image bytes that passed `check_photo`, with what was learnt on the way."""

    data: bytes
    sha256: str
    format: str          # "JPEG" or "PNG"
    width: int
    height: int

    @property
    def suffix(self) -> str:
        """The file name ending of its format."""
        return ".jpg" if self.format == "JPEG" else ".png"


def sha256_hex(data: bytes) -> str:
    """The lowercase hex SHA-256 of `data` (a photo's name in the store)."""
    return hashlib.sha256(data).hexdigest()


def check_photo(data: bytes, name: str, *, decode: bool = True) -> CheckedPhoto:
    """Accept JPEG or PNG bytes within the limits, or raise `PhotoRefused` naming `name`."""
    if len(data) > MAX_BYTES:
        raise PhotoRefused(f"{name}: {len(data):,} bytes is over the {MAX_BYTES:,}-byte "
                           "(20 MB) limit for a photo")
    from PIL import Image, UnidentifiedImageError

    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            with Image.open(io.BytesIO(data), formats=list(FORMATS)) as im:
                fmt = str(im.format)
                width, height = im.size
                if width * height > MAX_PIXELS:
                    raise PhotoRefused(f"{name}: {width} x {height} pixels is over the "
                                       f"{MAX_PIXELS // 1_000_000}-megapixel limit for a photo")
                if width < 1 or height < 1:
                    raise PhotoRefused(f"{name}: an image of no pixels")
                if decode:
                    im.load()
    except PhotoRefused:
        raise
    except UnidentifiedImageError:
        raise PhotoRefused(f"{name}: not a JPEG or PNG image (by its content); only those "
                           "two are taken") from None
    except (Image.DecompressionBombError, Image.DecompressionBombWarning) as err:
        # Pillow's own guard, met before ours for a header claiming hundreds of megapixels
        n = re.search(r"\((\d+) pixels\)", str(err))
        size = f"{int(n.group(1)):,} pixels" if n else "its size"
        raise PhotoRefused(f"{name}: {size} is over the {MAX_PIXELS // 1_000_000}-megapixel "
                           "limit for a photo") from None
    except (OSError, ValueError, SyntaxError, EOFError, MemoryError) as err:
        raise PhotoRefused(f"{name}: a damaged or truncated {FORMATS[0]}/{FORMATS[1]} image "
                           f"({' '.join(str(err).split()) or type(err).__name__})") from None
    return CheckedPhoto(data, sha256_hex(data), fmt, width, height)


def read_inside(folder: Path, given: str, name: str) -> bytes | None:
    """The bytes of photo file `given` under `folder`; None when it does not exist.

    Refused (`PhotoRefused`, naming `name`): an absolute path, a `..` step, a path whose
    symlinks lead outside `folder`, anything but a regular file, a file over `MAX_BYTES`.
    """
    pure = PurePath(given)
    if pure.is_absolute() or given.startswith(("/", "\\")) or (len(given) > 1
                                                              and given[1] == ":"):
        raise PhotoRefused(f"{name}: {given!r} is an absolute path; photos are read only "
                           "from inside the survey file's folder (give a path relative to it)")
    if ".." in pure.parts or ".." in given.replace("\\", "/").split("/"):
        raise PhotoRefused(f"{name}: {given!r} steps out with '..'; photos are read only from "
                           "inside the survey file's folder")
    base = folder.resolve()
    full = (base / pure).resolve()
    if not full.is_relative_to(base):
        raise PhotoRefused(f"{name}: {given!r} is a link to a file outside the survey file's "
                           "folder; photos are read only from inside it")
    try:
        fd = os.open(full, os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except FileNotFoundError:
        return None
    except NotADirectoryError:
        return None
    except OSError as err:
        raise io_failure(f"{name}: {given}", err, "read") from None
    try:
        st = os.fstat(fd)
        if not stat.S_ISREG(st.st_mode):
            raise PhotoRefused(f"{name}: {given!r} is not a regular file")
        if st.st_size > MAX_BYTES:
            raise PhotoRefused(f"{name}: {st.st_size:,} bytes is over the {MAX_BYTES:,}-byte "
                               "(20 MB) limit for a photo")
        chunks = []
        left = MAX_BYTES + 1
        while left > 0:
            chunk = os.read(fd, min(left, 1 << 20))
            if not chunk:
                break
            chunks.append(chunk)
            left -= len(chunk)
    except OSError as err:
        raise io_failure(f"{name}: {given}", err, "read") from None
    finally:
        os.close(fd)
    data = b"".join(chunks)
    if len(data) > MAX_BYTES:
        raise PhotoRefused(f"{name}: over the {MAX_BYTES:,}-byte (20 MB) limit for a photo")
    return data


def photo_fields(doc: dict[str, Any]) -> Iterator[tuple[str, dict[str, Any]]]:
    """Every photo of a survey's JSON data with its field path, in survey order."""
    for i, st in enumerate(doc.get("storeys") or ()):
        for j, ph in enumerate(st.get("photos") or ()):
            yield f"storeys[{i}].photos[{j}]", ph
        for k, m in enumerate(st.get("members") or ()):
            for j, ph in enumerate(m.get("photos") or ()):
                yield f"storeys[{i}].members[{k}].photos[{j}]", ph
    for i, h in enumerate(doc.get("hazards") or ()):
        for j, ph in enumerate(h.get("photos") or ()):
            yield f"hazards[{i}].photos[{j}]", ph


@dataclass
class Gathered:
    """A survey's photos read for import: the survey with digests, the blobs, the warnings."""

    survey: Survey
    photos: list[CheckedPhoto]
    warnings: list[str]


def gather(survey: Survey, folder: Path | None, *,
           have: Callable[[str], bool] = lambda _sha: False) -> Gathered:
    """Read and check every photo a survey names, for import; refuse the survey on any break.

    `folder` is the survey file's folder (None for standard input: any photo path is refused).
    `have(sha256)` says whether the store holds a blob already: a photo whose file is missing
    but whose digest the store holds is fine. A missing file is a warning; the photo stays in
    the survey, without `sha256`, and is listed as missing.
    """
    from triage.model import parse_survey

    doc = survey.to_json_dict()
    blobs: dict[str, CheckedPhoto] = {}
    said: list[str] = []
    for field, ph in photo_fields(doc):
        path = str(ph.get("path", ""))
        name = f"{field} ({path})"
        if folder is None:
            raise PhotoRefused(f"{field}.path: {path!r}: a survey read from standard input has "
                               "no folder to read photos from; import the file itself")
        data = read_inside(folder, path, field)
        given = ph.get("sha256")
        if data is None:
            if given and have(given):
                continue
            said.append(f"{name}: no such file; imported without it, listed as missing")
            ph.pop("sha256", None)
            continue
        checked = check_photo(data, name)
        if given and given != checked.sha256:
            raise PhotoRefused(f"{field}.sha256: the file {path!r} is not the photo this digest "
                               "names (its content differs)")
        ph["sha256"] = checked.sha256
        blobs.setdefault(checked.sha256, checked)
    new = parse_survey(doc) if blobs or said else survey
    return Gathered(new, list(blobs.values()), said)


PhotoLoader = Callable[["Photo", str], "bytes | None"]
"""Gives a photo's bytes (checked) for the report, or None when it is missing."""


def folder_loader(folder: Path | None) -> PhotoLoader:
    """Photos read from inside `folder` (a survey file's), checked; none without a folder."""

    def load(photo: Photo, name: str) -> bytes | None:
        if folder is None:
            return None
        data = read_inside(folder, photo.path, name)
        if data is None:
            return None
        checked = check_photo(data, name, decode=False)
        sha = getattr(photo, "sha256", None)
        if sha and sha != checked.sha256:
            raise PhotoRefused(f"{name}: the file {photo.path!r} is not the photo its sha256 "
                               "names (its content differs)")
        return checked.data

    return load


def blob_loader(get: Callable[[str], bytes | None], folder: Path | None) -> PhotoLoader:
    """Photos of a stored survey: the blob its `sha256` names, checked again.

    A photo without a `sha256` (a survey stored before photos were kept, or whose file was
    missing at import) is read, checked, from inside `folder` (the folder of the file it was
    imported from, while it is there), else it is missing.
    """
    from_folder = folder_loader(folder)

    def load(photo: Photo, name: str) -> bytes | None:
        sha = getattr(photo, "sha256", None)
        if sha:
            data = get(sha)
            return None if data is None else check_photo(data, name, decode=False).data
        return from_folder(photo, name)

    return load


def thumbnail_jpeg(data: bytes, box: int = 640) -> tuple[bytes, int, int] | None:
    """A small JPEG of checked photo bytes, with its size; None when it cannot be decoded.

    Only JPEG and PNG are opened, the pixel limit is checked again before decoding, and a JPEG
    is decoded at a reduced scale (`draft`), so a photo at the limit costs little.
    """
    from PIL import Image

    try:
        with warnings.catch_warnings():
            warnings.simplefilter("error", Image.DecompressionBombWarning)
            with Image.open(io.BytesIO(data), formats=list(FORMATS)) as src:
                w, h = src.size
                if w * h > MAX_PIXELS or w < 1 or h < 1:
                    return None
                if src.format == "JPEG":
                    src.draft("RGB", (box, box))
                im = src.convert("RGB")
        im.thumbnail((box, box))
        out = io.BytesIO()
        im.save(out, format="JPEG", quality=80)
    except Exception:  # any image that will not decode is listed as unreadable, never fatal
        return None
    return out.getvalue(), im.size[0], im.size[1]
