"""Engine speed: the 60-storey survey (DEVELOPERS.md, Benchmarks), and a plain brute-force Monte Carlo of it."""

from __future__ import annotations

import statistics
import time

import numpy as np

from bench.generate import big_survey
from triage.assess import assess
from triage.assess import damage as dmg
from triage.standards import load


def _median_ms(fn, repeats: int = 7) -> float:
    fn()  # warm-up
    times = []
    for _ in range(repeats):
        t0 = time.perf_counter()
        fn()
        times.append((time.perf_counter() - t0) * 1000)
    return statistics.median(times)


def brute_force(survey, samples: int = 10_000, seed: int = 1) -> dict[str, float]:
    """Sample every reading and every crack `samples` times and take each through the chain."""
    std = load()
    a = std.assumptions
    rng = np.random.default_rng(seed)
    level = np.zeros(samples, dtype=int)
    figs = {}
    from triage.assess.drift import figures
    from triage.assess.floors import group_floor
    from triage.assess.spots import storey_spots
    for d in ("x", "y"):
        figs[d] = figures(getattr(survey.building.system, d), std, a)
    rc = dmg.rc_dirs(survey, std)
    for si, st in enumerate(survey.storeys):
        for d in ("x", "y"):
            drift = np.zeros(samples)
            f = figs[d]
            for v in storey_spots(st.readings, si, st.label, a)[0]:
                if v.dir != d:
                    continue
                drift = np.maximum(drift, np.abs(v.value + v.u * rng.standard_normal(samples)))
            level = np.maximum(level, np.searchsorted([f.IO, f.LS, f.CP], drift, side="left"))
        classes = []
        for m in st.members:
            s = dmg.sign_class(m, std)
            if m.crack_mm:
                sd = m.crack_sd_mm or a.sd_crack_mm
                c = m.crack_mm + sd * rng.standard_normal(samples)
                cc = np.where(c < 0.2, 1, np.where(c <= 1.0, 2, np.where(c <= 2.0, 3, 4)))
                classes.append(np.maximum(cc, s))
            else:
                classes.append(np.full(samples, s))
        for d in rc:
            num, den = np.zeros(samples), 0.0
            for m, cls in zip(st.members, classes, strict=True):
                t = dmg.eta_table(m, std)
                if t is None or not dmg.counts_in(m, d):
                    continue
                num += t[cls] * m.count * m.weight
                den += m.count * m.weight
            if den:
                r = num / den
                level = np.maximum(level, np.where(r >= 0.8, 0, np.where(r >= 0.6, 1, 2)))
        vertical = [cls for m, cls in zip(st.members, classes, strict=True)
                    if m.kind in ("column", "wall")]
        for m, cls in zip(st.members, classes, strict=True):
            level = np.maximum(level, group_floor(m, survey.building.system, std, a).by_class[cls])
        if sum(m.count for m in st.members if m.kind in ("column", "wall")) >= 2 and vertical:
            level = np.where(np.all([c == 5 for c in vertical], axis=0), 3, level)
    tier = np.array([0, 1, 2, 2])[level]
    return {t: float(np.mean(tier == i)) for i, t in enumerate(("occupy", "hold", "evacuate"))}


def figures_of_assess() -> dict[str, float]:
    """assess_big_ms and assess_speedup."""
    survey = big_survey()
    engine_ms = _median_ms(lambda: assess(survey))
    brute_ms = _median_ms(lambda: brute_force(survey), repeats=3)
    return {"assess_big_ms": engine_ms, "assess_speedup": brute_ms / engine_ms,
            "assess_brute_ms": brute_ms}


if __name__ == "__main__":
    s = big_survey()
    a = assess(s)
    print("tier", a.tier, a.tier_probability, "brute", brute_force(s, samples=50_000))
    print(figures_of_assess())
