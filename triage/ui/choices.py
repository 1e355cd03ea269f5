"""What the screens offer to pick from: storey labels, and what the field forms list.

From the forms (forms/) of a storey's systems: the member kinds, damage signs, hazards and
class descriptions (the lists completed from the standard tables).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # the forms load when first asked for
    from triage.forms import Form

# How storeys above ground are named, chosen when a survey is made (basements are B1, B2 …
# either way): the ground storey G then 1, 2 …, or 1, 2, 3 … from the ground storey up.
NAMINGS: tuple[tuple[str, str], ...] = (("G, 1, 2 … (ground storey G)", "G"),
                                       ("1, 2, 3 … (ground storey 1)", "1"))


def storey_labels(above: int, below: int, naming: str = "G") -> list[str]:
    """Storey labels bottom to top: B2, B1 below ground, then G, 1, 2 … (or 1, 2, 3 …)."""
    labels = [f"B{i}" for i in range(below, 0, -1)]
    if naming == "1":
        labels += [str(i + 1) for i in range(above)]
    else:
        labels += ["G" if i == 0 else str(i) for i in range(above)]
    return labels


def next_label(existing: list[str]) -> str:
    """A label for a storey added on top: one more than the highest number, or G first."""
    if "G" not in existing and not any(x.isdigit() for x in existing):
        return "G"
    nums = [int(x) for x in existing if x.isdigit()]
    n = (max(nums) + 1) if nums else 1
    while str(n) in existing:
        n += 1
    return str(n)



def _forms(systems: tuple[str, ...]) -> list[Form]:
    from triage.forms import FormError, load_form

    out: list[Form] = []
    for s in dict.fromkeys(systems):
        try:
            out.append(load_form(s))
        except (FormError, KeyError, OSError):
            continue
    return out


def member_kinds(systems: tuple[str, ...]) -> list[str]:
    """Member kinds the forms of these systems count first, then every other kind."""
    from triage.model import MEMBER_KINDS

    kinds: list[str] = []
    for f in _forms(systems):
        kinds += [k for k in f.member_kinds if k not in kinds]
    return kinds + [k for k in MEMBER_KINDS if k not in kinds]


def sign_choices(systems: tuple[str, ...], kind: str) -> list[tuple[str, str]]:
    """(sign key, where to look) for a member kind, from the forms of the storey's systems.

    Signs the sign table gives that kind in one of these systems that no form lists come
    after, with their description as the hint: an unreinforced masonry wall is never offered
    a concrete wall's spalled cover or bars. Only when none of the systems is in the table
    (none known) are all the kind's signs offered.
    """
    from triage import standards

    out: dict[str, str] = {}
    for f in _forms(systems):
        try:
            for key, hint in f.signs_for(kind):
                out.setdefault(key, hint)
        except KeyError:
            continue
    table = standards.load().signs
    known = {s for sign in table.values() for s in sign.systems}
    here = set(systems) & known
    for key, sign in table.items():
        if kind in sign.kinds and key not in out and (not here or here & set(sign.systems)):
            out[key] = sign.description
    return list(out.items())


def hazard_choices(systems: tuple[str, ...]) -> list[tuple[str, str, str]]:
    """(group, hazard key, where to look) from the forms' check lists, in walking order."""
    from triage import standards

    seen: dict[str, tuple[str, str, str]] = {}
    for f in _forms(systems):
        for group, items in f.hazard_groups:
            for key, hint in items:
                seen.setdefault(key, (group, key, hint))
    for key, h in standards.load().hazards.items():
        seen.setdefault(key, (h.group, key, h.description))
    return list(seen.values())


def class_texts(systems: tuple[str, ...]) -> dict[str, str]:
    """What each damage class looks like, in the first form's words."""
    for f in _forms(systems):
        return dict(f.class_text)
    return {}



# --- residual capacity beyond concrete: what a member group of these systems may record ---

def connection_type_choices() -> list[tuple[str, str]]:
    """(words, code) of every FEMA 352 connection damage type: the code with its family."""
    from triage import standards
    from triage.standards.vocabulary import words

    return [(words("connection_types", c), c) for c in standards.connection_type_keys()]


def wall_mode_choices(kind: str, systems: tuple[str, ...]) -> list[tuple[str, str]]:
    """(words, key) of the FEMA 306 modes the tool keeps for this kind in these systems.

    In the table's order, "not known" last (it takes the worst of the type's modes).
    """
    from triage import standards
    from triage.standards.vocabulary import words

    return [(words("wall_modes", m), m) for m in standards.wall_modes_kept(kind, systems)]


def severity_choices() -> list[tuple[str, str]]:
    """(words, key) of the FEMA 306 severities, insignificant to extreme."""
    from triage.standards import SEVERITIES
    from triage.standards.vocabulary import words

    return [(words("severities", s), s) for s in SEVERITIES]


def capacity_hint(kind: str, connection_type: str | None, mode: str | None,
                  severity: str | None) -> str:
    """What the picked FEMA 352 type, or FEMA 306 mode and severity, mean: in words."""
    from triage import standards
    from triage.standards.vocabulary import describe, meaning, words

    std = standards.load()
    if kind == "connection":
        if connection_type is None:
            dflt = std.assumptions.fema352_fractured_type
            return (f"FEMA 352 damage type blank: none seen (with {words('signs', FRACTURED)} "
                    f"ticked, taken as {words('connection_types', dflt)}, ours)")
        t = std.steel.types[connection_type]
        return (f"FEMA 352 type {words('connection_types', connection_type)}: "
                f"{describe('connection_types', connection_type)}; damage index {t.index:g} "
                "(from memory)")
    m = ("behaviour mode blank: the worst of the wall's modes is taken" if mode is None
         else f"behaviour mode {words('wall_modes', mode)}"
         + (f" ({meaning('wall_modes', mode)})" if meaning("wall_modes", mode) else ""))
    s = ("FEMA 306 severity blank: read from the widest crack on the mode's bounds"
         if severity is None else
         f"FEMA 306 severity {words('severities', severity)}: {meaning('severities', severity)}")
    return f"{m} · {s} (from memory)"


FRACTURED = "connection_fractured"  # the sign that, without a type, takes our default type
