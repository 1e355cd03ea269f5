"""What the report's words say: editions, fractions, times, no doubled text, no key, and a
method page of the methods and FEMA 356 figures this building used, with its status words."""

from __future__ import annotations

import io
import re
from datetime import UTC, datetime, timedelta, timezone

import pytest
from pypdf import PdfReader

from tests.helpers import make, reading, storey
from tests.report.conftest import clinic_dict
from triage.assess import assess
from triage.model import parse_survey, parse_survey_text
from triage.report import render_report
from triage.report.model import build_report_model, comparison_lines
from triage.report.words import cite, edition_text, pct_figure, value_text, when_text
from triage.resources import samples_dir
from triage.standards import Source, load
from triage.standards.vocabulary import words

SAMPLES = sorted(samples_dir().glob("*.json"))


def _text(pdf: bytes) -> str:
    return re.sub(r"\s+", " ", " ".join(p.extract_text() for p in
                                        PdfReader(io.BytesIO(pdf)).pages))


@pytest.fixture(scope="module", params=SAMPLES, ids=[p.stem for p in SAMPLES])
def sample_text(request):
    s = parse_survey_text(request.param.read_text(encoding="utf-8"))
    a = assess(s)
    return s, a, _text(render_report(s, a, photo_dir=request.param.parent))


def test_editions_never_nest_brackets(sample_text):
    _s, _a, text = sample_text
    assert not re.search(r"\([^()]*\(", text), re.search(r"\([^()]*\(.{0,40}", text)
    assert edition_text("2012 (2nd ed. 2018)") == "2012; 2nd ed. 2018"
    src = Source(document="FEMA P-58-1", edition="2012 (2nd ed. 2018)", table="Table C-1",
                 status="memory")
    assert cite(src) == "FEMA P-58-1 (2012; 2nd ed. 2018) Table C-1"


def test_fractions_are_rounded_as_people_read_them(sample_text):
    _s, _a, text = sample_text
    assert not re.search(r"\d\.\d{4,}%", text)   # never "0.333333%"
    # EN 1090-2 h/300 and TMS 602 1/4 in per 10 ft (docs/references.md, plumbness, memory)
    assert (pct_figure(0.333333), pct_figure(0.208333), pct_figure(0.2), pct_figure(1.0)) == (
        "0.33%", "0.21%", "0.2%", "1%")


def test_no_text_is_doubled(sample_text):
    _s, _a, text = sample_text
    doubled = re.search(r"\b([A-Za-z][\w ,-]{9,}?); \1\b", text)
    assert doubled is None, doubled.group(0)


def test_no_internal_key_reaches_the_report(sample_text):
    _s, _a, text = sample_text
    # a snake_case word is an internal key; a data file's name (damage_floors.toml) is not
    keys = [w for w in re.findall(r"\b[a-z][a-z0-9]*(?:_[a-z0-9]+)+\b(?!\.toml|\.json)", text)]
    assert not keys


def test_no_raw_iso_time(sample_text):
    s, _a, text = sample_text
    assert not re.search(r"\d{4}-\d\d-\d\dT\d\d:\d\d", text)
    assert when_text(s.inspection.at) in text and "UTC" in when_text(s.inspection.at)


def test_times_read_with_their_zone():
    nz = timezone(timedelta(hours=13))
    assert when_text(datetime(2026, 12, 1, 14, 5, tzinfo=nz)) == "1 December 2026, 14:05 UTC+13:00"
    assert when_text(datetime(2026, 12, 1, 20, 0, 5, tzinfo=UTC), seconds=True) == (
        "1 December 2026, 20:00:05 UTC")


def test_the_comparison_section_reads_its_times():
    class Side:
        def __init__(self, at: str) -> None:
            self.at = at

    class Cmp:
        old = Side("2026-11-29T09:00:00+13:00")
        new = Side("2026-12-01T10:30:00+13:00")

        def lines(self):
            return [f"tier: hold on {self.old.at} -> evacuate on {self.new.at}",
                    "seen at 2026-12-01T10:31:00Z"]

    got = comparison_lines(Cmp())
    assert got == ["tier: hold on 29 November 2026, 09:00 UTC+13:00 -> evacuate on "
                   "1 December 2026, 10:30 UTC+13:00", "seen at 1 December 2026, 10:31 UTC"]


