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
    # The relative tolerance of a plain stated value ("25 nJ") when the spec and the project
    # configuration give none: how well such a number is usually known, and why.
    tolerance: float = 0.05
    tolerance_why: str = "a few % (common practice for a measured optical quantity)"

    def __post_init__(self) -> None:
        if not self.name.isidentifier() or self.name != self.name.lower():
            raise ValueError(f"quantity name {self.name!r} must be a snake_case identifier")
        if self.dimensionless != (self.si_unit == "1"):
            raise ValueError(f"{self.name}: dimensionless quantities have si_unit '1'")


QUANTITIES: tuple[Quantity, ...] = (
    Quantity("wavelength", "m", "λ", "nm", "centre (carrier) wavelength in vacuum",
             tolerance=0.01, tolerance_why="a centre wavelength is known to about 1% (spectrometer and stated centre, common practice)"),
    Quantity("photon_energy", "J", "E_ph", "eV", "photon energy at the carrier wavelength",
             tolerance=0.01, tolerance_why="as the wavelength it restates"),
    Quantity("carrier_frequency", "Hz", "ν", "THz", "optical carrier frequency",
             tolerance=0.01, tolerance_why="as the wavelength it restates"),
    Quantity("carrier_period", "s", "T_0", "fs", "duration of one optical cycle", secondary=True,
             tolerance=0.01, tolerance_why="as the wavelength it restates"),
    Quantity("repetition_rate", "Hz", "f_rep", "MHz", "pulse repetition rate",
             tolerance=0.0001, tolerance_why="set by electronics or the cavity length and counted: known far better than 0.1% (common practice)"),
    Quantity("repetition_period", "s", "T_rep", "ns", "time between pulses", secondary=True,
             tolerance=0.0001, tolerance_why="as the repetition rate it restates"),
    Quantity("pulse_duration", "s", "τ", "fs", "intensity FWHM of the pulse",
             tolerance=0.1, tolerance_why="an autocorrelation or FROG width with its deconvolution: about 10% (common practice)"),
    Quantity("duty_cycle", "1", "D", "1", "pulse duration over repetition period", True,
             tolerance=0.1, tolerance_why="as the pulse duration it depends on"),
    Quantity("cycles_per_pulse", "1", "N_cyc", "1", "optical cycles within the pulse FWHM", True,
             tolerance=0.1, tolerance_why="as the pulse duration it depends on"),
    Quantity("average_power", "W", "P_avg", "W", "time-averaged power",
             tolerance=0.03, tolerance_why="a thermal or photodiode power meter: about 3% (common practice)"),
    Quantity("pulse_energy", "J", "E_p", "µJ", "energy of one pulse",
             tolerance=0.05, tolerance_why="a pyroelectric energy meter, or power over rate: about 5% (common practice)"),
    Quantity("peak_power", "W", "P_pk", "MW", "peak power of the temporal profile",
             tolerance=0.1, tolerance_why="computed from energy and duration: as the duration, about 10%"),
    Quantity("peak_power_factor", "1", "a", "1",
             "P_pk·τ/E of the temporal profile (the shape's constant, or the field's after dispersion)", True,
             secondary=True,
             tolerance=0.02, tolerance_why="the integral of a measured or modelled profile: about 2% (common practice)"),
    Quantity("energy_in_main_peak", "1", "η", "1",
             "share of the pulse energy in the main peak (the rest in a pedestal or satellites)", True,
             tolerance=0.05, tolerance_why="from a measured trace's integral: about 5% (common practice)"),
    Quantity("spectral_bandwidth", "Hz", "Δν", "THz", "spectral FWHM in frequency",
             tolerance=0.05, tolerance_why="a spectrometer FWHM: about 5% (common practice)"),
    Quantity("spectral_bandwidth_wavelength", "m", "Δλ", "nm", "spectral FWHM in wavelength", secondary=True,
             tolerance=0.05, tolerance_why="a spectrometer FWHM: about 5% (common practice)"),
    Quantity("spectral_bandwidth_wavenumber", "1/m", "Δν̃", "1/cm", "spectral FWHM in wavenumber", secondary=True,
             tolerance=0.05, tolerance_why="a spectrometer FWHM: about 5% (common practice)"),
    Quantity("time_bandwidth_product", "1", "Δν·τ", "1", "product of the two FWHMs", True,
             tolerance=0.1, tolerance_why="a product of two widths: about 10%"),
    Quantity("autocorrelation_width", "s", "τ_ac", "fs", "FWHM of the intensity autocorrelation", secondary=True,
             tolerance=0.05, tolerance_why="the FWHM of a measured trace: about 5% (common practice)"),
    Quantity("beam_diameter", "m", "D", "mm", "1/e² intensity diameter",
             tolerance=0.05, tolerance_why="a camera or knife-edge 1/e² width: about 5% (common practice)"),
    Quantity("beam_radius", "m", "w", "mm", "1/e² intensity radius", secondary=True,
             tolerance=0.05, tolerance_why="a camera or knife-edge 1/e² width: about 5% (common practice)"),
    Quantity("beam_diameter_fwhm", "m", "D_fwhm", "mm", "FWHM intensity diameter", secondary=True,
             tolerance=0.05, tolerance_why="a camera FWHM: about 5% (common practice)"),
    Quantity("m2", "1", "M²", "1", "beam quality factor", True,
             tolerance=0.05, tolerance_why="an M² measurement (ISO 11146 caustic fit): about 5% (common practice)"),
    Quantity("peak_intensity", "W/m^2", "I_pk", "W/cm^2", "on-axis intensity at the pulse peak",
             tolerance=0.1, tolerance_why="computed from energy, duration and spot: about 10%"),
    Quantity("average_intensity", "W/m^2", "I_avg", "W/cm^2", "on-axis time-averaged intensity",
             tolerance=0.05, tolerance_why="computed from power and spot: about 5%"),
    Quantity("peak_fluence", "J/m^2", "F_pk", "J/cm^2", "on-axis energy per area of one pulse",
             tolerance=0.1, tolerance_why="computed from energy and spot: about 10%"),
    Quantity("peak_field", "V/m", "E_pk", "V/m", "peak electric field amplitude in the medium",
             tolerance=0.05, tolerance_why="the square root of an intensity: half its tolerance"),
    Quantity("refractive_index", "1", "n", "1", "refractive index of the medium (default 1)", True,
             tolerance=0.001, tolerance_why="a tabulated index: to 0.1% or better"),
    Quantity("transform_limited_duration", "s", "τ_TL", "fs",
             "shortest duration the spectrum allows (flat spectral phase)",
             tolerance=0.05, tolerance_why="the transform of a measured spectrum: about 5%"),
    Quantity("transform_limit_ratio", "1", "τ/τ_TL", "1", "pulse duration over its transform limit", True,
             secondary=True,
             tolerance=0.1, tolerance_why="a ratio of durations: about 10%"),
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

# The colour of the light: the experiment's choice rather than a knob to reach a number (a new
# one changes every material's dispersion), so goal seek does not offer it as a remedy.
CARRIER = ("wavelength", "photon_energy", "carrier_frequency", "carrier_period")

# Laser-block keys of the chirp the pulse carries (not quantities of the relation table: the
# path's field reads them, checking/laser_pulse.py).
LASER_CHIRP = ("chirp", "gdd", "tod")

# Laser-block keys that place the beam's waist (the path's geometry reads them, checking/beam_space.py).
LASER_BEAM = ("waist_position", "beam_divergence")

# Keys that point to a measured data file next to the spec (reading/measured.py reads them):
# key -> (the axis-unit key, the unit's dimension key in units.DIMENSION_NAMES).
MEASURED = {"spectrum": ("wavelength_unit", "m"), "autocorrelation": ("delay_unit", "s")}

# Values a block assumes when it states nothing: quantity -> value in SI.
DEFAULTS: dict[str, float] = {"refractive_index": 1.0, "energy_in_main_peak": 1.0}
# ... unless it states one of these: then the default would contradict what it says.
DEFAULT_UNLESS: dict[str, tuple[str, ...]] = {"energy_in_main_peak": ("peak_power_factor",)}


def defaults_for(stated) -> dict[str, float]:
    """The defaults a block with these stated (or carried) quantities assumes."""
    return {q: v for q, v in DEFAULTS.items() if q not in stated
            and not any(u in stated for u in DEFAULT_UNLESS.get(q, ()))}

if len(BY_NAME) != len(QUANTITIES):  # pragma: no cover - table sanity
    raise ValueError("duplicate quantity names in QUANTITIES")
