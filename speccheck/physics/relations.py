"""The relation table: every law that ties a block's quantities together.

Each relation is a product of powers of quantities equal to a constant,

    Π q_i ** e_i  =  K(constants, pulse shape, beam profile)

which is linear in log space (Σ e_i ln q_i = ln K).  Every check, derived cell
and explanation in speccheck comes from these rows; adding a law is adding a
row here (and a test).  Physical constants come from pint's CODATA values
through ``Context``; shape factors from ``physics/shapes.py``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from speccheck.physics.quantities import BY_NAME
from speccheck.physics.shapes import BeamProfile, PulseShape


@dataclass(frozen=True)
class Context:
    """What a relation's constant may depend on."""

    c: float  # speed of light in vacuum, m/s
    h: float  # Planck constant, J s
    eps0: float  # vacuum permittivity, F/m
    shape: PulseShape
    profile: BeamProfile


@dataclass(frozen=True)
class Relation:
    id: str
    formula: str  # as shown to people
    terms: tuple[tuple[str, int], ...]  # (quantity, exponent) with Π q**e = K
    constant: Callable[[Context], float]
    source: str
    uses: tuple[str, ...] = ()  # categorical keys the constant depends on

    def __post_init__(self) -> None:
        names = [q for q, _ in self.terms]
        if len(set(names)) != len(names) or len(names) < 2:
            raise ValueError(f"relation {self.id}: needs two or more distinct quantities")
        for q, e in self.terms:
            if q not in BY_NAME:
                raise ValueError(f"relation {self.id}: unknown quantity {q!r}")
            if e == 0:
                raise ValueError(f"relation {self.id}: zero exponent for {q}")

    def quantities(self) -> tuple[str, ...]:
        return tuple(q for q, _ in self.terms)


def _one(_: Context) -> float:
    return 1.0


