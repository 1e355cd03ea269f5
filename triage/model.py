"""The survey: the interchange format `triage-survey/2` as pydantic models.

`triage-survey/2` is `triage-survey/1` plus optional keys; files of either format are read,
and every survey is written as `/2` (see docs/formats.md).

Data is validated once, here, at the edge (a form field, an imported file); the assessment
trusts it. Every rule a user can break has a message naming the field path and the rule
(`SurveyError`, built by `parse_survey` / `format_error`).
"""

from __future__ import annotations

import json
import math
import uuid
from typing import Annotated, Any, Literal, get_args

from pydantic import (
    AfterValidator,
    AwareDatetime,
    BaseModel,
    ConfigDict,
    Field,
    ValidationError,
    WithJsonSchema,
    model_validator,
)

from triage import standards

FORMAT = "triage-survey/2"
"""The format every survey is written as."""
FORMATS: tuple[str, ...] = ("triage-survey/1", FORMAT)
"""The formats this version reads (each a superset of the one before)."""

# The optional keys `/2` added, by where they sit: a survey's derived id is taken over its
# text as `/1` wrote it, so these are left out of that text when absent (ids do not change).
_V2_KEYS: dict[str, tuple[str, ...]] = {
    "building": ("year_built",),
    "inspection": ("team", "event", "not_inspected", "weather"),
    "reading": ("baseline_sd_mm", "baseline_sd_deg"),
    "photo": ("sha256",),
}

# Ids absent from a file are derived as UUID 5 under this namespace of ours.
ID_NAMESPACE = uuid.UUID("6f1c0c3e-2b9a-5d4e-9a61-7d2f0b8e4c11")

Dir = Literal["x", "y"]
MemberKind = Literal["column", "wall", "beam", "brace", "connection", "slab", "infill"]
MEMBER_KINDS: tuple[str, ...] = get_args(MemberKind)   # the same kinds, as a tuple to iterate
DamageClass = standards.DamageClass
Access = Literal["full", "partial", "none"]


def _known(keys: tuple[str, ...], what: str, value: str) -> str:
    if value not in keys:
        raise ValueError(f"{value!r} is not a known {what} (known: {', '.join(keys)})")
    return value


def _system(value: str) -> str:
    return _known(standards.system_keys(), "structural system", value)


def _sign(value: str) -> str:
    return _known(standards.sign_keys(), "damage sign", value)


def _hazard(value: str) -> str:
    return _known(standards.hazard_keys(), "hazard kind", value)


# Keys checked against the tables of triage.standards (one table each; never redefined here).
SystemKey = Annotated[str, AfterValidator(_system),
                      WithJsonSchema({"type": "string", "enum": list(standards.system_keys())})]
SignKey = Annotated[str, AfterValidator(_sign),
                    WithJsonSchema({"type": "string", "enum": list(standards.sign_keys())})]
HazardKey = Annotated[str, AfterValidator(_hazard),
                      WithJsonSchema({"type": "string", "enum": list(standards.hazard_keys())})]


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, validate_default=True)


class Photo(_Model):
    """A photograph taken on site."""

    path: str = Field(min_length=1, description="file path, relative to the survey file")
    caption: str = Field(default="", description="what the photo shows")
    sha256: str | None = Field(
        default=None, pattern=r"^[0-9a-f]{64}$",
        description="SHA-256 of the image bytes, 64 lowercase hex digits (set when stored)")


class Location(_Model):
    """Where the building stands (WGS 84)."""

    lat: float = Field(ge=-90, le=90, description="latitude, degrees")
    lon: float = Field(ge=-180, le=180, description="longitude, degrees")


class Systems(_Model):
    """The structural system resisting sideways load in each principal direction."""

    x: SystemKey = Field(description="system acting in the x direction")
    y: SystemKey = Field(description="system acting in the y direction")


class Building(_Model):
    """The building, kept across inspections by its building id."""

    id: uuid.UUID | None = Field(default=None, description="building id; derived when absent")
    name: str = Field(min_length=1, description="the building's name as the inspector knows it")
    address: str = Field(min_length=1, description="street address")
    location: Location | None = Field(default=None, description="map position, when known")
    use: str | None = Field(default=None, description="what the building is used for")
    system: Systems = Field(description="structural system per direction")
    year_built: int | None = Field(
        default=None, ge=1000, le=9999, description="year the building was completed")


class Inspector(_Model):
    """Who inspected."""

    name: str = Field(min_length=1, description="the inspector's name")
    id: str | None = Field(default=None, description="the inspector's registration or staff id")


class Inspection(_Model):
    """Who inspected, when, and which earlier survey of the building this one follows."""

    inspector: Inspector
    at: AwareDatetime = Field(description="time of the inspection, ISO 8601 with offset")
    previous: uuid.UUID | None = Field(
        default=None, description="id of the earlier survey of the same building")
    team: tuple[Inspector, ...] = Field(
        default=(), description="others who inspected with the inspector")
    event: str | None = Field(
        default=None, description="the earthquake or aftershock this inspection follows")
    not_inspected: str | None = Field(
        default=None, description="what could not be inspected, and why")
    weather: str | None = Field(default=None, description="weather at the time of inspection")


