"""The `triage` command: parses the command line, then calls the layers below.

Each command lives in a module of this package named after it, with `add_parser(subparsers)`;
every subparser sets `func` to its own run function (`run`, or `run_NAME` where a module
registers several commands), which `main` calls. Shared helpers are in `common`. Heavy
libraries are imported inside the run functions, so start-up stays quick.
Every refusal is one line on standard error naming the file or field and the rule, with the
exit status of docs/index.md; never a traceback. Whatever a command writes to standard output and
error passes through `triage.safetext.visible`, so no control or bidi character of a survey
reaches the terminal raw (the screens escape their own text). Refusals are `TriageError`s
(`triage.errors`); an `OSError` that escapes is told as the I/O failure it is; anything else is
a bug of ours: the one line names a crash file (`triage.crash`), and `--debug` prints the
traceback too.
"""

from __future__ import annotations

import argparse
import importlib
import sys
from collections.abc import Sequence
from typing import Any

from triage.errors import TriageError, io_failure

from .errors import UserError, refusal_lines

# Command modules, in the order `triage --help` lists them.
MODULES = ("assess", "surveys", "keys", "report", "verify", "compare", "merge", "summary",
           "centre", "form", "screens")


EXIT_STATUS = """exit status:
  0  done
  1  input refused (a bad file, field, database or system key) or a check failed; with
     several inputs (import, merge), 1 when any was refused, the rest done
  2  the command line itself is wrong (unknown command or option)
  3, 4, 5  verify only: see 'triage verify --help'"""


class _Formatter(argparse.HelpFormatter):
    """Descriptions and epilogs wrapped paragraph by paragraph.

    A paragraph whose lines after the first are indented (a table of exit statuses) keeps
    its lines as written.
    """

    def _fill_text(self, text: str, width: int, indent: str) -> str:
        out = []
        for para in text.split("\n\n"):
            if "\n " in para:
                out.append("\n".join(indent + line for line in para.splitlines()))
            else:
                out.append(super()._fill_text(para, width, indent))
        return "\n\n".join(out)


class _Parser(argparse.ArgumentParser):
    """An argument parser whose complaints are one line and exit status 2.

    Descriptions and epilogs keep their line breaks (the exit-status tables).
    """

    def __init__(self, *args: Any, **kwargs: Any) -> None:
        kwargs.setdefault("formatter_class", _Formatter)
        super().__init__(*args, **kwargs)

    def error(self, message: str) -> None:  # type: ignore[override]
        sys.stderr.write(f"{self.prog}: {message} (see '{self.prog} --help')\n")
        raise SystemExit(2)


def build_parser() -> argparse.ArgumentParser:
    """The full command-line parser."""
    parser = _Parser(prog="triage", description=(
        "Post-earthquake building inspection: residual drift and damage, storey by storey, to "
        "an indicative occupancy tier. Indicative only: the licensed engineer of record and "
        "the local building authority decide.\n\n"
        "Data goes to standard output, status lines and refusals to standard error; '-' "
        "names standard input or output where a command reads or writes a file. "
        "'triage COMMAND --help' describes a command."), epilog=EXIT_STATUS)
    parser.add_argument("--db", metavar="PATH", help="the survey database (default: under the "
                        "user's data folder); or a centre's postgresql:// URL, read-only, for "
                        "list, export, report, compare and summary")
    from triage import __version__
    parser.add_argument("--version", action="version", version=f"triage {__version__}")
    parser.add_argument("--debug", action="store_true",
                        help="on an internal error, print the traceback too")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_Parser,
                                title="commands (with no command: the screens on the "
                                "database)")
    for name in MODULES:
        importlib.import_module(f"triage.cli.{name}").add_parser(sub)
    return parser


SCREENS = ("ui", "demo")   # commands that hand the terminal to the screens


def main(argv: Sequence[str] | None = None) -> int:
    """Run the command; return its exit status (docs/index.md, "Exit status")."""
    from triage.safetext import SafeStream

    given = list(sys.argv[1:] if argv is None else argv)
    out, err = sys.stdout, sys.stderr
    sys.stdout, sys.stderr = SafeStream(out), SafeStream(err)
    try:
        return _run(given)
    finally:
        sys.stdout, sys.stderr = out, err


def _run(argv: list[str]) -> int:
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
    except SystemExit as exc:
        return int(exc.code or 0)
    if args.command is None:
        args.command = "ui"
        from . import screens
        args.func = screens.run_default
    action = getattr(args, "key_command", None) or getattr(args, "centre_command", None)
    named = f"{args.command} {action}" if action else args.command   # in refusals
    if args.command in SCREENS:   # the screens write escape sequences of their own
        sys.stdout = getattr(sys.stdout, "wrapped", sys.stdout)
        sys.stderr = getattr(sys.stderr, "wrapped", sys.stderr)
    try:
        if getattr(args, "db", None) == "-":
            raise UserError("--db -: a database is a file (SQLite) or a centre's URL; give "
                            "its path")
        _check_centre_url(args)
        if args.command in ("ui", "demo", "form"):
            _check_forms()
        return int(args.func(args) or 0)
    except TriageError as err:
        for line in refusal_lines(err):
            sys.stderr.write(f"triage {named}: {_one_line(line)}\n")
        return err.code
    except KeyboardInterrupt:
        sys.stderr.write(f"triage {named}: interrupted\n")
        return 1
    except BrokenPipeError:
        return 0
    except OSError as err:   # the machine, not the data: a full disk, a removed stick
        where = f"{err.filename}: " if err.filename else ""
        failure = io_failure(err.filename or "a file", err, "read or written")
        why = str(failure).split("(", 1)[-1].removesuffix(")")
        sys.stderr.write(f"triage {named}: {where}input/output failed ({why}); "
                         "nothing more was done\n")
        return 1
    except Exception as err:  # a bug of ours: one line naming the crash file
        from triage.crash import write_crash

        path = write_crash(err, argv)
        if getattr(args, "debug", False):
            import traceback

            traceback.print_exception(err, file=sys.stderr)
        said = f"details in {path}" if path else "no crash file could be written"
        sys.stderr.write(f"triage {named}: internal error: {type(err).__name__}: "
                         f"{_one_line(str(err))[:300]} ({said}; please report it)\n")
        return 1


def _one_line(text: str) -> str:
    """A message on one line (a multi-line message, from a library, joined with spaces)."""
    return " ".join(text.split("\n")) if "\n" in text else text


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
    except FormError as err:   # every rule broken, one line each; the last says why we stop
        lines = list(err.all_messages)
        lines[-1] += " (the tool will not start on a bad form file)"
        raise UserError(lines[0], lines=lines) from None


def entry() -> None:
    """Console-script entry point."""
    raise SystemExit(main())
