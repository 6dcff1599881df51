"""What passes from one column of the path to the next: the beam's carried values as
intervals, what its pulse's field is built from, and the field itself once a stage has
needed it; the interval arithmetic of the stages."""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from typing import Callable

CARRIED = ("wavelength", "repetition_rate", "pulse_energy", "average_power", "pulse_duration",
           "spectral_bandwidth", "beam_diameter", "m2", "peak_power_factor")

Value = tuple  # (low, typical, high); low 0 / high inf when unbounded; typical may be None


def scaled(v: Value, f: Value) -> Value:
    """The product of two positive intervals."""
    typ = v[1] * f[1] if v[1] is not None and f[1] is not None else None
    return (v[0] * f[0], typ, v[2] * f[2])


def inverted(v: Value) -> Value:
    return (1.0 / v[2] if v[2] > 0 else 0.0, 1.0 / v[1] if v[1] else None,
            1.0 / v[0] if v[0] > 0 else math.inf)


def point(x: float) -> Value:
    return (x, x, x)


def typical(v: Value) -> float | None:
    if v[1] is not None:
        return v[1]
    if v[0] > 0 and math.isfinite(v[2]):
        return math.sqrt(v[0] * v[2])
    return None


@dataclass(frozen=True)
class LaserPulse:
    """What the laser block says about its pulse, to build its field from when a stage needs it."""

    shape: str
    tl: Value | None  # s, the transform-limited duration (from the bandwidth, a measured spectrum or τ0)
    duration: Value | None
    chirp: str | None = None  # "positive" | "negative" | None
    gdd: Value | None = None  # s², the chirp the laser's pulse carries (signed)
    tod: Value | None = None  # s³
    share: Value = (1.0, 1.0, 1.0)  # of the energy in the main peak
    tl_from: str = "bandwidth"  # or "measured", or "duration" (nothing else known: transform limited)
    # a measured spectrum's amplitude: (ω in rad/s, √S(ω)), the field's amplitude instead of the shape's
    spectrum: tuple = ()


@dataclass(frozen=True)
class Beam:
    values: dict  # quantity -> Value
    laser: LaserPulse | None = None
    pulse: object = None  # physics.pulse.Pulse once a stage has needed the field
    stage_gdd: Value | None = None  # s², what the last stage added
    geometry: object = None  # physics.beam_geometry.Geometry: q at this plane, once the beam's size is known

    def get(self, q: str) -> Value | None:
        return self.values.get(q)

    def with_values(self, **changes) -> "Beam":
        values = dict(self.values)
        for q, v in changes.items():
            if v is None:
                values.pop(q, None)
            else:
                values[q] = v
        return replace(self, values=values)

    def field(self, ctx) -> object | None:
        """The pulse as a field (``physics.pulse.Pulse``), built from the laser on first use; None
        where the numbers do not determine it (no duration and no bandwidth, no wavelength)."""
        if self.pulse is not None:
            return self.pulse
        lam = self.get("wavelength")
        if self.laser is None or self.laser.tl is None or not lam or not typical(lam) or not typical(self.laser.tl):
            return None
        from speccheck.physics import pulse

        tl = self.laser.tl
        tl = (tl[0] or tl[1], typical(tl), tl[2] if math.isfinite(tl[2]) else typical(tl))
        made, notes = pulse.at_laser(self.laser.shape, tl, self.laser.duration, 2.0 * math.pi * ctx.c / typical(lam),
                                     self.laser.chirp, self.laser.gdd, self.laser.tod, self.laser.share,
                                     self.laser.tl_from, self.laser.spectrum)
        for text in notes:
            ctx.note(text)
        stated = self.get("peak_power_factor")
        if stated and stated[1] and made.terms:
            own = made.numbers.peak_factor[1]
            if abs(own / stated[1] - 1.0) > 0.02:
                ctx.note(f"the laser column takes P_pk·τ/E = {stated[1]:.3g} (its pulse shape's); the chirped "
                         f"field that gives its duration has {own:.3g}, so from here on the peak power follows the "
                         f"field ({own / stated[1]:.3g}× the laser column's before any change)")
        return made

    def with_pulse(self, made, ctx) -> "Beam":
        """The beam carrying the pulse ``made``: its duration and peak-power factor from the field."""
        n = made.numbers
        # a carried peak power (a laser stated by it, without an energy) does not survive a new profile
        return replace(self, pulse=made).with_values(pulse_duration=n.duration, peak_power_factor=n.peak_factor,
                                                     peak_power=None)


@dataclass(frozen=True)
class StageContext:
    c: float
    transform_limit: float  # of the pulse shape
    gvd: Callable[[str, float], float]  # (material, wavelength m) -> s²/m
    tod: Callable[[str, float, float], float] = field(default=lambda m, lam, length: 0.0)  # -> s³
    index: Callable[[str, float], float] = field(default=lambda m, lam: 1.5)  # (material, wavelength m) -> n
    note: Callable[[str], None] = field(default=lambda text: None)


# What a loss or a gain scales.  The peak power is carried only where the column before knew no
# pulse energy (a laser stated by its peak power): otherwise each column derives it again.
ENERGY_LIKE = ("pulse_energy", "average_power", "peak_power")


def transmit(beam: Beam, t: Value) -> Beam:
    return beam.with_values(**{q: scaled(beam.get(q), t) for q in ENERGY_LIKE if beam.get(q)})
