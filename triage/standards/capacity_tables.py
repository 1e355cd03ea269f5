"""Residual capacity beyond reinforced concrete: the FEMA 352 and FEMA 306 tables as models.

Both tables are recalled, not read (status "memory"): see the comments at the top of
`fema352_connections.toml` and `fema306_walls.toml`. Nothing here computes; `triage.assess.steel`
and `triage.assess.walls` read these objects.
"""

from __future__ import annotations

import itertools
from typing import Any, Literal

from pydantic import Field, model_validator

from triage.standards.base import Frozen, Source

Severity = Literal["insignificant", "slight", "moderate", "heavy", "extreme"]
SEVERITIES: tuple[Severity, ...] = ("insignificant", "slight", "moderate", "heavy", "extreme")
# The severities the document gives factors for (insignificant: all 1; extreme: none).
FACTORED: tuple[Severity, ...] = ("slight", "moderate", "heavy")
Family = Literal["G", "C", "P", "S", "W"]
WallMode = Literal["flexure", "rocking", "diagonal_tension", "web_crushing", "sliding_shear",
                   "bed_joint_sliding", "toe_crushing", "corner_crushing", "unknown"]
WALL_MODES: tuple[str, ...] = WallMode.__args__  # type: ignore[attr-defined]
UNKNOWN = "unknown"


class ConnectionType(Frozen):
    """A FEMA 352 connection damage type: its family and damage index (0 to 10)."""

    family: Family
    index: float = Field(ge=0, le=10)
    recalled: tuple[float, float] | None = Field(
        default=None, description="the two values recalled; `index` takes the higher")
    description: str

    @model_validator(mode="after")
    def _higher_end(self) -> ConnectionType:
        if self.recalled is not None and self.index != max(self.recalled):
            raise ValueError("a type recalled as two values takes the higher")
        return self


class SampleRule(Frozen):
    """FEMA 352's upper estimate of a floor's index from a sample of its connections."""

    confidence: float = Field(gt=0.5, lt=1)
    form: str


class SteelTable(Frozen):
    """FEMA 352 chapter 4: connection damage types and their indices (from memory)."""

    source: Source
    range_rule: str
    scale_max: float = Field(gt=0)
    families: dict[Family, str]
    sample: SampleRule
    types: dict[str, ConnectionType]

    @model_validator(mode="after")
    def _codes(self) -> SteelTable:
        for code, t in self.types.items():
            if not code.startswith(t.family):
                raise ValueError(f"type {code}: its code starts with its family {t.family}")
            if t.index > self.scale_max:
                raise ValueError(f"type {code}: index {t.index} is over the scale")
        return self


class Lambdas(Frozen):
    """FEMA 306 modification factors of one mode at one severity."""

    k: float = Field(ge=0, le=1, description="lambda K, stiffness")
    q: float = Field(ge=0, le=1, description="lambda Q, strength")
    d: float = Field(ge=0, le=1, description="lambda D, displacement")


NO_CHANGE = Lambdas(k=1.0, q=1.0, d=1.0)


class ModeRow(Frozen):
    """One behaviour mode of one component type: crack bounds and factors per severity."""

    crack_mm: tuple[float, float, float] = Field(
        description="widest crack that is still insignificant, slight, moderate (mm)")
    slight: Lambdas
    moderate: Lambdas
    heavy: Lambdas

    @model_validator(mode="after")
    def _ordered(self) -> ModeRow:
        a, b, c = self.crack_mm
        if not 0 < a < b < c:
            raise ValueError("crack bounds rise from insignificant to moderate")
        rows = (NO_CHANGE, self.slight, self.moderate, self.heavy)
        for lo, hi in itertools.pairwise(rows):
            if hi.k > lo.k or hi.q > lo.q or hi.d > lo.d:
                raise ValueError("a factor never rises with severity")
        return self

    def factors(self, severity: str) -> Lambdas:
        """The factors at a severity that has them (insignificant: no change)."""
        if severity == "insignificant":
            return NO_CHANGE
        out: Lambdas = getattr(self, severity)
        return out


class Component(Frozen):
    """A FEMA 306 component type: the chapter, the systems and member kinds it covers."""

    chapter: str
    name: str
    systems: tuple[str, ...]
    kinds: tuple[str, ...]
    modes: dict[str, ModeRow]

    @model_validator(mode="after")
    def _known_modes(self) -> Component:
        for m in self.modes:
            if m not in WALL_MODES or m == UNKNOWN:
                raise ValueError(f"mode {m!r} is not one of {', '.join(WALL_MODES)}")
        return self

    def worst(self) -> ModeRow:
        """The "unknown" mode: the worst of every kept mode, bound by bound, factor by factor."""
        rows = list(self.modes.values())

        def least(sev: str) -> Lambdas:
            return Lambdas(k=min(getattr(r, sev).k for r in rows),
                           q=min(getattr(r, sev).q for r in rows),
                           d=min(getattr(r, sev).d for r in rows))

        bounds = tuple(min(r.crack_mm[i] for r in rows) for i in range(3))
        return ModeRow(crack_mm=bounds, slight=least("slight"),
                       moderate=least("moderate"), heavy=least("heavy"))

    def mode(self, key: str | None) -> tuple[str, ModeRow]:
        """The mode taken for a recorded mode: itself when kept, else "unknown" (the worst)."""
        if key is not None and key in self.modes:
            return key, self.modes[key]
        return UNKNOWN, self.worst()


class WallTable(Frozen):
    """FEMA 306 component damage classification (from memory)."""

    source: Source
    range_rule: str
    severities: tuple[Severity, ...]
    components: dict[str, Component]

    def component_of(self, kind: str, system: str) -> tuple[str, Component] | None:
        """The component type of a member kind in a system, or None when none covers it."""
        for key, c in self.components.items():
            if kind in c.kinds and system in c.systems:
                return key, c
        return None


def steel_table(raw: dict[str, Any], source: Source) -> SteelTable:
    """The FEMA 352 table from its TOML data."""
    return SteelTable(source=source, range_rule=raw["range_rule"], scale_max=raw["scale_max"],
                      families=raw["families"], sample=raw["sample"], types=raw["types"])


def wall_table(raw: dict[str, Any], source: Source) -> WallTable:
    """The FEMA 306 table from its TOML data."""
    return WallTable(source=source, range_rule=raw["range_rule"],
                     severities=raw["severities"], components=raw["components"])
