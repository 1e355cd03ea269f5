"""The engine's tier probabilities against a brute-force Monte Carlo written plainly here.

The brute force takes every reading, every baseline and every crack from its normal
distribution (N = 200,000 draws each) and carries each draw through the whole chain, from the
rules of docs/method.md with the tables' numbers typed in again (FEMA 356 Table C1-3 and JBDPA
2001 eta and bounds, both from memory; our damage-floor table and plumbness rules):
repeats at a spot averaged with inverse-variance weights, the baseline drawn once per spot and
shared by its repeats, tilts through the tangent (not linearised), crack classes, R and its
grade, the damage floors, the all-class-V rule, hazards, the tier. Masonry walls and infill
panels are classed by FEMA 306 too (1998, from memory: each mode's crack bounds and lambda Q
typed in again below): the same draw of a crack sets the group's JBDPA class and its FEMA 306
severity, and each direction's lambda Q ratio (members seen times weight), our grade bounds
and the grade's level join the storey's level.

Agreement: within 3 standard errors, |engine - brute| <= 3 sqrt(se_brute^2 + se_engine^2), with
se_brute = sqrt(p (1 - p) / N) (at most 0.00112 for N = 200,000) and se_engine the engine's own
`tier_probability_se` (0 where exact). The brute force is seeded, so the test is deterministic.
"""

from __future__ import annotations

import math

import numpy as np
import pytest

from tests.helpers import make, reading, storey, survey_dict, tilt
from triage.assess import assess

N = 200_000
TIERS = ("occupy", "hold", "evacuate")
# IO, LS, CP residual drift ratios per system (FEMA 356 C1-3; IO negligible -> our 0.2%).
FIG = {"rc_frame": (0.002, 0.010, 0.04), "rc_wall": (0.002, 0.005, 0.02),
       "steel_braced_frame": (0.002, 0.005, 0.02), "steel_moment_frame": (0.002, 0.010, 0.05),
       "urm_infill": (0.002, 0.003, 0.006)}
# eta per class 0 (sound) .. 5 (V), JBDPA 2001 (from memory).
ETA = {"ductile": [1, 0.95, 0.75, 0.5, 0.1, 0.0], "brittle": [1, 0.95, 0.6, 0.3, 0.0, 0.0],
       "wall": [1, 0.95, 0.6, 0.3, 0.0, 0.0]}
SIGN_CLASS = {"cover_spalling": 3, "bar_exposed": 4, "bar_buckled": 5, "brace_buckled": 4,
              "bar_fractured": 5}
CLASS = {"I": 1, "II": 2, "III": 3, "IV": 4, "V": 5}
RC = {"rc_frame", "rc_wall"}
# Our damage floors, level per class 0..5 (IO 0, LS 1, CP 2): docs/method.md.
FLOOR = {"vertical": [0, 0, 0, 0, 1, 2], "brittle_vertical": [0, 0, 0, 1, 2, 2],
         "lateral": [0, 0, 0, 0, 1, 2], "other": [0, 0, 0, 0, 1, 1]}
MATERIAL = {"rc_frame": "concrete", "rc_wall": "concrete", "steel_braced_frame": "steel",
            "steel_moment_frame": "steel", "urm_infill": "masonry"}
HAZARD_TIER = {"falling_hazard": 1, "blocked_egress": 1, "visible_lean": 2}
SD_DEFAULT = {"mm": 1.0, "deg": 0.05, "crack": 0.05}
# FEMA 306 (1998, from memory): the component type of a kind in a system, and per type and
# mode the crack bounds (mm) up to which it is insignificant, slight, moderate (wider: heavy)
# and lambda Q at insignificant, slight, moderate, heavy. A mode not recorded takes the worst
# of its type's modes, bound by bound and factor by factor (docs/method.md, section 4a).
FEMA306 = {("wall", "urm_infill"): "urm_pier", ("infill", "urm_infill"): "infill_panel"}
MODES = {("infill_panel", "diagonal_tension"): ((0.7, 1.5, 3.1), (1.0, 0.9, 0.7, 0.5)),
         ("infill_panel", None): ((0.7, 1.5, 3.1), (1.0, 0.9, 0.7, 0.5)),
         ("urm_pier", None): ((0.7, 1.5, 3.1), (1.0, 0.9, 0.7, 0.4))}


def floor_row(m: dict, system: str) -> str:
    kind = m["kind"]
    if (kind == "column" and m.get("ductility") == "brittle") or (
            kind == "wall" and MATERIAL[system] in ("concrete", "masonry")):
        return "brittle_vertical"
    if kind in ("column", "wall"):
        return "vertical"
    if (kind == "brace" and system == "steel_braced_frame") or (
            kind == "connection" and MATERIAL[system] == "steel") or (
            kind == "infill" and system == "urm_infill"):
        return "lateral"
    return "other"


