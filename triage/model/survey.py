"""The survey's blocks as frozen pydantic models, and the whole `Survey`.

Photo, location, systems, building, inspector, inspection, reading, member group, storey and
hazard; the survey derives its ids and gives its canonical text.
"""

from __future__ import annotations

import json
import math
import uuid
from typing import Annotated, Any, Literal

from pydantic import AfterValidator, AwareDatetime, Field, model_validator

from triage import model_rules as rules
from triage import standards
from triage.model_rules import RuleBroken

from .fields import (
    _V2_KEYS,
    FORMAT,
    FORMATS,
    ID_NAMESPACE,
    Access,
    ConnectionTypeKey,
    DamageClass,
    Dir,
    HazardKey,
    Int,
    MemberKind,
    Notes,
    Num,
    Severity,
    SignKey,
    SystemKey,
    Text,
    WallMode,
    _Model,
)


class Photo(_Model):
    """A photograph taken on site."""

    path: Text = Field(min_length=1, description="file path, relative to the survey file")
    caption: Text = Field(default="", description="what the photo shows")
    sha256: str | None = Field(
        default=None, pattern=r"^[0-9a-f]{64}$",
        description="SHA-256 of the image bytes, 64 lowercase hex digits (set when stored)")


Photos = Annotated[tuple[Photo, ...], Field(max_length=rules.MAX_PHOTOS)]


class Location(_Model):
    """Where the building stands (WGS 84)."""

    lat: Num = Field(ge=-90, le=90, description="latitude, degrees")
    lon: Num = Field(ge=-180, le=180, description="longitude, degrees")


class Systems(_Model):
    """The structural system resisting sideways load in each principal direction."""

    x: SystemKey = Field(description="system acting in the x direction")
    y: SystemKey = Field(description="system acting in the y direction")


class Building(_Model):
    """The building, kept across inspections by its building id."""

    id: uuid.UUID | None = Field(default=None, description="building id; derived when absent")
    name: Text = Field(min_length=1, description="the building's name as the inspector knows it")
    address: Text = Field(min_length=1, description="street address")
    location: Location | None = Field(default=None, description="map position, when known")
    use: Text | None = Field(default=None, description="what the building is used for")
    system: Systems = Field(description="structural system per direction")
    year_built: Int | None = Field(
        default=None, ge=rules.FIRST_YEAR_BUILT, le=rules.LAST_YEAR,
        description="year the building was completed (not after the inspection)")


class Inspector(_Model):
    """Who inspected."""

    name: Text = Field(min_length=1, description="the inspector's name")
    id: Text | None = Field(default=None, description="the inspector's registration or staff id")


class Inspection(_Model):
    """Who inspected, when, and which earlier survey of the building this one follows."""

    inspector: Inspector
    at: Annotated[AwareDatetime, AfterValidator(rules.inspection_time)] = Field(
        description="time of the inspection, ISO 8601 with offset, years 1900-2100")
    previous: uuid.UUID | None = Field(
        default=None, description="id of the earlier survey of the same building")
    team: tuple[Inspector, ...] = Field(
        default=(), description="others who inspected with the inspector")
    event: Text | None = Field(
        default=None, description="the earthquake or aftershock this inspection follows")
    not_inspected: Text | None = Field(
        default=None, description="what could not be inspected, and why")
    weather: Text | None = Field(default=None, description="weather at the time of inspection")


