"""The demo surveys of Kōwhai Bay (invented town, invented Tūrama Fault earthquake).

Each sample is assessed and its outcome pinned, so the demo data can never silently drift. The
expected outcomes were worked by hand from the rules of docs/method.md (see each case's comment).
"""

from __future__ import annotations

import json
from datetime import datetime
from pathlib import Path

import pytest

from tests.wording import BORROWED
from triage.assess import assess
from triage.model import Survey, parse_survey
from triage.resources import samples_dir

# name: (tier, performance level, governing storey, governing dir, governing basis, provisional)
EXPECTED = {
    # rc_wall x / rc_frame y; largest drift 0.10% (2 mm / 2 m) under the IO figure 0.20%;
    # R = (14 + 0.75 + 0.75) / 16 = 96.9% in y (slight). Nothing above IO. Governing: the largest
    # |d| / F_IO: G y (grid A1) 0.10/0.20 = 0.5 ties storey 1 y (stair landing) 0.5; G x at most
    # 0.075/0.20 = 0.375; the tie goes to the lowest storey: G, y.
    "clinic_tidewater_medical": ("occupy", "IO", "G", "y", "drift", False),
    # rc_frame both ways; drift at most 0.15%. Ground storey R = (8 + 5 x 0.6 + 3 x 0.3) / 16
    # = 74.4% (brittle columns, classes II and III): grade moderate, LS, so hold; equal R in
    # both directions, so x.
    "school_saltmarsh_road": ("hold", "LS", "G", "x", "capacity", False),
    # reinforced masonry walls: ground storey y 9 mm / 2 m = 0.45%, over 0.20% and within the
    # LS figure 0.6%.
    "flats_mariner_court_1": ("hold", "LS", "G", "y", "drift", False),
    # after the aftershock: 17 mm / 2 m = 0.85%, over LS 0.6% and within CP 1.5%; W5 class V
    # (core crushed, bars buckled) also floors at CP; drift comes first in a tie.
    "flats_mariner_court_2": ("evacuate", "CP", "G", "y", "drift", False),
    # braced frame x, moment frame y; tilts 0.04-0.10 deg (0.07-0.17%) within IO 0.20%; BR3
    # buckled brace is class IV (rule of ours), the member-damage floor holds it to LS.
    "warehouse_anchor_quay": ("hold", "LS", "G", None, "damage", False),
    # brick infill along the street: tilt 0.55 deg = 0.96% over the CP figure 0.6%: beyond CP.
    # Upper storey not entered and ground storey seen only in part: provisional.
    "shops_wharf_street": ("evacuate", "beyond-CP", "G", "x", "drift", True),
    # wood stud walls: the largest tilt, y 0.08 deg = 0.14%, within the IO figure 0.25%; by
    # |d| / F_IO it beats x's 0.07 deg (0.12%): G, y.
    "house_driftwood_crescent": ("occupy", "IO", "G", "y", "drift", False),
    # structure at IO (3.5 mm over a 2 m gauge = 0.175%, within 0.25%); the cracked
    # chimney (falling hazard, storey 1) raises the tier to hold and so governs.
    "house_kelp_street": ("hold", "IO", "1", None, "hazard", False),
}


def _load(name: str) -> Survey:
    return parse_survey(json.loads((samples_dir() / f"{name}.json").read_text(encoding="utf-8")))


def test_every_sample_file_is_pinned() -> None:
    names = {p.stem for p in samples_dir().glob("*.json")}
    assert names == set(EXPECTED)


@pytest.mark.parametrize("name", sorted(EXPECTED))
def test_sample_outcome(name: str) -> None:
    tier, level, storey, d, basis, provisional = EXPECTED[name]
    a = assess(_load(name))
    assert a.tier == tier
    assert a.performance_level == level
    assert (a.governing.storey, a.governing.dir, a.governing.basis) == (storey, d, basis)
    assert a.provisional is provisional
    assert a.reasons, "every outcome carries its reasons"


