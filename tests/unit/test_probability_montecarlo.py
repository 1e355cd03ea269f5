"""The engine's tier probabilities against a brute-force Monte Carlo of 200,000 samples.

The brute force is written plainly here, from the rules of docs/method.md and the tables' numbers typed
in again (FEMA 356 Table C1-3 and JBDPA 2001 eta, both from memory): every reading and every
crack is drawn from its normal distribution, every sample is taken through the whole chain
(drift level, crack class, R, grade, damage floor, tier). The engine must agree within 0.01 on
surveys that sit near thresholds, on both its exact path and its sampled path.
"""

from __future__ import annotations

import numpy as np
import pytest

from tests.helpers import make, reading, storey
from triage.assess import assess
from triage.assess import uncertainty as unc

N = 200_000
# IO, LS, CP residual drift ratios per system (FEMA 356 C1-3; IO negligible -> 0.2%).
FIG = {"rc_frame": (0.002, 0.010, 0.04), "rc_wall": (0.002, 0.005, 0.02),
       "steel_braced_frame": (0.002, 0.005, 0.02)}
# eta per class 0 (sound) .. 5 (V), JBDPA 2001 (from memory).
ETA = {"ductile": [1, 0.95, 0.75, 0.5, 0.1, 0.0], "brittle": [1, 0.95, 0.6, 0.3, 0.0, 0.0],
       "wall": [1, 0.95, 0.6, 0.3, 0.0, 0.0]}
SIGN_CLASS = {"cover_spalling": 3, "bar_exposed": 4, "bar_buckled": 5, "brace_buckled": 4}
RC = {"rc_frame", "rc_wall"}


def brute_force(d: dict, seed: int = 12345) -> dict[str, float]:
    rng = np.random.default_rng(seed)
    level = np.zeros(N, dtype=int)
    sx, sy = d["building"]["system"]["x"], d["building"]["system"]["y"]
    for st in d["storeys"]:
        for dr, system in (("x", sx), ("y", sy)):
            rs = [r for r in st["readings"] if r["dir"] == dr]
            if not rs:
                continue
            drift = np.zeros(N)
            for r in rs:
                v = (r["offset_mm"] + r["sd_mm"] * rng.standard_normal(N)) / r["gauge_mm"]
                drift = np.maximum(drift, np.abs(v))
            io, ls, cp = FIG[system]
            lv = np.where(drift <= io, 0, np.where(drift <= ls, 1, np.where(drift <= cp, 2, 3)))
            level = np.maximum(level, lv)
        classes = []
        for m in st["members"]:
            sign = max([SIGN_CLASS[s] for s in m.get("signs", [])], default=0)
            if m.get("crack_mm"):
                c = m["crack_mm"] + m["crack_sd_mm"] * rng.standard_normal(N)
                cc = np.where(c < 0.2, 1, np.where(c <= 1.0, 2, np.where(c <= 2.0, 3, 4)))
                classes.append(np.maximum(cc, sign))
            else:
                classes.append(np.full(N, sign))
        for dr, system in (("x", sx), ("y", sy)):
            if system not in RC:
                continue
            num, den = np.zeros(N), 0.0
            for m, cls in zip(st["members"], classes, strict=True):
                if m["kind"] == "column":
                    eta = ETA[m.get("ductility", "ductile")]
                elif m["kind"] == "wall" and m.get("dir", dr) == dr:
                    eta = ETA["wall"]
                else:
                    continue
                w = m["count"] * m.get("weight", 1.0)
                num += np.array(eta)[cls] * w
                den += w
            if den:
                r = np.round(num / den, 9)
                lv = np.where(r >= 0.80, 0, np.where(r >= 0.60, 1, 2))
                level = np.maximum(level, lv)
        for m, cls in zip(st["members"], classes, strict=True):
            if m["kind"] in ("column", "wall", "brace"):
                level = np.maximum(level, np.where(cls == 5, 2, np.where(cls == 4, 1, 0)))
    tier = np.array([0, 1, 2, 2])[level]
    return {t: float(np.mean(tier == i)) for i, t in enumerate(("occupy", "hold", "evacuate"))}


