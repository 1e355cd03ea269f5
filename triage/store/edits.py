"""One edit of a survey's JSON, and the validation of only what it touched. No SQL here.

A field edit of a large survey must not run the whole survey through pydantic: the edit is
applied to the survey's JSON data, then only the unit it touched is validated (a reading, a
member group, a hazard, a storey without its readings and members, the building block or the
inspection block) together with the rules across fields that an edit can break: those of the
storey it touched and those of the whole survey, called from `triage.model_rules`, where the
model's validators call them too (one rule, one place). The unit is replaced by its validated,
normalised JSON, so the stored data is what `Survey.to_json_dict()` would give (a test checks
this against full validation).

Paths name fields the way the survey file does: `building.name`, `storeys[2].label`,
`storeys[2].readings[1].offset_mm`, `hazards[0]`; indices count the visible items only.
"""

from __future__ import annotations

import copy
import functools
import re
from collections.abc import Callable
from typing import Any, NamedTuple

from pydantic import BaseModel, ValidationError

from triage import model_rules
from triage.model import (
    Building,
    Hazard,
    Inspection,
    MemberGroup,
    Reading,
    Storey,
    error_lines,
    rule_error,
)

from .connect import StoreError

Token = str | int

_TOKEN = re.compile(r"([A-Za-z_][A-Za-z0-9_]*)((?:\[\d+\])*)")
_INDEX = re.compile(r"\[(\d+)\]")


class EditRefused(StoreError, ValueError):
    """An edit broke a rule; `str()` is one line naming the field path and the rule.

    An item set whole can break several: `str()` names the first, `all_messages` holds one
    line per rule broken (the first among them).
    """

    def __init__(self, message: str, all_messages: list[str] | None = None) -> None:
        super().__init__(message)
        self.all_messages = all_messages or [message]


@functools.lru_cache(maxsize=4096)
def _parse(path: str) -> tuple[Token, ...]:
    out: list[Token] = []
    for part in path.split("."):
        m = _TOKEN.fullmatch(part)
        if m is None:
            raise EditRefused(f"{path}: not a field path (e.g. storeys[0].readings[1].offset_mm)")
        out.append(m.group(1))
        out.extend(int(i) for i in _INDEX.findall(m.group(2)))
    return tuple(out)


def parse_path(path: str) -> list[Token]:
    """`storeys[2].readings[1].offset_mm` -> ['storeys', 2, 'readings', 1, 'offset_mm']."""
    if not isinstance(path, str) or not path:
        raise EditRefused("(path): an edit names a field, e.g. storeys[0].label")
    return list(_parse(path))


def format_path(tokens: list[Token]) -> str:
    """The inverse of `parse_path`."""
    out = ""
    for t in tokens:
        out += f"[{t}]" if isinstance(t, int) else ("." if out else "") + t
    return out


class Applied(NamedTuple):
    """An edit applied to a copy of the survey data: the new data and what it changed."""

    doc: dict[str, Any]
    op: str          # set | add | remove
    path: str        # the field set, the item added (with its index) or the item removed
    old: Any         # JSON value before (None: absent)
    new: Any         # JSON value after (None: absent)


# The item models of the survey, by where they sit.
_UNITS: dict[str, type[BaseModel]] = {"building": Building, "inspection": Inspection}


def _walk_copy(doc: dict[str, Any], tokens: list[Token]) -> tuple[dict[str, Any], Any]:
    """Copy the containers along `tokens[:-1]` (copy on write) and return (new doc, parent)."""
    root = dict(doc)
    node: Any = root
    for i, t in enumerate(tokens[:-1]):
        where = format_path(tokens[: i + 1])
        if isinstance(t, int):
            if not isinstance(node, list) or not 0 <= t < len(node):
                raise EditRefused(f"{where}: no such item (there are "
                                  f"{len(node) if isinstance(node, list) else 0})")
            child = node[t]
        else:
            if not isinstance(node, dict):
                raise EditRefused(f"{where}: no such field")
            child = node.get(t)
            if child is None:
                # An absent optional block (a location, a list left out) is created on write.
                nxt = tokens[i + 1]
                child = [] if isinstance(nxt, int) else {}
        if isinstance(child, dict):
            child = dict(child)
        elif isinstance(child, list):
            child = list(child)
        else:
            raise EditRefused(f"{where}: is a value, not a block or a list")
        node[t] = child
        node = child
    return root, node


