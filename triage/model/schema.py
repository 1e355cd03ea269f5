"""The JSON Schema of `triage-survey/2`, generated from the models."""

from __future__ import annotations

from typing import Any

from .fields import FORMAT
from .survey import Survey

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
    schema: dict[str, Any] = _json_schema_bounds(Survey.model_json_schema())
    schema["$schema"] = "https://json-schema.org/draft/2020-12/schema"
    schema["$id"] = f"urn:triage:{FORMAT}"
    schema["title"] = FORMAT
    return schema
