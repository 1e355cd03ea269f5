"""What the paper form's look-up sheet lists for residual capacity beyond concrete.

For a steel moment frame's connections, the FEMA 352 damage types (the code to write, its
family, what it is, its damage index); for the walls and infill panels FEMA 306 covers, the
behaviour modes kept for them and the FEMA 306 severities, each with what it means; and how to
write how many members were inspected. The same lists the screens offer (the rules of
`triage.standards.takes_*`), in the vocabulary's words: whatever is written on paper can be
picked when the form is typed in. Every figure is from memory and says so.

Pure data: no reportlab here (`paper_form.py` draws it).
"""

from __future__ import annotations

from collections.abc import Sequence

from triage import standards
from triage.standards import SEVERITIES
from triage.standards.vocabulary import describe, many, meaning, words

FIELD = "fields.member_group"


def _first_up(text: str) -> str:
    """The text with its first letter a capital (the rest as it is: 'FEMA' stays)."""
    return text[:1].upper() + text[1:]


def capacity_asks(grids: Sequence[tuple[str, Sequence[str]]]) -> tuple[bool, bool]:
    """What grids of these (kind, systems) ask: (a connection's type, a wall's mode)."""
    return (any(standards.takes_connection_type(k, s) for k, s in grids),
            any(standards.takes_wall_mode(k, s) for k, s in grids))


def capacity_step(grids: Sequence[tuple[str, Sequence[str]]]) -> str:
    """The words the instructions add for the capacity columns ('' where there are none)."""
    steel, walls = capacity_asks(grids)
    if not (steel or walls):
        return ""
    what = []
    if steel:
        what.append(f"for a connection its {words(FIELD, 'connection_type')} code")
    if walls:
        what.append(f"for a wall or infill panel its {words(FIELD, 'mode')} and "
                    f"{words(FIELD, 'severity')}")
    return (" Write " + "; ".join(what) + " (the look-up sheet lists them; blank when not "
            "judged), and how many of the group were inspected when not all were: those not "
            "seen are never counted as undamaged.")


def capacity_lookup(kinds: Sequence[str], systems: Sequence[str]) -> list[tuple[str, list[str]]]:
    """(heading, lines) of the look-up sheet for these member kinds of these systems."""
    std = standards.load()
    out: list[tuple[str, list[str]]] = []
    if any(standards.takes_connection_type(k, systems) for k in kinds):
        dflt = std.assumptions.fema352_fractured_type
        out.append((
            f"{_first_up(words(FIELD, 'connection_type'))} of a connection (write the code; "
            f"FEMA 352 chapter 4, from memory; {words('signs', 'connection_fractured')} "
            f"ticked with no type counts as {dflt}, ours)",
            [f"{words('connection_types', code)}: {describe('connection_types', code)}; "
             f"damage index {t.index:g}" for code, t in std.steel.types.items()]))
    walls = [k for k in kinds if standards.takes_wall_mode(k, systems)]
    for kind in walls:
        out.append((
            f"{_first_up(words(FIELD, 'mode'))} of {many('member_kinds', kind)} (FEMA 306, "
            "from memory): the inspector's judgement, not read from a crack",
            [words("wall_modes", m) + (f": {meaning('wall_modes', m)}"
                                       if meaning("wall_modes", m) else "")
             for m in standards.wall_modes_kept(kind, systems)]))
    if walls:
        out.append((
            f"{words(FIELD, 'severity')} (from memory; not a JBDPA grade): blank to read it "
            "from the widest crack on the mode's bounds",
            [f"{words('severities', s)}: {meaning('severities', s)}" for s in SEVERITIES]))
    return out
