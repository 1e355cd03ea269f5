"""The computing core: survey in, assessment out. Pure: no I/O, no clock, no UI.

from triage.assess import assess
result = assess(survey)          # an Assessment
text = result.to_json()          # triage-assessment/1
"""

from .engine import assess, seed_of
from .result import (
    CAUTION,
    PROBABILITY_LABEL,
    TIER_MARK,
    TIERS,
    Assessment,
    parse_assessment,
    tier_words,
)

__all__ = ["CAUTION", "PROBABILITY_LABEL", "TIERS", "TIER_MARK", "Assessment", "assess",
           "parse_assessment", "seed_of", "tier_words"]
