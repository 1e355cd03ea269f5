"""The tier probability of a single reading against scipy.stats.norm.

Source: the normal distribution (standard statistics); the reading's stated standard
uncertainty is its sigma (docs/references.md, default uncertainties: common practice for the
defaults). For one reading d ~ N(mu, s) in a concrete frame,
P(occupy) = P(|d| <= IO) = Phi((IO-mu)/s) - Phi((-IO-mu)/s), and
P(evacuate) = 1 - P(|d| <= LS). Tolerance 1e-6.
"""

from __future__ import annotations

import pytest
from scipy.stats import norm

from tests.helpers import make, reading, storey
from triage.assess import assess


@pytest.mark.parametrize(("offset", "sd"), [(3.5, 1.0), (4.0, 0.5), (19.0, 2.0), (-4.2, 1.5),
                                            (0.0, 3.0)])
def test_one_reading(offset, sd):
    gauge = 2000.0
    # A steel moment frame storey with no members logged: only the reading decides the level.
    s = make([storey("1", [reading("x", offset, gauge_mm=gauge, sd_mm=sd)], members=[])],
             sx="steel_moment_frame", sy="steel_moment_frame")
    a = assess(s)
    mu, sig = offset / gauge, sd / gauge
    io, ls = 0.002, 0.010  # steel moment frames: negligible (our 0.2%), LS 1%
    p_io = norm.cdf((io - mu) / sig) - norm.cdf((-io - mu) / sig)
    p_ls = norm.cdf((ls - mu) / sig) - norm.cdf((-ls - mu) / sig)
    tp = a.tier_probability
    assert tp["occupy"] == pytest.approx(p_io, abs=1e-6)
    assert tp["hold"] == pytest.approx(p_ls - p_io, abs=1e-6)
    assert tp["evacuate"] == pytest.approx(1 - p_ls, abs=1e-6)
    assert sum(tp.values()) == pytest.approx(1.0, abs=1e-6)
