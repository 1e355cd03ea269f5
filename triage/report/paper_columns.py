"""What the paper form's grids hold, as data: one `Col` per column, its words from the vocabulary.

A grid is a list of columns. Each column records one field of the survey format (its heading is
that field's words and unit in `triage/standards/vocabulary.toml`), is filled in one way
(written, ticked, or a choice circled) and has a width in points. The member grids pick their
columns per member kind and material from `MEMBER_COLUMNS`, a table: a field the survey gains
(a connection type, a wall's behaviour mode) is one more row there, with the kinds and
materials it belongs to, and the grids, the tests and the instructions follow.

Pure data and the vocabulary: no reportlab here, so the tests can read the same tables.

    from triage.report.paper_columns import member_columns, reading_columns
    [c.head for c in reading_columns()]     # ['#', 'direction', 'where', 'offset (mm)', ...]
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass
from typing import Literal

from triage import standards
from triage.forms import Form
from triage.standards.vocabulary import entry, words

Fill = Literal["write", "tick", "circle"]

# Readings the instructions ask for in each storey (four corners and the middle of the plan, in
# x and in y), and the rows printed for them: two spare rows for repeats of an odd reading.
READINGS_ASKED = 10
READING_ROWS = 12
# Rows for damaged members (or groups damaged alike) per storey and kind: the kinds that carry
# the storey (assumption `vertical_kinds`) get enough for a school's storey, the others fewer.
DAMAGED_ROWS_VERTICAL = 8
DAMAGED_ROWS_OTHER = 4
# Spare rows on the hazard list for a second hazard of a kind already listed.
SPARE_HAZARD_ROWS = 3
# Materials whose members are judged by residual crack width (the crack-width classes are
# written for concrete, and masonry cracks are read the same way); steel and timber members are
# judged by the signs seen (buckling, fractures, connections) and get no crack columns.
CRACK_MATERIALS: tuple[str, ...] = ("reinforced concrete", "masonry")


@dataclass(frozen=True)
class Col:
    """One column of a grid as printed."""

    head: str            # the heading printed at the top (the field's words and unit)
    width: float         # points, before the grid is fitted to the page
    fill: Fill = "write"
    choices: str = ""    # for "circle": the choices printed in every row, e.g. "x   y"
    field: str = ""      # the survey field it records, e.g. "reading.sd_mm" ("" for none)


@dataclass(frozen=True)
class MemberCol:
    """A row of the member-grid table: a member-group field and where it belongs.

    `kinds` and `materials` limit the column to those member kinds and to members of a system of
    those materials (None: every one); `where`, when given, to grids it says yes to for the kind
    and the grid's systems (the rules the screens use: `triage.standards.takes_*`).
    `field = "signs"` stands for one tick column per sign the forms list for the kind.
    """

    field: str
    width: float
    fill: Fill = "write"
    kinds: tuple[str, ...] | None = None
    materials: tuple[str, ...] | None = None
    head: str = ""       # heading when the field's own words need more (else the vocabulary's)
    choices: str = ""
    where: Callable[[str, Sequence[str]], bool] | None = None


def _field_head(block: str, field: str) -> str:
    e = entry(f"fields.{block}", field)
    if e is None:
        raise KeyError(f"the vocabulary has no words for fields.{block}.{field}")
    return e.with_unit


MEMBER_COLUMNS: tuple[MemberCol, ...] = (
    MemberCol("ref", 80.0),
    MemberCol("count", 34.0),
    MemberCol("ductility", 44.0, "tick", kinds=("column",),
              head=f"{words('fields.member_group', 'ductility')}: tick if "
                   f"{words('ductility', 'brittle')}"),
    MemberCol("dir", 46.0, "circle", kinds=("wall", "brace", "infill", "connection"),
              head=f"{words('fields.member_group', 'dir')} (blank: both)", choices="x    y"),
    MemberCol("weight", 44.0, kinds=("column", "wall"),
              head=f"{words('fields.member_group', 'weight')} (blank: 1)"),
    MemberCol("crack_mm", 44.0, materials=CRACK_MATERIALS),
    MemberCol("crack_sd_mm", 46.0, materials=CRACK_MATERIALS),
    # residual capacity beyond concrete: written as the look-up sheet lists them
    MemberCol("inspected", 44.0, where=standards.takes_inspected,
              head=f"{words('fields.member_group', 'inspected')} (blank: all)"),
    MemberCol("connection_type", 50.0, where=standards.takes_connection_type,
              head=f"{words('fields.member_group', 'connection_type')} (code)"),
    MemberCol("mode", 62.0, where=standards.takes_wall_mode),
    MemberCol("severity", 56.0, where=standards.takes_wall_mode),
    MemberCol("signs", 42.0, "tick"),
    MemberCol("damage_class", 40.0, head=f"{words('fields.member_group', 'damage_class')} "
                                        "(I–V)"),
    MemberCol("override_reason", 110.0),
)


def reading_columns() -> list[Col]:
    """The readings grid: number, direction, where, then an offset's fields, then a tilt's."""
    def f(name: str, width: float) -> Col:
        return Col(_field_head("reading", name), width, field=f"reading.{name}")

    return [Col("#", 22.0),
            Col(words("fields.reading", "dir"), 40.0, "circle", "x    y", "reading.dir"),
            f("where", 150.0),
            f("offset_mm", 50.0), f("gauge_mm", 50.0), f("sd_mm", 56.0),
            f("baseline_mm", 56.0), f("baseline_sd_mm", 60.0),
            f("tilt_deg", 44.0), f("sd_deg", 56.0),
            f("baseline_deg", 50.0), f("baseline_sd_deg", 60.0)]


def hazard_columns() -> list[Col]:
    """The hazard list: ticked when seen, the kind (with where to look), then its fields."""
    def f(name: str, width: float) -> Col:
        return Col(_field_head("hazard", name), width, field=f"hazard.{name}")

    return [Col("seen", 28.0, "tick"),
            Col(f"{words('fields.hazard', 'kind')}, and where to look", 420.0,
                field="hazard.kind"),
            f("where", 110.0), f("storey", 44.0), f("height_above_ground_m", 56.0),
            f("note", 120.0)]


@dataclass(frozen=True)
class KindGrid:
    """A member kind of a storey band: its signs (from every form listing it) and columns."""

    kind: str
    systems: tuple[str, ...]          # the systems whose forms list this kind
    signs: tuple[tuple[str, str], ...]  # (sign key, where to look), first form's hint first
    columns: tuple[Col, ...]
    damaged_rows: int

    @property
    def cracks(self) -> bool:
        """Whether the grid asks for a crack width."""
        return any(c.field == "member_group.crack_mm" for c in self.columns)


def _materials(systems: Sequence[str]) -> set[str]:
    table = standards.load().systems
    return {table[s].material for s in systems}


def member_columns(kind: str, systems: Sequence[str],
                   signs: Sequence[tuple[str, str]]) -> list[Col]:
    """The columns of a member kind's grid, for members of these systems, with these signs."""
    mats = _materials(systems)
    out: list[Col] = []
    for mc in MEMBER_COLUMNS:
        if mc.kinds is not None and kind not in mc.kinds:
            continue
        if mc.materials is not None and not mats & set(mc.materials):
            continue
        if mc.where is not None and not mc.where(kind, systems):
            continue
        if mc.field == "signs":
            out += [Col(words("signs", s), mc.width, "tick", field=f"member_group.signs.{s}")
                    for s, _ in signs]
            continue
        out.append(Col(mc.head or _field_head("member_group", mc.field), mc.width, mc.fill,
                       mc.choices, f"member_group.{mc.field}"))
    return out


