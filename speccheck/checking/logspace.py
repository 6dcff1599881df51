"""Log-space helpers of the column check: the engine works on ln of SI values."""

from __future__ import annotations

import math


def ln(x: float) -> float:
    if x <= 0.0:
        return -math.inf
    return math.log(x) if math.isfinite(x) else math.inf


LN_MAX = math.log(1.7e308)  # beyond this a float overflows


def exp(y: float) -> float | None:
    """Back from log space; None for an unbounded side (or one beyond what a float holds)."""
    if not math.isfinite(y) or abs(y) > LN_MAX:
        return None  # a float cannot hold it (inf, or an underflow to 0 that would divide by zero)
    return math.exp(y)


def centre(low: float | None, high: float | None) -> float | None:
    if low is not None and high is not None:
        return math.sqrt(low * high)
    return low if low is not None else high