def spot_draws(rs: list[dict], rng: np.random.Generator) -> np.ndarray:
    """Signed drift ratio draws of one spot: its repeats averaged, its baseline drawn once."""
    if "tilt_deg" in rs[0]:
        sds = [r.get("sd_deg", SD_DEFAULT["deg"]) for r in rs]
        w = np.array([1 / s ** 2 for s in sds])
        angle = sum(wi * (r["tilt_deg"] + s * rng.standard_normal(N))
                    for wi, r, s in zip(w, rs, sds, strict=True)) / w.sum()
        if "baseline_deg" in rs[0]:
            bsd = rs[0].get("baseline_sd_deg", SD_DEFAULT["deg"])
            angle = angle - (rs[0]["baseline_deg"] + bsd * rng.standard_normal(N))
        return np.tan(np.radians(angle))
    g = rs[0]["gauge_mm"]
    sds = [r.get("sd_mm", SD_DEFAULT["mm"]) for r in rs]
    w = np.array([1 / s ** 2 for s in sds])
    off = sum(wi * (r["offset_mm"] + s * rng.standard_normal(N))
              for wi, r, s in zip(w, rs, sds, strict=True)) / w.sum()
    if "baseline_mm" in rs[0]:
        bsd = rs[0].get("baseline_sd_mm", SD_DEFAULT["mm"])
        off = off - (rs[0]["baseline_mm"] + bsd * rng.standard_normal(N))
    return off / g


def brute_force(d: dict, seed: int = 12345) -> dict[str, float]:
    rng = np.random.default_rng(seed)
    level = np.zeros(N, dtype=int)
    systems = d["building"]["system"]
    for st in d["storeys"]:
        for dr in ("x", "y"):
            spots: dict[str, list[dict]] = {}
            for i, r in enumerate(st["readings"]):
                if r["dir"] == dr:  # test data: repeats share method, baseline and gauge
                    key = " ".join(r["where"].lower().split()) if r.get("where") else f"#{i}"
                    spots.setdefault(key, []).append(r)
            if not spots:
                continue
            drift = np.max([np.abs(spot_draws(rs, rng)) for rs in spots.values()], axis=0)
            io, ls, cp = FIG[systems[dr]]
            level = np.maximum(level, np.where(drift <= io, 0, np.where(
                drift <= ls, 1, np.where(drift <= cp, 2, 3))))
        classes, cracks = [], []
        for m in st["members"]:
            sign = max([SIGN_CLASS[s] for s in m.get("signs", [])], default=0)
            c = None
            if m.get("damage_class"):
                classes.append(np.full(N, CLASS[m["damage_class"]]))
            elif m.get("crack_mm"):
                c = m["crack_mm"] + m.get("crack_sd_mm", SD_DEFAULT["crack"]) * \
                    rng.standard_normal(N)
                cc = np.where(c < 0.2, 1, np.where(c <= 1.0, 2, np.where(c <= 2.0, 3, 4)))
                classes.append(np.maximum(cc, sign))
            else:
                classes.append(np.full(N, sign))
            cracks.append(c)
        for dr in ("x", "y"):   # FEMA 306: the same crack draw gives the severity
            num, den = np.zeros(N), 0.0
            for m, c in zip(st["members"], cracks, strict=True):
                comp = FEMA306.get((m["kind"], systems[dr]))
                if comp is None or m.get("dir", dr) != dr:
                    continue
                assert not m.get("signs") and not m.get("severity")  # not typed in here
                bounds, q = MODES[(comp, m.get("mode"))]
                w = m.get("inspected", m["count"]) * m.get("weight", 1.0)
                num += w if c is None else np.array(q)[np.searchsorted(bounds, c)] * w
                den += w
            if den:
                r = np.round(num / den, 9)   # grades: light from 0.8 (IO), moderate 0.6 (LS)
                level = np.maximum(level, np.where(r >= 0.8, 0, np.where(r >= 0.6, 1, 2)))
        for dr in ("x", "y"):
            if systems[dr] not in RC:
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
                level = np.maximum(level, np.where(r >= 0.95, 0, np.where(
                    r >= 0.80, 0, np.where(r >= 0.60, 1, 2))))
        for m, cls in zip(st["members"], classes, strict=True):
            dirs = [m["dir"]] if m.get("dir") else ["x", "y"]
            floor = np.max([np.array(FLOOR[floor_row(m, systems[dr])]) for dr in dirs], axis=0)
            level = np.maximum(level, floor[cls])
        vertical = [(m, cls) for m, cls in zip(st["members"], classes, strict=True)
                    if m["kind"] in ("column", "wall")]
        if vertical and sum(m["count"] for m, _ in vertical) >= 2:
            level = np.where(np.all([cls == 5 for _, cls in vertical], axis=0), 3, level)
    tier = np.array([0, 1, 2, 2])[level]
    hazard = max((HAZARD_TIER[h["kind"]] for h in d.get("hazards", [])), default=0)
    tier = np.maximum(tier, hazard)
    return {t: float(np.mean(tier == i)) for i, t in enumerate(TIERS)}


