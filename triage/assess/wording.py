"""The engine's words for keys, from the one vocabulary (`triage.standards.vocabulary`).

The reasons, notes and text output name systems, signs, hazards, member kinds, levels and
survey fields in these words, so no internal key (`rc_frame`, `falling_hazard`, `sd_mm`,
`storeys[0].readings[5]`) reaches a person; the JSON keeps its keys as data.
"""

from __future__ import annotations

from triage.standards.vocabulary import entry, words


def field_name(block: str, key: str) -> str:
    """A survey field's words without its unit ('reading', 'sd_mm' -> 'uncertainty')."""
    e = entry(f"fields.{block}", key)
    return e.words if e is not None else words("", key)


def system_words(key: str) -> str:
    """A structural system's words ('rc_frame' -> 'concrete frame')."""
    return words("systems", key)


def systems_words(keys: list[str], joiner: str) -> str:
    """Several systems' words joined ('concrete frame or timber stud walls')."""
    return f" {joiner} ".join(system_words(k) for k in keys)


def kind_words(key: str) -> str:
    """A member kind's words ('slab' -> 'floor slab')."""
    return words("member_kinds", key)


def hazard_words(key: str) -> str:
    """A hazard kind's words ('falling_hazard' -> 'falling hazard')."""
    return words("hazards", key)


def level_words(key: str) -> str:
    """A performance level's words ('LS' -> 'Life Safety (LS)')."""
    return words("levels", key)


def class_from_words(key: str | None) -> str:
    """Where a member group's class came from, as a phrase: 'from crack width', 'set by hand'."""
    if key is None:
        return "no damage logged"
    return "set by hand" if key == "override" else "from " + words("class_from", key)


def mode_words(key: str) -> str:
    """A FEMA 306 behaviour mode's words ('web_crushing' -> 'web crushing')."""
    return words("wall_modes", key)


def severity_words(key: str | None) -> str:
    """A FEMA 306 severity's words after 'FEMA 306 severity' (None -> 'none (undamaged)')."""
    return "none (undamaged)" if key is None else words("severities", key)


def connection_type_words(code: str) -> str:
    """A FEMA 352 connection damage type with its family ('G4' -> 'G4 (girder)')."""
    return words("connection_types", code)


def group_words(kind: str, gi: int, ref: str | None = None) -> str:
    """A member group named in words: 'infill panel group 3', with its mark when it has one."""
    return f"{kind_words(kind)} group {gi + 1}" + (f" {ref}" if ref else "")
