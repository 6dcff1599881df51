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


def solve(checker, doc, name: str, result) -> Solution:
    rechecks = Rechecks(checker, doc, nominal=False)  # "no error" needs the tolerances of the spec
    inp = overrides.find(rechecks.table, name)
    if inp.kind not in ("quantity", "number", "angle"):
        raise overrides.SettingProblem(f"{name} is not a number; solve finds the range of a number")
    if inp.value is None:
        cell = result.sheet.get(inp.column, {}).get(inp.parameter)
        if cell is None or cell.value is None or cell.value <= 0:
            raise overrides.SettingProblem(f"{name} has no value in this spec to start from; state it, or set "
                                           "one with --set")
        inp = replace(inp, value=cell.value, display_unit=cell.display_unit)
    if not inp.signed and inp.value <= 0:
        raise overrides.SettingProblem(f"{name} is {inp.value:g}: solve needs a positive value to start from")
    t0, lo, hi, step, to_x = domain(inp)
    _, outcomes, _ = checker.rerun(doc, doc.data)
    targets = [(o.at, o.need) for o in outcomes]

    def ok(t: float) -> float:
        values, error = rechecks.run(inp, to_x(t))
        met = all(values.get(at) is not None and need.low <= values[at] <= need.high for at, need in targets)
        return 0.0 if met and not error else 1.0

    found = seek.region(ok, t0, ok(t0), lo, hi, (-0.5, 0.5), step, BUDGET)
    if found is None or not found.reachable:
        errors = sorted({f.rule for f in result.findings if f.severity == "error"})
        why = f"at the value now the check reports {', '.join(errors)}" if errors else ""
        return Solution(name, None, None, inp.dimension, inp.value, inp.display_unit, False, why)
    low = to_x(found.low) if found.low is not None else (1.0 if inp.exact else None)
    high = to_x(found.high) if found.high is not None else (inp.highest if math.isfinite(inp.highest) else None)
    if inp.exact:
        low = float(math.ceil(low - 1e-9)) if low is not None else None
        high = float(math.floor(high + 1e-9)) if high is not None else None
        if low is not None and high is not None and low > high:
            return Solution(name, None, None, inp.dimension, inp.value, inp.display_unit, False,
                            "no whole number lies in the range")
    return Solution(name, low, high, inp.dimension, inp.value, inp.display_unit, True)
