"""`triage verify OUT.pdf [--expect FINGERPRINT] [--format text|json]`: check a report."""

from __future__ import annotations

import argparse
import sys

from .common import add_command, add_format
from .errors import UserError
from .streams import input_path, is_std, write_json

# The exit statuses of `verify` (docs/formats.md, "triage verify"), as `--help` prints them.
EXIT_CODES = (
    (0, "intact, signer accepted, and this engine assesses the survey to the same tier and "
        "level (tier probabilities within 0.01)"),
    (1, "changed or damaged (any byte changed, appended or cut; an update after the "
        "signature; an embedded file not the one signed); also not a PDF, no such file"),
    (2, "the command line is wrong (e.g. --expect not 32 hex digits)"),
    (3, "unsigned: no signature of either kind"),
    (4, "intact, but the signer is not accepted: not the key --expect names or, without it, "
        "not a key trusted here; or the name and id printed are not the key's"),
    (5, "intact and accepted, but this engine assesses the survey to another tier or level "
        "(both named), or the probabilities differ by more than 0.01, or it refuses the "
        "embedded survey (each rule broken in a note)"),
)

RESULTS = {0: "verified", 1: "changed", 3: "unsigned", 4: "signer not accepted",
           5: "assessed differently"}


def _epilog() -> str:
    import textwrap

    lines = ["exit status:"]
    for code, meaning in EXIT_CODES:
        wrapped = textwrap.wrap(meaning, 84)
        lines.append(f"  {code}  {wrapped[0]}")
        lines += [f"     {w}" for w in wrapped[1:]]
    return "\n".join(lines)


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `verify`."""
    v = add_command(sub, "verify", "check a report's signature, signer and content",
                    description=(
                        "Check a report PDF: its bytes against its signature (either kind), "
                        "the embedded survey and assessment against the signed digests, the "
                        "signer against the trusted keys (or --expect), then assess the "
                        "embedded survey again with this engine. The verdict is one line "
                        "(standard output when it holds, standard error otherwise, followed "
                        "there by its notes, one a line: another engine, other assumptions, "
                        "each rule of an embedded survey this engine refuses) and the exit "
                        "status."), epilog=_epilog())
    v.add_argument("pdf", metavar="OUT.pdf", help="the report PDF to check; - reads it from "
                   "standard input")
    v.add_argument("--expect", metavar="FINGERPRINT",
                   help="accept only this signer's key, 32 hex digits as 'triage key list' "
                   "shows them (else any key trusted on this laptop)")
    add_format(v, "triage-verify/1", "the verdict line",
               also=", whatever the verdict; the exit status is the same")
    v.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Verify a report: exit 0, 1, 3, 4 or 5 (docs/formats.md, "triage verify")."""
    from dataclasses import replace

    from triage.report.verify import verify_report

    if args.expect is not None:
        from triage.report.keys import normalise_fingerprint

        try:
            normalise_fingerprint(args.expect)
        except ValueError as err:
            raise UserError(f"--expect: {err}", 2) from None
    with input_path(args.pdf, ".pdf") as pdf:
        result = verify_report(pdf, expect=args.expect)
        if is_std(args.pdf):
            result = replace(result, message=result.message.replace(str(pdf), "-"))
    if args.format == "json":
        write_json({"format": "triage-verify/1", "file": args.pdf, "status": result.code,
                    "result": RESULTS.get(result.code, "refused"), "message": result.message,
                    "signed": result.scheme is not None, "scheme": result.scheme,
                    "signer": None if result.signer_name is None and result.signer_id is None
                    else {"name": result.signer_name, "id": result.signer_id},
                    "fingerprint": result.fingerprint, "signed_at": result.signed_at,
                    "notes": list(result.notes)})
        if result.code != 0:
            sys.stderr.write(f"triage verify: {result.message}\n")
        return result.code
    if result.code != 0:   # the verdict, then each note on a line of its own
        raise UserError(result.message, result.code, lines=[
            result.message, *(f"{args.pdf}: note: {n}" for n in result.notes)])
    sys.stdout.write(result.message + "\n")
    return 0
