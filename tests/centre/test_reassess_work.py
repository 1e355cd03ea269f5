"""`centre reassess` when there is work: a new engine version assesses every current version
once (in batches, with progress), marks its rows as the centre's, and the views then show
them; run again it has nothing to do. A version this engine refuses is counted, not fatal."""

from __future__ import annotations

import json

import triage.centre.reassess as reassess_module
from tests.centre.conftest import synced
from triage.centre.reassess import reassess


def test_a_new_engine_version_assesses_each_current_version_once(centre, tmp_path, monkeypatch):
    synced(centre, tmp_path)
    first = reassess(centre.admin)
    assert (first.assessed, first.current, first.failed) == (0, 8, 0)   # the laptop's own
    monkeypatch.setattr(reassess_module, "__version__", "99.0-test")
    steps: list[tuple[int, int]] = []
    got = reassess(centre.admin, batch=3, progress=lambda i, n, s: steps.append((i, n)))
    assert (got.assessed, got.current, got.failed) == (8, 0, 0)
    assert steps == [(3, 8), (6, 8), (8, 8)]   # one report per batch committed
    assert centre.rows("SELECT count(*) FROM triage.assessments WHERE engine = '99.0-test' "
                       "AND computed_by = 'centre'") == [(8,)]
    again = reassess(centre.admin)
    assert (again.assessed, again.current, again.failed) == (0, 8, 0)


def test_a_version_this_engine_refuses_is_counted_and_the_rest_assessed(centre, tmp_path,
                                                                       monkeypatch):
    synced(centre, tmp_path, n=3)
    monkeypatch.setattr(reassess_module, "__version__", "99.0-test")
    real_loads = json.loads
    calls = {"n": 0}

    def first_refused(text, *a, **kw):   # the first version's JSON reads as no survey
        calls["n"] += 1
        return {"format": "not-a-survey"} if calls["n"] == 1 else real_loads(text, *a, **kw)

    monkeypatch.setattr(reassess_module.json, "loads", first_refused)
    got = reassess(centre.admin)
    monkeypatch.undo()
    assert (got.assessed, got.failed) == (2, 1)