def apply_set(doc: dict[str, Any], path: str, value: Any) -> Applied:
    """Set a field (or replace a whole item); `None` makes an optional field absent."""
    tokens = parse_path(path)
    if tokens in (["format"], ["id"]):
        raise EditRefused(f"{path}: the survey's {tokens[0]} is fixed once it is stored")
    new_doc, parent = _walk_copy(doc, tokens)
    last = tokens[-1]
    if isinstance(last, int):
        if not isinstance(parent, list) or not 0 <= last < len(parent):
            raise EditRefused(f"{path}: no such item")
        if value is None:
            raise EditRefused(f"{path}: remove an item with remove, not by setting it to null")
        old = parent[last]
        parent[last] = copy.deepcopy(value)
    else:
        if not isinstance(parent, dict):
            raise EditRefused(f"{path}: no such field")
        old = parent.get(last)
        if value is None:
            parent.pop(last, None)
        else:
            parent[last] = copy.deepcopy(value)
    return Applied(new_doc, "set", path, old, value)


def apply_add(doc: dict[str, Any], path: str, item: Any, index: int | None = None) -> Applied:
    """Insert an item into the list at `path` (at `index`, or at the end)."""
    tokens = parse_path(path)
    if isinstance(tokens[-1], int):
        raise EditRefused(f"{path}: add to a list, e.g. storeys[0].readings")
    new_doc, parent = _walk_copy(doc, [*tokens, 0])
    if not isinstance(parent, list):
        raise EditRefused(f"{path}: is not a list")
    at = len(parent) if index is None else index
    if not 0 <= at <= len(parent):
        raise EditRefused(f"{path}: index {at} is outside 0..{len(parent)}")
    if item is None:
        raise EditRefused(f"{path}: an added item cannot be null")
    parent.insert(at, copy.deepcopy(item))
    return Applied(new_doc, "add", format_path([*tokens, at]), None, item)


def apply_remove(doc: dict[str, Any], path: str) -> Applied:
    """Take an item out of its list (the caller keeps it in the change log)."""
    tokens = parse_path(path)
    if not isinstance(tokens[-1], int):
        raise EditRefused(f"{path}: name an item to remove, e.g. storeys[0].readings[1]")
    new_doc, parent = _walk_copy(doc, tokens)
    last = tokens[-1]
    assert isinstance(last, int)
    if not isinstance(parent, list) or not 0 <= last < len(parent):
        raise EditRefused(f"{path}: no such item")
    old = parent.pop(last)
    return Applied(new_doc, "remove", path, old, None)


def _refused(err: ValidationError, where: str, doc: Any = None) -> EditRefused:
    """The refusal of an item that broke rules: its first rule, and every line kept."""
    lines = error_lines(err, doc, tuple(_parse(where)) if where else ())
    return EditRefused(lines[0], lines)


def _validate(model: type[BaseModel], data: Any, where: str | Callable[[], str],
              doc: Any = None) -> dict[str, Any]:
    """`model.model_validate(data).model_dump(mode="json", exclude_none=True)`, or refuse.

    `where` (the item's path, or a function giving it) is only formatted for a refusal, with
    `doc` (the survey's data) for naming its storey.
    """
    def place() -> str:
        return where if isinstance(where, str) else where()

    if not isinstance(data, dict):
        raise EditRefused(f"{place()}: must be a JSON object")
    try:
        obj = model.__pydantic_validator__.validate_python(data)
    except ValidationError as err:
        raise _refused(err, place(), doc) from None
    out: dict[str, Any] = model.__pydantic_serializer__.to_python(obj, mode="json",
                                                                 exclude_none=True)
    return out