def test_the_method_page_defines_its_status_words(sample_text):
    _s, _a, text = sample_text
    for word, meaning in (("checked", "read in a public copy of the document"),
                          ("secondary", "seen only as quoted in another publication"),
                          ("memory", "recalled, not re-read")):
        assert f"{word} {meaning}" in text


def test_the_method_page_lists_only_the_methods_that_applied():
    std = load()
    # a steel frame: AISC 303-16's tolerance, not the concrete or masonry ones
    steel = make([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                         [{"kind": "column", "count": 4}])],
                 sx="steel_moment_frame", sy="steel_moment_frame")
    rows = build_report_model(steel, assess(steel)).method
    sources = " ".join(r.source for r in rows)
    assert "AISC 303-16" in sources and "ACI 117-10" not in sources and "TMS 602" not in sources
    assert not any("JBDPA" in r.source for r in rows)  # no member class, no R: not used
    # nothing measured: no drift table, figures, tolerance or repairability; R of the sound
    # concrete columns is computed, so the JBDPA row stays
    empty = make([storey("1", [], [{"kind": "column", "count": 4}])])
    m = build_report_model(empty, assess(empty))
    assert [r.source.split()[0] for r in m.method] == ["JBDPA"] and m.figures == []
    assert not any("FEMA 356 calls" in t for t in m.method_text)
    # a concrete building whose columns are classed: JBDPA, FEMA 356 and ACI 117-10
    s = parse_survey(clinic_dict())
    what = [r.what for r in build_report_model(s, assess(s)).method]
    assert what[0].startswith("structural performance levels by residual drift")
    assert any(w.startswith("damage classes") for w in what)
    assert "as-built plumbness tolerance, reinforced concrete" in what
    assert len(what) == len(set(what))
    assert std.drift.source.table == "Table C1-3"


@pytest.mark.parametrize(("sample", "listed", "absent"), [
    ("warehouse_anchor_quay", "FEMA 352", "FEMA 306"),      # steel: connections
    ("flats_mariner_court_2", "FEMA 306", "FEMA 352"),      # reinforced masonry walls
])
def test_the_capacity_method_used_is_listed(sample, listed, absent):
    s = parse_survey_text((samples_dir() / f"{sample}.json").read_text(encoding="utf-8"))
    sources = " ".join(r.source for r in build_report_model(s, assess(s)).method)
    assert listed in sources and absent not in sources


def test_the_fema_356_figures_used_are_tabulated():
    # FEMA 356 (2000) Table C1-3 (memory, docs/references.md): concrete walls LS 0.5%
    # permanent, CP 2.0%; concrete frames LS 1.0% permanent, CP 4.0%; IO permanent "negligible"
    s = parse_survey(clinic_dict())   # x: concrete walls, y: concrete frames
    a = assess(s)
    figs = {f.dirs: f for f in build_report_model(s, a).figures}
    assert set(figs) == {"x", "y"}
    assert (figs["x"].system, figs["x"].ls, figs["x"].cp) == (words("systems", "rc_wall"),
                                                              "0.50%", "2.0%")
    assert (figs["y"].system, figs["y"].ls, figs["y"].cp) == (words("systems", "rc_frame"),
                                                              "1.0%", "4.0%")
    assert figs["y"].io.startswith("negligible") and "0.20%" in figs["y"].io
    assert "transient figures, not used: IO 1%, LS 2%" in figs["y"].note
    text = _text(render_report(s, a))
    assert "FEMA 356 Table C1-3 figures used for this building" in text
    one = make([storey("1", [reading("x", 1.0)])])
    assert [f.dirs for f in build_report_model(one, assess(one)).figures] == ["x, y"]


def test_assumption_values_read_in_words():
    assert value_text({"brittle_vertical": {"III": "LS"}, "other": {"IV": "LS"}}) == (
        "brittle vertical: III → LS; other: IV → LS")
    assert value_text(["column", "wall"]) == "column, wall"
    s = parse_survey(clinic_dict())
    floors = next(r for r in build_report_model(s, assess(s)).assumptions
                  if r.value.startswith("vertical member:"))
    assert "brittle vertical member: III → LS" in floors.value