def frame_near_thresholds() -> dict:
    # Storey 1 x at 0.19% (IO 0.2%), y at 0.95% (LS 1.0%); columns cracked near 0.2 and 1.0 mm;
    # one near the class IV bound (damage floor) and a wall near 1.0 mm (brittle: floor LS).
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
    return survey_dict([
        storey("1", [reading("x", 9.6, sd_mm=1.0), reading("x", 9.0), reading("y", 4.1, sd_mm=0.5)],
               [{"kind": "column", "count": 10}, {"kind": "brace", "count": 8}]),
        storey("2", [reading("x", 3.0), reading("y", 3.9, sd_mm=0.3)],
               [{"kind": "column", "count": 10}, {"kind": "brace", "count": 1,
                                                  "signs": ["brace_buckled"]}]),
    ], sx="steel_braced_frame", sy="steel_braced_frame")


def tilts_with_baselines_and_repeats() -> dict:
    # Steel moment frame. Storey 1 x: three tilts at "column A1" (repeats, one baseline of
    # 0.02 deg with its own sd 0.03), y: a tilt with a default baseline sd; storey 2 offsets at
    # one spot twice with a baseline in mm (default sd), near IO.
    return survey_dict([
        storey("1", [tilt("x", 0.13, where="column A1", baseline_deg=0.02,
                          baseline_sd_deg=0.03),
                     tilt("x", 0.11, sd_deg=0.03, where="Column  a1", baseline_deg=0.02,
                          baseline_sd_deg=0.03),
                     tilt("x", 0.14, where="COLUMN A1", baseline_deg=0.02, baseline_sd_deg=0.03),
                     tilt("y", -0.1, where="core", baseline_deg=0.01)], members=[]),
        storey("2", [reading("x", 4.5, where="grid 3", baseline_mm=1.0),
                     reading("x", 5.0, sd_mm=0.5, where="grid 3", baseline_mm=1.0),
                     reading("y", 3.5, sd_mm=0.8, baseline_mm=-0.5, baseline_sd_mm=0.4)],
               members=[]),
    ], sx="steel_moment_frame", sy="steel_moment_frame")


def overrides_and_hazard() -> dict:
    # A concrete frame near IO, and near LS at storey 2 y (19.5 mm = 0.975%), with a falling
    # hazard (hold at least): the occupy mass moves to hold. A ductile column near the class IV
    # bound may floor at LS.
    return survey_dict([
        storey("1", [reading("x", 3.6, where="a"), reading("x", 3.4, where="a"),
                     reading("y", 3.0)],
               [{"kind": "column", "count": 18},
                {"kind": "column", "count": 1, "crack_mm": 1.95, "crack_sd_mm": 0.1}]),
        storey("2", [reading("x", 1.0), reading("y", 19.5, sd_mm=0.5)],
               [{"kind": "column", "count": 20}]),
    ], hazards=[{"kind": "falling_hazard", "height_above_ground_m": 7.0}])


def override_floor() -> dict:
    # The same without the hazard and storey 2 y back near IO (3.9 mm, sd 0.5); a brittle column
    # overridden to class II (certain, no floor) and a beam near class IV (floor LS, "other").
    d = overrides_and_hazard()
    d["hazards"] = []
    d["storeys"][1]["readings"][1] = reading("y", 3.9, sd_mm=0.5)
    d["storeys"][1]["members"].append(
        {"kind": "column", "count": 1, "ductility": "brittle", "damage_class": "II",
         "override_reason": "seen on site"})
    d["storeys"][0]["members"].append(
        {"kind": "beam", "count": 2, "crack_mm": 1.9, "crack_sd_mm": 0.2})
    return d


def many_columns_in_doubt(weight: float = 1.0) -> dict:
    # 14 column groups each cracked close to the II/III bound: 2^14 combinations. With weights on
    # a grid the engine sums them exactly (integer losses); with a weight off every grid, and
    # more combinations than the enumeration limit, it samples them (its sampled path).
    cols = [{"kind": "column", "count": 1, "crack_mm": 1.0 + 0.01 * (i % 3 - 1),
             "crack_sd_mm": 0.05, "ductility": "brittle", "weight": weight} for i in range(14)]
    return survey_dict([storey("1", [reading("x", 1.0), reading("y", 1.0)],
                               [{"kind": "column", "count": 6}, *cols])],
                       sx="rc_frame", sy="rc_frame")


