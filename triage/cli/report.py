"""`triage report FILE|ID -o OUT.pdf [--key KEYFILE]`: the report PDF, signed when a key is given.

Heavy libraries (reportlab, cryptography, pypdf) are imported inside the functions, so the
command line starts quickly.
"""

from __future__ import annotations

import argparse
import re
from pathlib import Path
from typing import TYPE_CHECKING

from .common import add_command, db_writable, open_reader, read_survey_file, resolve_id
from .errors import UserError
from .keys import PASSPHRASE_ENV, load_signing_key
from .streams import binary_stdout, is_std, output_path, shown, status

# The path a report written to standard output is recorded with in the database.
STDOUT_RECORD = "(standard output)"


def is_url(text: object) -> bool:
    """Whether `--db` names a coordination centre (`triage.centre.is_url`)."""
    from triage.centre import is_url as centre_url

    return centre_url(text)

if TYPE_CHECKING:
    from triage.assess import Assessment
    from triage.assess.compare import Comparison
    from triage.model import Survey
    from triage.store.reader import SurveyReader


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `report`."""
    r = add_command(sub, "report", "the report PDF, signed when a key is given", description=(
        "Write the report PDF of a survey file or of a survey in the database: the indicative "
        "tier with its caution, every storey, reading and member group, the photos, and the "
        "survey and assessment embedded as JSON. Signed (a standard PDF signature) when "
        "--key is given; a report of a stored survey is recorded in the database."))
    r.add_argument("source", metavar="FILE|ID|-", help="a survey file, a survey id (or an "
                   "unambiguous start of it) in the database, or - for a survey JSON on "
                   "standard input (its photos are not read: standard input has no folder)")
    r.add_argument("-o", "--output", required=True, metavar="OUT.pdf|-",
                   help="the PDF to write (replaced atomically if it exists); - writes it to "
                   "standard output (not to a terminal)")
    r.add_argument("--key", metavar="KEYFILE", help="sign with this private key file (its "
                   f"passphrase from {PASSPHRASE_ENV}, else a prompt)")
    r.set_defaults(func=run)


def _is_id(text: str) -> bool:
    """A survey id, or the start of one (as `triage list` shows them), rather than a path."""
    return re.fullmatch(r"[0-9a-fA-F][0-9a-fA-F-]{3,35}", text) is not None


def run(args: argparse.Namespace) -> int:
    """Write the report of a survey file or of a survey in the database."""
    from triage.assess import assess
    from triage.report import write_report

    to_stdout = is_std(args.output)
    out = Path(args.output)
    if not to_stdout:
        if out.is_dir():
            raise UserError(f"{args.output}: is a folder; give the PDF file to write")
        if not out.parent.exists():
            raise UserError(f"{args.output}: its folder does not exist")
    src = Path(args.source)
    from_stdin = is_std(args.source)
    if not (from_stdin or to_stdout) and src.exists() and out.exists() \
            and src.resolve() == out.resolve():
        raise UserError(f"{args.output}: is the survey file itself; choose another name")
    if to_stdout:
        binary_stdout("a PDF")   # refused on a terminal before any work
    key = load_signing_key(args.key) if args.key else None

    from triage.photos import blob_loader, folder_loader

    store: SurveyReader | None = None
    revision = None
    if not from_stdin and not src.exists() and not _is_id(args.source):
        raise UserError(f"{args.source}: no such file (nor a survey id or the start of one)")
    if from_stdin or src.exists():
        survey = read_survey_file(args.source)
        # photos only from inside the survey file's own folder, checked; none from stdin
        photos = folder_loader(None if from_stdin else src.resolve().parent)
    else:
        store, survey, revision = _from_store(args)
        sid = str(survey.survey_id)
        # photos from the store's blobs (the original files may be long gone)
        photos = blob_loader(store.photo_bytes, store.photo_dir(sid))
    recorded = ""
    try:
        assessment = assess(survey)
        comparison = _since_previous(survey, assessment, store, args)
        try:
            with output_path(args.output, "a PDF", ".pdf") as dest:
                info = write_report(survey, assessment, dest, key=key, revision=revision,
                                    photos=photos, comparison=comparison)
        except ValueError as err:
            raise UserError(str(err)) from None
        from triage.store.reader import ReportLog

        if isinstance(store, ReportLog) and revision is not None:   # a centre records nothing
            if getattr(store, "read_only", False):
                recorded = " (the database is read-only: this report is not recorded in it)"
            else:
                store.record_report(str(survey.survey_id), revision,
                                    STDOUT_RECORD if to_stdout else str(out.resolve()),
                                    info.fingerprint)
    finally:
        if store is not None:
            store.close()
    signed = f"signed with key {info.fingerprint}" if info.signed else "UNSIGNED"
    rev = f", store revision {revision}" if revision is not None else ""
    status(f"report written to {shown(args.output)} ({info.pages} pages, {signed}{rev}); "
           f"tier {assessment.tier}, indicative only{recorded}")
    return 0


def _since_previous(survey: Survey, assessment: Assessment, store: SurveyReader | None,
                    args: argparse.Namespace) -> Comparison | None:
    """The "since the previous inspection" comparison, when the earlier survey is stored.

    It is looked up in the open database, else in the `--db` (or default) database if one
    exists; a survey file whose previous survey is nowhere here gets no such section.
    """
    from triage.assess import assess
    from triage.assess.compare import since_previous

    if survey.inspection.previous is None:
        return None
    own: SurveyReader | None = store
    if own is None and is_url(getattr(args, "db", None)):
        own = open_reader(args)
    if own is None:
        try:
            from triage.store import Store, StoreError, default_db_path
        except ImportError:
            return None
        db = Path(args.db) if getattr(args, "db", None) else default_db_path()
        if not db.exists():
            return None
        try:
            own = Store.open(db, create=False, read_only=True)
        except StoreError:
            return None

    reader = own

    def load(prev_id: str) -> tuple[Survey, Assessment] | None:
        if not reader.has_survey(prev_id):
            return None
        old = reader.load_survey(prev_id)
        return old, assess(old)

    try:
        return since_previous(survey, assessment, load)
    finally:
        if reader is not store:
            reader.close()


def _from_store(args: argparse.Namespace) -> tuple[SurveyReader, Survey, int]:
    """Open the database and load the survey with this id (refusals are one line).

    From a centre (`--db postgresql://…`) the reader records nothing: the centre is never
    written by `report`; only the PDF is.
    """
    if is_url(getattr(args, "db", None)):
        return _load(open_reader(args), args)
    try:
        from triage.store import Store, StoreError, default_db_path
    except ImportError:
        raise UserError(f"{args.source}: no such file (and no survey database here)") from None
    db = Path(args.db) if getattr(args, "db", None) else default_db_path()
    if not db.exists():
        raise UserError(f"{args.source}: no such file, and no database at {db}")
    try:
        store: SurveyReader = Store.open(db, create=False, read_only=not db_writable(args))
    except StoreError as err:
        raise UserError(str(err)) from None

    return _load(store, args)


def _load(store: SurveyReader, args: argparse.Namespace) -> tuple[SurveyReader, Survey, int]:
    """The survey the id names, with its revision; the reader closed on a refusal."""
    from triage.store import StoreError

    try:
        sid = resolve_id(store, args.source)
        survey = store.load_survey(sid)
        revision = store.revision(sid)
    except UserError:
        store.close()
        raise
    except StoreError as err:
        store.close()
        raise UserError(f"{args.source}: {err}") from None
    return store, survey, revision
