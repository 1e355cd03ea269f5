"""Helpers shared by the command modules: reading survey files, opening the database, ids.

Everything here is public and used by more than one command; a command module keeps its own
helpers private and never imports another command module's.
"""

from __future__ import annotations

import argparse
import os
from pathlib import Path
from typing import TYPE_CHECKING

from .errors import UserError
from .streams import is_std, read_stdin_bytes, read_text

if TYPE_CHECKING:
    from triage.model import Survey
    from triage.store import Store
    from triage.store.reader import SurveyReader


def add_command(sub: argparse._SubParsersAction[argparse.ArgumentParser], name: str,
                summary: str, description: str | None = None, epilog: str | None = None,
                ) -> argparse.ArgumentParser:
    """A command's parser.

    `summary` is its line in `triage --help`; `description` (else the summary as a sentence)
    heads its own `--help`; `epilog` ends it.
    """
    said = description or summary[:1].upper() + summary[1:] + "."
    parser: argparse.ArgumentParser = sub.add_parser(name, help=summary, description=said,
                                                     epilog=epilog)
    return parser


def add_format(parser: argparse.ArgumentParser, name: str, text: str, *, also: str = "",
               more: tuple[tuple[str, str], ...] = (), default: str | None = "text") -> None:
    """A command's `--format`: text for people (the default) or json, one `name` object.

    Every command words it the same way: "text: TEXT (the default); json: one NAME object on
    standard output (docs/formats.md)ALSO", then "; KEY: WORDS" for each other format in `more`.
    `default` None lets the command tell an unset option from text (`compare` with `-o`).
    """
    said = [f"text: {text} (the default)",
            f"json: one {name} object on standard output (docs/formats.md){also}",
            *(f"{key}: {words}" for key, words in more)]
    parser.add_argument("--format", choices=("text", "json", *(k for k, _ in more)),
                        default=default, help="; ".join(said))


def survey_refused(name: str, err: Exception, part: str = "") -> UserError:
    """A refused survey as a `UserError` listing every broken rule, one line each.

    `part` names where in the file the survey was ("embedded survey: " in a report PDF).
    """
    found = getattr(err, "all_messages", None) or [str(err)]
    lines = [f"{name}: {part}{m}" for m in found]
    return UserError(lines[0], lines=lines)


def read_survey_file(path: str) -> Survey:
    """Read and validate a survey JSON file (`-`: standard input); refuse naming every field."""
    # imported here, not at the top: every command imports this module, and the survey model
    # (pydantic) is too heavy to load before the screens of `triage demo` are drawn
    from triage.model import SurveyError, parse_survey_text

    text = read_text(path)
    try:
        return parse_survey_text(text)
    except SurveyError as err:
        raise survey_refused(path, err) from None


def _embedded_survey(where: str, files: dict[str, bytes]) -> Survey:
    """The survey among a report PDF's embedded files; refusals name `where`."""
    from triage.model import SurveyError, parse_survey_text
    from triage.report.pdfparts import ASSESSMENT_FILE, SURVEY_FILE

    if SURVEY_FILE not in files or ASSESSMENT_FILE not in files:
        raise UserError(f"{where}: carries no embedded triage survey (not a triage report)")
    try:
        text = files[SURVEY_FILE].decode("utf-8")
    except UnicodeDecodeError:
        raise UserError(f"{where}: the embedded survey is not UTF-8 text") from None
    try:
        return parse_survey_text(text)
    except SurveyError as err:
        raise survey_refused(where, err, "embedded survey: ") from None


def read_report_survey(path: str, data: bytes | None = None) -> Survey:
    """The survey embedded in a triage report PDF (its bytes, when given); one-line refusals."""
    from triage.report import read_embedded_files

    try:
        files = read_embedded_files(data if data is not None else Path(path))
    except (ValueError, OSError) as err:
        msg = str(err) or type(err).__name__
        for name in ("the PDF", path):
            if msg.startswith(name + ": "):
                msg = msg[len(name) + 2:]
        raise UserError(f"{path}: {msg}") from None
    return _embedded_survey(path, files)


def read_survey(path: str) -> Survey:
    """A survey from a JSON file, or from a report PDF carrying one (by the `.pdf` suffix).

    `-` reads standard input: a report PDF there is told by its first bytes (`%PDF-`).
    """
    if is_std(path):
        from triage.model import SurveyError, parse_survey_text

        data = read_stdin_bytes()
        if data.lstrip()[:5] == b"%PDF-":
            return read_report_survey(path, data)
        try:
            text = data.decode("utf-8")
        except UnicodeDecodeError:
            raise UserError("-: not UTF-8 text (a survey file is JSON)") from None
        try:
            return parse_survey_text(text)
        except SurveyError as err:
            raise survey_refused(path, err) from None
    if path.lower().endswith(".pdf"):
        return read_report_survey(path)
    return read_survey_file(path)


