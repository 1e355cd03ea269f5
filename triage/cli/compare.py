"""`triage compare OLD NEW [--format text|json | -o FILE.pdf|-] [--force]`: what changed.

With `-o FILE.pdf` the comparison is written as a PDF, an unsigned working document (through
`triage.output.write_output`: a regular file replaced atomically, a device or FIFO written in
place, nothing else replaced); `-o -` writes the PDF to standard output (never to a terminal).
The status line saying what was written goes to standard error, as every command's does.
"""

from __future__ import annotations

import argparse
import sys
from pathlib import Path
from typing import TYPE_CHECKING

from .common import add_command, add_format, open_reader, read_survey, resolve_id
from .errors import UserError
from .streams import binary_stdout, is_std, shown, status, write_bytes

if TYPE_CHECKING:
    from triage.assess import Assessment
    from triage.assess.compare import Comparison
    from triage.model import Survey
    from triage.store.reader import SurveyReader


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `compare`."""
    p = add_command(sub, "compare", "what changed between two surveys of one building",
                    description=(
                        "What changed between two surveys of one building: each spot's drift "
                        "change against the two measurements' combined uncertainty, members, "
                        "hazards, and the tier and level before and after."))
    p.add_argument("old", metavar="OLD", help="the earlier survey: a file (JSON or report PDF), "
                   "an id in the database, or - for standard input")
    p.add_argument("new", metavar="NEW", help="the later survey: a file (JSON or report PDF), "
                   "an id in the database, or - for standard input (only one of the two)")
    add_format(p, "triage-comparison/2", "what changed, in sentences", also="; not with -o",
               default=None)
    p.add_argument("-o", "--output", metavar="FILE.pdf|-",
                   help="write the comparison as a PDF (an unsigned working document); - "
                   "writes it to standard output (not to a terminal)")
    p.add_argument("--force", action="store_true",
                   help="compare even when the two surveys are of different buildings")
    p.set_defaults(func=run)


def load_either(given: str, args: argparse.Namespace) -> tuple[Survey, Assessment]:
    """A survey from a file (JSON or report PDF) or from the database, with its assessment.

    A file is assessed by this engine; a stored survey uses its stored assessment when current.
    """
    from triage.assess import assess

    if is_std(given) or Path(given).exists():
        survey = read_survey(given)
        return survey, assess(survey)
    st: SurveyReader = open_reader(args)
    try:
        sid = resolve_id(st, given)
        survey = st.load_survey(sid)
        stored = st.load_assessment(sid)
        row = st.survey_row(sid)
        current = stored if stored is not None and row is not None and not row.stale else None
    finally:
        st.close()
    return survey, current or assess(survey)


def run(args: argparse.Namespace) -> int:
    """Compare, refusing two different buildings unless --force."""
    from triage.assess.compare import compare
    from triage.safetext import visible

    if args.output is not None:
        _check_output(args)
    if is_std(args.old) and is_std(args.new):
        raise UserError("OLD and NEW: - (standard input) given for both; it holds one survey")
    old, old_a = load_either(args.old, args)
    new, new_a = load_either(args.new, args)
    if old.building_id != new.building_id and not args.force:
        raise UserError(f"{args.old} and {args.new} are surveys of different buildings "
                        f"({old.building.name!r}, building {old.building_id}; "
                        f"{new.building.name!r}, building {new.building_id}); "
                        "use --force to compare them anyway")
    if old.inspection.at > new.inspection.at:
        sys.stderr.write(f"triage compare: note: {args.old} was inspected after {args.new}; "
                         "OLD is taken as the earlier survey as given\n")
    result = compare(old, old_a, new, new_a)
    if args.output is not None:
        return _write_pdf(args, result, old, new)
    if args.format == "json":
        sys.stdout.write(visible(result.to_json()))
        return 0
    sys.stdout.write(visible(text(result, old, new)))
    return 0


def _check_output(args: argparse.Namespace) -> None:
    """Refuse -o with --format, naming one of the two survey files, or `-` on a terminal."""
    if args.format is not None:
        raise UserError(f"--format {args.format}: not with -o, which writes the comparison PDF; "
                        "give one or the other")
    if is_std(args.output):
        binary_stdout("a PDF")   # refused on a terminal before any work
        return
    out = Path(args.output)
    for given in (args.old, args.new):
        src = Path(given)
        if src.exists() and out.exists() and src.resolve() == out.resolve():
            raise UserError(f"{args.output}: is the survey file {given} itself; choose another "
                            "name for the PDF")


def _write_pdf(args: argparse.Namespace, result: Comparison, old: Survey, new: Survey) -> int:
    """Write the comparison PDF to -o (`-`: standard output); say so on standard error."""
    from triage.report import render_comparison

    try:
        data = render_comparison(result, old, new)
    except ValueError as err:
        raise UserError(str(err)) from None
    write_bytes(args.output, data, "a PDF")
    pages = data.count(b"/Type /Page\n")
    b = result.building_line
    status(f"comparison written to {shown(args.output)} ({pages} pages, UNSIGNED working "
           f"document); {b.compared} spots compared, {b.flagged} beyond the uncertainty; "
           "indicative only")
    return 0


def text(result: Comparison, old: Survey, new: Survey) -> str:
    """The comparison as text: the caution first, then what changed, in words.

    Not escaped: the caller passes it through `triage.safetext.visible` for a terminal.
    """
    from triage.assess import CAUTION
    from triage.assess.drift import pct

    head = [f"CAUTION: {CAUTION}",
            "This comparison is indicative too: the engineer of record decides what a change "
            "means for the building.", "",
            f"{new.building.name}, {new.building.address}: what changed between the two surveys",
            f"earlier: survey {str(old.survey_id)[:8]} (id {old.survey_id}) by "
            f"{old.inspection.inspector.name}",
            f"later:   survey {str(new.survey_id)[:8]} (id {new.survey_id}) by "
            f"{new.inspection.inspector.name}",
            *([] if result.same_building else ["NOTE: these are surveys of different buildings"]),
            ""]
    k = f"{result.k:g}"
    foot = ["",
            f"How to read it: a drift is a signed ratio (+ and − are the two senses of a "
            f"direction); a change is significant where it exceeds {k} times the combined "
            "standard uncertainty of the two measurements (z is the change over that "
            "uncertainty). Where the same baseline was used both times it cancels and its "
            "uncertainty is left out; a spot measured another way carries "
            f"{pct(result.method_change_sd)} more. The building line counts the spots flagged "
            "against those chance alone would flag.", ""]
    return "\n".join([*head, *result.lines(), *foot])
