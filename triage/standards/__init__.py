"""Published tables and our named assumptions, as data.

Each table is a TOML file beside this module; the file and the model loaded from it carry the
document, edition, table number and how sure we are of the figures (checked, secondary, memory).
Nothing here computes: `triage.assess` reads these objects.
"""

from __future__ import annotations

import tomllib
from collections.abc import Sequence
from functools import cache
from pathlib import Path
from typing import Any, Literal

from pydantic import Field, model_validator

from triage.standards.base import Frozen as _Frozen
from triage.standards.base import Source, Status
from triage.standards.capacity_tables import (
    SEVERITIES,
    WALL_MODES,
    Severity,
    SteelTable,
    WallMode,
    WallTable,
    steel_table,
    wall_table,
)

HERE = Path(__file__).resolve().parent

Level = Literal["IO", "LS", "CP", "beyond-CP"]
DamageClass = Literal["I", "II", "III", "IV", "V"]
Grade = Literal["slight", "light", "moderate", "severe", "collapse"]

LEVELS: tuple[Level, ...] = ("IO", "LS", "CP", "beyond-CP")
CLASSES: tuple[DamageClass, ...] = ("I", "II", "III", "IV", "V")
GRADES: tuple[Grade, ...] = ("slight", "light", "moderate", "severe", "collapse")
DIRS: tuple[Literal["x", "y"], ...] = ("x", "y")


class DriftRow(_Frozen):
    """One structural system's row of FEMA 356 Table C1-3 (drift ratios in percent)."""

    name: str
    io_transient_pct: float
    io_permanent_pct: float | Literal["negligible"]
    ls_transient_pct: float
    ls_permanent_pct: float
    cp_pct: float


class DriftTable(_Frozen):
    """FEMA 356 Table C1-3: structural performance levels by residual drift."""

    source: Source
    title: str
    systems: dict[str, DriftRow]


class DamageClassRow(_Frozen):
    """One JBDPA damage class: its signs, crack bound and reduction factors eta."""

    signs: str
    crack_above_mm: float | None = None
    eta_ductile_column: float
    eta_brittle_column: float
    eta_wall: float


class CapacityTable(_Frozen):
    """JBDPA damage classes, eta factors and damage grades by R."""

    source: Source
    classes: dict[DamageClass, DamageClassRow]
    grades: dict[str, float] = Field(description="lower bound of R in percent, per grade")


class DamageStateRow(_Frozen):
    """A FEMA P-58 residual drift damage state."""

    residual_pct: float | None = None
    meaning: str


class DamageStateTable(_Frozen):
    """FEMA P-58-1 Appendix C Table C-1."""

    source: Source
    damage_states: dict[str, DamageStateRow]


class Repairability(_Frozen):
    """A named repairability alternative: a lognormal fragility or a plain threshold."""

    key: str
    name: str
    kind: Literal["lognormal", "threshold"]
    median_pct: float | None = None
    beta: float | None = None
    threshold_pct: float | None = None
    source: Source
    label: str = Field(description="the short source line shown beside the probability")


class Tolerance(_Frozen):
    """An as-built plumbness tolerance."""

    source: Source
    rule: str
    drift_pct: float


class FloorMatch(_Frozen):
    """One way a member group falls in a row of the damage-floor table."""

    kinds: tuple[str, ...] = ()
    ductility: Literal["ductile", "brittle"] | None = None
    materials: tuple[str, ...] = ()
    systems: tuple[str, ...] = ()

    def matches(self, kind: str, ductility: str, system: str, material: str) -> bool:
        """Whether a group of this kind and ductility, acting in this system, matches."""
        return ((not self.kinds or kind in self.kinds)
                and (self.ductility is None or ductility == self.ductility)
                and (not self.materials or material in self.materials)
                and (not self.systems or system in self.systems))


class FloorRow(_Frozen):
    """A row of the damage-floor table (rule of ours): which groups take its floors."""

    key: str
    label: str
    match: tuple[FloorMatch, ...]


class System(_Frozen):
    """A system key of the survey format (docs/formats.md), with our one-line description."""

    key: str
    material: str
    description: str
    residual_capacity: bool


class Sign(_Frozen):
    """A damage sign: the member kinds and systems it applies to and the class it implies."""

    key: str
    damage_class: DamageClass
    basis: str
    kinds: tuple[str, ...]
    systems: tuple[str, ...]
    description: str


class HazardKind(_Frozen):
    """A hazard kind and what it does to the result."""

    key: str
    effect: Literal["beyond-CP", "evacuate", "hold"]
    group: str
    description: str


class Assumption(_Frozen):
    """A named assumption of ours, with its default value and why."""

    key: str
    value: Any
    status: Literal["ours", "common practice"]
    why: str