def many_columns_off_grid() -> dict:
    return many_columns_in_doubt(weight=4 / 3)


def walls_in_doubt() -> dict:
    # Masonry infill frame. Storey 1 x: three infill panels cracked 1.75 mm (sd 0.3) in
    # diagonal tension: over 1.5 mm FEMA 306 moderate (lambda Q 0.7: ratio (3 * 0.7 + 1) / 4 =
    # 0.775, moderate grade, LS), over 2.0 mm JBDPA class IV (lateral floor, LS) — one crack
    # sets both, so P(LS) there is P(crack > 1.5) = 0.80, not 0.84 as two independent draws
    # would make it. Storey 1 y: two walls, no mode (the worst), 0.98 mm: class III over 1.0 mm
    # (brittle vertical floor, LS), slight either side of it. Storey 2: four panels in both
    # directions at 1.45 mm (sd 0.1) beside panels seen 1 of 3, weight 1.5: moderate gives
    # (4 * 0.7 + 1.5) / 5.5 = 0.78 (LS), slight 0.93 (IO).
    return survey_dict([
        storey("1", [reading("x", 0.5, sd_mm=0.3), reading("y", 0.5, sd_mm=0.3)],
               [{"kind": "column", "count": 10},
                {"kind": "infill", "count": 3, "dir": "x", "mode": "diagonal_tension",
                 "crack_mm": 1.75, "crack_sd_mm": 0.3},
                {"kind": "infill", "count": 1, "dir": "x"},
                {"kind": "wall", "count": 2, "dir": "y", "crack_mm": 0.98}]),
        storey("2", [reading("x", 0.5, sd_mm=0.3), reading("y", 0.5, sd_mm=0.3)],
               [{"kind": "column", "count": 10},
                {"kind": "infill", "count": 4, "mode": "diagonal_tension", "crack_mm": 1.45,
                 "crack_sd_mm": 0.1},
                {"kind": "infill", "count": 3, "inspected": 1, "weight": 1.5}]),
    ], sx="urm_infill", sy="urm_infill")


CASES = [frame_near_thresholds, braced_near_ls, tilts_with_baselines_and_repeats,
         overrides_and_hazard, override_floor, many_columns_in_doubt, many_columns_off_grid,
         walls_in_doubt]


@pytest.mark.parametrize("build", CASES)
def test_engine_agrees_with_brute_force(build):
    d = build()
    a = assess(make(d["storeys"], sx=d["building"]["system"]["x"],
                    sy=d["building"]["system"]["y"], hazards=d.get("hazards")))
    want = brute_force(d)
    for t in TIERS:
        got, se = a.tier_probability[t], a.tier_probability_se[t]
        se_b = math.sqrt(max(want[t] * (1 - want[t]), 1.0 / N) / N)
        assert abs(got - want[t]) <= 3 * math.hypot(se_b, se), (
            f"{t}: engine {a.tier_probability} (se {a.tier_probability_se}), brute {want}")
    # The surveys must really sit near thresholds: no tier is certain.
    assert max(want.values()) < 0.999, want


def test_paths_taken():
    exact = assess(make(many_columns_in_doubt()["storeys"]))
    assert not any("sampled" in n for n in exact.notes)
    assert exact.tier_probability_se == {"occupy": 0.0, "hold": 0.0, "evacuate": 0.0}
    sampled = assess(make(many_columns_off_grid()["storeys"]))
    assert any("sampled" in n for n in sampled.notes)
    assert sampled.tier_probability_se["hold"] > 0


def test_the_walls_case_tells_one_crack_from_two_independent_draws():
    # In walls_in_doubt the tier is occupy only when storey 1's panels stay at or under 1.5 mm
    # (then under 2.0 mm too), its walls at or under 1.0 mm and storey 2's panels at or under
    # 1.5 mm: the engine gives that product exactly (its standard error 0). Drawing the class
    # and the severity of storey 1's panels independently would give 0.018 less, nine times
    # the brute force's tolerance above (3 standard errors, 0.002).
    d = walls_in_doubt()
    a = assess(make(d["storeys"], sx="urm_infill", sy="urm_infill"))

    def phi(z: float) -> float:
        return 0.5 * (1 + math.erf(z / math.sqrt(2)))

    panels, walls, upper = phi((1.5 - 1.75) / 0.3), phi((1.0 - 0.98) / 0.05), phi(0.5)
    joint = panels * walls * upper
    assert a.tier_probability["occupy"] == pytest.approx(joint, abs=1e-6)
    assert a.tier_probability_se["occupy"] == 0.0
    independent = panels * phi((2.0 - 1.75) / 0.3) * walls * upper
    assert joint - independent > 0.015
