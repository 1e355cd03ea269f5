"""Performance levels and tiers as ordered enums (worse is greater), with their words.

The JSON and the screens use the words (`IO`, `beyond-CP`, `hold`); the engine compares the
enums. `Level.of(word)` and `Tier.of(word)` read a word back.
"""

from __future__ import annotations

from enum import IntEnum

from triage.standards import LEVELS
from triage.standards import Level as LevelWord

from .result import TIERS
from .result import Tier as TierWord


class Level(IntEnum):
    """A structural performance level: IO < LS < CP < beyond-CP."""

    IO = 0
    LS = 1
    CP = 2
    BEYOND_CP = 3

    @property
    def word(self) -> LevelWord:
        """The trade's name: 'IO', 'LS', 'CP' or 'beyond-CP'."""
        return LEVELS[self.value]

    @classmethod
    def of(cls, word: str) -> Level:
        """The level named `word`."""
        return cls(LEVELS.index(word))

    @property
    def tier(self) -> Tier:
        """The tier a structure at this level gets: IO occupy, LS hold, CP and beyond evacuate."""
        return (Tier.OCCUPY, Tier.HOLD, Tier.EVACUATE, Tier.EVACUATE)[self.value]


class Tier(IntEnum):
    """An occupancy tier: occupy < hold < evacuate."""

    OCCUPY = 0
    HOLD = 1
    EVACUATE = 2

    @property
    def word(self) -> TierWord:
        """'occupy', 'hold' or 'evacuate'."""
        return TIERS[self.value]

    @classmethod
    def of(cls, word: str) -> Tier:
        """The tier named `word`."""
        return cls(TIERS.index(word))


# What a hazard kind's effect (hazards.toml) does to the tier.
HAZARD_TIER = {"beyond-CP": Tier.EVACUATE, "evacuate": Tier.EVACUATE, "hold": Tier.HOLD}