def _unit(tokens: list[Token], op: str) -> list[Token] | None:
    """The path of the item to validate after an edit at `tokens` (None: cross rules only)."""
    if op == "remove":
        tokens = tokens[:-1]   # the list it left; its parent item may have rules (photos)
    n = len(tokens)
    head = tokens[0] if tokens else None
    if op == "set" and tokens in (["storeys"], ["hazards"]):
        raise EditRefused(f"{head}: change the items one by one (add, set, remove)")
    if head == "storeys":
        if n >= 4 and tokens[2] in ("readings", "members") and isinstance(tokens[3], int):
            return tokens[:4]
        if n >= 2 and isinstance(tokens[1], int):
            if n == 3 and tokens[2] in ("readings", "members") and op == "remove":
                return None   # an item left a storey's list: nothing of the storey changed
            return tokens[:2]
        return None
    if head == "hazards":
        return tokens[:2] if n >= 2 else None
    if head in _UNITS:
        return tokens[:1]
    raise EditRefused(f"{format_path(tokens) or '(survey)'}: not an editable part of a survey")


def _get(doc: Any, tokens: list[Token]) -> Any:
    node = doc
    for t in tokens:
        node = node[t]
    return node


def _put(doc: dict[str, Any], tokens: list[Token], value: Any) -> None:
    _get(doc, tokens[:-1])[tokens[-1]] = value


def validate_applied(applied: Applied) -> dict[str, Any]:
    """Validate what an edit touched and the cross-field rules; return the normalised data."""
    doc = applied.doc
    tokens = parse_path(applied.path)
    unit = _unit(tokens, applied.op)
    if unit is not None:
        where = format_path(unit)
        data = _get(doc, unit)
        if unit[0] == "storeys" and len(unit) == 4:
            model: type[BaseModel] = Reading if unit[2] == "readings" else MemberGroup
            _put(doc, unit, _validate(model, data, where, doc))
        elif unit[0] == "storeys":
            # A storey added or replaced, or a whole list of it set, is validated with its items.
            whole = len(tokens) == 2 or (len(tokens) == 3 and tokens[2] in ("readings", "members"))
            if whole:
                _put(doc, unit, _validate(Storey, data, where, doc))
            else:
                if not isinstance(data, dict):
                    raise EditRefused(f"{where}: must be a JSON object")
                shallow = {k: v for k, v in data.items() if k not in ("readings", "members")}
                out = _validate(Storey, shallow, where, doc)
                out["readings"] = data.get("readings", [])
                out["members"] = data.get("members", [])
                _put(doc, unit, out)
        elif unit[0] == "hazards":
            _put(doc, unit, _validate(Hazard, data, where, doc))
        else:
            _put(doc, unit, _validate(_UNITS[str(unit[0])], data, where, doc))
    touched = tokens[1] if len(tokens) >= 2 and tokens[0] == "storeys" else None
    check_cross_rules(doc, touched if isinstance(touched, int) else None)
    return doc


def check_cross_rules(doc: dict[str, Any], storey: int | None = None) -> None:
    """The rules across fields an edit can break: the touched storey's, then the survey's.

    They are the model's own (`triage.model_rules`); a broken one is refused in its words.
    """
    prefix: tuple[str | int, ...] = ()
    try:
        storeys = doc.get("storeys")
        if storey is not None and isinstance(storeys, list) and 0 <= storey < len(storeys):
            prefix = ("storeys", storey)
            model_rules.storey_rules(storeys[storey])
            prefix = ()
        model_rules.survey_rules(doc)
    except model_rules.RuleBroken as err:
        raise EditRefused(rule_error(err, doc, prefix)) from None


