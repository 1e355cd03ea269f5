"""The walls of DEVELOPERS.md: the computing core loads no UI, PDF or database library."""

from __future__ import annotations

import subprocess
import sys

import pytest

from tests.helpers import unmeasured_env

# The UI (textual, rich), the PDF side (reportlab, pypdf, PIL), the signing (cryptography) and
# every database driver (sqlite3 the store's, psycopg the
# centre's): none may be loaded by importing the computing core.
FORBIDDEN = ("textual", "rich", "reportlab", "pypdf", "PIL", "cryptography",
             "sqlite3", "_sqlite3", "psycopg")


@pytest.mark.parametrize("module", ["triage.model", "triage.model_rules", "triage.standards",
                                    "triage.assess",
                                    "triage.assess.text", "triage.standards.vocabulary"])
def test_core_module_imports_no_ui_pdf_or_database(module):
    code = (f"import sys, {module}\n"
            f"bad = [m for m in {FORBIDDEN!r} if m in sys.modules]\n"
            "print(','.join(bad))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True,
                         env=unmeasured_env())
    assert out.stdout.strip() == "", f"{module} loads {out.stdout.strip()}"
