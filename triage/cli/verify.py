"""`triage verify OUT.pdf [--expect FINGERPRINT]`: check a report's signature and content."""

from __future__ import annotations

import argparse
import sys
from pathlib import Path

from .errors import UserError


def add_parser(sub: argparse._SubParsersAction) -> None:  # type: ignore[type-arg,unused-ignore]
    """Register `verify`."""
    v = sub.add_parser("verify", help="check a report's signature, signer and content")
    v.add_argument("pdf", metavar="OUT.pdf")
    v.add_argument("--expect", metavar="FINGERPRINT",
                   help="accept only this signer's key (else any trusted key)")
    v.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Verify a report: exit 0, 1, 3, 4 or 5 (docs/index.md, "Exit status")."""
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
