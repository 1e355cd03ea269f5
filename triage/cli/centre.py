"""Commands of the coordination centre: `centre init URL`, `centre reassess URL`, `sync --to URL`.

The URL is a libpq URL (`postgresql://user@host/db?sslmode=verify-full`); its password is never
printed: messages name the server without it.
"""

from __future__ import annotations

import argparse
import sys
import time
from collections.abc import Callable

from .common import add_command
from .errors import UserError
from .streams import status


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `centre` (init, reassess) and `sync`."""
    p = add_command(sub, "centre", "the coordination centre on PostgreSQL: schema, roles, "
                    "reassessment", description=(
                        "Set up or upgrade a coordination centre's PostgreSQL database, or "
                        "assess its surveys again with this engine (docs/centre.md). The "
                        "URL's password is never printed."))
    csub = p.add_subparsers(dest="centre_command", metavar="ACTION", required=True,
                            parser_class=type(p), title="actions")
    c = add_command(csub, "init", "create or upgrade the schema and the roles triage_field "
                    "and triage_read (run again: harmless)")
    c.add_argument("url", metavar="URL", help="postgresql://ADMIN@HOST/DATABASE (a role that "
                   "may create schemas and roles)")
    c.set_defaults(func=run)
    c = add_command(csub, "reassess", "assess every current survey on the server with this "
                    "engine")
    c.add_argument("url", metavar="URL", help="postgresql://ADMIN@HOST/DATABASE (a role that "
                   "may read and write the surveys' assessments)")
    c.set_defaults(func=run)
    p = add_command(sub, "sync", "send this laptop's surveys to the coordination centre",
                    description=(
                        "Send every survey version, change, assessment, report record and "
                        "photo the centre lacks, whole surveys per transaction; run again "
                        "after an interruption to finish. Progress on standard error when it "
                        "is a terminal."))
    p.add_argument("--to", required=True, metavar="URL", dest="url",
                   help="postgresql://LOGIN@HOST/DATABASE (a login in triage_field)")
    p.add_argument("--batch", type=int, default=200, metavar="N",
                   help="whole surveys per transaction (default 200)")
    p.set_defaults(func=run)


def _progress(what: str) -> Callable[[int, int, float], None] | None:
    """A progress line on standard error (count and rate), only when that is a terminal."""
    if not sys.stderr.isatty():
        return None
    last = [0.0]

    def show(done: int, total: int, seconds: float) -> None:
        now = time.perf_counter()
        if done < total and now - last[0] < 0.2:
            return
        last[0] = now
        rate = done / seconds if seconds > 0 else 0.0
        end = "\n" if done >= total else ""
        sys.stderr.write(f"\r{what}: {done:,} of {total:,} surveys, {rate:,.0f}/s{end}")
        sys.stderr.flush()
    return show


def run(args: argparse.Namespace) -> int:
    """Run `centre init`, `centre reassess` or `sync`."""
    from triage.centre.connect import CentreError, is_url, redact

    if not is_url(args.url):
        raise UserError(f"{args.url}: not a PostgreSQL URL (postgresql://USER@HOST/DATABASE)")
    try:
        if args.command == "sync":
            return _sync(args)
        if args.centre_command == "init":
            return _init(args)
        return _reassess(args)
    except CentreError as err:
        raise UserError(str(err)) from None
    except KeyboardInterrupt:
        raise UserError(f"{redact(args.url)}: interrupted; what was sent is kept whole; run "
                        "again to finish") from None


def _init(args: argparse.Namespace) -> int:
    from triage.centre.connect import redact
    from triage.centre.schema import init

    r = init(args.url)
    where = redact(args.url)
    done = (f"schema upgraded to version {r.applied[-1]}" if r.applied
            else "schema already current")
    roles = (f"; roles created: {', '.join(r.roles_created)}" if r.roles_created
             else "; roles triage_field and triage_read present")
    gis = "map view triage.building_map with PostGIS points" if r.postgis else \
        "map view triage.building_map with lat/lon"
    status(f"{where}: {done}{roles}; grants renewed; {gis}")
    if r.postgis_note:
        sys.stderr.write(f"triage centre init: note: {r.postgis_note}\n")
    return 0


def _reassess(args: argparse.Namespace) -> int:
    from triage import __version__
    from triage.centre.connect import redact
    from triage.centre.reassess import reassess

    r = reassess(args.url, progress=_progress("reassess"))
    failed = f", {r.failed} could not be assessed" if r.failed else ""
    status(f"{redact(args.url)}: {r.assessed} survey versions assessed with engine "
           f"{__version__}, {r.current} already were{failed}")
    return 1 if r.failed else 0


def _sync(args: argparse.Namespace) -> int:
    from triage.centre.sync import sync

    from .common import open_store

    if args.batch < 1:
        raise UserError(f"--batch {args.batch}: must be at least 1")
    st = open_store(args, create=False)
    try:
        r = sync(st, args.url, batch=args.batch, progress=_progress("sync"))
    finally:
        st.close()
    for note in r.notes:
        sys.stderr.write(f"triage sync: note: {note}\n")
    if r.nothing:
        status(f"{r.server}: nothing to send; the centre holds all {r.surveys} "
               f"survey{'s' if r.surveys != 1 else ''} of this laptop as they are")
        return 0
    status(f"{r.server}: sent {r.versions} survey version"
           f"{'s' if r.versions != 1 else ''}, {r.changes} changes, {r.assessments} "
           f"assessments, {r.reports} report records, {r.photos} photos in "
           f"{r.transactions} transactions ({r.seconds:.1f} s)")
    return 0
