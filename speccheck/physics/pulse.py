"""The pulse carried along the path: its field (``field.py``) at the typical values, and the
intervals its numbers can take.

A ``Pulse`` is an envelope (the laser's pulse shape at its transform-limited duration τ0,
or a sampled spectrum after a harmonic), the phase terms the path has added to it at
their typical values, and *windows*: ranges of GDD and TOD to add on top of the typical
phase, one per hypothesis about the laser's chirp (one window when its sign is known or
the pulse is transform limited, two when it is not).  The tolerances of every stage widen
the windows; the tolerance of τ0 (from the bandwidth's) scales the envelope.

The numbers of a column (duration, peak-power factor P_pk·τ/E, the energy in the main
peak) are evaluated at the typical phase and at the corners: τ0 low and high × each end of
each window's GDD (× each end of its TOD where that matters), and, where a window's GDD
range holds the GDD that cancels the typical net GDD, there too, so an interval that spans
the compensating value holds the shortest pulse.  The interval is the smallest and
largest over these points; the typical value is the typical phase's (for an unknown
chirp sign, the positive one, common practice: normal dispersion in the source).

A Gaussian envelope whose phase beyond second order is negligible over its spectrum
(below 0.01 rad at four spectral half-widths) takes the closed form
τ = τ0 √(1 + (4 ln2 φ2/τ0²)²) (``dispersion.py``) instead of an FFT: it is exact there.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import cached_property

from speccheck.physics import broadening as B
from speccheck.physics import field as F
from speccheck.physics import phase_terms as T
from speccheck.physics import harmonics as H
from speccheck.physics.dispersion import broadened_duration
from speccheck.physics.shapes import PULSE_SHAPES

Value = tuple  # (low, typical, high)
GAUSSIAN_A = PULSE_SHAPES["gaussian"].peak_power_factor
_NEGLIGIBLE = 0.01  # rad: phase beyond second order that changes no duration visibly
# x·τ0 out to which a shape's spectrum matters for that test: its intensity is 1e-3 of its peak there
_REACH = {"gaussian": 4.0, "sech2": 6.0, "flat_top": 60.0}


@dataclass(frozen=True)
class Window:
    gdd: tuple[float, float]  # s², added to the typical phase
    tod: tuple[float, float] = (0.0, 0.0)  # s³

    def shifted(self, gdd=(0.0, 0.0), tod=(0.0, 0.0)) -> "Window":
        return Window((self.gdd[0] + gdd[0], self.gdd[1] + gdd[1]), (self.tod[0] + tod[0], self.tod[1] + tod[1]))

    def scaled(self, k2: float, k3: float) -> "Window":
        return Window((self.gdd[0] * k2, self.gdd[1] * k2), (self.tod[0] * k3, self.tod[1] * k3))


@dataclass(frozen=True)
class Numbers:
    duration: Value
    peak_factor: Value
    main_peak: Value
    net: tuple[Value, Value, Value]  # net GDD, TOD, FOD over the windows (typical in the middle)
    phase_rms: float


@dataclass(frozen=True)
class Pulse:
    envelope: F.Envelope
    omega0: float  # rad/s
    tl: Value  # s: the transform-limited FWHM, low / typical / high
    terms: tuple = ()
    windows: tuple[Window, ...] = (Window((0.0, 0.0)),)
    shaped: bool = False  # a stage has changed the temporal profile: the field's numbers apply
    sign_unknown: bool = False
    # the share of the energy in the main peak at the laser (a pedestal, ``energy_in_main_peak``): the
    # field is the main peak's, the pedestal is taken as too long to add to the peak
    share: Value = (1.0, 1.0, 1.0)
    # the spread of the net FOD the stages' tolerances allow (shown; the corners do not vary FOD)
    fod_spread: tuple[float, float] = (0.0, 0.0)

    def adding(self, terms: tuple, gdd=(0.0, 0.0), tod=(0.0, 0.0), fod=(0.0, 0.0)) -> "Pulse":
        """The pulse after phase-only terms (typical) with their tolerances as GDD and TOD ranges
        around the typical (``gdd`` = (low − typical, high − typical)), and its FOD's spread."""
        return replace(self, terms=self.terms + tuple(terms), shaped=True,
                       windows=tuple(w.shifted(gdd, tod) for w in self.windows),
                       fod_spread=(self.fod_spread[0] + fod[0], self.fod_spread[1] + fod[1]))

    def harmonic(self, order: int) -> "Pulse":
        """E(t)^order of the typical field (thin crystal, undepleted; ``harmonics.harmonic``), the GDD
        φ2/n that the pump's net GDD φ2 gives the harmonic carried as a phase term.  The windows' GDD and
        TOD become φ2/n and φ3/n² (the phase of E^n at n times the offsets)."""
        gdd = self.taylor[0]
        env = H.harmonic(self.envelope, self.terms, self.omega0, order, gdd)
        ratio = env.tl / self.envelope.tl
        tl = tuple(x * ratio for x in self.tl)
        terms = (T.Poly(2, gdd / order),) if gdd else ()
        return Pulse(env, self.omega0 * order, tl, terms, tuple(w.scaled(1.0 / order, 1.0 / order**2)
                                                            for w in self.windows), True, self.sign_unknown,
                     self.share, tuple(x / order**3 for x in self.fod_spread))

    # ------------------------------------------------------------- numbers
    @cached_property
    def taylor(self) -> tuple[float, float, float]:
        """Net GDD, TOD, FOD at the carrier: the envelope's own phase and the terms'."""
        own, added = self.envelope.taylor(), T.taylor(self.terms, self.omega0)
        return tuple(a + b for a, b in zip(own, added))

    @cached_property
    def _closed(self) -> bool:
        return self._closed_form()

    def _closed_form(self) -> bool:
        """A shape's envelope whose phase beyond second order is negligible: the Gaussian closed form,
        or the shape's broadening table (``broadening_data.py``), instead of an FFT."""
        if self.envelope.shape is None:
            return False
        _, tod, fod = self.taylor
        x = _REACH[self.envelope.shape] / (self.envelope.tl * min(1.0, self.tl[0] / self.tl[1]))
        tods = [abs(tod + t) for w in self.windows for t in w.tod]
        return max(tods) * x**3 / 6.0 + abs(fod) * x**4 / 24.0 < _NEGLIGIBLE

    def _at(self, scale: float, gdd: float, tod: float) -> F.Measures:
        shape = self.envelope.shape
        if self._closed and shape == "gaussian":
            return F.Measures(broadened_duration(self.envelope.tl * scale, self.taylor[0] + gdd), GAUSSIAN_A,
                              1.0, float("nan"), "closed form")
        if self._closed:
            duration, factor, main = B.broadened(shape, self.envelope.tl * scale, self.taylor[0] + gdd)
            return F.Measures(duration, factor, main, float("nan"), "table")
        return F.measure(self.envelope, self.terms, self.omega0, scale, (gdd, tod))

    @cached_property
    def numbers(self) -> Numbers:
        scales = sorted({self.tl[0] / self.tl[1], self.tl[2] / self.tl[1]}) if self.tl[1] else [1.0]
        corners = [(1.0, 0.0, 0.0)]
        extra: list = []  # the shortest pulse within a window, where higher orders move it
        for w in self.windows:
            tods = sorted(set(w.tod)) if self._tod_matters(w) else [0.0]
            gdds = list(w.gdd)
            best = -self.taylor[0]  # cancels the typical net GDD: the shortest pulse, near enough
            if w.gdd[0] < best < w.gdd[1]:
                gdds.append(best)
                if self._higher_orders_matter():  # FOD moves the shortest pulse: the best GDD and TOD in reach
                    for g, t in (self.compensation(), self._shortest):
                        extra.append((1.0, min(max(g, w.gdd[0]), w.gdd[1]), min(max(t, w.tod[0]), w.tod[1])))
            corners += [(s, g, t) for s in scales for g in gdds for t in tods]
        corners = list(dict.fromkeys(corners + extra))
        if self._closed:
            points = [self._at(*c) for c in corners]
        else:
            points = F.measure_set(self.envelope, self.terms, self.omega0, corners)
        typ = points[0]
        durations = [p.duration for p in points]
        lo, mid, hi = self.share
        factors = [p.peak_factor * k for p in points for k in (lo, hi)]
        mains = [p.main_peak * k for p in points for k in (lo, hi)]
        gdd, tod, fod = self.taylor
        net_gdd = (gdd + min(w.gdd[0] for w in self.windows), gdd, gdd + max(w.gdd[1] for w in self.windows))
        net_tod = (tod + min(w.tod[0] for w in self.windows), tod, tod + max(w.tod[1] for w in self.windows))
        return Numbers((min(durations), typ.duration, max(durations)),
                       (min(factors), typ.peak_factor * mid, max(factors)), (min(mains), typ.main_peak * mid, max(mains)),
                       (net_gdd, net_tod, (fod + self.fod_spread[0], fod, fod + self.fod_spread[1])), typ.phase_rms)

    def profile(self, points: int = 300) -> tuple[tuple, ...]:
        """The typical field for plots: (time from the peak in s, I(t)/max, wavelength in m ascending,
        spectral intensity/max, spectral phase in rad with its constant and group delay removed)."""
        import numpy as np

        t, inten = H.time_profile(self.envelope, self.terms, self.omega0, 1.0, points)
        t = t - t[int(np.argmax(inten))]
        half = self.envelope.half_span()
        dw = np.linspace(-half, half, 4001)
        amp = self.envelope.at(dw)
        power = np.abs(amp) ** 2
        keep = (power > 1e-3 * power.max()) & (np.abs(dw) < 0.95 * self.omega0)
        dw, amp, power = dw[keep], amp[keep], power[keep]
        with np.errstate(invalid="ignore"):
            phi = T.total_phase(self.terms, self.omega0, dw) + np.unwrap(np.angle(amp))
        good = np.isfinite(phi)
        dw, power, phi = dw[good], power[good], phi[good]
        slope, offset = np.polyfit(dw, phi, 1, w=np.sqrt(power))  # the group delay and constant: no shape
        phi = phi - slope * dw - offset
        stride = max(1, len(dw) // points)
        lam = 2.0 * math.pi * 299792458.0 / (self.omega0 + dw[::stride])  # c, exact by the SI's definition
        order = np.argsort(lam)
        return (tuple(float(x) for x in t), tuple(float(x) for x in inten), tuple(float(x) for x in lam[order]),
                tuple(float(x) for x in (power[::stride] / power.max())[order]),
                tuple(float(x) for x in phi[::stride][order]))

    def _tod_matters(self, w: Window) -> bool:
        x = 4.0 / self.envelope.tl
        return abs(w.tod[1] - w.tod[0]) * x**3 / 6.0 >= _NEGLIGIBLE

    def compensation(self) -> tuple[float, float]:
        return self._optimum

    @cached_property
    def _optimum(self) -> tuple[float, float]:
        """The GDD and TOD to add for the highest peak power: the negatives of the net GDD and TOD
        at the carrier, then, where fourth and higher orders matter (over 0.05 rad across the
        spectrum), a pattern search on the peak power."""
        return self._search(lambda m: m.peak_factor / m.duration)

    @cached_property
    def _shortest(self) -> tuple[float, float]:
        """The GDD and TOD to add for the shortest pulse (where higher orders matter, not the same as
        for the highest peak power: a satellite may take energy and leave a short main peak)."""
        return self._search(lambda m: -m.duration)

    def _search(self, objective) -> tuple[float, float]:
        gdd0, tod0, fod = self.taylor
        best = (-gdd0, -tod0)
        tl = self.envelope.tl
        if not self._higher_orders_matter():
            return best

        def score(g, t):
            return objective(F.measure(self.envelope, self.terms, self.omega0, 1.0, (g, t)))

        # a pattern search, its first steps as large as the GDD and TOD that balance the FOD across the
        # spectrum's half-width (φ4·Δω²/2 and φ4·Δω), halved when no step gains
        reach = 2.0 / tl
        step = [max(0.05 * tl * tl, abs(fod) * reach**2 / 2.0), max(0.05 * tl**3, abs(fod) * reach)]
        value = score(*best)
        for _ in range(60):
            trials = [(best[0] + sign * step[0], best[1]) for sign in (1, -1)] + \
                     [(best[0], best[1] + sign * step[1]) for sign in (1, -1)]
            scored = max((score(*trial), trial) for trial in trials)
            if scored[0] > value + 1e-9 * abs(value):
                value, best = scored
            else:
                step = [s / 2.0 for s in step]
                if step[0] < 0.01 * tl * tl and step[1] < 0.01 * tl**3:
                    break
        return best

    def _higher_orders_matter(self) -> bool:
        """Phase beyond third order over 0.05 rad across the spectrum: the compressing GDD and TOD are then
        not just the negatives of the net ones (a sampled spectrum is always taken to need the search)."""
        if self.envelope.shape is None:
            return True
        fod = self.taylor[2]
        return abs(fod) * (_REACH[self.envelope.shape] / self.envelope.tl) ** 4 / 24.0 >= 0.05


def at_laser(shape: str, tl: Value, duration: Value | None, omega0: float, chirp: str | None,
             gdd: Value | None, tod: Value | None, share: Value = (1.0, 1.0, 1.0),
             tl_from: str = "bandwidth", spectrum: tuple = ()) -> tuple[Pulse, list[str]]:
    """The laser's pulse: its shape at τ0, with the chirp that gives its stated duration.

    ``chirp`` is "positive", "negative" or None; ``gdd`` and ``tod`` (signed intervals) are the
    chirp the laser's pulse carries, where the spec states it; ``share`` the energy in its main
    peak; ``tl_from`` where τ0 came from ("bandwidth", "measured" or "duration": none known, the
    pulse is then transform limited); ``spectrum`` a measured spectrum's (ω, √S(ω)), whose amplitude
    the field then takes instead of the shape's.  Returns the pulse and the model notes to say at the
    first stage that uses the field."""
    notes = []
    if spectrum:
        return _measured(spectrum, tl, duration, omega0, chirp, gdd, tod, share)
    if shape not in ("gaussian", "sech2", "flat_top"):
        text = f"the {shape} shape has no transform limit, so its field is taken as a Gaussian's"
        if tl_from == "bandwidth" and duration is not None and duration[1] is not None and duration[1] < tl[1] * 0.999:
            text += (f", whose transform limit over the bandwidth ({tl[1] * 1e15:.4g} fs) is longer than the "
                     f"stated {duration[1] * 1e15:.4g} fs: the field starts at that limit")
        notes.append(text)
        shape = "gaussian"
    if share[1] < 1.0:
        notes.append(f"{share[1]:.3g} of the laser's energy is in its main peak: the field is the main peak's, "
                     "and the rest (a pedestal) is taken as too long to add to the peak power")
    env = F.Envelope(tl[1], shape)
    made = dict(share=share)
    if gdd is not None:
        return _stated_chirp(env, omega0, tl, gdd, tod, made), notes
    if tl_from == "duration":
        notes.append("the laser block states no bandwidth (or measured spectrum), so its pulse is taken as "
                     "transform limited; state spectral_bandwidth to carry its chirp")
        return Pulse(env, omega0, tl, **made), notes
    if duration is None or duration[1] is None:
        notes.append("the laser block states no pulse_duration, so its pulse is taken at its transform limit")
        return Pulse(env, omega0, tl, **made), notes
    # the chirp that gives each corner of the duration from each corner of τ0 (none where the duration
    # is within the transform limit): a duration at its limit may still carry a chirp within its tolerance
    corners = [B.gdd_for_duration(shape, t0, d) for t0 in (tl[0], tl[2]) for d in (duration[0], duration[2])
               if t0 > 0 and math.isfinite(t0) and math.isfinite(d) and d > 0]
    typ = B.gdd_for_duration(shape, tl[1], duration[1]) if duration[1] > tl[1] * 1.001 else 0.0
    return _chirped(env, omega0, tl, made, chirp, corners, typ, notes), notes


def _measured(spectrum: tuple, tl: Value, duration: Value | None, omega0: float, chirp: str | None,
              gdd: Value | None, tod: Value | None, share: Value) -> tuple[Pulse, list[str]]:
    """The laser's pulse from its measured spectrum: the amplitude √S(ω) with a flat phase, then the
    chirp (a stated GDD, or the GDD that gives the stated duration, found on the field itself)."""
    import numpy as np

    omega, amp = (np.asarray(x, dtype=float) for x in spectrum)
    env = H.sampled(omega - omega0, amp.astype(complex), omega0)
    # τ0's interval relative to the measured one (the analysis's, from its noise)
    tl = (env.tl * tl[0] / tl[1], env.tl, env.tl * tl[2] / tl[1]) if tl[1] else (env.tl,) * 3
    notes = ["the field's amplitude is the measured spectrum's, √S(ω), with the chirp that gives the stated "
             "duration"]
    made = dict(share=share)
    if gdd is not None:
        return _stated_chirp(env, omega0, tl, gdd, tod, made), notes
    if duration is None or duration[1] is None or not all(math.isfinite(d) for d in (duration[0], duration[2])):
        return Pulse(env, omega0, tl, **made), notes
    corners = [_gdd_for(env, omega0, s, d) for s in (tl[0] / tl[1], tl[2] / tl[1]) for d in (duration[0], duration[2])
               if d > 0]
    typ = _gdd_for(env, omega0, 1.0, duration[1]) if duration[1] > env.tl * 1.001 else 0.0
    return _chirped(env, omega0, tl, made, chirp, corners, typ, notes), notes


def _gdd_for(env: F.Envelope, omega0: float, scale: float, duration: float) -> float:
    """|GDD| that stretches the flat-phase pulse of a sampled spectrum (widened by 1/scale) to
    ``duration``: bisection in log GDD on the field's duration (it grows with |GDD| for a spectrum
    with a single main peak), 0 when the pulse is already that long."""
    tl = F.measure(env, (), omega0, scale).duration
    if duration <= tl * 1.001:
        return 0.0
    lo, hi = 0.0, tl * tl  # grow the bracket until it holds the duration
    while F.measure(env, (T.Poly(2, hi),), omega0, scale).duration < duration:
        lo, hi = hi, hi * 4.0
        if hi > 1e6 * tl * tl:
            break
    for _ in range(40):
        mid = 0.5 * (lo + hi) if lo == 0.0 else math.sqrt(lo * hi)
        if F.measure(env, (T.Poly(2, mid),), omega0, scale).duration < duration:
            lo = mid
        else:
            hi = mid
        if hi - lo <= 1e-4 * hi:
            break
    return 0.5 * (lo + hi)


def _stated_chirp(env: F.Envelope, omega0: float, tl: Value, gdd: Value, tod: Value | None, made: dict) -> Pulse:
    """The pulse with the GDD (and TOD) the laser block states, their tolerances as its window."""
    terms = [T.Poly(2, gdd[1])] + ([T.Poly(3, tod[1])] if tod is not None else [])
    window = Window((gdd[0] - gdd[1], gdd[2] - gdd[1]),
                    (tod[0] - tod[1], tod[2] - tod[1]) if tod is not None else (0.0, 0.0))
    return Pulse(env, omega0, tl, tuple(terms), (window,), **made)


def _chirped(env: F.Envelope, omega0: float, tl: Value, made: dict, chirp: str | None, corners: list,
             typ: float, notes: list) -> Pulse:
    """The pulse with the |GDD| ``typ`` that gives its duration (``corners``: at the tolerances' ends), of
    the stated sign, or both signs (two windows, positive typical) with a note where none is stated."""
    lo, hi = min(corners + [typ]), max(corners + [typ])
    if hi <= 0.0:
        return Pulse(env, omega0, tl, **made)
    sign = -1.0 if chirp == "negative" else 1.0
    terms = (T.Poly(2, sign * typ),)
    window = Window((lo - typ, hi - typ) if sign > 0 else (-hi + typ, -lo + typ))
    if chirp in ("positive", "negative"):
        return Pulse(env, omega0, tl, terms, (window,), **made)
    longer = ("the laser's pulse is longer than its transform limit" if typ > 0.0 else
              "the laser's pulse may be longer than its transform limit within the tolerance of its duration")
    notes.append(f"{longer} and the sign of its chirp is not stated, so every duration after a dispersive "
                 "stage covers both signs (the typical value takes positive chirp, common practice); state "
                 "laser.chirp: positive or negative")
    return Pulse(env, omega0, tl, terms, (window, Window((-hi - typ, -lo - typ))), sign_unknown=True, **made)