RELATIONS: tuple[Relation, ...] = (
    Relation(
        "repetition-period",
        "T_rep = 1 / f_rep",
        (("repetition_period", 1), ("repetition_rate", 1)),
        _one,
        "definition",
    ),
    Relation(
        "pulse-energy",
        "E_p = P_avg / f_rep",
        (("pulse_energy", 1), ("repetition_rate", 1), ("average_power", -1)),
        _one,
        "definition (energy per pulse of a periodic train)",
    ),
    Relation(
        "duty-cycle",
        "D = τ · f_rep",
        (("duty_cycle", 1), ("pulse_duration", -1), ("repetition_rate", -1)),
        _one,
        "definition",
    ),
    Relation(
        "carrier-frequency",
        "ν = c / λ",
        (("carrier_frequency", 1), ("wavelength", 1)),
        lambda x: x.c,
        "definition (vacuum wavelength)",
    ),
    Relation(
        "carrier-period",
        "T_0 = 1 / ν",
        (("carrier_period", 1), ("carrier_frequency", 1)),
        _one,
        "definition",
    ),
    Relation(
        "photon-energy",
        "E_ph = h ν",
        (("photon_energy", 1), ("carrier_frequency", -1)),
        lambda x: x.h,
        "Planck–Einstein relation",
    ),
    Relation(
        "cycles-per-pulse",
        "N_cyc = τ / T_0",
        (("cycles_per_pulse", 1), ("pulse_duration", -1), ("carrier_period", 1)),
        _one,
        "definition",
    ),
    Relation(
        "main-peak",
        "a = a_shape · η  (a_shape = 0.94 Gaussian, 0.88 sech², 2/π Lorentzian, 1 flat top)",
        (("peak_power_factor", 1), ("energy_in_main_peak", -1)),
        lambda x: x.shape.peak_power_factor,
        "a main peak of the pulse's shape holding the share η of the energy (the pulse-shape table); "
        "η = 1 unless a or η is stated",
        uses=("pulse_shape",),
    ),
    Relation(
        "peak-power",
        "P_pk = a · E_p / τ",
        (("peak_power", 1), ("pulse_energy", -1), ("pulse_duration", 1), ("peak_power_factor", -1)),
        _one,
        "definition of the peak-power factor a = P_pk·τ/E (the integral of the normalised profile)",
    ),
    Relation(
        "bandwidth-wavelength",
        "Δν = c · Δλ / λ²",
        (("spectral_bandwidth", 1), ("spectral_bandwidth_wavelength", -1), ("wavelength", 2)),
        lambda x: x.c,
        "first-order conversion dν = c dλ / λ² (narrow-band approximation)",
    ),
    Relation(
        "bandwidth-wavenumber",
        "Δν = c · Δν̃",
        (("spectral_bandwidth", 1), ("spectral_bandwidth_wavenumber", -1)),
        lambda x: x.c,
        "definition of the wavenumber ν̃ = ν / c",
    ),
    Relation(
        "time-bandwidth-product",
        "TBP = Δν · τ",
        (("time_bandwidth_product", 1), ("spectral_bandwidth", -1), ("pulse_duration", -1)),
        _one,
        "definition",
    ),
    Relation(
        "autocorrelation-width",
        "τ_ac = k · τ  (k = √2 Gaussian, 1.543 sech², 2 Lorentzian, 1 flat top)",
        (("autocorrelation_width", 1), ("pulse_duration", -1)),
        lambda x: x.shape.autocorrelation_factor,
        "intensity autocorrelation of the pulse shape (the pulse-shape table)",
        uses=("pulse_shape",),
    ),
    Relation(
        "beam-radius",
        "w = D / 2",
        (("beam_radius", 1), ("beam_diameter", -1)),
        lambda x: 0.5,
        "definition",
    ),
    Relation(
        "beam-fwhm",
        "D_fwhm = √(ln2 / 2) · D  (Gaussian beam; = D for flat top)",
        (("beam_diameter_fwhm", 1), ("beam_diameter", -1)),
        lambda x: x.profile.fwhm_diameter_factor,
        "Gaussian beam profile I ∝ exp(-2 r²/w²)",
        uses=("beam_profile",),
    ),
    Relation(
        "peak-intensity",
        "I_pk = k · P_pk / (π w²)  (k = 2 Gaussian, 1 flat top)",
        (("peak_intensity", 1), ("peak_power", -1), ("beam_radius", 2)),
        lambda x: x.profile.intensity_factor / math.pi,
        "on-axis intensity of a Gaussian beam 2P/(πw²); P/(πw²) for a uniform disc",
        uses=("beam_profile",),
    ),
    Relation(
        "average-intensity",
        "I_avg = k · P_avg / (π w²)",
        (("average_intensity", 1), ("average_power", -1), ("beam_radius", 2)),
        lambda x: x.profile.intensity_factor / math.pi,
        "as peak-intensity, with the average power",
        uses=("beam_profile",),
    ),
    Relation(
        "peak-fluence",
        "F_pk = k · E_p / (π w²)",
        (("peak_fluence", 1), ("pulse_energy", -1), ("beam_radius", 2)),
        lambda x: x.profile.intensity_factor / math.pi,
        "on-axis fluence of a Gaussian beam 2E/(πw²); E/(πw²) for a uniform disc",
        uses=("beam_profile",),
    ),
    Relation(
        "peak-field",
        "E_pk = √(2 I_pk / (c ε0 n))",
        (("peak_field", 2), ("refractive_index", 1), ("peak_intensity", -1)),
        lambda x: 2.0 / (x.c * x.eps0),
        "intensity of a plane wave I = ½ c ε0 n E²",
    ),
    Relation(
        "transform-limit-ratio",
        "τ/τ_TL = τ / τ_TL",
        (("transform_limit_ratio", 1), ("pulse_duration", -1), ("transform_limited_duration", 1)),
        _one,
        "definition (τ_TL from a measured spectrum)",
    ),
)

BY_ID: dict[str, Relation] = {r.id: r for r in RELATIONS}

if len(BY_ID) != len(RELATIONS):  # pragma: no cover - table sanity
    raise ValueError("duplicate relation ids")
