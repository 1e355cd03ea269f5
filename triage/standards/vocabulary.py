"""The words a person reads for every key, as data (`vocabulary.toml`), loaded once.

Screens, report, paper form and text output take a key's words from here, so `cover_spalling`
reads "cover spalled" everywhere and a path such as `storeys[0].readings[5].gauge_mm` reads
"storey G, reading 6, gauge (mm)". What a table already says (a sign's, hazard's or system's
description, an assumption's reason, a repairability alternative's name, a damage state's
meaning) is read from that table, never copied: each key's words live in one place.

    from triage.standards.vocabulary import words, field_words
    words("signs", "cover_spalling")                        # 'cover spalled'
    field_words("storeys[0].readings[5].gauge_mm", survey)  # 'storey G, reading 6, gauge (mm)'

Pure: no UI, no I/O after the first load.
"""

from __future__ import annotations

import re
import tomllib
from dataclasses import dataclass
from functools import cache
from typing import Any

from triage.standards import HERE, load

# Sections whose words are a table's own (the loader reads them from there).
TABLE_SECTIONS = ("repairability", "damage_states")
# Sections whose one-line description lives in a table, and the attribute holding it.
_DESCRIBED = {"signs": "signs", "hazards": "hazards", "systems": "systems",
              "assumptions": "assumption_notes"}

_PART = re.compile(r"^([A-Za-z_][A-Za-z0-9_]*)((?:\[\d+\])*)$")
_PATH_HEAD = re.compile(r"^((?:[A-Za-z_][A-Za-z0-9_]*(?:\[\d+\])*)(?:\.[A-Za-z_][A-Za-z0-9_]*"
                        r"(?:\[\d+\])*)*): ")


@dataclass(frozen=True)
class Entry:
    """The words of one key, and for a field of the survey format what it holds."""

    words: str
    many: str = ""
    unit: str = ""
    meaning: str = ""
    block: str = ""   # a nested block: the fields section it opens
    item: str = ""    # a list of blocks: the fields section of each item
    noun: str = ""    # a list: what one item is called
    values: str = ""  # the section that words this field's values

    @property
    def with_unit(self) -> str:
        """The words with the unit in brackets, e.g. 'gauge (mm)'."""
        return f"{self.words} ({self.unit})" if self.unit else self.words


def _entry(raw: Any) -> Entry:
    if isinstance(raw, str):
        return Entry(words=raw)
    return Entry(**raw)


@cache
def vocabulary() -> dict[str, dict[str, Entry]]:
    """Every section of the vocabulary; the survey fields as 'fields.<block>'. Read once."""
    with open(HERE / "vocabulary.toml", "rb") as f:
        raw = tomllib.load(f)
    out: dict[str, dict[str, Entry]] = {}
    for name, section in raw.items():
        if name == "fields":
            for block, fields in section.items():
                out[f"fields.{block}"] = {k: _entry(v) for k, v in fields.items()}
        else:
            out[name] = {k: _entry(v) for k, v in section.items()}
    tables = load()
    out["repairability"] = {r.key: Entry(words=r.name) for r in tables.repairability}
    out["damage_states"] = {k: Entry(words=k, meaning=d.meaning)
                            for k, d in tables.damage_states.damage_states.items()}
    return out


def _plain(key: str) -> str:
    return str(key).replace("_", " ")


def entry(section: str, key: str) -> Entry | None:
    """The entry of a key, or None when the vocabulary has none."""
    return vocabulary().get(section, {}).get(str(key))


def has_words(section: str, key: str) -> bool:
    """Whether the vocabulary words this key."""
    return entry(section, key) is not None


def words(section: str, key: Any) -> str:
    """The words for a key of a section (e.g. 'signs', 'cover_spalling' -> 'cover spalled').

    A key the vocabulary lacks (a test keeps that from happening) reads as itself with spaces
    for underscores, so a screen never fails for want of a word.
    """
    e = entry(section, key)
    return e.words if e is not None else _plain(key)


def many(section: str, key: Any) -> str:
    """The plural words of a key (member kinds); the words themselves when it has none."""
    e = entry(section, key)
    return (e.many or e.words) if e is not None else _plain(key)


