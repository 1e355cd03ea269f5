"""Commands: compare, merge, summary (being built)."""

from __future__ import annotations

import argparse

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Register the commands of this module."""
    p = sub.add_parser("compare", help="what changed between two surveys of one building")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    raise UserError(f"{args.command}: not available yet")