class Reading(_Model):
    """A residual drift measurement: offset over a gauge length, or a tilt, in one direction."""

    dir: Dir = Field(description="direction of the reading; signed toward +x or +y")
    offset_mm: Num | None = Field(default=None, description="plumb offset over the gauge, mm")
    gauge_mm: Num | None = Field(
        default=None, gt=0, description="gauge length, mm: at least 100, at most the storey "
        "height plus 5%")
    sd_mm: Num | None = Field(
        default=None, gt=0, description="standard uncertainty of offset, mm; at most the gauge")
    baseline_mm: Num | None = Field(
        default=None, description="as-built offset at this spot over the same gauge, mm")
    tilt_deg: Num | None = Field(default=None, ge=-45, le=45, description="tilt, degrees")
    sd_deg: Num | None = Field(default=None, gt=0, le=rules.MAX_SD_DEG,
                               description="standard uncertainty of tilt, degrees")
    baseline_deg: Num | None = Field(
        default=None, ge=-45, le=45, description="as-built tilt at this spot, degrees")
    baseline_sd_mm: Num | None = Field(
        default=None, gt=0, description="standard uncertainty of baseline_mm, mm")
    baseline_sd_deg: Num | None = Field(
        default=None, gt=0, le=rules.MAX_SD_DEG,
        description="standard uncertainty of baseline_deg, degrees")
    where: Text | None = Field(default=None, description="where on the plan it was taken")

    @model_validator(mode="after")
    def _one_kind(self) -> Reading:
        by_offset = self.offset_mm is not None or self.gauge_mm is not None
        by_tilt = self.tilt_deg is not None
        if by_offset and by_tilt:
            raise ValueError("a reading has offset_mm with gauge_mm, or tilt_deg, never both")
        if not by_offset and not by_tilt:
            raise ValueError("a reading needs offset_mm with gauge_mm, or tilt_deg")
        if by_offset and (self.offset_mm is None or self.gauge_mm is None):
            raise ValueError("offset_mm and gauge_mm go together")
        if by_offset and (self.sd_deg is not None or self.baseline_deg is not None
                          or self.baseline_sd_deg is not None):
            raise ValueError("sd_deg, baseline_deg and baseline_sd_deg belong to a tilt reading")
        if by_tilt and (self.sd_mm is not None or self.baseline_mm is not None
                        or self.baseline_sd_mm is not None):
            raise ValueError("sd_mm, baseline_mm and baseline_sd_mm belong to an offset reading")
        if self.baseline_sd_mm is not None and self.baseline_mm is None:
            raise ValueError("baseline_sd_mm is the uncertainty of baseline_mm, which is absent")
        if self.baseline_sd_deg is not None and self.baseline_deg is None:
            raise ValueError("baseline_sd_deg is the uncertainty of baseline_deg, which is absent")
        limit = standards.load().assumptions.max_drift_ratio
        rules.reading_rules(self, limit)
        if abs(self.drift_ratio()) >= limit:
            raise ValueError(rules.too_large_drift(self.drift_ratio(), limit))
        return self

    @property
    def by_tilt(self) -> bool:
        """Whether the reading is a tilt angle (else an offset over a gauge)."""
        return self.tilt_deg is not None

    def drift_ratio(self) -> float:
        """The signed drift ratio, as-built baseline subtracted."""
        if self.tilt_deg is not None:
            return math.tan(math.radians(self.tilt_deg - (self.baseline_deg or 0.0)))
        assert self.offset_mm is not None and self.gauge_mm is not None
        return (self.offset_mm - (self.baseline_mm or 0.0)) / self.gauge_mm


