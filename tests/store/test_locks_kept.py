"""A second store opened in the same process keeps the first one's locks.

Closing any descriptor of a file drops every POSIX lock the process holds on it, SQLite's
included. If opening a second store read the file's header with a plain `open()`, the app's
connection (the screens keep one open while a worker opens another) would lose its lock, and
another process closing its own connection could then checkpoint and delete the WAL beneath
it: committed edits gone from everyone else's view, and lost on a crash.
"""

from __future__ import annotations

import subprocess
import sys
from pathlib import Path

from tests.helpers import storey, survey_dict
from triage.model import parse_survey
from triage.store import Store

READ = """
import sys
from triage.store import Store
with Store.open(sys.argv[1], refresh=False, check=False) as st:
    print(len(st.list_surveys()))
"""


def test_wal_survives_a_second_store_in_the_same_process(tmp_path: Path) -> None:
    db = tmp_path / "field.db"
    wal = tmp_path / "field.db-wal"
    with Store.open(db) as app_store:
        app_store.add_survey(parse_survey(survey_dict([storey("G", [])])), "Tess Tester", "test")
        assert wal.exists()
        # a worker of the same process opens and closes its own store, checked
        with Store.open(db, create=False, refresh=False) as worker:
            assert len(worker.list_surveys()) == 1
        # another process reads and closes: the WAL under the open store must stay
        out = subprocess.run([sys.executable, "-c", READ, str(db)], capture_output=True,
                             text=True, check=True)
        assert out.stdout.strip() == "1"
        assert wal.exists(), "the WAL was deleted under an open connection"
        second = survey_dict([storey("G", [])], name="Second Shop")
        app_store.add_survey(parse_survey(second), "Tess Tester", "test")
        out = subprocess.run([sys.executable, "-c", READ, str(db)], capture_output=True,
                             text=True, check=True)
        assert out.stdout.strip() == "2"
