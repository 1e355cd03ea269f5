"""Standard input and output for the commands: `-` as a file name, status lines, data.

The manners every command keeps (docs/command.md, "Streams"):

- data goes to standard output (an assessment, a table, JSON, the bytes `-o -` asks for),
  status lines (what was written where, what was imported or merged) and refusals go to
  standard error, so `triage export ID -o - > s.json` holds the survey and nothing else;
- `-` names standard input where a file is read (`assess -`, `import -`, `report -`,
  `compare - ID`, `verify -`, `key trust -`) and standard output where one is written
  (`export ID -o -`, `report ... -o -`, `form SYSTEM -o -`, `backup -o -`);
- binary data (a PDF, a database) is never written to a terminal: `-o -` on a terminal is
  refused in one line, nothing written.

Text written here passes through the `SafeStream` that `main` puts round both streams, so a
survey's control or bidi characters reach no terminal raw; binary data is written to the
stream's byte buffer beneath it.
"""

from __future__ import annotations

import contextlib
import shutil
import sys
import tempfile
from collections.abc import Iterator
from pathlib import Path
from typing import Any, BinaryIO

from .errors import UserError

STD = "-"   # the file name that means standard input or output


def is_std(name: str | None) -> bool:
    """Whether a file argument names standard input or output."""
    return name == STD


def status(line: str) -> None:
    """A status line on standard error (what was done), never mixed into the data."""
    sys.stderr.write(line.rstrip("\n") + "\n")
    sys.stderr.flush()


def _raw(stream: Any) -> Any:
    """The stream beneath `main`'s `SafeStream`, if any."""
    return getattr(stream, "wrapped", stream)


def read_stdin_bytes() -> bytes:
    """All of standard input, as bytes."""
    raw = _raw(sys.stdin)
    buffer = getattr(raw, "buffer", None)
    if buffer is not None:
        return bytes(buffer.read())
    text = raw.read()   # a text stream with no bytes beneath (a test's StringIO)
    return text.encode("utf-8", "surrogateescape") if isinstance(text, str) else bytes(text)


def read_text(name: str, what: str = "a survey file is JSON") -> str:
    """The UTF-8 text of a file, or of standard input for `-`; one-line refusals naming it."""
    if is_std(name):
        try:
            return read_stdin_bytes().decode("utf-8")
        except UnicodeDecodeError:
            raise UserError(f"-: not UTF-8 text ({what})") from None
    p = Path(name)
    try:
        return p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise UserError(f"{name}: no such file") from None
    except IsADirectoryError:
        raise UserError(f"{name}: is a folder, not a file to read") from None
    except UnicodeDecodeError:
        raise UserError(f"{name}: not UTF-8 text ({what})") from None
    except OSError as err:
        raise UserError(f"{name}: cannot be read ({err.strerror})") from None


@contextlib.contextmanager
def input_path(name: str, suffix: str = "", *, sniff: bool = False) -> Iterator[Path]:
    """A path to read `name` from: the file itself, or a private temporary copy of stdin.

    For the readers that need a file (a PDF, a key): the copy is removed afterwards. With
    `sniff`, the copy is named `.pdf` when it starts as a PDF does (`%PDF-`), else `.json`.
    """
    if not is_std(name):
        yield Path(name)
        return
    data = read_stdin_bytes()
    if sniff:
        suffix = ".pdf" if data.lstrip()[:5] == b"%PDF-" else ".json"
    with tempfile.TemporaryDirectory(prefix="triage-stdin-") as folder:
        path = Path(folder) / f"stdin{suffix}"
        path.write_bytes(data)
        yield path


def write_json(obj: Any) -> None:
    """One JSON object on standard output (`--format json`), a newline after it."""
    import json

    sys.stdout.write(json.dumps(obj, ensure_ascii=False, indent=1) + "\n")
    sys.stdout.flush()


def binary_stdout(what: str) -> BinaryIO:
    """Standard output's byte stream, refused when it is a terminal (binary data garbles it)."""
    raw = _raw(sys.stdout)
    if raw.isatty():
        raise UserError(f"-o -: standard output is a terminal; {what} is binary: redirect it "
                        "to a file or a pipe (nothing was written)")
    raw.flush()
    buffer: BinaryIO = getattr(raw, "buffer", raw)
    return buffer


def write_bytes(dest: str, data: bytes, what: str) -> None:
    """Bytes to `dest` (`triage.output.write_output`), or to standard output for `-`."""
    if is_std(dest):
        out = binary_stdout(what)
        out.write(data)
        out.flush()
        return
    from triage.output import write_output

    write_output(Path(dest), data)


def write_text(dest: str, text: str) -> None:
    """Text to `dest` (`write_output`, UTF-8), or to standard output for `-`."""
    if is_std(dest):
        sys.stdout.write(text)
        sys.stdout.flush()
        return
    from triage.output import write_output

    write_output(Path(dest), text)


@contextlib.contextmanager
def output_path(dest: str, what: str, suffix: str = "") -> Iterator[Path]:
    """A path for a writer that needs one: `dest` itself, or a temporary file for `-`.

    For `-` the terminal check comes first (nothing is made for a terminal); once the
    writer is done, the temporary file's bytes are copied to standard output and it is
    removed. A writer that fails leaves standard output untouched.
    """
    if not is_std(dest):
        yield Path(dest)
        return
    out = binary_stdout(what)
    with tempfile.TemporaryDirectory(prefix="triage-stdout-") as folder:
        path = Path(folder) / f"out{suffix}"
        yield path
        with open(path, "rb") as f:
            shutil.copyfileobj(f, out)
        out.flush()


def shown(name: str) -> str:
    """How a status line names a file written: `-` as standard output."""
    return "standard output" if is_std(name) else name


def refuse_std(name: str | None, option: str, why: str) -> None:
    """Refuse `-` where it makes no sense (a database, a key file), in one line."""
    if is_std(name):
        raise UserError(f"{option} -: {why}")