def open_store(args: argparse.Namespace, *, create: bool = True,
               refresh: bool = True, read_only: bool = False) -> Store:
    """The database of `--db` (default: under the user's data folder), or a one-line refusal."""
    from triage.centre import is_url
    from triage.store import Store, StoreError

    if is_url(args.db):
        raise UserError("--db: a centre's URL serves only list, export, report, compare and "
                        "summary; laptops send to it with 'triage sync --to URL'")

    try:
        return Store.open(args.db, create=create, refresh=refresh, read_only=read_only)
    except StoreError as err:
        raise UserError(str(err)) from None


def open_reader(args: argparse.Namespace, *, refresh: bool = True) -> SurveyReader:
    """The surveys to read (`--db`, which must exist), for the commands that only read them.

    A `postgresql://` URL reads from a coordination centre (read-only; never written).
    Opened read-only (nothing written to the file or beside it; works on a read-only USB
    stick), except that with `refresh`, where the file and its folder can be written, it is
    opened as usual so assessments left stale by a crash are recomputed and stored first.
    """
    from triage.centre import is_url

    if is_url(args.db):
        from triage.centre.connect import CentreError
        from triage.centre.reader import CentreReader

        try:
            return CentreReader.open(args.db)
        except CentreError as err:
            raise UserError(str(err)) from None
    return open_store(args, create=False, refresh=refresh,
                      read_only=not (refresh and db_writable(args)))


def db_path(args: argparse.Namespace) -> Path:
    """The database `--db` names, or the default one."""
    from triage.store import default_db_path

    return Path(args.db) if getattr(args, "db", None) else default_db_path()


def db_writable(args: argparse.Namespace) -> bool:
    """Whether the database file and its folder can be written (False when absent)."""
    p = db_path(args)
    return p.exists() and os.access(p, os.W_OK) and os.access(p.parent, os.W_OK)


# How many matches an ambiguous id prefix lists before "and N more".
MATCHES_LISTED = 10


def resolve_id(reader: SurveyReader, given: str) -> str:
    """A survey id from the whole id or an unambiguous start of it (e.g. the 8-character code).

    An ambiguous start is refused in one line that lists the matching ids (the first
    `MATCHES_LISTED`, then how many more).
    """
    ids = reader.match_ids(given)
    if len(ids) == 1:
        return ids[0]
    if not ids:
        raise UserError(f"{given}: no survey with this id in {reader.location} "
                        "(see 'triage list')")
    shown = ", ".join(sorted(ids)[:MATCHES_LISTED])
    more = f" and {len(ids) - MATCHES_LISTED} more" if len(ids) > MATCHES_LISTED else ""
    raise UserError(f"{given}: {len(ids)} surveys start with this ({shown}{more}); "
                    "give more of the id")


# A survey code: the first CODE_LEN characters of the id (docs/formats.md, "Survey codes").
CODE_LEN = 8


def survey_codes(ids: list[str]) -> dict[str, str]:
    """Each id's code: its first `CODE_LEN` characters, longer only where two ids share them.

    A code is the shortest start of its id, of at least `CODE_LEN` characters, that no other
    of `ids` starts with (a hyphen is never its last character), so every code shown is one
    that `resolve_id` takes. `ids` should be every survey in the database, hidden ones too.
    """
    order = sorted(set(ids))
    out: dict[str, str] = {}
    for i, sid in enumerate(order):
        shared = max((_common(sid, order[j]) for j in (i - 1, i + 1) if 0 <= j < len(order)),
                     default=0)
        n = min(max(CODE_LEN, shared + 1), len(sid))
        if sid[n - 1:n] == "-" and n < len(sid):
            n += 1
        out[sid] = sid[:n]
    return out


def _common(a: str, b: str) -> int:
    """How many characters `a` and `b` share from the start."""
    n = 0
    for x, y in zip(a, b, strict=False):
        if x != y:
            break
        n += 1
    return n


def yes_no(v: bool | None) -> str:
    """"yes", "no", or "—" when not known, as the tables print a flag."""
    return "—" if v is None else ("yes" if v else "no")