def inverse(op: str, path: str, old: Any, new: Any) -> tuple[str, str, Any]:
    """The edit that undoes one: (op, path, value)."""
    if op == "set":
        return "set", path, old
    if op == "add":
        return "remove", path, None
    if op == "remove":
        return "add", path, old
    raise EditRefused(f"{op}: this change cannot be undone")


_PLAIN = (str, int, float, bool)
_ITEM_MODELS: dict[str, type[BaseModel]] = {"readings": Reading, "members": MemberGroup}


def apply_field(doc: dict[str, Any], path: str, value: Any) -> Applied | None:
    """The keystroke case, done directly: one plain field of a reading or a member group.

    Such an edit can break only the rules of its own item and of its storey (no label, hazard
    or storey count changes), so the item and its storey's rules are checked. None when the
    edit is not of this kind (the general path then handles it, with the same result; a test
    checks both agree).
    """
    try:
        t = _parse(path)
    except EditRefused:
        return None
    if (len(t) != 5 or t[0] != "storeys" or not isinstance(t[1], int)
            or not isinstance(t[3], int) or not isinstance(t[4], str)):
        return None
    kind = t[2]
    model = _ITEM_MODELS.get(str(kind))
    if model is None or not (value is None or isinstance(value, _PLAIN)):
        return None
    storeys = doc.get("storeys")
    if type(storeys) is not list or not 0 <= t[1] < len(storeys):
        return None
    st = storeys[t[1]]
    items = st.get(kind) if type(st) is dict else None
    if type(items) is not list or not 0 <= t[3] < len(items) or type(items[t[3]]) is not dict:
        return None
    field = t[4]
    item = dict(items[t[3]])
    old = item.get(field)
    if value is None:
        item.pop(field, None)
    else:
        item[field] = value
    norm = _validate(model, item, lambda: f"storeys[{t[1]}].{kind}[{t[3]}]", doc)
    new_items = list(items)
    new_items[t[3]] = norm
    new_st = dict(st)
    new_st[kind] = new_items
    new_storeys = list(storeys)
    new_storeys[t[1]] = new_st
    new_doc = dict(doc)
    new_doc["storeys"] = new_storeys
    try:   # a reading's gauge against its storey, a mark unique in it, the storey's capacity
        model_rules.storey_rules(new_st)
    except model_rules.RuleBroken as err:
        raise EditRefused(rule_error(err, new_doc, ("storeys", t[1]))) from None
    return Applied(new_doc, "set", path, old, norm.get(field))


def apply(doc: dict[str, Any], op: str, path: str, value: Any, *,
          direct: bool = True) -> Applied:
    """Apply one edit (set, add at the path's index, remove) and validate what it touched.

    `direct` lets a plain field of a reading or member group take the short way
    (`apply_field`); off, every edit goes the general way (for the test that they agree).
    """
    if direct and op == "set":
        quick = apply_field(doc, path, value)
        if quick is not None:
            return quick
    if op == "set":
        applied = apply_set(doc, path, value)
    elif op == "add":
        tokens = parse_path(path)
        if isinstance(tokens[-1], int):
            applied = apply_add(doc, format_path(tokens[:-1]), value, tokens[-1])
        else:
            applied = apply_add(doc, path, value)
    elif op == "remove":
        applied = apply_remove(doc, path)
    else:
        raise EditRefused(f"{op}: not an edit (set, add, remove)")
    out = validate_applied(applied)
    new_value = None   # a removal leaves no new value
    if applied.op in ("set", "add"):
        # Log the value as validated (normalised), not as typed: a field set to null that has
        # a default holds its default now, as the short way (`apply_field`) logs it too.
        t = parse_path(applied.path)
        try:
            new_value = _get(out, t)
        except (KeyError, IndexError, TypeError):
            new_value = None
    return Applied(out, applied.op, applied.path, applied.old, new_value)
