"""Commands: `key new|trust|list`, `report FILE|ID`, `verify OUT.pdf`.

Heavy libraries (reportlab, cryptography, pypdf) are imported inside the functions, so the
command line starts quickly.
"""

from __future__ import annotations

import argparse
import os
import re
import sys
from pathlib import Path
from typing import Any

from .errors import UserError

PASSPHRASE_ENV = "TRIAGE_KEY_PASSPHRASE"


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg,unused-ignore]
    """Register `key`, `report` and `verify`."""
    p = sub.add_parser("key", help="inspectors' signing keys and the keys this laptop trusts")
    ks = p.add_subparsers(dest="key_command", metavar="new|trust|list", required=True,
                          parser_class=type(p))
    n = ks.add_parser("new", help="make an Ed25519 signing key (and trust it here)")
    n.add_argument("--name", required=True, help="the signer's name, as printed on reports")
    n.add_argument("--id", required=True, dest="signer_id",
                   help="the signer's registration or staff id")
    n.add_argument("-o", "--output", required=True, metavar="KEYFILE",
                   help="the private key file to write (mode 600); the public key goes "
                   "beside it as .pub")
    n.add_argument("--no-passphrase", action="store_true",
                   help=f"leave the key unencrypted (else {PASSPHRASE_ENV} or a prompt)")
    n.set_defaults(func=run_key_new)
    t = ks.add_parser("trust", help="trust another inspector's public key on this laptop")
    t.add_argument("pubfile", metavar="PUBFILE")
    t.set_defaults(func=run_key_trust)
    ls = ks.add_parser("list", help="the public keys this laptop trusts")
    ls.set_defaults(func=run_key_list)

    r = sub.add_parser("report", help="the report PDF, signed when a key is given")
    r.add_argument("source", metavar="FILE|ID", help="a survey file, or a survey id in the "
                   "database")
    r.add_argument("-o", "--output", required=True, metavar="OUT.pdf",
                   help="the PDF to write (replaced if it exists)")
    r.add_argument("--key", metavar="KEYFILE", help="sign with this key")
    r.set_defaults(func=run_report)

    v = sub.add_parser("verify", help="check a report's signature, signer and content")
    v.add_argument("pdf", metavar="OUT.pdf")
    v.add_argument("--expect", metavar="FINGERPRINT",
                   help="accept only this signer's key (else any trusted key)")
    v.set_defaults(func=run_verify)


def _new_passphrase() -> str:
    env = os.environ.get(PASSPHRASE_ENV)
    if env:
        return env
    if not sys.stdin.isatty():
        raise UserError(f"no passphrase: set {PASSPHRASE_ENV}, or use --no-passphrase")
    import getpass

    first = getpass.getpass("passphrase for the new key: ")
    if not first:
        raise UserError("passphrase: must not be empty (or use --no-passphrase)")
    if getpass.getpass("the same passphrase again: ") != first:
        raise UserError("passphrase: the two entries differ; no key was written")
    return first


def run_key_new(args: argparse.Namespace) -> int:
    """Make a key, write it and its public key, trust it, print the fingerprint."""
    from triage.report.keys import new_key

    passphrase = None if args.no_passphrase else _new_passphrase()
    try:
        key, pub = new_key(args.name, args.signer_id, Path(args.output), passphrase)
    except ValueError as err:
        raise UserError(str(err)) from None
    sys.stdout.write(f"key written to {args.output} (mode 600), public key to {pub}\n"
                     f"fingerprint {key.fingerprint} ({key.name}, id {key.id}); "
                     "trusted on this laptop\n")
    return 0


def run_key_trust(args: argparse.Namespace) -> int:
    """Add a public key to this laptop's trusted keys."""
    from triage.report.keys import trust_key

    try:
        pub = trust_key(Path(args.pubfile))
    except ValueError as err:
        raise UserError(str(err)) from None
    sys.stdout.write(f"trusted {pub.fingerprint} ({pub.name}, id {pub.id})\n")
    return 0


def run_key_list(args: argparse.Namespace) -> int:
    """Print the trusted keys, one a line."""
    from triage.report.keys import home, trusted_keys

    try:
        keys = trusted_keys()
    except ValueError as err:
        raise UserError(str(err)) from None
    if not keys:
        sys.stdout.write(f"no trusted keys yet (kept in {home()})\n")
    for k in keys:
        sys.stdout.write(f"{k.fingerprint}  {k.name} (id {k.id})\n")
    return 0


