"""Field-form definitions: what to count, look at and record, per structural system.

One TOML file per structural system key of `triage/standards/systems.toml`, in the folder
`triage.resources.forms_dir()` (`forms/` of the repository, shipped inside the wheel). A form
names the member kinds an inspector counts, the signs of the one sign table
(`triage/standards/signs.toml`) to look for on each kind, by key, with a hint on where to look;
a short description in our words of each damage class; and the hazard check list, grouped.
A form never defines a sign or a class of its own.

Every file is validated on load: a malformed or incomplete form raises `FormError`, whose lines
name the file, the key and the rule, one line per rule broken (`str()` is the first), and the
tool refuses to start on it (`check_forms()`).

    from triage.forms import load_form
    form = load_form("rc_frame")
    form.member_kinds                 # ("column", "beam", "slab")
    form.signs_for("column")          # [("cover_spalling", "at the top and bottom ..."), ...]
"""

from __future__ import annotations

import tomllib
from dataclasses import dataclass
from functools import cache
from pathlib import Path
from typing import Any, Literal

from pydantic import BaseModel, ConfigDict, Field, ValidationError

from triage import standards
from triage.errors import InputRefused
from triage.model import MEMBER_KINDS, MemberKind
from triage.resources import forms_dir
from triage.standards import CLASSES

FORMAT = "triage-form/1"

# The hazard groups of a form, in the order an inspector meets them walking round and through.
HAZARD_GROUPS: tuple[str, ...] = (
    "ground and foundation", "structure", "falling objects", "exits and services", "neighbours")
HazardGroupName = Literal[
    "ground and foundation", "structure", "falling objects", "exits and services", "neighbours"]


class FormError(InputRefused, ValueError):
    """A form file broke a rule; `str()` is one line naming the file, the key and the rule.

    `all_messages` holds one such line per rule the file breaks (the command line prints
    each), the first of them being `str()`.
    """

    def __init__(self, message: str, all_messages: list[str] | None = None) -> None:
        super().__init__(message)
        self.all_messages = all_messages or [message]

    @classmethod
    def of(cls, path: Path, problems: list[str]) -> FormError:
        """The refusal of a file breaking `problems` (at least one), each line naming it."""
        lines = [f"{path}: {p}" for p in problems]
        return cls(lines[0], lines)


class _Model(BaseModel):
    model_config = ConfigDict(extra="forbid", frozen=True)


class SignEntry(_Model):
    """A sign of the sign table to look for on a member kind, with where to look."""

    sign: str = Field(min_length=1, description="a key of triage/standards/signs.toml")
    hint: str = Field(min_length=1, description="where and how to look for it, our words")


class KindEntry(_Model):
    """A member kind the inspector counts in a storey of this system."""

    kind: MemberKind = Field(description="member kind of the survey format")
    label: str = Field(min_length=1, description="what the members are called on the form")
    count_hint: str = Field(min_length=1, description="what to count and how to log damage")
    signs: tuple[SignEntry, ...] = Field(description="signs to look for (may be empty)")


class HazardEntry(_Model):
    """A hazard kind on the check list, with where to look."""

    hazard: str = Field(min_length=1, description="a key of triage/standards/hazards.toml")
    hint: str = Field(min_length=1, description="where and how to look for it, our words")


class HazardGroup(_Model):
    """A group of the hazard check list."""

    group: HazardGroupName
    items: tuple[HazardEntry, ...] = Field(min_length=1)


class ClassText(_Model):
    """What each damage class looks like on this system's members, in our words."""

    I: str = Field(min_length=1)  # noqa: E741  (the trade's name of the class)
    II: str = Field(min_length=1)
    III: str = Field(min_length=1)
    IV: str = Field(min_length=1)
    V: str = Field(min_length=1)


class FormFile(_Model):
    """The contents of one form file, `triage-form/1`."""

    format: Literal["triage-form/1"]
    system: str = Field(min_length=1, description="structural system key; also the file name")
    title: str = Field(min_length=1)
    summary: str = Field(min_length=1, description="what to look at first, our words")
    readings: str = Field(min_length=1, description="where to take drift readings")
    kinds: tuple[KindEntry, ...] = Field(min_length=1)
    classes: ClassText
    hazards: tuple[HazardGroup, ...] = Field(min_length=1)


