"""The assessment's residual capacity per storey, direction and method, and its method line.

JBDPA's R (reinforced concrete, the member stage) beside the FEMA 352 and FEMA 306 results
(`capacity.py`); where a storey direction has two, the worse ratio is `taken` and both are
listed (docs/method.md, section 4a).
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from triage.standards import GRADES, Grade

from . import damage as dmg
from .context import DIRS, JBDPA_SOURCE, Context
from .levels import Level
from .result import CapacityResult
from .stats import sig6, sig6_opt
from .steel import source as steel_source
from .walls import source as walls_source

if TYPE_CHECKING:   # the stage imports the engine's modules; only its type is needed here
    from .stages.members import StoreyMembers


def worse_ratio(a: float | None, b: float | None) -> float | None:
    """The lesser of two ratios, either possibly absent."""
    if a is None or b is None:
        return a if b is None else b
    return min(a, b)


def worse_grade(grades: list[Grade | None]) -> Grade | None:
    """The worst of some grades (None when there is none)."""
    found = [g for g in grades if g is not None]
    return max(found, key=GRADES.index) if found else None


def _jbdpa(ctx: Context, sm: StoreyMembers, d: str) -> CapacityResult | None:
    r = sm.r_by_dir.get(d)
    if d not in ctx.rc or r is None:
        return None
    st = ctx.survey.storeys[sm.storey]
    terms = sm.model.terms[d]  # R is measured in d, so its groups are there
    seen, count = terms.seen, terms.count
    grade = dmg.grade_of(r, ctx.std)
    return CapacityResult(
        storey=st.label, dir=d, method="jbdpa", ratio=sig6(r),
        level=Level.of(ctx.a.grade_to_level[grade]).word, grade=grade, index=None,
        inspected=seen, count=count, sampled=seen < count, taken=False, source=JBDPA_SOURCE)


def capacity_results(ctx: Context, members: list[StoreyMembers]) -> tuple[CapacityResult, ...]:
    """Every method's residual capacity of every storey direction, the worse marked taken."""
    out: list[CapacityResult] = []
    for sm in members:
        label = ctx.label(sm.storey)
        for d in DIRS:
            found = []
            j = _jbdpa(ctx, sm, d)
            if j is not None:
                found.append(j)
            for r in sm.beyond.results:
                if r.dir != d:
                    continue
                src = steel_source(ctx.std) if r.method == "fema352" else walls_source(ctx.std)
                found.append(CapacityResult(
                    storey=label, dir=d, method=r.method,
                    ratio=sig6_opt(r.ratio), level=r.level.word if r.level is not None else None,
                    grade=r.grade, index=sig6_opt(r.index), inspected=r.inspected,
                    count=r.count, sampled=r.sampled, taken=False, source=src))
            with_ratio = [i for i, c in enumerate(found) if c.ratio is not None]
            if with_ratio:
                worst = min(with_ratio, key=lambda i: (found[i].ratio, i))
                found[worst] = found[worst].model_copy(update={"taken": True})
            out += found
    return tuple(out)


def capacity_method(ctx: Context, members: list[StoreyMembers]) -> str | None:
    """The published methods behind the residual capacities, '; ' between them."""
    used = {r.method for sm in members for r in sm.beyond.results}
    cites = [ctx.std.capacity.source.cite()] if ctx.rc else []
    if "fema352" in used:
        cites.append(ctx.std.steel.source.cite())
    if "fema306" in used:
        cites.append(ctx.std.walls.source.cite())
    return "; ".join(cites) if cites else None