def _load_signing_key(path: str) -> Any:
    from triage.report.keys import key_is_encrypted, load_key

    p = Path(path)
    try:
        passphrase = None
        if key_is_encrypted(p):
            passphrase = os.environ.get(PASSPHRASE_ENV)
            if not passphrase:
                if not sys.stdin.isatty():
                    raise UserError(f"{path}: the key is protected by a passphrase; set "
                                    f"{PASSPHRASE_ENV}")
                import getpass

                passphrase = getpass.getpass(f"passphrase for {path}: ")
        return load_key(p, passphrase)
    except ValueError as err:
        raise UserError(str(err)) from None


def _is_id(text: str) -> bool:
    """A survey id, or the start of one (as `triage list` shows them), rather than a path."""
    return re.fullmatch(r"[0-9a-fA-F][0-9a-fA-F-]{3,35}", text) is not None


def run_report(args: argparse.Namespace) -> int:
    """Write the report of a survey file or of a survey in the database."""
    from triage.assess import assess
    from triage.report import write_report

    out = Path(args.output)
    if out.is_dir():
        raise UserError(f"{args.output}: is a folder; give the PDF file to write")
    if not out.parent.exists():
        raise UserError(f"{args.output}: its folder does not exist")
    src = Path(args.source)
    if src.exists() and out.exists() and src.resolve() == out.resolve():
        raise UserError(f"{args.output}: is the survey file itself; choose another name")
    key = _load_signing_key(args.key) if args.key else None

    store: Any = None
    revision = None
    photo_dir = None
    if not src.exists() and not _is_id(args.source):
        raise UserError(f"{args.source}: no such file (nor a survey id or the start of one)")
    if src.exists():
        from .common import read_survey_file

        survey = read_survey_file(args.source)
        photo_dir = src.resolve().parent
    else:
        store, survey, revision = _from_store(args)
        photo_dir = store.photo_dir(survey.survey_id)
    try:
        assessment = assess(survey)
        comparison = _since_previous(survey, assessment, store, args)
        try:
            info = write_report(survey, assessment, out, key=key, revision=revision,
                                photo_dir=photo_dir, comparison=comparison)
        except ValueError as err:
            raise UserError(str(err)) from None
        if store is not None and revision is not None:
            store.record_report(str(survey.survey_id), revision, str(out.resolve()),
                                info.fingerprint)
    finally:
        if store is not None:
            store.close()
    signed = f"signed with key {info.fingerprint}" if info.signed else "UNSIGNED"
    rev = f", store revision {revision}" if revision is not None else ""
    sys.stdout.write(f"report written to {out} ({info.pages} pages, {signed}{rev}); "
                     f"tier {assessment.tier}, indicative only\n")
    return 0


def _since_previous(survey: Any, assessment: Any, store: Any,
                    args: argparse.Namespace) -> Any:
    """The "since the previous inspection" comparison, when the earlier survey is stored.

    It is looked up in the open database, else in the `--db` (or default) database if one
    exists; a survey file whose previous survey is nowhere here gets no such section.
    """
    from triage.assess import assess
    from triage.assess.compare import since_previous

    if survey.inspection.previous is None:
        return None
    own = store
    if own is None:
        try:
            from triage.store import Store, StoreError, default_db_path
        except ImportError:
            return None
        db = Path(args.db) if getattr(args, "db", None) else default_db_path()
        if not db.exists():
            return None
        try:
            own = Store.open(db, create=False)
        except StoreError:
            return None

    def load(prev_id: str) -> Any:
        if not own.has_survey(prev_id):
            return None
        old = own.load_survey(prev_id)
        return old, assess(old)

    try:
        return since_previous(survey, assessment, load)
    finally:
        if own is not store:
            own.close()


def _from_store(args: argparse.Namespace) -> tuple[Any, Any, int]:
    """Open the database and load the survey with this id (refusals are one line)."""
    try:
        from triage.store import Store, StoreError, default_db_path
    except ImportError:
        raise UserError(f"{args.source}: no such file (and no survey database here)") from None
    db = Path(args.db) if getattr(args, "db", None) else default_db_path()
    if not db.exists():
        raise UserError(f"{args.source}: no such file, and no database at {db}")
    try:
        store = Store.open(db, create=False)
    except StoreError as err:
        raise UserError(str(err)) from None
    from .store_cmd import resolve_id

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


def run_verify(args: argparse.Namespace) -> int:
    """Verify a report: exit 0, 1, 3, 4 or 5 (DESIGN.md)."""
    from triage.report.verify import verify_report

    if args.expect is not None:
        from triage.report.keys import normalise_fingerprint

        try:
            normalise_fingerprint(args.expect)
        except ValueError as err:
            raise UserError(f"--expect: {err}", 2) from None
    result = verify_report(Path(args.pdf), expect=args.expect)
    if result.code != 0:
        raise UserError(result.message, result.code)
    sys.stdout.write(result.message + "\n")
    return 0
