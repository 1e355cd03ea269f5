"""Helpers shared by the command modules: reading survey files, one-line refusals."""

from __future__ import annotations

from pathlib import Path
from typing import TYPE_CHECKING

from .errors import UserError

if TYPE_CHECKING:
    from triage.model import Survey


def read_survey_file(path: str) -> Survey:
    """Read and validate a survey JSON file; refuse with one line naming the file and field."""
    # imported here, not at the top: every command imports this module, and the survey model
    # (pydantic) is too heavy to load before the screens of `triage demo` are drawn
    from triage.model import SurveyError, parse_survey_text

    p = Path(path)
    try:
        text = p.read_text(encoding="utf-8")
    except FileNotFoundError:
        raise UserError(f"{path}: no such file") from None
    except IsADirectoryError:
        raise UserError(f"{path}: is a folder, not a survey file") from None
    except UnicodeDecodeError:
        raise UserError(f"{path}: not UTF-8 text (a survey file is JSON)") from None
    except OSError as err:
        raise UserError(f"{path}: cannot be read ({err.strerror})") from None
    try:
        return parse_survey_text(text)
    except SurveyError as err:
        raise UserError(f"{path}: {err}") from None
