"""The survey format's names, and the field types every model of it uses.

Field types carry the checks on one value (`Num`, `Int`, `Text`, `Notes`; keys checked against
the tables of `triage.standards`); rules across fields live in `triage.model_rules`.
"""

from __future__ import annotations

import uuid
from typing import Annotated, Literal, get_args

from pydantic import (
    AfterValidator,
    BaseModel,
    BeforeValidator,
    ConfigDict,
    StringConstraints,
    WithJsonSchema,
)

from triage import model_rules as rules
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
    "member": ("inspected", "connection_type", "mode", "severity"),
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


def _connection_type(value: str) -> str:
    return _known(standards.connection_type_keys(), "FEMA 352 connection damage type", value)


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
ConnectionTypeKey = Annotated[
    str, AfterValidator(_connection_type),
    WithJsonSchema({"type": "string", "enum": list(standards.connection_type_keys())})]
# FEMA 306 behaviour modes and severities (triage/standards/fema306_walls.toml).
WallMode = standards.WallMode
Severity = standards.Severity


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True, validate_default=True)
