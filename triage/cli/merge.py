"""`triage merge DB... --into DB`: gather several inspectors' databases into one."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `merge`."""
    p = sub.add_parser("merge", help="gather several inspectors' databases into one")
    p.add_argument("sources", nargs="+", metavar="DB", help="databases to read (never changed)")
    p.add_argument("--into", required=True, metavar="DB", help="the database to gather into")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Merge each source into the target; a refused source is named and skipped."""
    from triage.store import Store, StoreError
    from triage.store.merge import MergeResult, merge_into

    try:
        st = Store.open(args.into, create=True)
    except StoreError as err:
        raise UserError(str(err)) from None
    failed = 0

    def said(r: MergeResult) -> None:
        # printed as each source commits: a merge stopped half-way has said what it did
        nonlocal failed
        if r.skipped:
            failed += 1
            sys.stderr.write(f"triage merge: {r.source}: {r.skipped}; skipped\n")
            sys.stderr.flush()
            return
        kept = (f", {r.conflicts} edited differently here and there (both versions kept, "
                "flagged as conflict)") if r.conflicts else ""
        sys.stdout.write(f"merged {r.source}: {r.added} added, {r.updated} brought up to "
                         f"date, {r.unchanged} unchanged{kept}\n")
        sys.stdout.flush()

    try:
        try:
            merge_into(st, [Path(s) for s in args.sources], each=said)
        except StoreError as err:
            raise UserError(str(err)) from None
    finally:
        st.close()
    return 1 if failed else 0
