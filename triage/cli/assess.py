"""`triage assess FILE [--format text|json]` and `triage schema`."""

from __future__ import annotations

import argparse
import sys

from .common import add_command, add_format, read_survey_file


def add_parser(sub: argparse._SubParsersAction[argparse.ArgumentParser]) -> None:
    """Register `assess` and `schema`."""
    p = add_command(sub, "assess", "assess a survey file", description=(
        "Assess one survey file and print the assessment: the indicative tier and level, "
        "what governs them, the probabilities and what to measure next. Nothing is stored. "
        "A refused file gets one line per broken rule on standard error (field and rule), "
        "exit status 1."))
    p.add_argument("file", metavar="FILE", help="a triage-survey/1 or /2 JSON file; - reads "
                   "it from standard input")
    add_format(p, "triage-assessment/1", "the assessment for people, the caution first")
    p.set_defaults(func=run)
    s = add_command(sub, "schema", "print the JSON Schema of triage-survey/2", description=(
        "Print the JSON Schema (draft 2020-12) of the survey format, generated from the "
        "survey models, on standard output."))
    s.set_defaults(func=run_schema)


def run(args: argparse.Namespace) -> int:
    """Assess the file (or standard input) and print the assessment."""
    from triage.assess import assess
    from triage.assess.text import summary

    survey = read_survey_file(args.file)
    result = assess(survey)
    if args.format == "json":
        sys.stdout.write(result.to_json())
    else:
        sys.stdout.write(summary(survey, result))
    return 0


def run_schema(args: argparse.Namespace) -> int:
    """Print the JSON Schema generated from the survey models."""
    import json

    from triage.model import json_schema

    sys.stdout.write(json.dumps(json_schema(), indent=2, ensure_ascii=False) + "\n")
    return 0