class MemberGroup(_Model):
    """Members alike in a storey: kind, count, and what was seen on them."""

    kind: MemberKind = Field(description="member kind")
    count: Int = Field(ge=1, le=rules.MAX_COUNT, description="how many members the group holds")
    ductility: Literal["ductile", "brittle"] = Field(
        default="ductile", description="failure mode expected: brittle for short or shear columns")
    crack_mm: Num | None = Field(
        default=None, ge=0, le=50, description="widest residual crack, mm; 0 or absent: none seen")
    crack_sd_mm: Num | None = Field(
        default=None, gt=0, le=rules.MAX_CRACK_SD_MM,
        description="standard uncertainty of the crack width, mm")
    signs: tuple[SignKey, ...] = Field(default=(), description="damage signs seen on the group")
    damage_class: DamageClass | None = Field(
        default=None, description="class set by the inspector; needs override_reason")
    override_reason: Text | None = Field(
        default=None, description="why the class was set by hand")
    weight: Num = Field(default=1.0, gt=0, le=1000,
                          description="share of storey capacity per member (1 when unknown)")
    dir: Dir | None = Field(default=None,
                            description="direction a wall acts in; absent: both directions")
    ref: Text | None = Field(
        default=None, description="grid or member mark, e.g. C3; used once in a storey")
    photos: Photos = Field(default=(), description="photos of the group")
    inspected: Int | None = Field(
        default=None, ge=0, le=rules.MAX_COUNT,
        description="how many of the group's members were seen (at most count); absent: all")
    connection_type: ConnectionTypeKey | None = Field(
        default=None, description="FEMA 352 damage type of a connection group (steel moment "
        "frames; from memory)")
    mode: WallMode | None = Field(
        default=None, description="FEMA 306 behaviour mode of a wall or infill group; unknown "
        "takes the worst")
    severity: Severity | None = Field(
        default=None, description="FEMA 306 damage severity of a wall or infill group (not a "
        "JBDPA grade)")

    @model_validator(mode="after")
    def _rules(self) -> MemberGroup:
        if self.damage_class is not None and not (self.override_reason or "").strip():
            raise ValueError("damage_class set by hand needs an override_reason")
        rules.capacity_rules(self, standards.wall_modes_of(self.kind))
        if self.dir is not None and self.kind == "column":
            raise RuleBroken(("dir",), "a column counts in both directions; dir is for walls, "
                             "braces and infill")
        table = standards.load().signs
        for s in self.signs:
            if self.kind not in table[s].kinds:
                raise RuleBroken(("signs",), f"{s!r} is not a sign of a {self.kind} "
                                 f"(it applies to: {', '.join(table[s].kinds)})")
        if len(set(self.signs)) != len(self.signs):
            raise RuleBroken(("signs",), "each sign is listed once")
        return self

    @property
    def seen(self) -> int:
        """How many of the group's members were inspected (all when `inspected` is absent)."""
        return self.count if self.inspected is None else self.inspected

    @property
    def cracked(self) -> bool:
        """Whether a residual crack was seen."""
        return bool(self.crack_mm)

    @property
    def sound(self) -> bool:
        """No crack, no sign, no class set by hand."""
        return not self.cracked and not self.signs and self.damage_class is None


class Storey(_Model):
    """One storey, with its readings, member groups and notes; storeys run bottom to top."""

    label: Text = Field(
        min_length=1, description="storey label as marked on site, e.g. G, 1, B1")
    height_m: Num = Field(gt=0, le=20, description="storey height, m")
    below_grade: bool = Field(
        default=False, description="a basement storey; below-grade storeys come first")
    access: Access = Field(default="full", description="how much of the storey could be entered")
    readings: tuple[Reading, ...] = Field(default=(), description="at most 200 readings")
    members: tuple[MemberGroup, ...] = Field(
        default=(), description="at most 500 member groups, count times weight at most 100,000")
    notes: Notes | None = Field(default=None, description="the inspector's notes on the storey")
    photos: Photos = Field(default=(), description="photos of the storey")

    @model_validator(mode="before")
    @classmethod
    def _sizes(cls, data: Any) -> Any:
        rules.storey_sizes(data)   # before the items are validated: bounded work
        return data

    @model_validator(mode="after")
    def _storey_rules(self) -> Storey:
        rules.storey_rules(self)
        return self


class Hazard(_Model):
    """A hazard seen at the building (ground, structure, falling objects, exits, neighbours)."""

    kind: HazardKey = Field(description="hazard kind")
    where: Text | None = Field(default=None, description="where it is")
    storey: Text | None = Field(default=None, description="label of the storey it is on")
    height_above_ground_m: Num | None = Field(
        default=None, ge=0, le=rules.MAX_HEIGHT_ABOVE_GROUND_M,
        description="height of a falling hazard, for its keep-out, m")
    note: Notes | None = Field(default=None, description="the inspector's note on the hazard")
    photos: Photos = Field(default=(), description="photos of the hazard")