class Assumptions(_Frozen):
    """The values of the named assumptions an assessment runs with (overridable)."""

    negligible_permanent_drift: float = Field(gt=0, lt=0.05)
    plumbness_bands: dict[str, float]
    borderline_below: float = Field(gt=0, le=1)
    measure_next_max_z: float = Field(gt=0)
    method_change_sd: float = Field(ge=0, lt=0.05)
    large_drift_warning: float = Field(gt=0, lt=0.25)
    max_drift_ratio: float = Field(gt=0, le=1)
    keep_out_factor: float = Field(gt=0, le=5)
    sd_offset_mm: float = Field(gt=0)
    sd_tilt_deg: float = Field(gt=0)
    sd_crack_mm: float = Field(gt=0)
    grade_to_level: dict[Grade, Level]
    damage_floors: dict[str, dict[DamageClass, Level]]
    collapse_min_vertical_members: int = Field(ge=1)
    vertical_kinds: tuple[str, ...]
    fema352_fractured_type: str
    fema352_index_levels: dict[Literal["IO", "LS", "CP"], float]
    fema352_class_of_index: dict[Literal["II", "III", "IV", "V"], float]
    fema352_min_sample: int = Field(ge=2)
    fema306_severity_class: dict[Severity, DamageClass]
    fema306_extreme_lambda: dict[Literal["k", "q", "d"], float]
    fema306_grade_bounds: dict[Literal["slight", "light", "moderate"], float]

    @model_validator(mode="after")
    def _capacity_links(self) -> Assumptions:
        steps = [self.fema352_index_levels[k] for k in ("IO", "LS", "CP")]
        if not 0 <= steps[0] < steps[1] < steps[2]:
            raise ValueError("fema352_index_levels: IO < LS < CP, each at least 0")
        cls = [self.fema352_class_of_index[k] for k in ("II", "III", "IV", "V")]
        if not 0 < cls[0] < cls[1] < cls[2] <= cls[3]:
            raise ValueError("fema352_class_of_index: II < III < IV <= V, each over 0")
        order = [CLASSES.index(self.fema306_severity_class[s]) for s in SEVERITIES]
        if order != sorted(order):
            raise ValueError("fema306_severity_class: a worse severity never has a lesser class")
        if any(not 0 <= v <= 1 for v in self.fema306_extreme_lambda.values()):
            raise ValueError("fema306_extreme_lambda: each factor from 0 to 1")
        g = self.fema306_grade_bounds
        if not 1 >= g["slight"] > g["light"] > g["moderate"] > 0:
            raise ValueError("fema306_grade_bounds: 1 >= slight > light > moderate > 0")
        return self

    def with_overrides(self, **changes: Any) -> Assumptions:
        """A copy with some values replaced, validated like the defaults."""
        return Assumptions.model_validate({**self.model_dump(), **changes})


class Standards(_Frozen):
    """Every table the assessment uses, loaded once."""

    drift: DriftTable
    capacity: CapacityTable
    damage_states: DamageStateTable
    repairability: tuple[Repairability, ...]
    plumbness: tuple[Tolerance, ...]
    plumbness_sources: dict[str, str] = Field(description="how each material's band is cited")
    floor_rows: tuple[FloorRow, ...]
    systems: dict[str, System]
    signs: dict[str, Sign]
    sign_rule: str
    hazards: dict[str, HazardKind]
    assumption_notes: dict[str, Assumption]
    assumptions: Assumptions
    steel: SteelTable
    walls: WallTable

    @model_validator(mode="after")
    def _fractured_type(self) -> Standards:
        t = self.assumptions.fema352_fractured_type
        if t not in self.steel.types:
            raise ValueError(f"fema352_fractured_type: {t!r} is not a type of the FEMA 352 table")
        return self

    def sources(self) -> list[str]:
        """Every published table the method rests on, cited."""
        out = [self.drift.source.cite(), self.capacity.source.cite(),
               self.damage_states.source.cite()]
        out += [r.source.cite() for r in self.repairability]
        out += [t.source.cite() for t in self.plumbness]
        out += [self.steel.source.cite(), self.walls.source.cite()]
        return out


def _read(name: str) -> dict[str, Any]:
    with open(HERE / name, "rb") as f:
        return tomllib.load(f)


def _source(d: dict[str, Any]) -> Source:
    return Source(**{k: d[k] for k in ("document", "edition", "table", "status")},
                  status_note=d.get("status_note", ""))


