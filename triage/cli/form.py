"""Command: form, a blank paper field form for one structural system (the paper fallback)."""

from __future__ import annotations

import argparse
from pathlib import Path

from .common import add_command
from .errors import UserError
from .streams import is_std, output_path, shown, status


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register the commands of this module."""
    p = add_command(
        sub, "form", "a blank paper form for when the laptop is down",
        description="Write a blank printable field form (PDF) for a structural system, or for "
                    "the two systems of a building whose x and y directions differ: a storey "
                    "grid to fill in on site and type into triage later. It has no result box; "
                    "the tier is worked out when the form is typed in.")
    p.add_argument("system", metavar="SYSTEM",
                   help="structural system key, e.g. rc_frame (unknown: the list is shown); "
                        "the x direction's when a second is given")
    p.add_argument("system_y", metavar="SYSTEM_Y", nargs="?",
                   help="the y direction's system, when it differs (both systems' grids and "
                        "look-up sheets are printed)")
    p.add_argument("-o", "--output", metavar="FILE.pdf|-", required=True,
                   help="where to write the PDF (replaced atomically if it exists); - writes "
                   "it to standard output (not to a terminal)")
    p.add_argument("--storeys", type=int, default=3, metavar="N",
                   help="how many storey bands to print (1-20, default 3)")
    p.set_defaults(func=run)


def run(args: argparse.Namespace) -> int:
    """Write the paper form; refuse an unknown system with the list of known ones."""
    from triage.forms import load_form, load_forms

    forms = load_forms()   # checked already: `main` refuses to start on a bad form file
    systems = [args.system] + ([args.system_y] if args.system_y else [])
    for key in systems:
        if key not in forms:
            raise UserError(f"{key!r} is not a structural system (known: {', '.join(forms)})")
    if not 1 <= args.storeys <= 20:
        raise UserError(f"--storeys: {args.storeys} is outside 1..20")
    out = Path(args.output)
    if not is_std(args.output):
        if out.is_dir():
            raise UserError(f"{out}: is a folder; give a file name, e.g. {args.system}.pdf")
        if not out.parent.is_dir():
            raise UserError(f"{out}: the folder {out.parent} does not exist")
    from triage.report.paper_form import systems_line, write_paper_form

    chosen = [load_form(key) for key in dict.fromkeys(systems)]
    try:
        with output_path(args.output, "a PDF", ".pdf") as dest:
            pages = write_paper_form(chosen, dest, storeys=args.storeys)
    except OSError as err:
        raise UserError(f"{out}: cannot be written ({err.strerror})") from None
    status(f"{shown(args.output)}: paper form {systems_line(chosen)} "
           f"({', '.join(dict.fromkeys(systems))}), {args.storeys} storey bands, {pages} pages")
    return 0
