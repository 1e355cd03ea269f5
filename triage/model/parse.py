"""Reading a survey: file text to JSON data, data to a validated `Survey`.

The text's depth and digits are checked before parsing. Also the notes and warnings on values
kept but doubtful.
"""

from __future__ import annotations

import json
from typing import Any

from pydantic import ValidationError

from triage import model_rules as rules
from triage import standards
from triage.model_rules import RuleBroken
from triage.standards.vocabulary import field_words

from .errors import SurveyError, error_lines
from .fields import FORMATS
from .survey import Survey


def parse_survey(data: Any) -> Survey:
    """Validate survey JSON data; raise `SurveyError` with one line naming field and rule."""
    if not isinstance(data, dict):
        raise SurveyError("(survey): a survey is a JSON object")
    fmt = data.get("format")
    if fmt is not None and fmt not in FORMATS:
        shown = fmt if isinstance(fmt, str) and len(fmt) <= 40 and fmt.isprintable() else "it"
        raise SurveyError(f"format: {shown!r} is not a survey format this version reads "
                          f"({', '.join(FORMATS)}); a newer triage may read it")
    try:
        return Survey.model_validate(data)
    except ValidationError as err:
        lines = error_lines(err, data)
        more = f" (and {len(lines) - 1} more)" if len(lines) > 1 else ""
        raise SurveyError(lines[0] + more, lines) from None
    except RecursionError:   # only reachable by data built in Python: files are depth-checked
        raise SurveyError(f"(survey): nested over {rules.MAX_DEPTH} levels deep") from None


def _object(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    """A JSON object whose keys are text (a lone surrogate in a key is refused, as in values)."""
    for key, _ in pairs:
        try:
            rules.plain_text(key)
        except ValueError as err:
            raise SurveyError(f"(file): a key {err}") from None
    return dict(pairs)


def load_json_text(text: str) -> Any:
    """JSON data of a survey file's text, checked for depth and number size before parsing.

    Raises `SurveyError` (one line, with line and column) for text that is not JSON, nests
    over 20 levels or holds a number of over 15 digits before the point.
    """
    try:
        rules.check_json_text(text)
    except RuleBroken as err:
        raise SurveyError(f"(file): {err.rule}") from None
    try:
        return json.loads(text, object_pairs_hook=_object)
    except SurveyError:
        raise
    except json.JSONDecodeError as err:
        raise SurveyError(f"(file): not JSON: {err.msg} at line {err.lineno} column {err.colno}"
                          ) from None
    except (ValueError, RecursionError) as err:   # the scan above should leave none
        raise SurveyError(f"(file): not JSON a survey may hold ({type(err).__name__})"
                          ) from None


def parse_survey_text(text: str) -> Survey:
    """Parse and validate a survey file's text."""
    return parse_survey(load_json_text(text))


def survey_warnings(survey: Survey) -> list[str]:
    """Kept-but-doubtful values, one line each (a drift over the large-drift warning)."""
    limit = standards.load().assumptions.large_drift_warning
    out = []
    for si, st in enumerate(survey.storeys):
        for ri, r in enumerate(st.readings):
            d = abs(r.drift_ratio())
            if d > limit:
                at = field_words(f"storeys[{si}].readings[{ri}]", survey)
                out.append(f"{at}: drift ratio {d:.1%} is over {limit:.0%}; kept, but check it "
                           "is not a mis-entry")
    return out


def gauge_notes(survey: Survey) -> list[str]:
    """Notes (kept, not refused) on offset readings over a gauge under a quarter storey."""
    return rules.short_gauge_notes(survey.storeys)
