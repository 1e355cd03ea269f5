"""Helpers shared by the command modules: reading survey files, opening the database, ids.

Everything here is public and used by more than one command; a command module keeps its own
helpers private and never imports another command module's.
"""

from __future__ import annotations

import argparse
import os
from pathlib import Path
from typing import TYPE_CHECKING, Any

from .errors import UserError

if TYPE_CHECKING:
    from triage.model import Survey
    from triage.store import Store
    from triage.store.reader import SurveyReader


def read_survey_file(path: str) -> Survey:
    """Read and validate a survey JSON file; refuse with one line naming the file and field."""
    # imported here, not at the top: every command imports this module, and the survey model
    # (pydantic) is too heavy to load before the screens of `triage demo` are drawn
    from triage.model import SurveyError, parse_survey_text

    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise UserError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise UserError(f"{path}: is a folder, not a survey file") from None
    except UnicodeDecodeError:
        raise UserError(f"{path}: not UTF-8 text (a survey file is JSON)") from None
    except OSError as err:
        raise UserError(f"{path}: cannot be read ({err.strerror})") from None
    try:
        return parse_survey_text(text)
    except SurveyError as err:
        raise UserError(f"{path}: {err}") from None


def read_report_survey(path: str) -> Survey:
    """The survey embedded in a triage report PDF; refuse with one line naming the file."""
    from triage.model import SurveyError, parse_survey_text

    try:
        from triage.report import read_embedded
    except (ImportError, AttributeError):
        raise UserError(f"{path}: this build cannot read surveys from report PDFs; import the "
                        "survey's JSON file") from None
    try:
        got: Any = read_embedded(Path(path))
    except (ValueError, OSError) as err:
        msg = str(err) or type(err).__name__
        raise UserError(msg if msg.startswith(path) else f"{path}: {msg}") from None
    text = got[0] if isinstance(got, tuple) else got
    if not text:
        raise UserError(f"{path}: carries no embedded triage survey (not a triage report)")
    try:
        return parse_survey_text(text if isinstance(text, str) else text.decode("utf-8"))
    except (SurveyError, UnicodeDecodeError) as err:
        raise UserError(f"{path}: embedded survey: {err}") from None


def read_survey(path: str) -> Survey:
    """A survey from a JSON file, or from a report PDF carrying one (by the `.pdf` suffix)."""
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


def resolve_id(reader: SurveyReader, given: str) -> str:
    """A survey id from the whole id or an unambiguous start of it."""
    ids = reader.match_ids(given)
    if len(ids) == 1:
        return ids[0]
    if not ids:
        raise UserError(f"{given}: no survey with this id in {reader.location} "
                        "(see 'triage list')")
    raise UserError(f"{given}: {len(ids)} surveys start with this; give more of the id")


def yes_no(v: bool | None) -> str:
    """"yes", "no", or "—" when not known, as the tables print a flag."""
    return "—" if v is None else ("yes" if v else "no")
