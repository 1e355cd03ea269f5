"""Commands: form (being built)."""

from __future__ import annotations

import argparse

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Register the commands of this module."""
    p = sub.add_parser("form", help="a blank paper form for when the laptop is down")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    raise UserError(f"{args.command}: not available yet")
