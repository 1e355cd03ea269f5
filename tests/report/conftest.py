"""Fixtures of the report tests: a private TRIAGE_HOME, the command, surveys and keys."""

from __future__ import annotations

from pathlib import Path
from typing import Any

import pytest

from tests.helpers import cli, reading, storey, survey_dict, triage_home
from triage.assess import assess
from triage.model import Survey, parse_survey
from triage.report.keys import SigningKey, new_key

__all__ = ["KINDS", "cli", "clinic", "clinic_dict", "clinic_pair", "key", "triage_home"]

KINDS = ["ecdsa-p256", "ed25519"]   # a new key's algorithm, and the first round's


def clinic_dict() -> dict[str, Any]:
    """A two-storey clinic of Kōwhai Bay with Unicode names, markup in notes and a hazard."""
    return survey_dict([
        storey("G", [reading("x", 1.0), reading("y", 2.0, where="stair core & lift")],
               [{"kind": "column", "count": 20},
                {"kind": "wall", "count": 1, "dir": "x", "weight": 3.0, "damage_class": "III",
                 "ref": "W1", "override_reason": "diagonal cracking <b>over 1 mm</b> & wide"}],
               notes="north bay: <b>bold?</b> & </para> stays as typed"),
        storey("1", [reading("x", 2.0), reading("y", 12.0)],
               [{"kind": "column", "count": 19},
                {"kind": "column", "count": 1, "crack_mm": 1.4, "ref": "C3",
                 "signs": ["cover_spalling"]}]),
    ], sx="rc_wall", sy="rc_frame", name="Ngāti Whare Clinic, Øster wing ≤ ± θ",
        hazards=[{"kind": "falling_hazard", "where": "north parapet", "storey": "1",
                  "height_above_ground_m": 7.5, "note": "loose <i>coping</i> & glass"}])


@pytest.fixture
def clinic() -> Survey:
    """The clinic survey, validated."""
    return parse_survey(clinic_dict())


@pytest.fixture
def clinic_pair(clinic: Survey) -> tuple[Survey, Any]:
    """The clinic and its assessment."""
    return clinic, assess(clinic)


@pytest.fixture(params=KINDS)
def key(request: pytest.FixtureRequest, tmp_path: Path) -> SigningKey:
    """Aroha Ngāti's signing key, no passphrase: the test runs once with each kind."""
    k, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "aroha.key", None, algorithm=request.param)
    return k
