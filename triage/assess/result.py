"""The assessment: `triage-assessment/1` as pydantic models.

Screens, JSON and the PDF are all drawn from one `Assessment` object. Floats are rounded to
6 significant digits by the engine, so the same survey gives the same JSON to the byte.
"""

from __future__ import annotations

import json
import math
from typing import Any, Literal, TypeVar

from pydantic import BaseModel, ConfigDict, Field

from triage.standards import DamageClass, Grade, Level, Severity

FORMAT = "triage-assessment/1"

Tier = Literal["occupy", "hold", "evacuate"]
TIERS: tuple[Tier, ...] = ("occupy", "hold", "evacuate")
Basis = Literal["drift", "capacity", "damage", "hazard", "no-data"]
Dir = Literal["x", "y"]

# Our mark for each tier, always written beside the word (docs/glossary.md: presentation is ours).
TIER_MARK: dict[str, str] = {"occupy": "○", "hold": "◐", "evacuate": "●"}

CAUTION = ("Indicative only, not a safety certificate: the licensed engineer of record and the "
           "local building authority decide, under local codes.")
PROBABILITY_LABEL = "from measurement uncertainty only"
PROVISIONAL_LABEL = "measured parts only"
SPOTS_LABEL = "each spot taken as a separate place"


def probability_text(p: float, se: float = 0.0) -> str:
    """A tier probability as printed: never past its standard error, never past 3 decimals.

    A sampled value is rounded to the place of its error's first significant digit (se 0.0023:
    three decimals, se 0.04: two); an exact one (se 0) to three decimals. Under 0.001 prints
    "< 0.001" and over 0.999 "> 0.999", 0 and 1 included (a float of 0 may be a tail too small
    to hold).
    """
    if p < 0.001:
        return "< 0.001"
    if p > 0.999:
        return "> 0.999"
    places = 3 if se <= 0 else min(3, max(0, -math.floor(math.log10(se))))
    return f"{p:.{places}f}"


def tier_words(tier: str) -> str:
    """The tier with our mark, e.g. '◐ hold'."""
    return f"{TIER_MARK.get(tier, '?')} {tier}"


class _Out(BaseModel):
    model_config = ConfigDict(frozen=True, extra="forbid")


_M = TypeVar("_M", bound=_Out)
_set_attr = object.__setattr__


def trusted(cls: type[_M], values: dict[str, Any]) -> _M:
    """A result model of the engine's own values, built without validating them.

    `values` holds every field of `cls`, in its order, each already of its field's type (a
    float field a float, never an int): what validating them would give, so the JSON is the
    same to the byte (tests/unit/test_trusted_results.py checks it against validation). It does
    what pydantic's `model_construct` does for such a dict, at a tenth of its cost; the member
    stage makes one per member group, 3,000 for the benchmark's 60 storeys.
    """
    m = cls.__new__(cls)
    _set_attr(m, "__dict__", values)
    _set_attr(m, "__pydantic_fields_set__", set(values))
    _set_attr(m, "__pydantic_extra__", None)
    _set_attr(m, "__pydantic_private__", None)
    return m


class PerDir(_Out):
    """A value per principal direction; null where there is none."""

    x: float | None = None
    y: float | None = None

    def get(self, d: str) -> float | None:
        """The value of direction `d`."""
        return self.x if d == "x" else self.y


class LevelPerDir(_Out):
    """A performance level per direction; null where unmeasured."""

    x: Level | None = None
    y: Level | None = None

    def get(self, d: str) -> Level | None:
        """The level of direction `d`."""
        return self.x if d == "x" else self.y


class Figures(_Out):
    """The residual drift ratios that bound IO, LS and CP for one direction's system."""

    system: str
    system_name: str
    IO: float
    LS: float
    CP: float
    io_negligible: bool = Field(description="IO is FEMA 356's 'negligible', given our number")


class Governing(_Out):
    """What sets the tier."""

    storey: str | None
    dir: Dir | None
    basis: Basis


class MeasureNext(_Out):
    """Where one more reading (or crack width) helps most."""

    storey: str
    dir: Dir | None = Field(description="null for a crack width")
    why: str
    where: str | None = None
    what: Literal["reading", "spot", "crack"] = Field(
        default="spot", description="a direction with no reading, a spot, or a crack width")
    member: str | None = Field(default=None, description="the member group, for a crack")
    z: float | None = Field(default=None, description="distance to the threshold in sd")

    def text(self) -> str:
        """The suggestion in words, e.g. 'storey 2, x (grid B2): ...'."""
        if self.what == "crack":
            return f"storey {self.storey}, {self.member}: {self.why}"
        at = f" ({self.where})" if self.where else ""
        return f"storey {self.storey}, {self.dir}{at}: {self.why}"


class SpotRef(_Out):
    """A spot named by storey, direction and `where` (null: a reading without one)."""

    storey: str
    dir: Dir
    where: str | None
    reading: int = Field(description="index of the spot's first reading in its storey")


class PlumbnessSpot(_Out):
    """A spot that sets or raises the tier while its drift lies in its plumbness band."""

    storey: str
    dir: Dir
    where: str | None
    drift: float = Field(description="the spot's absolute drift ratio")
    band: float = Field(description="the as-built plumbness band of its material")


class SpotResult(_Out):
    """A spot of a storey: the signed drift ratio of its readings, averaged."""

    dir: Dir
    where: str | None
    value: float = Field(description="signed drift ratio, baseline subtracted")
    u: float = Field(description="standard uncertainty, the baseline's included")
    readings: tuple[int, ...]
    baseline: bool
    disagree: bool = Field(description="the repeats disagreed: the largest was taken")
    level: Level