@dataclass(frozen=True)
class Form:
    """A validated field form for one structural system."""

    system: str
    title: str
    summary: str
    readings_hint: str
    kinds: tuple[KindEntry, ...]
    class_text: dict[str, str]
    hazard_groups: list[tuple[str, list[tuple[str, str]]]]
    path: Path

    @property
    def member_kinds(self) -> tuple[str, ...]:
        """The member kinds counted in a storey, in the form's order."""
        return tuple(k.kind for k in self.kinds)

    def _kind(self, kind: str) -> KindEntry:
        for k in self.kinds:
            if k.kind == kind:
                return k
        raise KeyError(f"{self.system} form has no member kind {kind!r} "
                       f"(kinds: {', '.join(self.member_kinds)})")

    def signs_for(self, kind: str) -> list[tuple[str, str]]:
        """The (sign key, hint) pairs to look for on a member kind; KeyError if not on the form."""
        return [(s.sign, s.hint) for s in self._kind(kind).signs]

    def label_of(self, kind: str) -> str:
        """What the form calls the members of a kind (e.g. 'gravity columns')."""
        return self._kind(kind).label

    def count_hint(self, kind: str) -> str:
        """What to count of a kind and how to log its damage."""
        return self._kind(kind).count_hint

    def hazard_keys(self) -> list[str]:
        """Every hazard key on the check list, in the form's order."""
        return [key for _, items in self.hazard_groups for key, _ in items]


def _loc(loc: tuple[int | str, ...]) -> str:
    out = ""
    for part in loc:
        out += f"[{part}]" if isinstance(part, int) else ("." if out else "") + str(part)
    return out or "(form)"


def _error_lines(err: ValidationError) -> list[str]:
    """One line per pydantic error: `key.path: the rule`."""
    out = []
    for e in err.errors(include_url=False):
        loc = tuple(e.get("loc", ()))
        kind = e.get("type", "")
        if kind == "extra_forbidden":
            rule = f"unknown key {loc[-1]!r} (not part of {FORMAT})"
        elif kind == "missing":
            rule = "required key is missing"
        else:
            msg = str(e.get("msg", kind))
            if msg.startswith("Input should"):
                msg = "must" + msg[len("Input should"):]
            rule = msg[0].lower() + msg[1:] if msg else kind
        out.append(f"{_loc(loc)}: {rule}")
    return out


def _check(f: FormFile, stem: str) -> list[str]:
    """Rules across keys and against the standards tables: every one broken, in file order.

    A system that is not one of the tables' stops there: the sign and hazard rules depend on it.
    """
    std = standards.load()
    out: list[str] = []
    if f.system != stem:
        out.append(f"system: {f.system!r} does not match the file name {stem!r}.toml")
    if f.system not in std.systems:
        return [*out, f"system: {f.system!r} is not a structural system of "
                f"triage/standards/systems.toml (known: {', '.join(std.systems)})"]
    seen_kinds: set[str] = set()
    for ki, k in enumerate(f.kinds):
        if k.kind in seen_kinds:
            out.append(f"kinds[{ki}].kind: {k.kind!r} is listed twice; each kind once")
        seen_kinds.add(k.kind)
        seen_signs: set[str] = set()
        for si, s in enumerate(k.signs):
            at = f"kinds[{ki}].signs[{si}].sign"
            sign = std.signs.get(s.sign)
            if sign is None:
                out.append(f"{at}: {s.sign!r} is not a key of the sign table "
                           f"triage/standards/signs.toml (known: {', '.join(std.signs)})")
            elif k.kind not in sign.kinds:
                out.append(f"{at}: {s.sign!r} is not a sign of a {k.kind} in the sign table "
                           f"(it applies to: {', '.join(sign.kinds)})")
            elif f.system not in sign.systems:
                out.append(f"{at}: {s.sign!r} is not a sign of {f.system} in the sign table "
                           f"(its systems: {', '.join(sign.systems)})")
            if s.sign in seen_signs:
                out.append(f"{at}: {s.sign!r} is listed twice for {k.kind}")
            seen_signs.add(s.sign)
    on_form = {s.sign for k in f.kinds for s in k.signs}
    out += [f"kinds: sign {key!r} of {f.system} (sign table) is on no member kind of the form "
            f"(add it to one of: {', '.join(sign.kinds)})"
            for key, sign in std.signs.items() if f.system in sign.systems and key not in on_form]
    groups = [g.group for g in f.hazards]
    out += [f"hazards: group {g!r} is listed twice" for g in dict.fromkeys(groups)
            if groups.count(g) > 1]
    seen_h: set[str] = set()
    for gi, g in enumerate(f.hazards):
        for hi, h in enumerate(g.items):
            at = f"hazards[{gi}].items[{hi}].hazard"
            hk = std.hazards.get(h.hazard)
            if hk is None:
                out.append(f"{at}: {h.hazard!r} is not a hazard kind of "
                           f"triage/standards/hazards.toml (known: {', '.join(std.hazards)})")
            elif hk.group != g.group:
                out.append(f"{at}: {h.hazard!r} belongs to the group {hk.group!r} "
                           f"(triage/standards/hazards.toml), not {g.group!r}")
            if h.hazard in seen_h:
                out.append(f"{at}: {h.hazard!r} is listed twice")
            seen_h.add(h.hazard)
    missing = [k for k in std.hazards if k not in seen_h]
    if missing:
        out.append(f"hazards: the check list lacks {', '.join(missing)} (every hazard kind is "
                   "on it)")
    return out


