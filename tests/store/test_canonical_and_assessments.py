"""The canonical text's odd inputs and its memo pruned after many edits (the same text as the
plain encoder every time); stored assessments that no longer read, a survey the engine fails
on left stale, and assessing now."""

from __future__ import annotations

import json

import pytest

from tests.store.conftest import sample, sample_dict
from triage.model import canonical_json
from triage.store import Store
from triage.store import edits as edit_api
from triage.store.canonical import CanonicalText, scalar_json


def test_scalar_json_is_the_plain_encoder():
    plain = json.JSONEncoder(sort_keys=True, separators=(",", ":"), ensure_ascii=False).encode
    for v in (None, True, False, "Kōwhai \"Bay\"\n", 7, -0.0, 1e300, [1, "a"], {"b": 1, "a": 2}):
        assert scalar_json(v) == plain(v), v


def test_odd_documents_give_the_plain_text():
    ct = CanonicalText()
    for doc in ({"a": 1}, {"storeys": "not a list", "z": 1},
                {"storeys": [1, "two", None, {"label": "G", "readings": [{"x": 1}, 2]}]}):
        assert ct.text(doc) == canonical_json(doc)


def test_after_many_edits_the_memo_is_pruned_and_the_text_stays_right():
    class Small(CanonicalText):
        LIMIT = 40   # pruned often, so every edit below meets a freshly pruned memo

    ct = Small()
    pruned = []
    real = ct._prune
    ct._prune = lambda doc: (pruned.append(len(ct._memo)), real(doc))   # type: ignore
    doc = json.loads(json.dumps(sample_dict(storeys=3)))
    for k in range(60):
        doc = edit_api.apply(doc, "set", f"storeys[{k % 3}].readings[0].offset_mm",
                             float(k % 50) / 10 + 0.1).doc
        assert ct.text(doc) == canonical_json(doc)
    assert len(pruned) >= 3 and all(n > Small.LIMIT for n in pruned)
    assert len(ct._memo) <= Small.LIMIT + 8   # what the survey holds, plus the last edit's


def test_a_stored_assessment_that_no_longer_reads_is_recomputed(tmp_path):
    with Store.open(tmp_path / "f.db") as st:
        s = sample()
        st.add_survey(s)
        sid = str(s.survey_id)
        good = st.load_assessment(sid)
        assert good is not None
        st.conn.execute("UPDATE assessments SET json = '{\"format\": \"old\"}' "
                        "WHERE survey_id = ?", (sid,))
        assert st.load_assessment(sid) is None
        st.conn.execute("UPDATE assessments SET json = 'not json' WHERE survey_id = ?", (sid,))
        assert st.load_assessment(sid) is None
        again = st.assess_now(sid)
        assert again.to_json() == good.to_json()
        assert st.load_assessment(sid).to_json() == good.to_json()
        assert st.load_assessment("9a5d7c3e-1b46-4f80-9e2a-0c7b4d6f8e13") is None


def test_a_survey_the_engine_fails_on_is_left_stale(tmp_path, monkeypatch):
    import triage.assess as assess_pkg

    with Store.open(tmp_path / "f.db") as st:
        a, b = sample("Harbour Flats"), sample("Quay Stores")
        st.add_survey(a)
        st.add_survey(b)
        st.conn.execute("UPDATE surveys SET assessed_revision = NULL")
        assert sorted(st.stale_ids()) == sorted([str(a.survey_id), str(b.survey_id)])
        real = assess_pkg.assess

        def fails_on_flats(survey):
            if survey.building.name == "Harbour Flats":
                raise ArithmeticError("a bug of the engine")
            return real(survey)

        monkeypatch.setattr(assess_pkg, "assess", fails_on_flats)
        assert st.refresh_stale() == 1
        assert st.stale_ids() == [str(a.survey_id)]   # no tier rather than a wrong one
        monkeypatch.undo()
        assert st.refresh_stale() == 1 and st.stale_ids() == []


@pytest.mark.parametrize("n", [0])
def test_nothing_stale_is_nothing_to_do(tmp_path, n):
    with Store.open(tmp_path / "f.db") as st:
        st.add_survey(sample())
        assert st.refresh_stale() == n
