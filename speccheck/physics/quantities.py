"""The quantities a spec block may state: one row each.

Every row names the quantity as it is written in a spec (the contract), its
SI unit (values in the sheet and in JSON are in this unit), its symbol for
formulas, the unit it is shown in when the user did not state it, and a
one-line meaning.  The engine knows nothing beyond this table and the
relation table.

A few quantities can be stated in more than one dimension (a spectral
bandwidth in nm, THz or cm^-1).  Such a spec key is an *alias*: it maps each
accepted dimension to the quantity that holds it.
"""

from __future__ import annotations

from dataclasses import dataclass


@dataclass(frozen=True)
class Quantity:
    name: str
    si_unit: str  # pint-parsable; also what JSON's "unit" says
    symbol: str
    display_unit: str  # preferred unit for derived values (engineering prefix applied)
    meaning: str
    dimensionless: bool = False
    secondary: bool = False  # a restatement of another quantity (not worth a note of its own)

    def __post_init__(self) -> None:
        if not self.name.isidentifier() or self.name != self.name.lower():
            raise ValueError(f"quantity name {self.name!r} must be a snake_case identifier")
        if self.dimensionless != (self.si_unit == "1"):
            raise ValueError(f"{self.name}: dimensionless quantities have si_unit '1'")


QUANTITIES: tuple[Quantity, ...] = (
    Quantity("wavelength", "m", "λ", "nm", "centre (carrier) wavelength in vacuum"),
    Quantity("photon_energy", "J", "E_ph", "eV", "photon energy at the carrier wavelength"),
    Quantity("carrier_frequency", "Hz", "ν", "THz", "optical carrier frequency"),
    Quantity("carrier_period", "s", "T_0", "fs", "duration of one optical cycle", secondary=True),
    Quantity("repetition_rate", "Hz", "f_rep", "MHz", "pulse repetition rate"),
    Quantity("repetition_period", "s", "T_rep", "ns", "time between pulses", secondary=True),
    Quantity("pulse_duration", "s", "τ", "fs", "intensity FWHM of the pulse"),
    Quantity("duty_cycle", "1", "D", "1", "pulse duration over repetition period", True),
    Quantity("cycles_per_pulse", "1", "N_cyc", "1", "optical cycles within the pulse FWHM", True),
    Quantity("average_power", "W", "P_avg", "W", "time-averaged power"),
    Quantity("pulse_energy", "J", "E_p", "µJ", "energy of one pulse"),
    Quantity("peak_power", "W", "P_pk", "MW", "peak power of the temporal profile"),
    Quantity("spectral_bandwidth", "Hz", "Δν", "THz", "spectral FWHM in frequency"),
    Quantity("spectral_bandwidth_wavelength", "m", "Δλ", "nm", "spectral FWHM in wavelength", secondary=True),
    Quantity("spectral_bandwidth_wavenumber", "1/m", "Δν̃", "1/cm", "spectral FWHM in wavenumber", secondary=True),
    Quantity("time_bandwidth_product", "1", "Δν·τ", "1", "product of the two FWHMs", True),
    Quantity("autocorrelation_width", "s", "τ_ac", "fs", "FWHM of the intensity autocorrelation", secondary=True),
    Quantity("beam_diameter", "m", "D", "mm", "1/e² intensity diameter"),
    Quantity("beam_radius", "m", "w", "mm", "1/e² intensity radius", secondary=True),
    Quantity("beam_diameter_fwhm", "m", "D_fwhm", "mm", "FWHM intensity diameter", secondary=True),
    Quantity("m2", "1", "M²", "1", "beam quality factor", True),
    Quantity("peak_intensity", "W/m^2", "I_pk", "W/cm^2", "on-axis intensity at the pulse peak"),
    Quantity("average_intensity", "W/m^2", "I_avg", "W/cm^2", "on-axis time-averaged intensity"),
    Quantity("peak_fluence", "J/m^2", "F_pk", "J/cm^2", "on-axis energy per area of one pulse"),
    Quantity("peak_field", "V/m", "E_pk", "V/m", "peak electric field amplitude in the medium"),
    Quantity("refractive_index", "1", "n", "1", "refractive index of the medium (default 1)", True),
    Quantity("transform_limited_duration", "s", "τ_TL", "fs",
             "shortest duration the spectrum allows (flat spectral phase)"),
    Quantity("transform_limit_ratio", "1", "τ/τ_TL", "1", "pulse duration over its transform limit", True,
             secondary=True),
)

BY_NAME: dict[str, Quantity] = {q.name: q for q in QUANTITIES}

# Spec keys that accept several dimensions: key -> {dimension's SI unit: quantity}.
ALIASES: dict[str, dict[str, str]] = {
    "spectral_bandwidth": {
        "Hz": "spectral_bandwidth",
        "m": "spectral_bandwidth_wavelength",
        "1/m": "spectral_bandwidth_wavenumber",
    },
}

# Categorical keys of a block and the values each accepts (the pulse-shape and beam-profile tables of physics/shapes.py).
CATEGORICAL = ("pulse_shape", "beam_profile")

# Keys that point to a measured data file next to the spec (reading/measured.py reads them):
# key -> (the axis-unit key, the unit's dimension key in units.DIMENSION_NAMES).
MEASURED = {"spectrum": ("wavelength_unit", "m"), "autocorrelation": ("delay_unit", "s")}

# Values a block assumes when it states nothing: quantity -> value in SI.
DEFAULTS: dict[str, float] = {"refractive_index": 1.0}

if len(BY_NAME) != len(QUANTITIES):  # pragma: no cover - table sanity
    raise ValueError("duplicate quantity names in QUANTITIES")
