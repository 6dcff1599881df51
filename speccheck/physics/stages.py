"""The beam path: stage kinds as data, each with the physics that maps its input beam
to its output beam.

A *beam* is what passes from one column of the sheet to the next: intervals
``(low, typical, high)`` in SI for the primary quantities (``CARRIED``), and the pulse
as a field (``physics/pulse.py``: its spectrum, the spectral phase the path has added,
and the windows its tolerances and an unknown chirp sign open).  Everything else of a
column (peak power, intensity, fluence, field, …) is derived again in that column by the
relation table, so a stage only says what it changes.

Until a stage changes the pulse's temporal profile, the laser's duration and its shape's
peak-power factor are carried as they are.  From the first dispersive stage (or
harmonic, or parametric stage) on, the duration, the peak-power factor P_pk·τ/E and the
energy in the main peak come from the field at each column.  The field is built only
when a stage needs it (``Beam.field``), so a path without such a stage never imports
numpy.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import Callable

from speccheck.physics import beam_geometry as optics
from speccheck.physics.beam import ENERGY_LIKE, LaserPulse, Value, inverted, scaled, transmit
from speccheck.physics.pulse_stages import compressor, dispersion, grating_compressor, harmonic, material, prism_compressor

# ------------------------------------------------------------------ stage kinds

@dataclass(frozen=True)
class Param:
    name: str
    dimension: str  # a key of units.DIMENSION_NAMES, "text", or "material_name" (a row of the material table)
    required: bool = False
    default: float | None = None
    choices: tuple = ()
    fraction: bool = False  # a share of the beam: never more than 1
    zero: bool = False  # 0 is a value it may take (never negative)
    signed: bool = False  # may be negative (a diverging lens's focal length)


@dataclass(frozen=True)
class StageKind:
    name: str
    params: tuple[Param, ...]
    apply: Callable  # (beam, params: dict[name, Value | str], ctx) -> Beam
    summary: str
    source: str = ""
    one_of: tuple = ()  # at least one of these parameters is needed
    # The kind's own checks, by id (their code is in checking.stage_checks, which has a
    # registry of them and fails loudly on an unknown id): physics does not make findings.
    checks: tuple[str, ...] = ()
    # A kind that ends its path and starts two named ``branches``: the shares of the beam the
    # two branches take, (low, typical, high) each, from the stage's parameters.
    shares: Callable | None = None
    # The kind's effect on the beam in space (``physics.beam_geometry``: a lens, a plate, a relay), applied
    # after the free space of the stage's ``distance`` and before ``apply``; None: it changes nothing there.
    optics: Callable | None = None

    @property
    def splits(self) -> bool:
        return self.shares is not None

    def param(self, name: str) -> Param | None:
        return next((p for p in self.params if p.name == name), None)


_T = Param("transmission", "1", default=1.0, fraction=True)


def _optic(beam, p, ctx):
    return transmit(beam, p["transmission"])


def _picker(beam, p, ctx):
    n = p["divide_by"]
    beam = transmit(beam, p["transmission"])
    changes = {}
    if beam.get("repetition_rate"):
        changes["repetition_rate"] = scaled(beam.get("repetition_rate"), inverted(n))
    if beam.get("average_power"):
        changes["average_power"] = scaled(beam.get("average_power"), inverted(n))
    return beam.with_values(**changes)


def _amplifier(beam, p, ctx):
    if p.get("gain") is not None:
        gain = p["gain"]
    elif p.get("output_energy") is not None and beam.get("pulse_energy"):
        return beam.with_values(pulse_energy=p["output_energy"], peak_power=None, average_power=(
            scaled(p["output_energy"], beam.get("repetition_rate")) if beam.get("repetition_rate") else None))
    elif p.get("output_power") is not None:
        rate = beam.get("repetition_rate")
        return beam.with_values(average_power=p["output_power"], peak_power=None, pulse_energy=(
            scaled(p["output_power"], inverted(rate)) if rate else None))
    else:
        return beam
    return beam.with_values(**{q: scaled(beam.get(q), gain) for q in ENERGY_LIKE if beam.get(q)})


def _parametric(beam, p, ctx):
    pump = beam.get("wavelength")
    signal, idler = p.get("signal_wavelength"), p.get("idler_wavelength")
    if pump and signal and idler is None:
        rest = _difference(inverted(pump), inverted(signal))
        idler = inverted(rest) if rest else None  # None: energy conservation forbids this signal
    if pump and idler and signal is None:
        rest = _difference(inverted(pump), inverted(idler))
        signal = inverted(rest) if rest else None
    out = signal if p.get("output", "signal") == "signal" else idler
    changes = {q: scaled(beam.get(q), p["efficiency"]) for q in ENERGY_LIKE if beam.get(q)}
    changes["wavelength"] = out
    changes["spectral_bandwidth"] = None  # not known from the pump
    ctx.note("the output pulse is taken to be as long as the pump, transform limited, with the pump's "
             "peak-power factor, and its beam with the pump's q (wavefront and Rayleigh range; common practice "
             "for a first estimate)")
    beam = beam.with_values(**changes)
    duration = beam.get("pulse_duration")
    shape = beam.laser.shape if beam.laser else "gaussian"
    return replace(beam, laser=LaserPulse(shape, duration, duration), pulse=None)


def _difference(a: Value, b: Value) -> Value | None:
    """a − b for positive intervals, or None when no positive difference is possible."""
    lo, hi = a[0] - b[2], a[2] - b[0]
    if not hi > 0.0:
        return None
    typ = a[1] - b[1] if a[1] is not None and b[1] is not None else None
    typ = typ if typ is not None and typ > 0.0 else None
    return (max(lo, 0.0), typ, hi)


def _unchanged(beam, p, ctx):
    return beam


def _splitter(beam, p, ctx):
    return beam  # the branches take their shares (``_splitter_shares``; checking.walker walks them)


def _splitter_shares(p) -> tuple[Value, Value]:
    ratio = p["ratio"]
    return ratio, (1.0 - ratio[2], 1.0 - ratio[1], 1.0 - ratio[0])


# The relative tolerance of a plain stage parameter ("3 mm") when the spec and the project
# configuration give none: parameter -> (tolerance, why).
PARAM_TOLERANCES: dict[str, tuple[float, str]] = {
    "transmission": (0.01, "a coated optic's or a measured transmission: to about 1% (common practice)"),
    "efficiency": (0.10, "a conversion efficiency: about 10% (common practice)"),
    "ratio": (0.02, "a beam splitter's ratio: to about 2% (common practice)"),
    "thickness": (0.01, "a polished optic's thickness: to about 1% (common practice)"),
    "focal_length": (0.01, "a catalogue lens: about 1% (common practice)"),
    "gdd": (0.05, "a designed or measured GDD: about 5% (common practice)"),
    "tod": (0.10, "a third-order dispersion: about 10% (common practice)"),
    "fod": (0.20, "a fourth-order dispersion: about 20% (common practice)"),
    "groove_density": (0.0001, "a ruled or holographic grating's line count: far better than 0.1% (common practice)"),
    "incidence_angle": (0.005, "an angle set on a rotation stage: about 0.5% (common practice)"),
    "separation": (0.01, "a distance set on a translation stage: about 1% (common practice)"),
    "apex_separation": (0.01, "a distance set on a translation stage: about 1% (common practice)"),
    "insertion": (0.05, "a prism's insertion depth: about 5% (common practice)"),
    "magnification": (0.01, "a telescope's focal-length ratio: about 1% (common practice)"),
    "divide_by": (0.0, "a whole number of pulses: exact"),
    "distance": (0.01, "a distance measured on the table: about 1% (common practice)"),
    "clear_aperture": (0.02, "an optic's clear aperture from its drawing: about 2% (common practice)"),
    "waist_position": (0.1, "a laser's waist position from a caustic fit: about 10% (common practice)"),
    "beam_divergence": (0.05, "a far-field divergence measurement: about 5% (common practice)"),
    "order": (0.0, "a harmonic order: exact"),
    "gain": (0.05, "an amplifier's gain: about 5% (common practice)"),
    "output_energy": (0.05, "as a pulse energy: about 5% (common practice)"),
    "output_power": (0.03, "as an average power: about 3% (common practice)"),
    "signal_wavelength": (0.01, "as a wavelength: about 1% (common practice)"),
    "idler_wavelength": (0.01, "as a wavelength: about 1% (common practice)"),
}


_TELESCOPE = (Param("magnification", "1", required=True), Param("focal_length", "m", signed=True))
# every stage sits a distance after the plane of the column before (free space, n = 1)
_DISTANCE = Param("distance", "m", default=0.0, zero=True)  # 0: this stage sits on the plane before


def _placed(kind: StageKind) -> StageKind:
    """The kind as the walk applies it: free space, then its optics, then its effect on the pulse."""
    def run(beam, p, ctx):
        beam = optics.travel(beam, p["distance"], ctx)
        if kind.optics is not None:
            beam = kind.optics(beam, p, ctx)
        return optics.follow_wavelength(beam, kind.apply(beam, p, ctx))
    return replace(kind, params=kind.params + (_DISTANCE,), apply=run)


STAGE_KINDS: dict[str, StageKind] = {k.name: _placed(k) for k in (
    StageKind("optic", (_T,), _optic, "a mirror, lens or window that loses power (transmission)"),
    StageKind("attenuator", (Param("transmission", "1", required=True, fraction=True),), _optic,
              "a deliberate loss: E and P times the transmission"),
    StageKind("pulse_picker", (Param("divide_by", "1", required=True), _T), _picker,
              "keeps one pulse in N: rate ÷ N, energy × transmission"),
    StageKind("amplifier", (Param("gain", "1"), Param("output_energy", "J"), Param("output_power", "W")),
              _amplifier, "energy × gain, or the output energy or power; rate unchanged",
              one_of=("gain", "output_energy", "output_power")),
    StageKind("dispersion", (Param("gdd", "s^2"), Param("tod", "s^3"), Param("fod", "s^4")),
              dispersion, "adds spectral phase GDD·Δω²/2 + TOD·Δω³/6 + FOD·Δω⁴/24 (a prechirp, a chirped "
              "mirror set)", "the pulse's field, by FFT (physics/field.py)", one_of=("gdd", "tod", "fod")),
    StageKind("material", (Param("material", "material_name", required=True), Param("thickness", "m", required=True),
                           _T),
              material, "a thickness of a named glass: the exact phase n(ω)ωL/c of its Sellmeier equation",
              "the Sellmeier equation, to all orders (GDD = GVD × L shown); in space its reduced thickness L/n",
              checks=("self-focusing", "dispersion-range"), optics=optics.plate),
    StageKind("compressor", (Param("gdd", "s^2"), Param("tod", "s^3"), Param("fod", "s^4"), _T), compressor,
              "a compressor given by its dispersion: GDD, TOD, FOD and a transmission"),
    StageKind("grating_compressor", (Param("groove_density", "1/m", required=True),
                                     Param("incidence_angle", "angle", required=True),
                                     Param("separation", "m", required=True), _T), grating_compressor,
              "a double-pass grating pair: perpendicular separation G, first order",
              "E. B. Treacy, IEEE J. Quantum Electron. 5, 454 (1969): the grating equation, exact phase"),
    StageKind("prism_compressor", (Param("material", "material_name", required=True),
                                   Param("apex_separation", "m", required=True),
                                   Param("insertion", "m", default=0.0, zero=True), _T), prism_compressor,
              "a double-pass Brewster prism pair: apex separation and insertion depth",
              "R. L. Fork, O. E. Martinez and J. P. Gordon, Opt. Lett. 9, 150 (1984): ray geometry, exact phase"),
    StageKind("harmonic", (Param("order", "1", required=True, choices=(2.0, 3.0)),
                           Param("efficiency", "1", required=True, fraction=True)), harmonic,
              "second or third harmonic: λ ÷ order, energy × efficiency"),
    StageKind("parametric", (Param("signal_wavelength", "m"), Param("idler_wavelength", "m"),
                             Param("output", "text", choices=("signal", "idler")),
                             Param("efficiency", "1", required=True, fraction=True)), _parametric,
              "pump → signal + idler: 1/λp = 1/λs + 1/λi, energy × efficiency",
              "photon-energy conservation", one_of=("signal_wavelength", "idler_wavelength"),
              checks=("photon-energy",)),
    StageKind("telescope", _TELESCOPE, _unchanged,
              "two lenses a distance f1 + f2 apart: beam diameter × magnification, the entrance imaged onto the exit",
              "ABCD matrices (Kogelnik and Li 1966)", optics=optics.telescope),
    StageKind("beam_expander", _TELESCOPE, _unchanged,
              "two lenses a distance f1 + f2 apart: beam diameter × magnification, the entrance imaged onto the exit",
              "ABCD matrices (Kogelnik and Li 1966)", optics=optics.telescope),
    StageKind("splitter", (Param("ratio", "1", required=True, fraction=True),), _splitter,
              "divides the beam into two named branches (pump–probe)", shares=_splitter_shares),
    StageKind("focus", (Param("focal_length", "m", required=True),), _unchanged,
              "focusing optic; its column sits at the beam's waist after it (1/e² diameter 4 M² λ f / (π D) for a "
              "collimated beam)", "Gaussian-beam optics (paraxial; ABCD matrices)",
              checks=("measured-spot", "focus-spot"), optics=optics.focus),
    StageKind("lens", (Param("focal_length", "m", required=True, signed=True),), _unchanged,
              "a thin lens, focal length positive or negative; its column shows the beam just after it",
              "ABCD matrices (Kogelnik and Li 1966)", checks=("focus-spot",), optics=optics.lens),
    StageKind("sample", (), _unchanged, "a plane in the beam that changes nothing (a target, a measurement)"),
)}

_untoleranced = sorted({p.name for k in STAGE_KINDS.values() for p in k.params if p.dimension not in
                        ("text", "material_name")} - set(PARAM_TOLERANCES))
if _untoleranced:  # pragma: no cover - table sanity
    raise ValueError(f"stage parameters without a default tolerance: {', '.join(_untoleranced)}")
