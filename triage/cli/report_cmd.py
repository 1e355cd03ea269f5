"""Commands: key, report, verify (being built)."""

from __future__ import annotations

import argparse

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg]
    """Register the commands of this module."""
    p = sub.add_parser("key", help="inspectors' signing keys")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)
    p = sub.add_parser("report", help="the report PDF, signed when a key is given")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)
    p = sub.add_parser("verify", help="check a report's signature, signer and content")
    p.add_argument("rest", nargs=argparse.REMAINDER)
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Not built yet."""
    raise UserError(f"{args.command}: not available yet")
