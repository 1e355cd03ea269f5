"""The verdict worker: assessing a stored survey in a thread with its own store.

A `sqlite3` connection belongs to the thread that opened it, so work done in a thread worker
(the verdict, the report) opens its own store: `worker_store` for one job, `VerdictThread`
for the verdict recomputed after every accepted field (one store kept open between runs).
"""

from __future__ import annotations

import contextlib
from collections.abc import Iterator
from concurrent.futures import Future
from contextlib import contextmanager
from dataclasses import dataclass
from pathlib import Path
from typing import TYPE_CHECKING

from triage.model import Survey
from triage.store import Store

if TYPE_CHECKING:  # imported in the worker thread, not on the way to the first screen
    from triage.assess import Assessment


@dataclass(frozen=True)
class Verdict:
    """A survey as stored at one revision and its assessment, made in a worker thread."""

    survey: Survey
    assessment: Assessment
    revision: int


@contextmanager
def worker_store(db_path: Path) -> Iterator[Store]:
    """A store opened and closed in the calling (worker) thread."""
    # The app checked the file when it opened it; a worker's store skips the whole-file read.
    st = Store.open(Path(db_path), create=False, refresh=False, check=False)
    try:
        yield st
    finally:
        st.close()


def verdict_of(st: Store, survey_id: str) -> Verdict:
    """Assess the stored survey at its current revision and store the assessment."""
    from triage.assess import assess

    revision = int(st.revision(survey_id))
    survey = st.load_survey(survey_id)
    assessment = assess(survey)
    st.save_assessment(survey_id, revision, assessment)
    return Verdict(survey, assessment, revision)


class VerdictThread:
    """One background thread that assesses, with its own store kept open between runs.

    Opening and closing a connection for every verdict costs more than the assessment of a
    small survey; this thread keeps one. `submit` returns a future.
    """

    def __init__(self, db_path: Path) -> None:
        from concurrent.futures import ThreadPoolExecutor

        self.db_path = Path(db_path)
        self.pool = ThreadPoolExecutor(max_workers=1, thread_name_prefix="verdict")
        self._store: Store | None = None

    def _run(self, survey_id: str) -> Verdict:
        if self._store is None:
            self._store = Store.open(self.db_path, create=False, refresh=False)
        return verdict_of(self._store, survey_id)

    def submit(self, survey_id: str) -> Future[Verdict]:
        """Assess a survey in the thread; a concurrent.futures.Future of its `Verdict`."""
        return self.pool.submit(self._run, survey_id)

    def close(self) -> None:
        """Close the thread's store and end the thread."""
        def shut() -> None:
            if self._store is not None:
                self._store.close()
                self._store = None
        with contextlib.suppress(Exception):  # the thread may be gone already
            self.pool.submit(shut).result(timeout=5)
        self.pool.shutdown(wait=False)