class MemberResult(_Out):
    """A member group's damage class and reduction factor."""

    index: int
    ref: str | None
    kind: str
    count: int
    damage_class: DamageClass | None = Field(description="null: undamaged")
    floor: Level | None = Field(default=None, description="the least level its class holds "
                                "the structure to (damage floor, ours)")
    eta: float | None = Field(description="JBDPA eta; null where R does not apply")
    class_from: Literal["crack", "signs", "override", "type", "severity"] | None
    inspected: int | None = Field(default=None, description="members seen; null: all")
    connection_type: str | None = Field(
        default=None, description="FEMA 352 damage type taken (a broken connection without "
        "one: our default); null where FEMA 352 does not apply")
    connection_index: float | None = Field(
        default=None, description="FEMA 352 damage index of each connection, 0 to 10")
    mode: str | None = Field(default=None, description="FEMA 306 behaviour mode taken")
    severity: Severity | None = Field(
        default=None, description="FEMA 306 severity; null: undamaged or FEMA 306 not applied")
    lambda_q: float | None = Field(default=None, description="FEMA 306 lambda Q taken")


class CapacityResult(_Out):
    """One method's residual capacity of one storey direction (docs/method.md, 4 and 4a)."""

    storey: str
    dir: Dir
    method: Literal["jbdpa", "fema352", "fema306"]
    ratio: float | None = Field(description="R, our FEMA 352 ratio 1 - D/10, or our FEMA 306 "
                                "strength ratio; null: not established")
    level: Level | None
    grade: Grade | None = Field(description="JBDPA grade, or ours of the FEMA 306 ratio")
    index: float | None = Field(description="FEMA 352 floor damage index D, 0 to 10")
    inspected: int = Field(description="members seen that the method counts")
    count: int = Field(description="members the method covers in that direction")
    sampled: bool = Field(description="only some were inspected")
    taken: bool = Field(description="the worse of the methods of that storey direction: the "
                        "one residual_capacity_by_dir shows")
    source: str


class StoreyResult(_Out):
    """One storey's drift, levels, residual capacity and members."""

    label: str
    height_m: float
    below_grade: bool
    access: str
    drift_ratio: PerDir = Field(description="largest absolute reading per direction")
    drift_mean: PerDir = Field(description="mean of absolute readings per direction")
    drift_sd: PerDir = Field(description="standard uncertainty of the largest spot")
    readings: dict[str, int] = Field(description="number of readings per direction")
    spots: tuple[SpotResult, ...] = ()
    performance_level: LevelPerDir = Field(description="level by drift, per direction")
    residual_capacity: float | None
    residual_capacity_by_dir: PerDir
    damage_grade: Grade | None
    damage_floor: Level | None = Field(description="least level set by member damage")
    level: Level | None = Field(description="the storey's worst level over directions and bases")
    members: tuple[MemberResult, ...]


class HazardResult(_Out):
    """A hazard and what it does."""

    index: int
    kind: str
    where: str | None
    storey: str | None
    effect: str
    tier: Tier
    keep_out_m: float | None = Field(description="width of the zone kept clear, m")


class RepairResult(_Out):
    """A named repairability alternative applied to the largest storey drift."""

    key: str
    name: str
    source: str
    probability: float | None


class Engine(_Out):
    """Which engine and which assumption values made this assessment."""

    version: str
    seed: int
    assumptions: dict[str, Any]


class Assessment(_Out):
    """The assessment of one survey: tier, level, reasons, uncertainty, per storey detail."""

    format: Literal["triage-assessment/1"] = "triage-assessment/1"
    survey: str
    building: str
    tier: Tier
    performance_level: Level | None
    governing: Governing
    provisional: bool
    borderline: bool | None
    tier_probability: dict[Tier, float]
    measure_next: MeasureNext | None
    reasons: tuple[str, ...]
    storeys: tuple[StoreyResult, ...]
    hazards: tuple[HazardResult, ...]
    repairability: tuple[RepairResult, ...]
    defaulted: tuple[str, ...]
    notes: tuple[str, ...]
    drift_figures: dict[Dir, Figures]
    engine: Engine
    sources: tuple[str, ...]
    plumbness: tuple[PlumbnessSpot, ...] = ()
    governing_spot: SpotRef | None = None
    settled_by: str | None = None
    tier_probability_se: dict[Tier, float] = Field(
        default_factory=lambda: dict.fromkeys(TIERS, 0.0),
        description="standard error of each sampled probability; 0 where exact")
    residual_capacity_method: str | None = Field(
        default=None, description="the published methods behind the residual capacities, "
        "'; ' between them; null where none applies")
    residual_capacity: tuple[CapacityResult, ...] = Field(
        default=(), description="per storey, direction and method, the residual capacity")

    def to_json(self) -> str:
        """The `triage-assessment/1` JSON text (sorted keys off: the schema's own order)."""
        return json.dumps(self.model_dump(mode="json"), ensure_ascii=False, indent=2) + "\n"

    def storey(self, label: str) -> StoreyResult:
        """The result of the storey with this label."""
        for s in self.storeys:
            if s.label == label:
                return s
        raise KeyError(label)


def parse_assessment(data: dict[str, Any]) -> Assessment:
    """Read back `triage-assessment/1` JSON data (for reports and stored results)."""
    return Assessment.model_validate(data)