def frame_near_thresholds() -> dict:
    # Storey 1 x at 0.19% (IO 0.2%), y at 0.95% (LS 1.0%); columns cracked near 0.2 and 1.0 mm;
    # one near the class IV bound (damage floor) and a wall near 1.0 mm.
    from tests.helpers import survey_dict
    return survey_dict([
        storey("1", [reading("x", 3.8, sd_mm=0.6), reading("x", -3.5, sd_mm=1.0),
                     reading("y", 1.2)],
               [{"kind": "column", "count": 16},
                {"kind": "column", "count": 3, "crack_mm": 0.95, "crack_sd_mm": 0.1},
                {"kind": "column", "count": 1, "crack_mm": 1.97, "crack_sd_mm": 0.08},
                {"kind": "wall", "count": 2, "dir": "x", "weight": 3.0, "crack_mm": 1.05,
                 "crack_sd_mm": 0.1}]),
        storey("2", [reading("x", 2.0), reading("y", 19.0, sd_mm=1.5, gauge_mm=2000.0)],
               [{"kind": "column", "count": 20},
                {"kind": "column", "count": 2, "ductility": "brittle", "crack_mm": 0.21,
                 "crack_sd_mm": 0.05}]),
    ], sx="rc_wall", sy="rc_frame")


def braced_near_ls() -> dict:
    from tests.helpers import survey_dict
    return survey_dict([
        storey("1", [reading("x", 9.6, sd_mm=1.0), reading("x", 9.0), reading("y", 4.1, sd_mm=0.5)],
               [{"kind": "column", "count": 10}, {"kind": "brace", "count": 8}]),
        storey("2", [reading("x", 3.0), reading("y", 3.9, sd_mm=0.3)],
               [{"kind": "column", "count": 10}, {"kind": "brace", "count": 1,
                                                  "signs": ["brace_buckled"]}]),
    ], sx="steel_braced_frame", sy="steel_braced_frame")


def many_columns_in_doubt(weight: float = 1.0) -> dict:
    # 14 column groups each cracked close to the II/III bound: 2^14 combinations. With weights on
    # a grid the engine sums them exactly (integer losses); with a weight off every grid, and
    # more combinations than the enumeration limit, it samples them (its sampled path).
    from tests.helpers import survey_dict
    cols = [{"kind": "column", "count": 1, "crack_mm": 1.0 + 0.01 * (i % 3 - 1),
             "crack_sd_mm": 0.05, "ductility": "brittle", "weight": weight} for i in range(14)]
    return survey_dict([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                               [{"kind": "column", "count": 6}, *cols])],
                       sx="rc_frame", sy="rc_frame")


def many_columns_off_grid() -> dict:
    return many_columns_in_doubt(weight=4 / 3)


@pytest.mark.parametrize("build", [frame_near_thresholds, braced_near_ls, many_columns_in_doubt,
                                   many_columns_off_grid])
def test_engine_agrees_with_brute_force(build):
    d = build()
    got = assess(make(d["storeys"], sx=d["building"]["system"]["x"],
                      sy=d["building"]["system"]["y"])).tier_probability
    want = brute_force(d)
    for t in ("occupy", "hold", "evacuate"):
        assert got[t] == pytest.approx(want[t], abs=0.01), f"{t}: engine {got}, brute {want}"
    # The surveys must really sit near thresholds: no tier is certain.
    assert max(want.values()) < 0.999


def test_paths_taken():
    exact = assess(make(many_columns_in_doubt()["storeys"]))
    assert not any("sampled" in n for n in exact.notes)
    sampled = assess(make(many_columns_off_grid()["storeys"]))
    assert any("sampled" in n for n in sampled.notes)
    assert unc.ENUMERATE_LIMIT < 2 ** 14
