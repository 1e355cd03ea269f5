"""The survey: the interchange format `triage-survey/2` as pydantic models.

`triage-survey/2` is `triage-survey/1` plus optional keys; files of either format are read,
and every survey is written as `/2` (see docs/formats.md).

Data is validated once, here, at the edge (a form field, an imported file); the assessment
trusts it. Every rule a user can break has a message naming the field path and the rule
(`SurveyError`, built by `parse_survey` from `error_lines`).

The package: `fields` (format names, field types), `survey` (the models), `errors` (refusals in
words), `parse` (file text and data to a `Survey`), `schema` (the JSON Schema). Import from
`triage.model`.
"""

from __future__ import annotations

from .errors import SurveyError, error_lines, rule_error
from .fields import (
    FORMAT,
    FORMATS,
    ID_NAMESPACE,
    MEMBER_KINDS,
    Access,
    DamageClass,
    Dir,
    HazardKey,
    Int,
    MemberKind,
    Notes,
    Num,
    SignKey,
    SystemKey,
    Text,
)
from .parse import (
    gauge_notes,
    load_json_text,
    parse_survey,
    parse_survey_text,
    survey_warnings,
)
from .schema import json_schema
from .survey import (
    Building,
    Hazard,
    Inspection,
    Inspector,
    Location,
    MemberGroup,
    Photo,
    Photos,
    Reading,
    Storey,
    Survey,
    Systems,
    canonical_json,
)

__all__ = ["FORMAT", "FORMATS", "ID_NAMESPACE", "MEMBER_KINDS", "Access", "Building",
           "DamageClass", "Dir", "Hazard", "HazardKey", "Inspection", "Inspector", "Int",
           "Location", "MemberGroup", "MemberKind", "Notes", "Num", "Photo", "Photos", "Reading",
           "SignKey", "Storey", "Survey", "SurveyError", "SystemKey", "Systems", "Text",
           "canonical_json", "error_lines", "gauge_notes", "json_schema",
           "load_json_text", "parse_survey", "parse_survey_text", "rule_error",
           "survey_warnings"]