def meaning(section: str, key: Any) -> str:
    """A line saying what a key means ('' when the vocabulary gives none)."""
    e = entry(section, key)
    return e.meaning if e is not None else ""


def describe(section: str, key: Any) -> str:
    """The one-line description a table gives a key (signs, hazards, systems, assumptions).

    Falls back to the vocabulary's meaning line for the other sections.
    """
    if section == "connection_types":
        found = load().steel.types.get(str(key))
        return found.description if found is not None else ""
    attr = _DESCRIBED.get(section)
    if attr is not None:
        table = getattr(load(), attr)
        item = table.get(str(key))
        if item is not None:
            return str(getattr(item, "why", None) or getattr(item, "description", ""))
    return meaning(section, key)


def options(section: str) -> list[tuple[str, str]]:
    """(words, key) for every key of a section, in the vocabulary's order (for pick lists)."""
    return [(e.words, k) for k, e in vocabulary().get(section, {}).items()]


# --- fields of the survey format ------------------------------------------------------------


def _get(obj: Any, key: str) -> Any:
    if obj is None:
        return None
    if isinstance(obj, dict):
        return obj.get(key)
    return getattr(obj, key, None)


def _at(seq: Any, i: int) -> Any:
    try:
        return seq[i] if seq is not None and 0 <= i < len(seq) else None
    except (TypeError, KeyError):
        return None


def _ordinal(n: int) -> str:
    suffix = "th" if 10 <= n % 100 <= 20 else {1: "st", 2: "nd", 3: "rd"}.get(n % 10, "th")
    return f"{n}{suffix}"


def _item_words(block: str, noun: str, i: int, item: Any) -> str:
    """One item of a list, e.g. 'storey G', 'member group 2 (C3)', 'hazard 1 (falling hazard)'."""
    if block == "storey":
        label = _get(item, "label")
        return f"{noun} {label}" if label else f"{_ordinal(i + 1)} {noun} from the bottom"
    text = f"{noun} {i + 1}"
    if block == "member_group" and _get(item, "ref"):
        text += f" ({_get(item, 'ref')})"
    elif block == "hazard" and _get(item, "kind"):
        text += f" ({words('hazards', _get(item, 'kind'))})"
    return text


def _walk(path: str, survey: Any = None) -> tuple[list[str], Entry | None] | None:
    """The words of each step of a path and the entry it ends on; None when not a path."""
    section = "fields.survey"
    node: Any = survey
    parts: list[str] = []
    last: Entry | None = None
    steps = path.split(".") if path else []
    for k, step in enumerate(steps):
        m = _PART.match(step)
        if m is None:
            return None
        name = m.group(1)
        index = [int(i) for i in re.findall(r"\d+", m.group(2))]
        e = entry(section, name)
        if e is None:
            return None
        last = e
        child = _get(node, name)
        if e.block:
            parts.append(e.words)
            section, node = f"fields.{e.block}", child
            continue
        if index:
            item = _at(child, index[0])
            parts.append(_item_words(e.item, e.noun or e.words, index[0], item))
            if e.item:
                section, node = f"fields.{e.item}", item
            elif k != len(steps) - 1:
                return None
            continue
        parts.append(e.with_unit)
        if k != len(steps) - 1:
            return None
    return parts, last


def field_entry(path: str) -> Entry | None:
    """The entry a survey path ends on ('storeys[0].readings[5].gauge_mm' -> gauge's)."""
    walked = _walk(path)
    return walked[1] if walked is not None else None


def field_words(path: str, survey: Any = None) -> str:
    """A survey path in words, e.g. 'storey G, reading 6, gauge (mm)'.

    'storeys[0].readings[5].gauge_mm' reads so when `survey` (a Survey or its JSON) is given;
    without it the storey is counted from the bottom. A path the vocabulary cannot read is
    returned as it is.
    """
    walked = _walk(path, survey)
    if walked is None:
        return path
    parts = walked[0]
    return ", ".join(parts) if parts else "the survey"