def read_form_file(path: Path) -> Form:
    """Read and validate one form file; raise `FormError` naming the file, key and rule."""
    try:
        raw: dict[str, Any] = tomllib.loads(path.read_text(encoding="utf-8"))
    except FileNotFoundError:
        raise FormError(f"{path}: no such form file") from None
    except UnicodeDecodeError:
        raise FormError(f"{path}: not UTF-8 text (a form file is TOML)") from None
    except tomllib.TOMLDecodeError as err:
        raise FormError(f"{path}: not valid TOML: {err}") from None
    except OSError as err:
        raise FormError(f"{path}: cannot be read ({err.strerror})") from None
    try:
        f = FormFile.model_validate(raw)
    except ValidationError as err:
        raise FormError.of(path, _error_lines(err)) from None
    problems = _check(f, path.stem)
    if problems:
        raise FormError.of(path, problems)
    return Form(
        system=f.system, title=f.title, summary=f.summary, readings_hint=f.readings,
        kinds=f.kinds,
        class_text={c: getattr(f.classes, c) for c in CLASSES},
        hazard_groups=[(g.group, [(h.hazard, h.hint) for h in g.items]) for g in f.hazards],
        path=path)


def _stamp(base: Path) -> tuple[tuple[str, int, int], ...]:
    """Names, sizes and change times of the form files: a changed file is read again."""
    if not base.is_dir():
        return ()
    return tuple((p.name, p.stat().st_size, p.stat().st_mtime_ns)
                 for p in sorted(base.glob("*.toml")))


@cache
def _load_all(folder: str, stamp: tuple[tuple[str, int, int], ...]) -> dict[str, Form]:
    base = Path(folder)
    if not base.is_dir():
        raise FormError(f"{base}: the folder of form files is missing")
    known = standards.system_keys()
    forms: dict[str, Form] = {}
    problems: list[str] = []   # every rule broken, in every file, one line each
    files = sorted(base.glob("*.toml"))
    for path in files:
        if path.stem not in known:
            problems.append(f"{path}: {path.stem!r} is not a structural system of "
                            f"triage/standards/systems.toml (known: {', '.join(known)})")
            continue
        try:
            forms[path.stem] = read_form_file(path)
        except FormError as err:
            problems += err.all_messages
    absent = [k for k in known if k not in {p.stem for p in files}]
    if absent:
        problems.append(f"{base}: no form file for {', '.join(absent)} "
                        "(one <system>.toml per structural system)")
    if problems:
        raise FormError(problems[0], problems)
    return {k: forms[k] for k in known}


def load_forms(folder: Path | None = None) -> dict[str, Form]:
    """Every form, keyed by system in the order of systems.toml; `FormError` on any bad file."""
    base = (folder or forms_dir()).resolve()
    return dict(_load_all(str(base), _stamp(base)))


def load_form(system_key: str, folder: Path | None = None) -> Form:
    """The form of one structural system; `FormError` for an unknown system or a bad file."""
    forms = load_forms(folder)
    if system_key not in forms:
        raise FormError(f"{system_key!r} is not a structural system "
                        f"(known: {', '.join(forms)})")
    return forms[system_key]


def check_forms(folder: Path | None = None) -> None:
    """Validate every form file; raise `FormError` so the tool refuses to start.

    Its `all_messages` name every rule broken in every file, one line each.
    """
    load_forms(folder)


def known_systems() -> tuple[str, ...]:
    """The structural system keys a form exists for (all of systems.toml)."""
    return tuple(standards.system_keys())


__all__ = ["FORMAT", "HAZARD_GROUPS", "MEMBER_KINDS", "ClassText", "Form", "FormError",
           "FormFile", "HazardEntry", "HazardGroup", "KindEntry", "SignEntry", "check_forms",
           "known_systems", "load_form", "load_forms", "read_form_file"]
