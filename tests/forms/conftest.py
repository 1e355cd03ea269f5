"""The printed forms the paper-form tests read: every system's, and a building of two systems."""

from __future__ import annotations

from pathlib import Path

import pytest

from tests.forms.pdfgrid import Page, read_pages
from triage import standards
from triage.forms import load_form
from triage.report.paper_form import write_paper_form

MIXED = ("rc_frame", "steel_braced_frame")
CASES: dict[str, tuple[str, ...]] = {key: (key,) for key in standards.system_keys()}
CASES["mixed"] = MIXED


@pytest.fixture(scope="session")
def printed_forms(tmp_path_factory: pytest.TempPathFactory) -> dict[str, tuple[Path, list[Page]]]:
    """Per case, the PDF (two storey bands) and its pages read back by position."""
    folder = tmp_path_factory.mktemp("printed-forms")
    out = {}
    for name, systems in CASES.items():
        path = folder / f"{name}.pdf"
        write_paper_form([load_form(s) for s in systems], path, storeys=2)
        out[name] = (path, read_pages(path))
    return out
