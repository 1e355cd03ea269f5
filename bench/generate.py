"""Seeded generators of the big inputs the benchmarks need (nothing large is committed)."""

from __future__ import annotations

import random
from typing import Any

from triage.model import Survey, parse_survey


def big_survey_dict(storeys: int = 60, groups: int = 50, readings: int = 4,
                    seed: int = 60) -> dict[str, Any]:
    """A tall concrete building as an inspector would log it after strong shaking.

    Per storey: the sound columns as one group, the rest logged individually or in small groups
    with residual cracks (mostly hairline, some clear, a few wide) and the odd sign; readings in
    both directions around 0.1-0.6% drift with their uncertainties. Many cracks sit near a class
    bound, so the probabilities have real work to do.
    """
    rnd = random.Random(seed)
    out = []
    for i in range(storeys):
        members: list[dict[str, Any]] = [{"kind": "column", "count": 40}]
        for g in range(groups - 1):
            kind = "wall" if g % 7 == 0 else "column"
            crack = rnd.choice([0.1, 0.15, 0.25, 0.4, 0.6, 0.9, 1.1, 1.4, 2.2]) + rnd.uniform(
                -0.05, 0.05)
            m: dict[str, Any] = {"kind": kind, "count": rnd.randint(1, 2),
                                 "crack_mm": round(crack, 2),
                                 "crack_sd_mm": rnd.choice([0.05, 0.1])}
            if kind == "wall":
                m["dir"] = rnd.choice(["x", "y"])
                m["weight"] = 3.0
            if kind == "column" and rnd.random() < 0.2:
                m["ductility"] = "brittle"
            if rnd.random() < 0.05:
                m["signs"] = ["cover_spalling"]
            members.append(m)
        rs = []
        for d in ("x", "y"):
            for k in range(readings):
                rs.append({"dir": d, "offset_mm": round(rnd.uniform(0.5, 8.6), 1),
                           "gauge_mm": 2000, "sd_mm": rnd.choice([0.5, 1.0, 1.5]),
                           "where": f"grid {'ABCD'[k]}{i % 9 + 1}"})
        out.append({"label": str(i + 1), "height_m": 3.4, "readings": rs, "members": members})
    return {
        "format": "triage-survey/1",
        "building": {"name": "Benchmark Tower", "address": "60 Harbour Parade, Kōwhai Bay",
                     "system": {"x": "rc_wall", "y": "rc_frame"}},
        "inspection": {"inspector": {"name": "Bench Mark"}, "at": "2026-11-28T10:00:00+13:00"},
        "storeys": out,
    }


def big_survey(**kw: Any) -> Survey:
    """The validated big survey."""
    return parse_survey(big_survey_dict(**kw))
