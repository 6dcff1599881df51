"""``speccheck solve``: the range of one input over which every target is met and no error is reported.

The spec is checked again with the input changed (``remedies.Rechecks``: what the input
determines moves with it), and a value counts when the nominal value of every target meets
it and the check reports no error.  ``seek.region`` takes the interval around the input's
value (or, when that value fails, the nearest one on a grid over the range searched,
the same as for remedies) and refines its ends by bisection.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from speccheck.checking import overrides, seek
from speccheck.checking.remedies import Rechecks, domain

BUDGET = 200  # re-checks


@dataclass(frozen=True)
class Solution:
    input: str
    low: float | None  # SI; None: open on that side (met to the end of the range searched)
    high: float | None
    unit: str  # SI
    value: float | None  # the input's value now
    display_unit: str
    reachable: bool
    why: str = ""  # when not reachable: what stands in the way
    searched: tuple[float, float] | None = None  # the range of the input searched, SI, low to high


def solve(checker, doc, name: str, result) -> Solution:
    points = doc.data.get("operating_points") if isinstance(doc.data, dict) else None
    points = [i for i, p in enumerate(points) if isinstance(p, dict)] if isinstance(points, list) else []
    # "no error" needs the tolerances of the spec; each value is checked at the laser block and
    # at every operating point (the path walked at each, as the check does)
    rechecks = Rechecks(checker, doc, nominal=False, budget=BUDGET * (1 + len(points)))
    inp = overrides.find(rechecks.table, name)
    if inp.kind not in ("quantity", "number", "angle"):
        raise overrides.SettingProblem(f"{name} is not a number; solve finds the range of a number")
    if inp.value is None:
        cell = result.sheet.get(inp.column, {}).get(inp.parameter)
        if cell is None or cell.value is None or cell.value <= 0:
            raise overrides.SettingProblem(f"{name} has no value in this spec to start from; state it, or set "
                                           "one with --set")
        inp = replace(inp, value=cell.value, display_unit=cell.display_unit)
    if not inp.signed and (inp.value == 0 or inp.value < 0 and inp.accepts != "any"):
        raise overrides.SettingProblem(f"{name} is {inp.value:g} {inp.dimension}: solve needs a value other than "
                                       "zero to start from; set one with --set")
    t0, lo, hi, step, to_x = domain(inp)
    searched = tuple(sorted((to_x(lo), to_x(hi))))
    targets = {}
    for point in [None] + points:
        _, outcomes, _ = checker.rerun(doc, doc.data, point=point)
        # with operating points, a target the laser block alone does not determine is theirs to meet
        targets[point] = [(o.at, o.need) for o in outcomes if not (point is None and points and o.value is None)]

    def ok(t: float) -> float:
        for point, wanted in targets.items():
            values, error = rechecks.run(inp, to_x(t), point)
            if error or not all(values.get(at) is not None and need.low <= values[at] <= need.high
                                for at, need in wanted):
                return 1.0
        return 0.0

    unknown = next((f.message for f in result.findings if f.rule == "target-unknown"), None)
    if unknown is not None:  # no value meets a target the numbers do not determine: say what would
        return Solution(name, None, None, inp.dimension, inp.value, inp.display_unit, False, unknown, searched)
    found = seek.region(ok, t0, ok(t0), lo, hi, (-0.5, 0.5), step, BUDGET)
    if found is None or not found.reachable:
        errors = sorted({f.rule for f in result.findings if f.severity == "error"})
        why = f"at the value now the check reports {', '.join(errors)}" if errors else ""
        return Solution(name, None, None, inp.dimension, inp.value, inp.display_unit, False, why, searched)
    low = to_x(found.low) if found.low is not None else (1.0 if inp.exact else None)
    high = to_x(found.high) if found.high is not None else (inp.highest if math.isfinite(inp.highest) else None)
    if inp.value < 0 and not inp.signed:  # searched in ln |x|: the ends change places
        low, high = high, low
    if inp.exact:
        low = float(math.ceil(low - 1e-9)) if low is not None else None
        high = float(math.floor(high + 1e-9)) if high is not None else None
        if low is not None and high is not None and low > high:
            return Solution(name, None, None, inp.dimension, inp.value, inp.display_unit, False,
                            "no whole number lies in the range", searched)
    return Solution(name, low, high, inp.dimension, inp.value, inp.display_unit, True, searched=searched)
