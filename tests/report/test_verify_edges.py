"""Verify at its edges: the probability tolerance of "re-assessed the same" just inside and just
outside, and an embedded file holding a number too long to read (one line, never a traceback).
"""

from __future__ import annotations

import json
import sys
from pathlib import Path

import pytest

from triage.assess.result import Assessment
from triage.report import write_report
from triage.report.keys import new_key
from triage.report.verify import PROBABILITY_TOLERANCE, _reassess, verify_report


def test_the_tolerance_is_one_hundredth():
    # docs/formats.md and the module's docstring: probabilities within 0.01 are the same.
    assert PROBABILITY_TOLERANCE == 0.01


@pytest.mark.parametrize(("shift", "code"), [(0.0, 0), (0.0095, 0), (0.0105, 5), (0.02, 5)])
def test_probabilities_at_the_edge_of_the_tolerance(clinic_pair, shift: float, code: int):
    """0.0105 apart is 'differ' and 0.0095 apart is 'the same': a tolerance widened to 0.011
    or more, or narrowed below 0.0095, fails here."""
    s, a = clinic_pair
    data = json.loads(a.to_json())
    p = data["tier_probability"]
    assert p["hold"] > 0.05 and p["evacuate"] < 0.95   # room to move either way
    p["hold"], p["evacuate"] = p["hold"] - shift, p["evacuate"] + shift
    got, message, _ = _reassess(json.loads(s.model_dump_json()), data)
    assert got == code, message
    if code:
        assert f"differ by {shift:.3f} (more than 0.01)" in message
    else:
        assert "re-assessed to the same tier and level, hold/LS" in message


def test_an_embedded_number_of_4400_digits_is_one_line(clinic_pair, tmp_path: Path,
                                                       monkeypatch):
    """A signed report whose embedded assessment holds a 4,400-digit number: Python refuses to
    read such an integer (a plain ValueError); verify says so in one line, exit 1. (Signed the
    first way: the standard way's canonical JSON refuses to sign such a number at all.)"""
    s, a = clinic_pair
    text = a.to_json().rstrip().removesuffix("}") + ', "x": ' + "9" * 4400 + "}\n"
    with pytest.raises(ValueError):
        json.loads(text)
    key, _ = new_key("Aroha Ngāti", "R-77", tmp_path / "k.key", None, algorithm="ed25519")
    out = tmp_path / "long.pdf"
    monkeypatch.setattr(Assessment, "to_json", lambda self: text)
    limit = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(0)   # only so that the report can be made and signed
    try:
        write_report(s, a, out, key=key)
    finally:
        sys.set_int_max_str_digits(limit)
        monkeypatch.undo()
    r = verify_report(out, trusted=[key.public])
    assert r.code == 1, r.message
    assert "embedded data cannot be read" in r.message and "\n" not in r.message
