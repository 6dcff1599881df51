"""Angles, read apart from pint: pint counts the radian as the number 1, so the unit system
refuses angles in every other value (``unit_text._RADIAN``).  A stage parameter of the
dimension ``angle`` (a grating's incidence angle) is read here: a number with deg, °, rad,
mrad or µrad, optionally ± a tolerance in the same unit, to radians."""

from __future__ import annotations

import math
import re

from speccheck.reading.values import Stated, ValueProblem

_FACTORS = {"deg": math.pi / 180.0, "degree": math.pi / 180.0, "degrees": math.pi / 180.0, "°": math.pi / 180.0,
            "rad": 1.0, "mrad": 1e-3, "µrad": 1e-6, "μrad": 1e-6, "urad": 1e-6}
_NUMBER = r"[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?"
_ANGLE = re.compile(rf"^\s*({_NUMBER})\s*(?:(?:±|\+/-|\+-)\s*({_NUMBER})\s*)?(deg|degrees?|°|rad|mrad|µrad|μrad|urad)\s*$")
_EXAMPLE = "'28 deg' or '0.49 rad'"


def parse_angle(label: str, raw, tolerance: float) -> Stated:
    """The angle ``raw`` in radians, its interval from a written ± or else ``tolerance``."""
    if isinstance(raw, bool) or not isinstance(raw, (str, int, float)):
        raise ValueProblem("invalid-value", f"{label}: expected an angle such as {_EXAMPLE}")
    text = str(raw)
    m = _ANGLE.match(text.replace("\u2212", "-")) if len(text) <= 64 else None
    if m is None:
        if isinstance(raw, (int, float)):
            raise ValueProblem("missing-unit", f"{label}: {text!r} has no unit; an angle needs deg or rad "
                               f"({_EXAMPLE})")
        raise ValueProblem("invalid-value", f"{label}: {text.strip()!r} is not an angle such as {_EXAMPLE}")
    factor = _FACTORS[m.group(3)]
    value = float(m.group(1)) * factor
    spread = float(m.group(2)) * factor if m.group(2) else abs(value) * tolerance
    if not math.isfinite(value) or not math.isfinite(spread) or abs(value) > 2.0 * math.pi:
        raise ValueProblem("invalid-value", f"{label}: {text.strip()!r} is not an angle between −360° and 360°")
    return Stated(label, value - spread, value + spread, value, "rad", text.strip())
