"""Pulse shapes and beam profiles: the factors that relations depend on.

Each temporal shape is described by its intensity profile I(t) with FWHM τ:

* gaussian   I ∝ exp(-4 ln2 t²/τ²)
* sech2      I ∝ sech²(1.7627 t/τ)
* lorentzian I ∝ 1 / (1 + (2t/τ)²)   (a Lorentzian *intensity*; its field is the square root)
* flat_top   I = const for |t| < τ/2

Factors (closed forms where they exist, so nothing is rounded by hand):

* peak_power_factor a:  P_peak = a · E / τ   (integral of the normalised profile)
* transform_limit:      smallest Δν·τ (FWHMs) for a pulse of that shape; None where there is none
* autocorrelation_factor k: τ_ac = k · τ (second-order intensity autocorrelation)

Sources: the pulse-shape tables in J.-C. Diels & W. Rudolph, *Ultrashort Laser
Pulse Phenomena*, 2nd ed. (Academic Press, 2006), ch. 9, and A. M. Weiner,
*Ultrafast Optics* (Wiley, 2009), ch. 3, list 0.441 / 0.315 / 0.221 / 0.886 for
the time-bandwidth products and √2 / 1.543 / 2 / 1 for the autocorrelation
factors (from memory; the tests re-derive the Gaussian and sech² values
numerically, and tests/test_shapes.py the Lorentzian row).  0.94 for a Gaussian's
peak-power factor is also common practice.

The Lorentzian row is the intensity Lorentzian above, all of it: 2/π and 2 are its
peak-power and autocorrelation factors.  It has no transform limit.  Its
flat-phase field 1/√(1 + (2t/τ)²) falls off as 1/|t|, so it is not integrable: the
spectrum at the centre, |∫E dt|², grows as asinh²(2L/τ) with the time window ±L
and the spectral FWHM shrinks towards zero (measured by FFT, Δν·τ = 0.011, 0.0020,
0.00040 for L = 100, 1000, 10000 τ), so no positive Δν·τ bounds it and the table
says None (the transform-limit checks skip the shape).  The 0.221 of some tables is
ln2/π, the Δν·τ of a Lorentzian *field* 1/(1 + (2t/τ_E)²) measured with the field's
FWHM τ_E; with that pulse's intensity FWHM it is 0.142, and its other factors are
not 2/π and 2, so it belongs to another row.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

_SECH2_T = 2.0 * math.acosh(math.sqrt(2.0))  # FWHM of sech² in units of its width T: 1.7627


@dataclass(frozen=True)
class PulseShape:
    name: str
    peak_power_factor: float
    transform_limit: float | None  # None: the shape has no transform limit
    autocorrelation_factor: float
    description: str

    def __post_init__(self) -> None:
        for field in ("peak_power_factor", "transform_limit", "autocorrelation_factor"):
            value = getattr(self, field)
            if field == "transform_limit" and value is None:
                continue
            if not value > 0:
                raise ValueError(f"{self.name}: {field} must be positive")


@dataclass(frozen=True)
class BeamProfile:
    name: str
    intensity_factor: float  # I_peak = intensity_factor · P / (π w²)
    fwhm_diameter_factor: float  # D_fwhm = factor · D(1/e²)
    description: str


PULSE_SHAPES: dict[str, PulseShape] = {
    s.name: s
    for s in (
        PulseShape(
            "gaussian",
            peak_power_factor=2.0 * math.sqrt(math.log(2.0) / math.pi),  # 0.9394
            transform_limit=2.0 * math.log(2.0) / math.pi,  # 0.4413
            autocorrelation_factor=math.sqrt(2.0),
            description="Gaussian intensity profile",
        ),
        PulseShape(
            "sech2",
            peak_power_factor=_SECH2_T / 2.0,  # ln(1+√2) = 0.8814
            transform_limit=(_SECH2_T / math.pi) ** 2,  # 0.3148
            autocorrelation_factor=1.5427,  # numerical value, no closed form
            description="hyperbolic-secant-squared intensity profile (soliton lasers)",
        ),
        PulseShape(
            "lorentzian",
            peak_power_factor=2.0 / math.pi,  # ∫ I dt = π τ / 2
            transform_limit=None,  # the spectrum of its field has no finite FWHM: see above
            autocorrelation_factor=2.0,  # a Lorentzian convolved with itself: twice the width
            description="Lorentzian intensity profile",
        ),
        PulseShape(
            "flat_top",
            peak_power_factor=1.0,
            transform_limit=0.8859,  # FWHM of sinc²: 2 × 0.44295
            autocorrelation_factor=1.0,
            description="rectangular (flat-top) intensity profile",
        ),
    )
}

BEAM_PROFILES: dict[str, BeamProfile] = {
    p.name: p
    for p in (
        # Gaussian TEM00: I(r) = 2P/(π w²) exp(-2 r²/w²); FWHM = √(2 ln2) w = √(ln2/2) D.
        BeamProfile("gaussian", 2.0, math.sqrt(math.log(2.0) / 2.0), "Gaussian (TEM00) beam"),
        # Uniform disc of radius w: I = P/(π w²); its edge is both the 1/e² and the FWHM edge.
        BeamProfile("flat_top", 1.0, 1.0, "uniform (flat-top) beam of radius w"),
    )
}

DEFAULT_SHAPE = "gaussian"
DEFAULT_PROFILE = "gaussian"
