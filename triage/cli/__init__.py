"""The `triage` command: parses the command line, then calls the layers below.

Each command lives in a module of this package named after it, with `add_parser(subparsers)`;
every subparser sets `func` to its own run function (`run`, or `run_NAME` where a module
registers several commands), which `main` calls. Shared helpers are in `common`. Heavy
libraries are imported inside the run functions, so start-up stays quick.
Every refusal is one line on standard error naming the file or field and the rule, with the
exit status of docs/index.md; never a traceback.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence

from .errors import UserError

# Command modules, in the order `triage --help` lists them.
MODULES = ("assess", "surveys", "keys", "report", "verify", "compare", "merge", "summary",
           "centre", "form", "screens")


class _Parser(argparse.ArgumentParser):
    """An argument parser whose complaints are one line and exit status 2."""

    def error(self, message: str) -> None:  # type: ignore[override]
        sys.stderr.write(f"{self.prog}: {message} (see '{self.prog} --help')\n")
        raise SystemExit(2)


def build_parser() -> argparse.ArgumentParser:
    """The full command-line parser."""
    parser = _Parser(prog="triage", description=(
        "Post-earthquake building inspection: residual drift and damage, storey by storey, to "
        "an indicative occupancy tier. Indicative only: the licensed engineer of record and "
        "the local building authority decide."))
    parser.add_argument("--db", metavar="PATH", help="the survey database (default: under the "
                        "user's data folder); or a centre's postgresql:// URL, read-only, for "
                        "list, export, report, compare and summary")
    from triage import __version__
    parser.add_argument("--version", action="version", version=f"triage {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser)
    for name in MODULES:
        importlib.import_module(f"triage.cli.{name}").add_parser(sub)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command; return its exit status (docs/index.md, "Exit status")."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:
        return int(exc.code or 0)
    if args.command is None:
        args.command = "ui"
        from . import screens
        args.func = screens.run_default
    try:
        _check_centre_url(args)
        if args.command in ("ui", "demo", "form"):
            _check_forms()
        return int(args.func(args) or 0)
    except UserError as err:
        sys.stderr.write(f"triage {args.command}: {err}\n")
        return err.code
    except KeyboardInterrupt:
        sys.stderr.write(f"triage {args.command}: interrupted\n")
        return 1
    except BrokenPipeError:
        return 0
    except Exception as err:  # a bug of ours: still one line, never a traceback
        sys.stderr.write(f"triage {args.command}: internal error: {type(err).__name__}: {err} "
                         "(nothing was changed; please report it)\n")
        return 1


def _check_centre_url(args: argparse.Namespace) -> None:
    """`--db postgresql://…` only for the commands that read from a centre (never a file)."""
    from triage.centre import READ_COMMANDS, is_url

    if is_url(getattr(args, "db", None)) and args.command not in READ_COMMANDS:
        raise UserError(f"--db: a centre's URL serves only {', '.join(READ_COMMANDS)}; "
                        "laptops send to it with 'triage sync --to URL'")


def _check_forms() -> None:
    """Refuse to start on a malformed field-form file rather than guess."""
    from triage.forms import FormError, check_forms

    try:
        check_forms()
    except FormError as err:
        raise UserError(f"{err} (the tool will not start on a bad form file)") from None


def entry() -> None:
    """Console-script entry point."""
    raise SystemExit(main())