def kind_grids(forms: Sequence[Form]) -> list[KindGrid]:
    """Every member kind the forms list, in their order, each once with the signs of all.

    A kind two systems share (a column in a concrete frame with braced steel bays) is one grid
    with both systems' signs, the first form's first, as the screens offer them.
    """
    vertical = standards.load().assumptions.vertical_kinds
    kinds: dict[str, tuple[list[str], dict[str, str]]] = {}
    for form in forms:
        for kind in form.member_kinds:
            systems, signs = kinds.setdefault(kind, ([], {}))
            systems.append(form.system)
            for sign, hint in form.signs_for(kind):
                signs.setdefault(sign, hint)
    # the kinds that carry the storey first (the order the instructions give), each in form order
    order = sorted(kinds, key=lambda k: k not in vertical)
    out = []
    for kind in order:
        systems, signs = kinds[kind]
        pairs = tuple(signs.items())
        out.append(KindGrid(kind, tuple(systems), pairs,
                            tuple(member_columns(kind, systems, pairs)),
                            DAMAGED_ROWS_VERTICAL if kind in vertical else DAMAGED_ROWS_OTHER))
    return out


def fit(columns: Sequence[Col], width: float, stretch: str = "") -> list[float]:
    """Column widths that fill `width`.

    The column of field `stretch` (else the last) takes what is left, or every width shrinks
    alike when the grid is too wide.
    """
    widths = [c.width for c in columns]
    at = next((i for i, c in enumerate(columns) if stretch and c.field == stretch),
              len(columns) - 1)
    rest = width - sum(widths) + widths[at]
    if rest >= widths[at]:
        widths[at] = rest
        return widths
    scale = width / sum(widths)
    return [w * scale for w in widths]
