"""Commands: import, export, list, backup (being built)."""

from __future__ import annotations

import argparse

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Register the commands of this module."""
    p = sub.add_parser("import", help="survey files (JSON, or a report PDF carrying its survey) into the database")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)
    p = sub.add_parser("export", help="a survey out of the database as triage-survey/1 JSON")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)
    p = sub.add_parser("list", help="the surveys in the database")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)
    p = sub.add_parser("backup", help="a consistent copy of the database, safe while it is in use")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    raise UserError(f"{args.command}: not available yet")
