"""The catalogue of common mistakes: one row each, with the reason beside it.

Each row says by what factor a mistake multiplies a stated value (stated /
true) and which quantities it can affect.  When the ratio between a suspect's
stated value and the value the rest of the spec implies matches a factor
within tolerance, speccheck names the mistake in plain words.  A new mistake
is one more row.  Factors that depend on the pulse shape are functions of the
``Context``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from speccheck.physics.quantities import BY_NAME
from speccheck.physics.relations import Context

LENGTHS = ("beam_diameter", "beam_radius", "beam_diameter_fwhm")
AREA_DEPENDENT = ("peak_intensity", "average_intensity", "peak_fluence")
FREQUENCIES = ("repetition_rate", "carrier_frequency", "spectral_bandwidth")
WITH_UNITS = tuple(q.name for q in BY_NAME.values() if not q.dimensionless)


@dataclass(frozen=True)
class Mistake:
    id: str
    factor: Callable[[Context], float]  # stated / true
    applies_to: tuple[str, ...]
    says: str  # plain words; may use {shape}
    reason: str  # why the factor is what it is (source or common practice)

    def __post_init__(self) -> None:
        unknown = [q for q in self.applies_to if q not in BY_NAME]
        if unknown:
            raise ValueError(f"mistake {self.id}: unknown quantities {unknown}")


def _const(x: float) -> Callable[[Context], float]:
    return lambda _: x


_FWHM = 1.0 / math.sqrt(math.log(2.0) / 2.0)  # D(1/e²) / D_fwhm = 1.699 for a Gaussian beam

MISTAKES: tuple[Mistake, ...] = (
    *(Mistake(f"prefix-{'up' if k > 0 else 'down'}-{abs(k)}", _const(10.0 ** k), WITH_UNITS,
              f"an SI-prefix slip of 10^{k} "
              + ("(a prefix too large, e.g. µ for n, m for µ, MHz for kHz)" if k > 0
                 else "(a prefix too small, e.g. n for µ, µ for m, kHz for MHz)"),
              "SI prefixes step by 10^3")
      for k in (3, 6, 9, -3, -6, -9)),
    Mistake("radius-as-diameter", _const(0.5), ("beam_diameter", "beam_diameter_fwhm"),
            "a radius written where the diameter belongs", "D = 2w"),
    Mistake("diameter-as-radius", _const(2.0), ("beam_radius",),
            "a diameter written where the radius belongs", "w = D/2"),
    Mistake("radius-diameter-intensity-high", _const(4.0), AREA_DEPENDENT,
            "computed with the radius taken for the diameter (a beam area 4× too small)",
            "area ∝ w²"),
    Mistake("radius-diameter-intensity-low", _const(0.25), AREA_DEPENDENT,
            "computed with the diameter taken for the radius (a beam area 4× too large)", "area ∝ w²"),
    Mistake("fwhm-as-1/e2-diameter", _const(1.0 / _FWHM), ("beam_diameter", "beam_radius"),
            "a FWHM beam size written as the 1/e² size (×0.589)",
            "Gaussian beam: D(1/e²) = 1.699 D_fwhm"),
    Mistake("1/e2-as-fwhm-diameter", _const(_FWHM), ("beam_diameter_fwhm",),
            "a 1/e² beam size written as the FWHM size (×1.699)", "Gaussian beam: D(1/e²) = 1.699 D_fwhm"),
    Mistake("fwhm-size-in-intensity", _const(_FWHM**2), AREA_DEPENDENT,
            "computed with the FWHM beam size taken for the 1/e² size (×2.885)",
            "Gaussian beam: (D(1/e²)/D_fwhm)² = 2/ln2 = 2.885"),
    Mistake("autocorrelation-as-duration", lambda x: x.shape.autocorrelation_factor, ("pulse_duration",),
            "the autocorrelation width quoted as the pulse duration (×{k} for a {shape} pulse)",
            "intensity autocorrelation FWHM = k τ (published pulse-shape tables)"),
    Mistake("duration-as-autocorrelation", lambda x: 1.0 / x.shape.autocorrelation_factor,
            ("autocorrelation_width",),
            "the pulse duration quoted as the autocorrelation width (÷{k} for a {shape} pulse)",
            "intensity autocorrelation FWHM = k τ (published pulse-shape tables)"),
    Mistake("autocorrelation-in-peak", lambda x: 1.0 / x.shape.autocorrelation_factor,
            ("peak_power", "peak_intensity"),
            "computed with the autocorrelation width taken as the pulse duration (÷{k})",
            "P_pk ∝ 1/τ and τ_ac = k τ"),
    Mistake("shape-factor-left-out", lambda x: 1.0 / x.shape.peak_power_factor,
            ("peak_power", "peak_intensity"),
            "the pulse-shape factor left out (E/τ used for the peak power instead of {a}·E/τ for a {shape} pulse)",
            "P_pk = a E/τ with a = 0.94 Gaussian, 0.88 sech² (published pulse-shape tables)"),
    Mistake("per-cm2-as-per-m2", _const(1e-4), AREA_DEPENDENT,
            "a value in W/cm² (or J/cm²) written with W/m² (J/m²)", "1 m² = 10⁴ cm²"),
    Mistake("per-m2-as-per-cm2", _const(1e4), AREA_DEPENDENT,
            "a value in W/m² (or J/m²) written with W/cm² (J/cm²)", "1 m² = 10⁴ cm²"),
    Mistake("angular-as-ordinary", _const(2.0 * math.pi), FREQUENCIES,
            "an angular frequency ω written as the frequency ν (×2π)", "ω = 2πν"),
    Mistake("ordinary-as-angular", _const(1.0 / (2.0 * math.pi)), FREQUENCIES,
            "a frequency ν where an angular frequency ω was meant, or back (÷2π)", "ω = 2πν"),
    Mistake("flat-top-intensity", _const(0.5), AREA_DEPENDENT,
            "the intensity of a flat-top beam used for a Gaussian one (÷2)",
            "on-axis peak of a Gaussian beam is 2P/(πw²), of a flat top P/(πw²)"),
    Mistake("gaussian-intensity-for-flat-top", _const(2.0), AREA_DEPENDENT,
            "the on-axis intensity of a Gaussian beam used for a flat-top one (×2)",
            "on-axis peak of a Gaussian beam is 2P/(πw²), of a flat top P/(πw²)"),
)

MATCH_TOLERANCE = 0.03  # a factor matches when within 3% of the stated/implied ratio range (common practice)


def likely_causes(quantity: str, ratio_low: float, ratio_high: float, context: Context) -> list[tuple[Mistake, str]]:
    """Catalogue entries whose factor lies in [ratio_low, ratio_high] (widened a little), best first."""
    lo, hi = ratio_low / (1 + MATCH_TOLERANCE), ratio_high * (1 + MATCH_TOLERANCE)
    centre = math.sqrt(ratio_low * ratio_high) if math.isfinite(ratio_high) and ratio_low > 0 else ratio_low
    found = []
    for m in MISTAKES:
        if quantity not in m.applies_to:
            continue
        f = m.factor(context)
        if lo <= f <= hi:
            text = m.says.format(shape=context.shape.name, k=f"{context.shape.autocorrelation_factor:.3g}",
                                 a=f"{context.shape.peak_power_factor:.2f}")
            found.append((abs(math.log(f / centre)) if centre > 0 else 0.0, m, text))
    found.sort(key=lambda t: t[0])
    return [(m, text) for _, m, text in found]
