"""Report speed: the unsigned report of the 60-storey survey against a bare reportlab document.

The promise (DEVELOPERS.md, Benchmarks): the report of a 60-storey survey is written in at most twice the time
reportlab takes for a bare document with the same number of table rows (the readings table's
one row per spot included). The bare document is
one platypus Table of that many rows (eight short text cells each, Helvetica, a header row
repeated on each page), built into memory; the report is `render_report` (model and PDF, not
the assessment, which is computed once beforehand). Medians of a few repeats.

    python -m bench.report_bench
"""

from __future__ import annotations

import io
import statistics
import time
from typing import Any

from bench.generate import big_survey
from triage.assess import assess


def _median_s(fn: Any, repeats: int) -> float:
    fn()  # warm-up: fonts registered, caches filled
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append(time.perf_counter() - t0)
    return statistics.median(times)


def table_rows(model: Any) -> int:
    """Every table row the report draws (header rows included)."""
    spots = sum(len(t.rows) for t in model.spot_tables)
    return (1 + len(model.storeys) + (1 + spots) + 1 + len(model.members)
            + (1 + len(model.hazards))
            + 1 + len(model.repairability) + 1 + len(model.method) + 1 + len(model.assumptions)
            + (1 + len(model.figures) if model.figures else 0) + 1 + len(model.status_words)
            + len(model.building) - 1)


def bare_document(rows: int) -> bytes:
    """A bare reportlab document: one table of `rows` rows of eight short cells."""
    from reportlab.lib.pagesizes import A4
    from reportlab.platypus import SimpleDocTemplate, Table, TableStyle

    data = [[f"r{r}c{c}" for c in range(8)] for r in range(rows)]
    t = Table(data, repeatRows=1)
    t.setStyle(TableStyle([("GRID", (0, 0), (-1, -1), 0.25, (0, 0, 0))]))
    buf = io.BytesIO()
    SimpleDocTemplate(buf, pagesize=A4, invariant=1).build([t])
    return buf.getvalue()


def figures_of_report(storeys: int = 60, repeats: int = 5) -> dict[str, float]:
    """pdf_ratio (report ÷ bare document, medians) and the times behind it."""
    from triage.report import render_report
    from triage.report.model import build_report_model

    survey = big_survey(storeys=storeys)
    assessment = assess(survey)
    rows = table_rows(build_report_model(survey, assessment))
    report_s = _median_s(lambda: render_report(survey, assessment), repeats)
    bare_s = _median_s(lambda: bare_document(rows), repeats)
    return {"pdf_ratio": report_s / bare_s, "report_s": report_s, "bare_s": bare_s,
            "table_rows": float(rows)}


if __name__ == "__main__":
    for k, v in figures_of_report().items():
        print(f"{k}: {v:.3f}")
