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
    BeforeValidator,
    ConfigDict,
    Field,
    StringConstraints,
    ValidationError,
    WithJsonSchema,
    model_validator,
)

from triage import model_rules as rules
from triage import standards
from triage.errors import InputRefused
from triage.model_rules import RuleBroken

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


# Numbers are finite, of at most 15 digits before the point, never true/false or text; text
# holds no lone surrogate and has a length limit (triage.model_rules has the limits).
Num = Annotated[float, BeforeValidator(rules.strict_number)]
Int = Annotated[int, BeforeValidator(rules.strict_integer)]
Text = Annotated[str, StringConstraints(max_length=rules.MAX_TEXT),
                 BeforeValidator(rules.plain_text)]
Notes = Annotated[str, StringConstraints(max_length=rules.MAX_NOTES),
                  BeforeValidator(rules.plain_text)]

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

    @model_validator(mode="after")
    def _rules(self) -> MemberGroup:
        if self.damage_class is not None and not (self.override_reason or "").strip():
            raise ValueError("damage_class set by hand needs an override_reason")
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


class SurveyError(InputRefused, ValueError):
    """A survey broke a rule; `str()` is one line naming the field path and the rule."""

    def __init__(self, message: str, all_messages: list[str] | None = None) -> None:
        super().__init__(message)
        self.all_messages = all_messages or [message]


def _loc(loc: tuple[int | str, ...]) -> tuple[int | str, ...]:
    """A pydantic location without the names of validators and unions."""
    return tuple(p for p in loc if not (isinstance(p, str) and p.startswith(
        ("function-", "tagged-union", "json-or-python", "lax-or-strict"))))


def _rule(e: Any) -> tuple[tuple[int | str, ...], str]:
    """(path, rule) of one pydantic error, the rule in our words with its limit."""
    loc = _loc(tuple(e.get("loc", ())))
    kind = e.get("type", "")
    ctx = e.get("ctx") or {}
    cause = ctx.get("error")
    if isinstance(cause, RuleBroken):
        return loc + cause.path, cause.rule
    if kind == "extra_forbidden":
        return loc, f"unknown key {loc[-1]!r} (not part of {FORMAT})"
    if kind == "missing":
        return loc, "required field is missing"
    if kind == "string_too_long":
        n = len(e["input"]) if isinstance(e.get("input"), str) else 0
        return loc, f"{n:,} characters; at most {ctx.get('max_length', 0):,}"
    if kind == "too_long":
        return loc, (f"{ctx.get('actual_length', 0):,} items; at most "
                     f"{ctx.get('max_length', 0):,}")
    msg = str(e.get("msg", ""))
    for prefix in ("Value error, ", "Assertion failed, "):
        if msg.startswith(prefix):
            msg = msg[len(prefix):]
    if msg.startswith("Input should"):
        msg = "must" + msg[len("Input should"):]
    return loc, (msg[0].lower() + msg[1:]) if msg else kind


def error_lines(err: ValidationError, doc: Any = None,
                prefix: tuple[int | str, ...] = ()) -> list[str]:
    """One line per pydantic error: `field.path: the rule (the field in words)`.

    `doc` is the whole survey's data, for naming storeys by label; `prefix` the path of the
    part validated when it is not the whole survey (the store validates one item at a time).
    """
    lines = []
    errors = err.errors(include_url=False)
    locs = [_loc(tuple(e.get("loc", ()))) for e in errors]
    for e, loc in zip(errors, locs, strict=True):
        # A list left short only because its items failed is a consequence, not a rule broken.
        if e.get("type") == "too_short" and any(
                other[:len(loc)] == loc and len(other) > len(loc) for other in locs):
            continue
        path, rule = _rule(e)
        lines.append(rules.line(prefix + path, rule, doc))
    return lines


def format_error(err: ValidationError, doc: Any = None,
                 prefix: tuple[int | str, ...] = ()) -> str:
    """The first error as one line, with a count of the rest."""
    lines = error_lines(err, doc, prefix)
    more = f" (and {len(lines) - 1} more)" if len(lines) > 1 else ""
    return lines[0] + more


