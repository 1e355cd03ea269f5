"""`triage merge DB... --into DB [--format text|json]`: gather inspectors' databases into one."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import Any

from .common import add_command, add_format
from .errors import UserError
from .streams import refuse_std, status, write_json


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `merge`."""
    p = add_command(sub, "merge", "gather several inspectors' databases into one", description=(
        "Gather each source database into the target, one transaction a source: surveys "
        "new here are added, ones the source edited further are brought up to date, and a "
        "survey edited differently on both sides is kept twice and flagged as a conflict. "
        "The sources are never changed. A source that cannot be read is named and skipped "
        "(exit status 1), the others merged."))
    p.add_argument("sources", nargs="+", metavar="DB", help="databases to read (never "
                   "changed); a database is a file, so - (standard input) is refused")
    p.add_argument("--into", required=True, metavar="DB", help="the database to gather into "
                   "(made if it does not exist)")
    add_format(p, "triage-merge/1", "a status line on standard error as each source commits",
               also=", at the end")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Merge each source into the target; a refused source is named and skipped."""
    from triage.store import Store, StoreError
    from triage.store.merge import MergeResult, merge_into

    for name in args.sources:
        refuse_std(name, "DB", "a database is read from a file; give its path")
    refuse_std(args.into, "--into", "a database is written to a file; give its path")
    as_json = args.format == "json"
    try:
        st = Store.open(args.into, create=True)
    except StoreError as err:
        raise UserError(str(err)) from None
    results: list[dict[str, Any]] = []

    def said(r: MergeResult) -> None:
        # said as each source commits: a merge stopped half-way has said what it did
        results.append({"source": r.source, "status": "skipped" if r.skipped else "merged",
                        "added": r.added, "updated": r.updated, "unchanged": r.unchanged,
                        "conflicts": r.conflicts, "skipped": r.skipped})
        if r.skipped:
            sys.stderr.write(f"triage merge: {r.source}: {r.skipped}; skipped\n")
            sys.stderr.flush()
            return
        if as_json:
            return
        kept = (f", {r.conflicts} edited differently here and there (both versions kept, "
                "flagged as conflict)") if r.conflicts else ""
        status(f"merged {r.source}: {r.added} added, {r.updated} brought up to date, "
               f"{r.unchanged} unchanged{kept}")

    try:
        try:
            merge_into(st, [Path(s) for s in args.sources], each=said)
        except StoreError as err:
            raise UserError(str(err)) from None
    finally:
        st.close()
    failed = sum(1 for r in results if r["status"] == "skipped")
    if as_json:
        totals = {k: sum(int(r[k]) for r in results)
                  for k in ("added", "updated", "unchanged", "conflicts")}
        write_json({"format": "triage-merge/1", "into": str(st.path), "sources": results,
                    "merged": len(results) - failed, "skipped": failed, **totals})
    return 1 if failed else 0
