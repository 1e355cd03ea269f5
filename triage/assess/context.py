"""What every stage of the assessment reads, and the names the stages share.

`Context` holds the survey, the tables, the assumptions and the drift figures.
"""

from __future__ import annotations

from dataclasses import dataclass, field

from triage.model import MemberGroup, Survey
from triage.standards import Assumptions, Standards

from .floors import GroupFloor, group_floor
from .result import Figures
from .spots import Spot

DIRS: tuple[str, str] = ("x", "y")
DRIFT_SOURCE = "FEMA 356 Table C1-3, from memory"
JBDPA_SOURCE = "JBDPA 2001, from memory"
# Between bases of one storey at one level, for the order of the reasons.
BASIS_ORDER = {"drift": 0, "capacity": 1, "damage": 2}
URM_SYSTEMS = ("urm_infill", "urm_wall")

# Spots in their plumbness band that set or raise the tier, with the band (see advice).
Plumbness = tuple[tuple[Spot, float], ...]

# A component of the structure's level: ("drift", storey, dir) or ("members", storey, "").
Component = tuple[str, int, str]


def seed_of(survey: Survey) -> int:
    """The seed of the assessment's sampling, from the survey id."""
    return int(survey.survey_id.hex[:8], 16)


@dataclass(frozen=True)
class Context:
    """What every stage reads: the survey, the tables, the assumptions, the drift figures."""

    survey: Survey
    std: Standards
    a: Assumptions
    figs: dict[str, Figures]
    rc: tuple[str, ...]  # directions whose system the JBDPA method covers
    seed: int
    floor_cache: dict[tuple[str, str, str | None], GroupFloor] = field(default_factory=dict)

    def group_floor(self, m: MemberGroup) -> GroupFloor:
        """A group's floors (kind, ductility and direction decide them: computed once each)."""
        key = (m.kind, m.ductility, m.dir)
        found = self.floor_cache.get(key)
        if found is None:
            found = self.floor_cache[key] = group_floor(m, self.survey.building.system,
                                                        self.std, self.a)
        return found

    def label(self, si: int) -> str:
        """The label of storey index `si`."""
        return self.survey.storeys[si].label

    def material(self, d: str) -> str:
        """The material of direction `d`'s system."""
        return self.std.systems[getattr(self.survey.building.system, d)].material