class Survey(_Model):
    """One inspection of one building at one time."""

    format: Literal["triage-survey/1", "triage-survey/2"] = Field(
        description="triage-survey/2 (triage-survey/1 files are read, and written as /2)")
    id: uuid.UUID | None = Field(default=None, description="survey id; derived when absent")
    building: Building
    inspection: Inspection
    storeys: tuple[Storey, ...] = Field(
        min_length=1, description="bottom to top, at most 300")
    hazards: tuple[Hazard, ...] = Field(default=(), description="at most 500")

    @model_validator(mode="before")
    @classmethod
    def _sizes(cls, data: Any) -> Any:
        rules.survey_sizes(data)   # before the storeys are validated: bounded work
        return data

    @model_validator(mode="after")
    def _rules(self) -> Survey:
        # Derive the ids that the file left out (docs/formats.md, "Derived ids"), so the same
        # file always gets the same ids and a re-inspection keeps its building id.
        if self.building.id is None:
            block = {"name": self.building.name, "address": self.building.address,
                     "location": (self.building.location.model_dump(mode="json")
                                  if self.building.location else None)}
            b = self.building.model_copy(
                update={"id": uuid.uuid5(ID_NAMESPACE, "building:" + canonical_json(block))})
            object.__setattr__(self, "building", b)
        if self.id is None:
            derived = uuid.uuid5(ID_NAMESPACE, "survey:" + canonical_json(self._id_body()))
            object.__setattr__(self, "id", derived)
        object.__setattr__(self, "format", FORMAT)
        rules.survey_rules(self)
        return self

    def _id_body(self) -> dict[str, Any]:
        """The text a derived survey id is taken over: the survey as `/1` wrote it.

        Every field, absent ones as null, except the id and the keys `/2` added when they
        are absent; the format always reads `triage-survey/1`. So a `/1` file keeps the id it
        had, and the same survey gets the same id whichever format its file says.
        """
        body = self.model_dump(mode="json", exclude={"id"})
        body["format"] = FORMATS[0]

        def strip(block: dict[str, Any], keys: tuple[str, ...]) -> None:
            for k in keys:
                if block.get(k) in (None, [], ()):
                    block.pop(k, None)

        def photos(block: dict[str, Any]) -> None:
            for ph in block.get("photos") or ():
                strip(ph, _V2_KEYS["photo"])

        strip(body["building"], _V2_KEYS["building"])
        strip(body["inspection"], _V2_KEYS["inspection"])
        for st in body["storeys"]:
            photos(st)
            for r in st["readings"]:
                strip(r, _V2_KEYS["reading"])
            for m in st["members"]:
                photos(m)
                strip(m, _V2_KEYS["member"])
        for h in body["hazards"]:
            photos(h)
        return body

    @property
    def survey_id(self) -> uuid.UUID:
        """The survey id (always set after validation)."""
        assert self.id is not None
        return self.id

    @property
    def building_id(self) -> uuid.UUID:
        """The building id (always set after validation)."""
        assert self.building.id is not None
        return self.building.id

    def to_json_dict(self) -> dict[str, Any]:
        """The survey as `triage-survey/2` JSON data, ids included, absent fields left out."""
        return self.model_dump(mode="json", exclude_none=True, exclude_defaults=False)

    def canonical(self) -> str:
        """Sorted-key compact JSON of the whole survey: what digests and signatures cover."""
        return canonical_json(self.to_json_dict())


def canonical_json(data: Any) -> str:
    """Sorted keys, no spaces, UTF-8 characters kept: the canonical text of JSON data."""
    return json.dumps(data, sort_keys=True, separators=(",", ":"), ensure_ascii=False)