def rule_error(err: RuleBroken, doc: Any = None, prefix: tuple[int | str, ...] = ()) -> str:
    """A rule broken outside pydantic (the store's edit API calls the rules) as one line."""
    return rules.line(prefix + err.path, err.rule, doc)


def parse_survey(data: Any) -> Survey:
    """Validate survey JSON data; raise `SurveyError` with one line naming field and rule."""
    if not isinstance(data, dict):
        raise SurveyError("(survey): a survey is a JSON object")
    fmt = data.get("format")
    if fmt is not None and fmt not in FORMATS:
        shown = fmt if isinstance(fmt, str) and len(fmt) <= 40 and fmt.isprintable() else "it"
        raise SurveyError(f"format: {shown!r} is not a survey format this version reads "
                          f"({', '.join(FORMATS)}); a newer triage may read it")
    try:
        return Survey.model_validate(data)
    except ValidationError as err:
        lines = error_lines(err, data)
        more = f" (and {len(lines) - 1} more)" if len(lines) > 1 else ""
        raise SurveyError(lines[0] + more, lines) from None
    except RecursionError:   # only reachable by data built in Python: files are depth-checked
        raise SurveyError(f"(survey): nested over {rules.MAX_DEPTH} levels deep") from None


def _object(pairs: list[tuple[str, Any]]) -> dict[str, Any]:
    """A JSON object whose keys are text (a lone surrogate in a key is refused, as in values)."""
    for key, _ in pairs:
        try:
            rules.plain_text(key)
        except ValueError as err:
            raise SurveyError(f"(file): a key {err}") from None
    return dict(pairs)


def load_json_text(text: str) -> Any:
    """JSON data of a survey file's text, checked for depth and number size before parsing.

    Raises `SurveyError` (one line, with line and column) for text that is not JSON, nests
    over 20 levels or holds a number of over 15 digits before the point.
    """
    try:
        rules.check_json_text(text)
    except RuleBroken as err:
        raise SurveyError(f"(file): {err.rule}") from None
    try:
        return json.loads(text, object_pairs_hook=_object)
    except SurveyError:
        raise
    except json.JSONDecodeError as err:
        raise SurveyError(f"(file): not JSON: {err.msg} at line {err.lineno} column {err.colno}"
                          ) from None
    except (ValueError, RecursionError) as err:   # the scan above should leave none
        raise SurveyError(f"(file): not JSON a survey may hold ({type(err).__name__})"
                          ) from None


def parse_survey_text(text: str) -> Survey:
    """Parse and validate a survey file's text."""
    return parse_survey(load_json_text(text))


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


def gauge_notes(survey: Survey) -> list[str]:
    """Notes (kept, not refused) on offset readings over a gauge under a quarter storey."""
    return rules.short_gauge_notes(survey.storeys)


_BOUNDS = {"gt": "exclusiveMinimum", "ge": "minimum", "lt": "exclusiveMaximum", "le": "maximum"}


def _json_schema_bounds(node: Any) -> Any:
    """Bounds in JSON Schema's words (`exclusiveMinimum`, `maximum`, ...).

    pydantic leaves `gt`/`le` raw on an optional number whose type carries a validator (our
    strict `Num`); they are renamed where they sit beside a `type`.
    """
    if isinstance(node, dict):
        out = {}
        for k, v in node.items():
            key = _BOUNDS.get(k, k) if "type" in node and not isinstance(v, dict | list) else k
            out[key] = _json_schema_bounds(v)
        return out
    if isinstance(node, list):
        return [_json_schema_bounds(v) for v in node]
    return node


def json_schema() -> dict[str, Any]:
    """The JSON Schema of `triage-survey/2` (which `/1` files also meet), from these models."""
    schema = _json_schema_bounds(Survey.model_json_schema())
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"urn:triage:{FORMAT}"
    schema["title"] = FORMAT
    return schema