def test_second_round_outcomes() -> None:
    # The timber house: occupy, but the four tilts each taken as a separate place leave it
    # borderline. IO 0.25% = 0.143239 deg; sd 0.05 deg each:
    # P(|t| <= IO) = Phi((0.143239 - t)/0.05) - Phi((-0.143239 - t)/0.05):
    # 0.05 -> 0.96884, 0.07 -> 0.92850, 0.08 -> 0.89702, 0.04 -> 0.98041; product 0.79112 < 0.8.
    a = assess(_load("house_driftwood_crescent"))
    assert a.tier_probability["occupy"] == pytest.approx(0.79112, abs=2e-5)
    assert a.borderline is True
    assert a.reasons[0].startswith("no permanent drift distinguishable from construction")
    # The flats after the aftershock: evacuate by CP drift (0.85%) and a class V wall; nothing
    # within 3 sd could change evacuate (LS 0.60% is (0.85 - 0.60)/0.05 = 5 sd away).
    b = assess(_load("flats_mariner_court_2"))
    assert b.measure_next is None and b.settled_by is not None
    # The warehouse: the buckled brace (class IV, a member of the braced frame's lateral system)
    # floors it at LS.
    c = assess(_load("warehouse_anchor_quay"))
    assert c.storeys[0].damage_floor == "LS"


def test_samples_cover_the_brief() -> None:
    surveys = [_load(n) for n in EXPECTED]
    systems = {s.building.system.x for s in surveys} | {s.building.system.y for s in surveys}
    assert len(systems) >= 4
    tiers = {assess(s).tier for s in surveys}
    assert tiers == {"occupy", "hold", "evacuate"}
    ids = [s.id for s in surveys]
    assert len(set(ids)) == len(ids)
    raw = [json.loads((samples_dir() / f"{n}.json").read_text(encoding="utf-8"))
           for n in EXPECTED]
    assert all("id" in r and "id" in r["building"] for r in raw), "explicit ids everywhere"


def test_samples_are_set_in_the_invented_town_after_the_invented_event() -> None:
    main_shock = datetime.fromisoformat("2026-11-27T00:00:00+13:00")
    for n in EXPECTED:
        s = _load(n)
        assert s.building.address.endswith("Kōwhai Bay"), n
        assert s.inspection.at >= main_shock, n
        assert s.inspection.at.utcoffset().total_seconds() == 13 * 3600, n  # type: ignore[union-attr]
        assert s.building.location is not None
        for st in s.storeys:
            assert 2.3 <= st.height_m <= 6.5, (n, st.label)
            for r in st.readings:
                assert (r.sd_mm if r.tilt_deg is None else r.sd_deg) is not None, n


def test_samples_use_no_forbidden_words() -> None:
    banned = BORROWED
    for p in samples_dir().glob("*.json"):
        text = p.read_text(encoding="utf-8").lower()
        for word in banned:
            assert word not in text, (p.name, word)


def test_reinspection_after_the_aftershock_shows_progression() -> None:
    before, after = _load("flats_mariner_court_1"), _load("flats_mariner_court_2")
    assert after.inspection.previous == before.id
    assert after.building.id == before.building.id
    aftershock = datetime.fromisoformat("2026-11-29T00:00:00+13:00")
    assert before.inspection.at < aftershock <= after.inspection.at
    a0, a1 = assess(before), assess(after)
    g0, g1 = a0.storeys[0], a1.storeys[0]
    assert g1.drift_ratio.y is not None and g0.drift_ratio.y is not None
    assert g1.drift_ratio.y > g0.drift_ratio.y
    order = [None, "I", "II", "III", "IV", "V"]
    worst0 = max(order.index(m.damage_class) for m in g0.members)
    worst1 = max(order.index(m.damage_class) for m in g1.members)
    assert (worst0, worst1) == (3, 5)
    assert (a0.tier, a1.tier) == ("hold", "evacuate")


def test_samples_are_found_by_the_resources_lookup() -> None:
    assert samples_dir().is_dir()
    assert isinstance(samples_dir(), Path)
    assert len(list(samples_dir().glob("*.json"))) >= 6


def test_photos_named_by_samples_exist_and_are_small() -> None:
    named = 0
    for n in EXPECTED:
        s = _load(n)
        groups = [st.photos for st in s.storeys]
        groups += [m.photos for st in s.storeys for m in st.members]
        groups += [h.photos for h in s.hazards]
        for photos in groups:
            for ph in photos:
                f = samples_dir() / ph.path
                assert f.is_file(), (n, ph.path)
                assert f.stat().st_size < 20_000, (n, ph.path)
                named += 1
    assert named >= 2
