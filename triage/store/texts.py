"""Stored survey texts as this version writes them (the schema 3 migration), and photos found.

A database written before `triage-survey/2` holds texts marked `triage-survey/1`. Schema 3
rewrites each as this version writes the same survey (`canonical_json` of the parsed survey:
marked `/2`, the keys `/2` added present where the model writes them), so the store, merge and
sync compare texts like with like. Ids, revisions, the change log and the assessments stay as
they were: the survey is the same, only its text is brought up to date, and that is recorded in
`meta` (`survey_texts_v2`), not as an edit. A stored text the model no longer accepts (a rule of
a later round it breaks) keeps every key and value and only its `format` is marked `/2`.
No edit here: `rewrite_v1_texts` runs inside the migration's transaction.
"""

from __future__ import annotations

import copy
import json
import sqlite3
from datetime import UTC, datetime
from typing import Any

from triage.model import FORMAT, FORMATS, canonical_json, parse_survey
from triage.photos import photo_fields

MIGRATION_KEY = "survey_texts_v2"


def as_written_now(text: str) -> str:
    """A stored survey text marked `triage-survey/1` as this version writes it; else as it is."""
    try:
        data = json.loads(text)
    except ValueError:
        return text
    if not isinstance(data, dict) or data.get("format") != FORMATS[0]:
        return text
    try:
        survey = parse_survey(copy.deepcopy(data))
    except ValueError:   # SurveyError: a rule it breaks now; keep it, marked /2
        survey = None
    if survey is not None and str(survey.survey_id) == str(data.get("id")):
        return canonical_json(survey.to_json_dict())
    return canonical_json({**data, "format": FORMAT})


def rewrite_v1_texts(conn: sqlite3.Connection) -> int:
    """Rewrite every stored `/1` survey text as `/2` (see the module); returns how many."""
    n = 0
    rows = conn.execute("SELECT id, doc FROM surveys").fetchall()
    for sid, doc in rows:
        new = as_written_now(doc)
        if new != doc:
            conn.execute("UPDATE surveys SET doc = ? WHERE id = ?", (new, sid))
            n += 1
    at = datetime.now(UTC).isoformat(timespec="seconds")
    conn.execute("INSERT OR REPLACE INTO meta (key, value) VALUES (?, ?)",
                 (MIGRATION_KEY, json.dumps({"at": at, "rewritten": n})))
    return n


def photos_found(stored: dict[str, Any], text: str) -> list[tuple[str, str]] | None:
    """The photos a stored survey lacked and the same survey's `text` now names by digest.

    A photo missing when the survey was imported stays without `sha256`; imported again with
    the file present, the survey is the same but for those digests. Returns each such photo's
    field path and digest when the stored survey with them filled in is `text` exactly (and
    at least one is); None otherwise (a different survey).
    """
    new = json.loads(text)
    have = list(photo_fields(stored))
    want = list(photo_fields(new))
    if len(have) != len(want):
        return None
    fills = [(field, str(ph["sha256"])) for (field, mine), (_f, ph) in zip(have, want, strict=True)
             if not mine.get("sha256") and ph.get("sha256") and ph.get("path") == mine.get("path")]
    if not fills:
        return None
    filled = copy.deepcopy(stored)
    for (_field, mine), (_f, ph) in zip(photo_fields(filled), want, strict=True):
        if not mine.get("sha256") and ph.get("sha256") and ph.get("path") == mine.get("path"):
            mine["sha256"] = ph["sha256"]
    return fills if canonical_json(filled) == text else None