class Reading(_Model):
    """A residual drift measurement: offset over a gauge length, or a tilt, in one direction."""

    dir: Dir = Field(description="direction of the reading; signed toward +x or +y")
    offset_mm: float | None = Field(default=None, description="plumb offset over the gauge, mm")
    gauge_mm: float | None = Field(default=None, gt=0, description="gauge length, mm")
    sd_mm: float | None = Field(default=None, gt=0, description="standard uncertainty of offset")
    baseline_mm: float | None = Field(
        default=None, description="as-built offset at this spot over the same gauge, mm")
    tilt_deg: float | None = Field(default=None, ge=-45, le=45, description="tilt, degrees")
    sd_deg: float | None = Field(default=None, gt=0, description="standard uncertainty of tilt")
    baseline_deg: float | None = Field(
        default=None, ge=-45, le=45, description="as-built tilt at this spot, degrees")
    baseline_sd_mm: float | None = Field(
        default=None, gt=0, description="standard uncertainty of baseline_mm, mm")
    baseline_sd_deg: float | None = Field(
        default=None, gt=0, description="standard uncertainty of baseline_deg, degrees")
    where: str | None = Field(default=None, description="where on the plan it was taken")

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
        if abs(self.drift_ratio()) >= limit:
            raise ValueError(
                f"drift ratio {abs(self.drift_ratio()):.1%} is {limit:.0%} or more: "
                "refused as a mis-entry (check offset and gauge units, mm)")
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
    count: int = Field(ge=1, description="how many members the group holds")
    ductility: Literal["ductile", "brittle"] = Field(
        default="ductile", description="failure mode expected: brittle for short or shear columns")
    crack_mm: float | None = Field(
        default=None, ge=0, le=50, description="widest residual crack, mm; 0 or absent: none seen")
    crack_sd_mm: float | None = Field(
        default=None, gt=0, description="standard uncertainty of the crack width, mm")
    signs: tuple[SignKey, ...] = Field(default=(), description="damage signs seen on the group")
    damage_class: DamageClass | None = Field(
        default=None, description="class set by the inspector; needs override_reason")
    override_reason: str | None = Field(default=None, description="why the class was set by hand")
    weight: float = Field(default=1.0, gt=0, le=1000,
                          description="share of storey capacity per member (1 when unknown)")
    dir: Dir | None = Field(default=None,
                            description="direction a wall acts in; absent: both directions")
    ref: str | None = Field(default=None, description="grid or member mark, e.g. C3")
    photos: tuple[Photo, ...] = Field(default=())

    @model_validator(mode="after")
    def _rules(self) -> MemberGroup:
        if self.damage_class is not None and not (self.override_reason or "").strip():
            raise ValueError("damage_class set by hand needs an override_reason")
        if self.dir is not None and self.kind == "column":
            raise ValueError("dir: a column counts in both directions; dir is for walls, "
                             "braces and infill")
        table = standards.load().signs
        for s in self.signs:
            if self.kind not in table[s].kinds:
                raise ValueError(f"signs: {s!r} is not a sign of a {self.kind} "
                                 f"(it applies to: {', '.join(table[s].kinds)})")
        if len(set(self.signs)) != len(self.signs):
            raise ValueError("signs: each sign is listed once")
        return self

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

    label: str = Field(min_length=1, description="storey label as marked on site, e.g. G, 1, B1")
    height_m: float = Field(gt=0, le=20, description="storey height, m")
    below_grade: bool = Field(default=False, description="a basement storey")
    access: Access = Field(default="full", description="how much of the storey could be entered")
    readings: tuple[Reading, ...] = Field(default=())
    members: tuple[MemberGroup, ...] = Field(default=())
    notes: str | None = Field(default=None)
    photos: tuple[Photo, ...] = Field(default=())


class Hazard(_Model):
    """A hazard seen at the building (ground, structure, falling objects, exits, neighbours)."""

    kind: HazardKey = Field(description="hazard kind")
    where: str | None = Field(default=None, description="where it is")
    storey: str | None = Field(default=None, description="label of the storey it is on")
    height_above_ground_m: float | None = Field(
        default=None, ge=0, le=500, description="height of a falling hazard, for its keep-out")
    note: str | None = Field(default=None)
    photos: tuple[Photo, ...] = Field(default=())


