"""Command: form, a blank paper field form for one structural system (the paper fallback)."""

from __future__ import annotations

import argparse
from pathlib import Path

from .common import add_command
from .errors import UserError
from .streams import is_std, output_path, shown, status


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register the commands of this module."""
    p = add_command(
        sub, "form", "a blank paper form for when the laptop is down",
        description="Write a blank printable field form (PDF) for one structural system: a "
                    "storey grid to fill in on site and type into triage later. It has no "
                    "result box; the tier is worked out when the form is typed in.")
    p.add_argument("system", metavar="SYSTEM",
                   help="structural system key, e.g. rc_frame (unknown: the list is shown)")
    p.add_argument("-o", "--output", metavar="FILE.pdf|-", required=True,
                   help="where to write the PDF (replaced atomically if it exists); - writes "
                   "it to standard output (not to a terminal)")
    p.add_argument("--storeys", type=int, default=3, metavar="N",
                   help="how many storey bands to print (1-20, default 3)")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the paper form; refuse an unknown system with the list of known ones."""
    from triage.forms import FormError, load_form, load_forms

    try:
        forms = load_forms()
    except FormError as err:
        raise UserError(str(err)) from None
    if args.system not in forms:
        raise UserError(f"{args.system!r} is not a structural system (known: "
                        f"{', '.join(forms)})")
    if not 1 <= args.storeys <= 20:
        raise UserError(f"--storeys: {args.storeys} is outside 1..20")
    out = Path(args.output)
    if not is_std(args.output):
        if out.is_dir():
            raise UserError(f"{out}: is a folder; give a file name, e.g. {args.system}.pdf")
        if not out.parent.is_dir():
            raise UserError(f"{out}: the folder {out.parent} does not exist")
    from triage.report.paper_form import write_paper_form

    try:
        with output_path(args.output, "a PDF", ".pdf") as dest:
            pages = write_paper_form(load_form(args.system), dest, storeys=args.storeys)
    except OSError as err:
        raise UserError(f"{out}: cannot be written ({err.strerror})") from None
    status(f"{shown(args.output)}: paper form for {args.system}, {args.storeys} storey bands, "
           f"{pages} pages")
    return 0