def value_words(path: str, value: Any) -> str:
    """A value of a field in words, with its unit: 'falling hazard', '1500 mm', 'yes'.

    A whole item (a dict, as added to a list) reads as its fields in words.
    """
    e = field_entry(path) if path else None
    return _value(e, value, path)


def _number(v: float) -> str:
    return f"{v:g}"


def _value(e: Entry | None, value: Any, path: str = "") -> str:
    if value is None:
        return "—"
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, dict):
        section = f"fields.{e.item or e.block}" if e is not None and (e.item or e.block) else ""
        bits = []
        for k, v in value.items():
            sub = entry(section, k) if section else None
            if sub is None or sub.block or sub.item or v in (None, "", [], ()):
                continue
            bits.append(f"{sub.words} {_value(sub, v)}")
        return ", ".join(bits) if bits else "—"
    if isinstance(value, (list, tuple)):
        if e is not None and e.item:
            return f"{len(value)} {e.words}" if value else "none"
        inner = Entry(words="", values=e.values) if e is not None else None
        return ", ".join(_value(inner, v) for v in value) if value else "none"
    if isinstance(value, (int, float)):
        text = _number(float(value)) if isinstance(value, float) else str(value)
        return f"{text} {e.unit}" if e is not None and e.unit and e.unit != "°" else (
            f"{text}°" if e is not None and e.unit == "°" else text)
    if e is not None and e.values:
        return words(e.values, value)
    return str(value)


def message_words(message: str, survey: Any = None) -> str:
    """A one-line message 'path: rule' with its path in words.

    'storeys[0].readings[5].gauge_mm: rule' -> 'storey G, reading 6, gauge (mm): rule'; a
    message without a path is returned as it is.
    """
    m = _PATH_HEAD.match(message)
    if m is None:
        return message
    said = field_words(m.group(1), survey)
    if said == m.group(1):
        return message
    rule = message[m.end():]
    # the model's refusals end with the field in words, as it read them: said once is enough
    for named in (said, field_words(m.group(1))):
        if rule.endswith(f" ({named})"):
            rule = rule[: -len(named) - 3]
            break
    return f"{said}: {rule}"


# --- keys left in running text --------------------------------------------------------------

_PATH_ANYWHERE = re.compile(r"\b(?:storeys|hazards|building|inspection)(?:\[\d+\])?"
                            r"(?:\.[A-Za-z_][A-Za-z0-9_]*(?:\[\d+\])*)*")
_KEYISH = re.compile(r"'?\b([A-Za-z][A-Za-z0-9]*(?:_[A-Za-z0-9]+)+)\b'?")
# where a key met in running text is looked up, first found wins
_KEY_SECTIONS = ("signs", "hazards", "systems", "member_kinds", "assumptions", "wall_modes")


@cache
def _key_index() -> dict[str, str]:
    index: dict[str, str] = {}
    voc = vocabulary()
    for section in _KEY_SECTIONS:
        for k, e in voc.get(section, {}).items():
            index.setdefault(k, e.words)
    for name, section_entries in voc.items():
        if name.startswith("fields."):
            for k, e in section_entries.items():
                if e.unit:  # 'gauge_mm' reads 'gauge (mm)'; other keys read as plain words
                    index.setdefault(k, e.with_unit)
    return index


def plain_text(text: str, survey: Any = None) -> str:
    """Running text with the keys in it put in words, for a person to read.

    A leading 'path: ' and any survey path in the text ('storeys[0].readings[5]') read as
    their words; a key such as cover_spalling or falling_hazard (quoted or not) as its words.
    Any other word with underscores reads with spaces ('override_reason': 'override reason').
    """
    text = message_words(text, survey)

    def path(m: re.Match[str]) -> str:
        said = field_words(m.group(0), survey)
        return m.group(0) if said == m.group(0) else said

    if "[" in text or "." in text:
        text = _PATH_ANYWHERE.sub(path, text)
    index = _key_index()

    def key(m: re.Match[str]) -> str:
        return index.get(m.group(1), _plain(m.group(1)))

    return _KEYISH.sub(key, text) if "_" in text else text
