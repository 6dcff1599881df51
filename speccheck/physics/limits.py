"""Physical limits on single quantities: one row each.

A limit says a quantity (stated or derived) must stay on one side of a bound
that may depend on the pulse shape.  It is reported only when the whole
interval of the quantity is beyond the bound, i.e. beyond tolerance.
"""

from __future__ import annotations

from dataclasses import dataclass
from typing import Callable

from speccheck.physics.quantities import BY_NAME
from speccheck.physics.relations import Context


@dataclass(frozen=True)
class Limit:
    rule: str
    quantity: str
    side: str  # "min": quantity must be >= bound; "max": quantity must be < bound
    bound: Callable[[Context], float | None]  # None: no bound for this shape
    what: str  # describes the bound; may use {shape}
    consequence: str
    source: str

    def __post_init__(self) -> None:
        # the rule id is checked against the rule catalogue where limits are reported
        # (checking.column_limits), since physics knows no findings
        if self.quantity not in BY_NAME or self.side not in ("min", "max"):
            raise ValueError(f"malformed limit row {self.rule}/{self.quantity}")

    def violated(self, low: float, high: float, context: Context) -> bool:
        b = self.bound(context)
        if b is None:
            return False
        return high < b if self.side == "min" else low >= b


LIMITS: tuple[Limit, ...] = (
    Limit("below-transform-limit", "time_bandwidth_product", "min",
          lambda x: x.shape.transform_limit,
          "the transform limit of a {shape} pulse",
          "no pulse of this shape can be that short with that bandwidth",
          "Fourier transform limit; published pulse-shape tables"),
    Limit("strongly-chirped", "time_bandwidth_product", "max",
          lambda x: None if x.shape.transform_limit is None else 2.0 * x.shape.transform_limit,
          "twice the transform limit of a {shape} pulse",
          "the pulse is strongly chirped (or a width is not what it says)",
          "common practice"),
    Limit("pulse-longer-than-period", "duty_cycle", "max", lambda x: 1.0,
          "1", "the pulse is longer than the time between pulses", "definition"),
    Limit("sub-cycle-pulse", "cycles_per_pulse", "min", lambda x: 1.0,
          "one optical cycle", "the pulse is shorter than one cycle of its carrier", "definition"),
    Limit("outside-ultrafast-range", "pulse_duration", "min", lambda x: 1e-15,
          "1 fs", "shorter than the ultrafast range speccheck is made for", "scope of speccheck"),
    Limit("outside-ultrafast-range", "pulse_duration", "max", lambda x: 100e-12,
          "100 ps", "longer than the ultrafast range speccheck is made for", "scope of speccheck"),
    Limit("below-transform-limit", "transform_limit_ratio", "min", lambda x: 1.0,
          "1 (the transform limit of the measured spectrum)",
          "the pulse is shorter than its measured spectrum allows", "Fourier transform limit"),
    Limit("strongly-chirped", "transform_limit_ratio", "max", lambda x: 2.0,
          "2", "the pulse is more than twice its transform limit: strongly chirped", "common practice"),
    Limit("m2-below-one", "m2", "min", lambda x: 1.0,
          "1", "no real beam has M² below 1", "ISO 11146; M² = 1 is the ideal Gaussian beam"),
)