@cache
def load() -> Standards:
    """Read every table file once; a malformed file raises a pydantic ValidationError."""
    drift = _read("fema356_c1_3.toml")
    cap = _read("jbdpa_rc.toml")
    ds = _read("fema_p58_residual.toml")
    rep = _read("repairability.toml")
    plumb = _read("plumbness.toml")
    floors = _read("damage_floors.toml")
    systems = _read("systems.toml")["systems"]
    signs = _read("signs.toml")
    hazards = _read("hazards.toml")["hazards"]
    assumptions = _read("assumptions.toml")
    steel = _read("fema352_connections.toml")
    walls = _read("fema306_walls.toml")
    return Standards(
        drift=DriftTable(source=_source(drift), title=drift["title"], systems=drift["systems"]),
        capacity=CapacityTable(source=_source(cap), classes=cap["classes"], grades=cap["grades"]),
        damage_states=DamageStateTable(source=_source(ds), damage_states=ds["damage_states"]),
        repairability=tuple(
            Repairability(
                key=a["key"], name=a["name"], kind=a["kind"], median_pct=a.get("median_pct"),
                beta=a.get("beta"), threshold_pct=a.get("threshold_pct"), source=_source(a),
                label=a["source"])
            for a in rep["alternatives"]),
        plumbness=tuple(Tolerance(source=_source(t), rule=t["rule"], drift_pct=t["drift_pct"])
                        for t in plumb["tolerances"]),
        plumbness_sources=plumb["bands"],
        floor_rows=tuple(FloorRow(**r) for r in floors["rows"]),
        systems={k: System(key=k, **v) for k, v in systems.items()},
        signs={k: Sign(key=k, damage_class=v["class"], basis=v["basis"], kinds=tuple(v["kinds"]),
                       systems=tuple(v["systems"]), description=v["description"])
               for k, v in signs["signs"].items()},
        sign_rule=signs["rule_of_ours"],
        hazards={k: HazardKind(key=k, **v) for k, v in hazards.items()},
        assumption_notes={k: Assumption(key=k, **v) for k, v in assumptions.items()},
        assumptions=Assumptions(**{k: v["value"] for k, v in assumptions.items()}),
        steel=steel_table(steel, _source(steel)),
        walls=wall_table(walls, _source(walls)),
    )


def with_tables(std: Standards, *, steel: Path | None = None,
                walls: Path | None = None) -> Standards:
    """The tables with the FEMA 352 or FEMA 306 table read from another file of the same shape.

    Both are recalled, not read (status memory): when the printed tables are at hand, a file
    holding them replaces ours here, and the assessment runs on it (`assess(survey, std=...)`).
    A malformed file raises a pydantic ValidationError naming the field.
    """
    update: dict[str, Any] = {}
    for key, path, build in (("steel", steel, steel_table), ("walls", walls, wall_table)):
        if path is not None:
            with open(path, "rb") as f:
                raw = tomllib.load(f)
            update[key] = build(raw, _source(raw))
    return Standards.model_validate({**dict(std), **update})


def system_keys() -> tuple[str, ...]:
    """The structural system keys, in table order."""
    return tuple(load().systems)


def sign_keys() -> tuple[str, ...]:
    """The damage sign keys of the one sign table."""
    return tuple(load().signs)


def hazard_keys() -> tuple[str, ...]:
    """The hazard kinds."""
    return tuple(load().hazards)


def connection_type_keys() -> tuple[str, ...]:
    """The FEMA 352 connection damage type codes (from memory), in table order."""
    return tuple(load().steel.types)


def wall_modes_of(kind: str) -> tuple[str, ...]:
    """The FEMA 306 behaviour modes a wall or infill group may record ("unknown" last)."""
    found = [m for c in load().walls.components.values() if kind in c.kinds for m in c.modes]
    return (*(m for m in WALL_MODES if m in found), "unknown")


STEEL_MOMENT_FRAME = "steel_moment_frame"  # the one system FEMA 352's damage types are read in


def takes_connection_type(kind: str, systems: Sequence[str]) -> bool:
    """Whether a group of this kind records a FEMA 352 type in a building of these systems.

    A connection of a steel moment frame; elsewhere a type is kept but only sets the class, so
    screens and paper forms do not ask for it.
    """
    return kind == "connection" and STEEL_MOMENT_FRAME in systems


def takes_wall_mode(kind: str, systems: Sequence[str]) -> bool:
    """Whether a group of this kind records a FEMA 306 mode and severity in these systems.

    A wall or infill panel of a component type FEMA 306 covers in one of them.
    """
    walls = load().walls
    return any(walls.component_of(kind, s) is not None for s in systems)


def takes_inspected(kind: str, systems: Sequence[str]) -> bool:
    """Whether screens and paper forms ask how many of a group's members were inspected.

    With a FEMA 352 type or a FEMA 306 mode: the methods whose ratios count members seen.
    """
    return takes_connection_type(kind, systems) or takes_wall_mode(kind, systems)


def wall_modes_kept(kind: str, systems: Sequence[str]) -> tuple[str, ...]:
    """The FEMA 306 modes the tool keeps for this kind in these systems, "unknown" last."""
    walls = load().walls
    kept: set[str] = set()
    for s in systems:
        found = walls.component_of(kind, s)
        if found is not None:
            kept |= set(found[1].modes)
    return (*(m for m in WALL_MODES if m in kept), "unknown")


__all__ = ["CLASSES", "DIRS", "GRADES", "HERE", "LEVELS", "SEVERITIES", "WALL_MODES",
           "Assumption", "Assumptions", "CapacityTable", "DamageClass", "DriftTable", "Grade",
           "Level", "Severity", "Source", "Standards", "Status", "SteelTable", "WallMode",
           "WallTable", "connection_type_keys", "hazard_keys", "load", "sign_keys",
           "system_keys", "takes_connection_type", "takes_inspected", "takes_wall_mode",
           "wall_modes_kept", "wall_modes_of", "with_tables"]
