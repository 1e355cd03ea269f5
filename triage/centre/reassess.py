"""`triage centre reassess URL`: assess every current survey version with this engine.

The laptops' assessments stay as they were sent (history is append-only); this adds one row per
current version that has none from this engine version, marked `computed_by = 'centre'`. The
views take each version's latest assessment, so after a reassess they show this engine's. Runs
as a login that may read the survey JSON and insert assessments (the schema's owner, or a role
given both).
"""

from __future__ import annotations

import json
from collections.abc import Callable
from dataclasses import dataclass

from triage import __version__

from .connect import CentreError, connect, first_line, redact
from .schema import check_schema
from .sync import _insert

Progress = Callable[[int, int, float], None]


@dataclass
class ReassessResult:
    """How many versions were assessed, how many were already, how many failed."""

    assessed: int = 0
    current: int = 0
    failed: int = 0


def reassess(url: str, *, batch: int = 200, progress: Progress | None = None) -> ReassessResult:
    """Assess, with this engine, each current version lacking its assessment; see the module."""
    import time

    import psycopg

    from triage.assess import assess
    from triage.model import SurveyError, parse_survey

    where = redact(url)
    out = ReassessResult()
    t0 = time.perf_counter()
    conn = connect(url)
    try:
        check_schema(conn, url)
        with conn.transaction():
            todo = conn.execute(
                "SELECT v.survey_id, v.doc_sha256, v.doc FROM triage.current_versions v "
                "WHERE NOT EXISTS (SELECT 1 FROM triage.assessments a WHERE a.survey_id = "
                "v.survey_id AND a.doc_sha256 = v.doc_sha256 AND a.engine = %s) "
                "ORDER BY v.survey_id, v.doc_sha256", (__version__,)).fetchall()
            got = conn.execute("SELECT count(*) FROM triage.current_versions").fetchone()
            out.current = (int(got[0]) if got else 0) - len(todo)
        seen: set[tuple[str, str]] = set()
        rows = []
        for i, (sid, sha, doc) in enumerate(todo, 1):
            if (sid, sha) in seen:
                continue
            seen.add((sid, sha))
            try:
                a = assess(parse_survey(json.loads(doc)))
            except (SurveyError, ValueError, ArithmeticError):
                out.failed += 1
                continue
            g = a.governing
            rows.append((sid, sha, __version__, a.tier, a.performance_level, g.storey, g.dir,
                         g.basis, a.provisional, a.to_json(), "centre", "centre"))
            if len(rows) >= batch or i == len(todo):
                with conn.transaction():
                    out.assessed += _insert(conn, "assessments", rows)
                rows = []
                if progress:
                    progress(i, len(todo), time.perf_counter() - t0)
        if rows:
            with conn.transaction():
                out.assessed += _insert(conn, "assessments", rows)
    except psycopg.errors.InsufficientPrivilege as err:
        raise CentreError(f"{where}: this login may not reassess ({first_line(err, url)}); run "
                          "it as the schema's owner") from None
    except psycopg.Error as err:
        raise CentreError(f"{where}: reassess stopped ({first_line(err, url)}); run it again "
                          "to finish") from None
    finally:
        conn.close()
    return out
