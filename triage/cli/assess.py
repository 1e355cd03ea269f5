"""`triage assess FILE [--format text|json]` and `triage schema`."""

from __future__ import annotations

import argparse
import sys

from .common import read_survey_file


def add_parser(sub: argparse._SubParsersAction) -> None:
    """Register `assess` and `schema`."""
    p = sub.add_parser("assess", help="assess a survey file")
    p.add_argument("file", help="a triage-survey/1 JSON file")
    p.add_argument("--format", choices=("text", "json"), default="text")
    p.set_defaults(func=run)
    s = sub.add_parser("schema", help="print the JSON Schema of triage-survey/2")
    s.set_defaults(func=run_schema)


def run(args: argparse.Namespace) -> int:
    """Assess the file and print the assessment."""
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