class Survey(_Model):
    """One inspection of one building at one time."""

    format: Literal["triage-survey/1", "triage-survey/2"] = Field(
        description="triage-survey/2 (triage-survey/1 files are read, and written as /2)")
    id: uuid.UUID | None = Field(default=None, description="survey id; derived when absent")
    building: Building
    inspection: Inspection
    storeys: tuple[Storey, ...] = Field(min_length=1, description="bottom to top")
    hazards: tuple[Hazard, ...] = Field(default=())

    @model_validator(mode="after")
    def _rules(self) -> Survey:
        labels = [s.label for s in self.storeys]
        seen: set[str] = set()
        for i, lab in enumerate(labels):
            if lab in seen:
                raise ValueError(f"storeys[{i}].label: {lab!r} is used twice; labels are unique")
            seen.add(lab)
        for i, h in enumerate(self.hazards):
            if h.storey is not None and h.storey not in seen:
                raise ValueError(f"hazards[{i}].storey: {h.storey!r} names no storey "
                                 f"(storeys: {', '.join(labels)})")
        # Derive the ids that the file left out (DESIGN.md), so the same file always gets the
        # same ids and a re-inspection keeps its building id.
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
        if self.inspection.previous is not None and self.inspection.previous == self.id:
            raise ValueError("inspection.previous: a survey cannot follow itself")
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


class SurveyError(ValueError):
    """A survey broke a rule; `str()` is one line naming the field path and the rule."""

    def __init__(self, message: str, all_messages: list[str] | None = None) -> None:
        super().__init__(message)
        self.all_messages = all_messages or [message]


def _path(loc: tuple[int | str, ...]) -> str:
    out = ""
    for part in loc:
        if isinstance(part, int):
            out += f"[{part}]"
        elif part in ("function-after[_one_kind()]", "function-after[_rules()]") or (
                isinstance(part, str) and part.startswith(("function-", "tagged-union"))):
            continue
        else:
            out += ("." if out else "") + str(part)
    return out or "(survey)"


def error_lines(err: ValidationError) -> list[str]:
    """One line per pydantic error: `field.path: the rule`."""
    lines = []
    errors = err.errors(include_url=False)
    locs = [tuple(e.get("loc", ())) for e in errors]
    for e in errors:
        loc = tuple(e.get("loc", ()))
        # A list left short only because its items failed is a consequence, not a rule broken.
        if e.get("type") == "too_short" and any(
                other[:len(loc)] == loc and len(other) > len(loc) for other in locs):
            continue
        kind = e.get("type", "")
        msg = str(e.get("msg", ""))
        if kind == "extra_forbidden":
            lines.append(f"{_path(loc)}: unknown key {loc[-1]!r} (not part of {FORMAT})")
            continue
        if kind == "missing":
            lines.append(f"{_path(loc)}: required field is missing")
            continue
        for prefix in ("Value error, ", "Assertion failed, "):
            if msg.startswith(prefix):
                msg = msg[len(prefix):]
        path = _path(loc)
        # Rules checked across fields carry their own sub-path at the start of the message.
        head, sep, rest = msg.partition(": ")
        if sep and (head.startswith(("storeys[", "hazards[", "inspection.")) or head in (
                "signs", "dir")):
            sub = head if head.startswith(("storeys[", "hazards[", "inspection.")) else (
                f"{path}.{head}" if path != "(survey)" else head)
            lines.append(f"{sub}: {rest}")
        else:
            if msg.startswith("Input should"):
                msg = "must" + msg[len("Input should"):]
            lines.append(f"{path}: {msg[0].lower() + msg[1:] if msg else kind}")
    return lines


def format_error(err: ValidationError) -> str:
    """The first error as one line, with a count of the rest."""
    lines = error_lines(err)
    more = f" (and {len(lines) - 1} more)" if len(lines) > 1 else ""
    return lines[0] + more


def parse_survey(data: Any) -> Survey:
    """Validate survey JSON data; raise `SurveyError` with one line naming field and rule."""
    if not isinstance(data, dict):
        raise SurveyError("(survey): a survey is a JSON object")
    fmt = data.get("format")
    if fmt is not None and fmt not in FORMATS:
        raise SurveyError(f"format: {fmt!r} is not a survey format this version reads "
                          f"({', '.join(FORMATS)}); a newer triage may read it")
    try:
        return Survey.model_validate(data)
    except ValidationError as err:
        raise SurveyError(format_error(err), error_lines(err)) from None


def parse_survey_text(text: str) -> Survey:
    """Parse and validate a survey file's text."""
    try:
        data = json.loads(text)
    except json.JSONDecodeError as err:
        raise SurveyError(f"(file): not JSON: {err.msg} at line {err.lineno} column {err.colno}"
                          ) from None
    return parse_survey(data)


def survey_warnings(survey: Survey) -> list[str]:
    """Kept-but-doubtful values, one line each (a drift over the large-drift warning)."""
    limit = standards.load().assumptions.large_drift_warning
    out = []
    for si, st in enumerate(survey.storeys):
        for ri, r in enumerate(st.readings):
            d = abs(r.drift_ratio())
            if d > limit:
                out.append(f"storeys[{si}].readings[{ri}]: drift ratio {d:.1%} is over "
                           f"{limit:.0%}; kept, but check it is not a mis-entry")
    return out


def json_schema() -> dict[str, Any]:
    """The JSON Schema of `triage-survey/2` (which `/1` files also meet), from these models."""
    schema = Survey.model_json_schema()
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"urn:triage:{FORMAT}"
    schema["title"] = FORMAT
    return schema
