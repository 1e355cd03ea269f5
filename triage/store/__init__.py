"""The field store: every observation kept, nothing lost. The only module that uses sqlite3.

    from triage.store import Store
    with Store.open(path) as st:                      # checked, migrated, stale ones refreshed
        st.add_survey(survey, who, source)            # "added" | "unchanged" | SurveyConflict
        rev = st.set_value(sid, "storeys[1].readings[0].offset_mm", 7.5, who)
        rev = st.add_item(sid, "storeys[1].members", {"kind": "wall", "count": 2}, who)
        rev = st.remove_item(sid, "hazards[0]", who)  # hidden, kept in the change log
        st.undo_last(sid, who)
        survey = st.load_survey(sid)                  # the validated Survey
        st.save_assessment(sid, rev, assess(survey))  # after each recompute, own transaction

Representation. A survey is one row of `surveys`: its canonical `triage-survey/1` JSON (`doc`)
holding the *visible* items only, so `load_survey` parses it as it is and every index in an edit
path (`storeys[2].readings[1]`) counts visible items. Each edit is applied to that JSON; only
the part it touched is validated (see `edits`), and the row and one `changes` row (op, path,
old and new value as JSON, when, who) are written in one BEGIN IMMEDIATE transaction. Removal
hides: the removed item leaves `doc` and is kept whole as the old value of its `remove` change
(`hidden_items` lists them); undo puts it back at its index. Nothing is deleted by a normal
command; a whole survey is hidden with a flag. Copies of the fields the lists show (building,
address, location, inspector, time) and of the latest assessment (tier, level, governing,
provisional, the revision it was computed for) are plain columns, so lists never parse JSON or
re-assess; a row whose assessment is of an older revision is stale and is refreshed on open.

Revisions. A survey is revision 1 when stored and one more with every change. A report records
the revision it covers (`record_report`); a later change means "edited since report".

Transactions. WAL journal, synchronous=FULL, foreign keys on and a busy timeout on every
connection; every write in BEGIN IMMEDIATE, so two processes on one file never lose each
other's writes. An edit's UPDATE is conditional on the revision this store last saw; if another
process moved the survey on, the JSON is reloaded under the write lock and the edit applied to
that. One `Store` per thread.

Modules: `connect` (checked opening, pragmas, transactions, one-line errors), `schema`
(tables, version, migrations), `edits` (paths, applying an edit, partial validation); the
`Store` in layers, one concern each: `core` (connection, write transaction, time stamp, who),
`reads`, `assessments`, `writes` (new surveys, edits), `history` (change log, undo, hide),
`store` (opening, reports, settings, backup); `rows` (the records handed out), `reader` (the
`SurveyReader` protocol the reading commands use), `backup` (consistent copies), `merge`
(gathering databases), `area` (the one-row-per-building summary), `paths` (the default
database).
"""

from .connect import StoreError, SurveyConflict
from .core import default_who
from .edits import EditRefused
from .paths import default_db_path
from .rows import Change, SurveyRow
from .schema import SCHEMA_VERSION
from .store import Store

__all__ = ["SCHEMA_VERSION", "Change", "EditRefused", "Store", "StoreError", "SurveyConflict",
           "SurveyRow", "default_db_path", "default_who"]
