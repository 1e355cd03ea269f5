"""Result models the engine builds without validation (`result.trusted`) are what validating
the same values gives: equal, of the same field types, with the same fields set."""

from __future__ import annotations

import json
from pathlib import Path

import pytest
from pydantic import BaseModel

from bench.generate import big_survey_dict
from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess.result import MemberResult, trusted
from triage.model import parse_survey

SAMPLES = sorted((Path(__file__).parents[2] / "sample_surveys").glob("*.json"))
TRUSTED = {"StoreyResult", "SpotResult", "PerDir", "LevelPerDir", "MemberResult"}
QUIET = [reading("x", 0.5), reading("y", 0.5)]


def _surveys():
    yield parse_survey(big_survey_dict(storeys=3, groups=12))
    for path in SAMPLES:
        yield parse_survey(json.loads(path.read_text(encoding="utf-8")))
    # FEMA 352 (a connection index) and FEMA 306 (a mode, severity and lambda Q) filled in
    yield make([storey("1", QUIET, [
        {"kind": "connection", "count": 4, "connection_type": "C2"},
        {"kind": "column", "count": 6, "crack_mm": 0.3, "inspected": 4}])],
        sx="steel_moment_frame", sy="steel_moment_frame")
    yield make([storey("1", QUIET, [
        {"kind": "wall", "count": 2, "mode": "rocking", "severity": "heavy", "dir": "x"},
        {"kind": "wall", "count": 1, "crack_mm": 1.2}])], sx="urm_wall", sy="urm_wall")


def _models(m: BaseModel):
    """Every model inside `m` (itself first)."""
    yield m
    for v in m.__dict__.values():
        for x in (v if isinstance(v, tuple) else v.values() if isinstance(v, dict) else (v,)):
            if isinstance(x, BaseModel):
                yield from _models(x)


def _same_as_validated(m: BaseModel) -> None:
    v = type(m).model_validate(dict(m.__dict__))
    assert v == m
    assert list(v.__dict__) == list(m.__dict__)
    assert {k: type(x) for k, x in v.__dict__.items()} == {
        k: type(x) for k, x in m.__dict__.items()}
    for k, x in v.__dict__.items():
        if isinstance(x, tuple):
            assert [type(i) for i in x] == [type(i) for i in m.__dict__[k]]
    if type(m).__name__ in TRUSTED:  # built with every field given, as before
        assert v.model_fields_set == m.model_fields_set == set(m.__dict__)


def test_every_result_model_matches_validation():
    kinds = set()
    for survey in _surveys():
        for m in _models(assess(survey)):
            _same_as_validated(m)
            kinds.add(type(m).__name__)
    assert kinds >= TRUSTED


def test_member_results_match_validation():
    seen_capacity = set()
    n = 0
    for survey in _surveys():
        for st in assess(survey).storeys:
            for r in st.members:
                v = MemberResult.model_validate(dict(r.__dict__))
                assert v == r
                assert list(v.__dict__) == list(r.__dict__)
                assert {k: type(x) for k, x in v.__dict__.items()} == {
                    k: type(x) for k, x in r.__dict__.items()}
                assert v.model_fields_set == r.model_fields_set
                seen_capacity |= {k for k in ("connection_index", "lambda_q", "eta")
                                  if getattr(r, k) is not None}
                n += 1
    assert n > 30
    assert seen_capacity == {"connection_index", "lambda_q", "eta"}


def test_trusted_is_a_working_model():
    values = {"index": 0, "ref": "C1", "kind": "column", "count": 2, "damage_class": "II",
              "floor": "IO", "eta": 0.75, "class_from": "crack", "inspected": None,
              "connection_type": None, "connection_index": None, "mode": None,
              "severity": None, "lambda_q": None}
    r = trusted(MemberResult, dict(values))
    assert r == MemberResult(**values)
    assert hash(r) == hash(MemberResult(**values))
    assert r.model_copy(update={"count": 3}).count == 3
    assert r.count == 2  # the copy's fields set is its own
    with pytest.raises(Exception, match="frozen"):
        r.count = 5  # type: ignore[misc]
    assert r.model_dump_json() == MemberResult(**values).model_dump_json()
