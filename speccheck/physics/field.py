"""The pulse as a field: a complex spectrum on a grid of angular-frequency offsets.

Conventions (settled numerically in tests/test_field.py):

* the field's spectrum is E(Δω) = A(Δω) exp(i φ(Δω)), Δω = ω − ω0, and the field in time
  is E(t) = Σ E(Δω) exp(−i Δω t) (numpy's forward FFT), so a spectral phase φ delays each
  frequency by its group delay dφ/dω: positive GDD (normal dispersion) makes an up-chirp;
* the intensity is |E(t)|², the duration its full width at half maximum, taken between
  the outermost half-maximum crossings (a TOD satellite above half the peak counts);
* the peak-power factor is a = P_peak·τ/E (0.9394 for a Gaussian, 0.8814 for sech²);
* the main peak is the stretch of I(t) around its maximum bounded by the nearest minima.

An envelope is the spectral amplitude before any added phase: a pulse shape of the shape
table at a transform-limited duration τ0 (closed forms: the Fourier transforms of the
flat-phase fields exp(−2 ln2 t²/τ0²), sech(t/T) and a rectangle), or a sampled complex
spectrum (a harmonic's output, a measured spectrum).  Phase terms are added to it: a
polynomial term c·Δω^k/k!, a glass's exact phase k(ω)L from its Sellmeier equation (all
orders, its constant and group delay removed), or any other exact phase function.

The grid is sized from the pulse: a time step of at most τ0/4 (the crossings and the peak are then refined by direct sums) and a time window that
holds the spread of group delays over the spectrum, so a moderate chirp takes 512–4,096
points.  When that would need more than 2^16 points (a stretcher), the duration comes
from the stationary-phase mapping instead: each frequency arrives at its group delay
t(ω) = φ'(ω) with intensity |A(ω)|²/|φ''(ω)| (exact in the limit of large chirp; A. M.
Weiner, *Ultrafast Optics* (Wiley, 2009), ch. 4).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

from speccheck.physics.measures import _UNDEFINED_OK, Measures, _crossing, _peak
from speccheck.physics.model_range import OutOfModelRange
from speccheck.physics.phase_terms import _d2, _d3, _d4, total_phase
from speccheck.physics.stationary import stationary_phase

_LN2 = math.log(2.0)
_SECH2_T = 2.0 * math.acosh(math.sqrt(2.0))  # a sech² pulse's FWHM over its width T
MAX_POINTS = 1 << 16  # beyond this the stationary-phase mapping gives the duration
_STEPS_PER_TL = 4  # time samples per transform-limited FWHM (crossings and peak are refined)
_FLOOR = 1e-7  # spectral amplitude (of its peak) below which a frequency carries nothing


# ------------------------------------------------------------------ envelopes
def shape_amplitude(shape: str, x: np.ndarray) -> np.ndarray:
    """The spectral amplitude of a flat-phase pulse of the shape, at x = Δω·τ0 (peak 1)."""
    if shape == "gaussian":  # FT of exp(-2 ln2 t²/τ0²) ∝ exp(-Δω² τ0² / (8 ln2))
        return np.exp(-x * x / (8.0 * _LN2))
    if shape == "sech2":  # FT of sech(t/T) ∝ sech(π Δω T / 2), T = τ0 / 1.7627
        return 1.0 / np.cosh(np.clip(math.pi * x / (2.0 * _SECH2_T), -700, 700))
    if shape == "flat_top":  # FT of a rectangle of width τ0: sinc(Δω τ0 / 2)
        return np.sinc(x / (2.0 * math.pi))
    raise ValueError(f"no field for the pulse shape {shape!r}")


# the half-width in x = Δω·τ0 beyond which the shape's amplitude is negligible
_SUPPORT = {"gaussian": 9.0, "sech2": 16.0, "flat_top": 60.0}  # flat top: band limited here (its sinc falls as 1/x)


@dataclass(frozen=True)
class Envelope:
    """A spectral amplitude: a shape at a transform-limited FWHM ``tl`` (s), or a sampled
    complex spectrum (``offsets`` in rad/s, ``values`` complex) whose own τ0 is ``tl``."""

    tl: float
    shape: str | None = None
    offsets: np.ndarray | None = field(default=None, compare=False)
    values: np.ndarray | None = field(default=None, compare=False)

    def half_span(self) -> float:
        """|Δω| beyond which the envelope carries nothing (rad/s)."""
        if self.shape is not None:
            return _SUPPORT[self.shape] / self.tl
        mag = np.abs(self.values)
        keep = self.offsets[mag > _FLOOR * mag.max()]
        return float(max(abs(keep[0]), abs(keep[-1])))

    def bandwidth(self) -> float:
        """The FWHM of the spectral intensity |A|², in rad/s."""
        if self.shape is not None:
            x = np.linspace(-_SUPPORT[self.shape], _SUPPORT[self.shape], 20001)
            p = shape_amplitude(self.shape, x) ** 2
            hot = x[p >= 0.5]
            return float(hot[-1] - hot[0]) / self.tl
        p = np.abs(self.values) ** 2
        half = 0.5 * p.max()
        above = np.flatnonzero(p >= half)
        lo, hi = int(above[0]), int(above[-1])
        return _crossing(self.offsets, p, hi, half) - _crossing(self.offsets, p, lo - 1, half)

    def taylor(self) -> tuple[float, float, float]:
        """GDD, TOD and FOD of the envelope's own phase at its centre (0 for a shape)."""
        if self.shape is not None:
            return (0.0, 0.0, 0.0)
        width = self.bandwidth()
        h = 0.15 * width
        p = np.angle(self.at(np.arange(-3, 4) * h))
        p = np.unwrap(p)
        # a term whose phase across the spectrum's FWHM stays below a microradian is rounding, not phase
        return tuple(c if abs(c) * (width / 2.0) ** k / math.factorial(k) > 1e-6 else 0.0
                     for c, k in ((_d2(p, h), 2), (_d3(p, h), 3), (_d4(p, h), 4)))

    def at(self, dw: np.ndarray, scale: float = 1.0) -> np.ndarray:
        """The complex amplitude at the offsets ``dw``, the spectrum widened by ``1/scale``
        (scale = τ0'/τ0: a longer transform limit is a narrower spectrum)."""
        if self.shape is not None:
            return shape_amplitude(self.shape, dw * self.tl * scale).astype(complex)
        x = dw * scale
        mag = np.interp(x, self.offsets, np.abs(self.values), left=0.0, right=0.0)
        phase = np.interp(x, self.offsets, _unwrapped(self.values), left=0.0, right=0.0)
        return mag * np.exp(1j * phase)


def _unwrapped(values: np.ndarray) -> np.ndarray:
    mag = np.abs(values)
    phase = np.unwrap(np.angle(values))
    keep = mag > 1e-3 * mag.max()
    phase = np.where(keep, phase, np.interp(np.arange(len(phase)), np.flatnonzero(keep), phase[keep]))
    return phase


# ---------------------------------------------------------------- the field
def _support(env: Envelope, scale: float) -> float:
    return env.half_span() / scale


def sample(env: Envelope, terms, omega0: float, scale: float = 1.0, extra=(0.0, 0.0), oversample: float = 1.0):
    """The spectrum on a grid fitted to the pulse: (dw, complex spectrum, tl, n_needed).

    ``extra`` adds a GDD and a TOD on top of the terms (the tolerance corners)."""
    tl = env.tl * scale
    if _support(env, scale) >= 0.95 * omega0 and abs(env.at(np.array([-0.95 * omega0]), scale)[0]) > 0.5:
        raise OutOfModelRange("the spectrum reaches zero frequency: the bandwidth exceeds the carrier")
    half = min(max(_support(env, scale), math.pi * _STEPS_PER_TL / tl), 0.95 * omega0)
    coarse = np.linspace(-half, half, 257)
    amp = np.abs(env.at(coarse, scale))
    # the delays of the spectrum above 1e-4 of its peak intensity: a far wing's delay (a large TOD's)
    # may wrap round the window, with energy below 1e-4 of the pulse's
    live = amp > 1e-2 * amp.max()
    with np.errstate(invalid="ignore"):
        phi = _phase(terms, omega0, np.where(live, coarse, 0.0), extra)
        delay = np.gradient(phi, coarse)
    # the group delay where the spectrum matters, its neighbours too (no step at the edge of ``live``)
    inner = live & np.isfinite(delay) & np.roll(live, 1) & np.roll(live, -1)
    delay = delay[inner]
    spread = float(np.max(np.abs(delay))) if delay.size else 0.0
    # a power of two times 32 τ0 (the envelope's own), so the columns of a path share grids
    need_window = 2.0 * (2.5 * spread + 16.0 * tl) * oversample
    base = 32.0 * env.tl
    window = base * 2.0 ** max(0, math.ceil(math.log2(need_window / base)))
    step = 2.0 * math.pi / window
    need = int(math.ceil(2.0 * half / step))
    n = 1 << max(9, (need - 1).bit_length())
    return half, window, n


def _phase(terms, omega0, dw, extra):
    phi = total_phase(terms, omega0, dw)
    if extra[0]:
        phi = phi + extra[0] * dw**2 / 2.0
    if extra[1]:
        phi = phi + extra[1] * dw**3 / 6.0
    return phi


def measure(env: Envelope, terms, omega0: float, scale: float = 1.0, extra=(0.0, 0.0),
            max_points: int = MAX_POINTS) -> Measures:
    """Duration, peak-power factor, main-peak energy and residual phase of the field (by FFT on up
    to ``max_points`` points, beyond them by the stationary-phase mapping)."""
    half, window, n = sample(env, terms, omega0, scale, extra)
    if n > max_points:
        mapped = stationary_phase(env, terms, omega0, scale, extra, half)
        if mapped.duration >= _MAPPED * env.tl * scale:
            return _whole(env, mapped)
        # not stretched enough for the mapping to hold (a short pulse on a wide spread of delays): the
        # FFT on the largest grid, its window what that grid can span (the far wings wrap round)
        n = max_points
        window = n * math.pi / half
    dw, spec, phi = _spectrum(env, terms, omega0, scale, extra, window, n)
    # zero-padded to four times the points: the time step is a quarter of the grid's
    padded = np.zeros(_PAD * n, dtype=complex)
    padded[: n // 2], padded[-(n // 2):] = spec[: n // 2], spec[n // 2:]
    m = _PAD * n
    intensity = np.abs(np.fft.fftshift(np.fft.fft(padded))) ** 2
    dt = window / m
    t = (np.arange(m) - m // 2) * dt
    return _whole(env, _measures(t, _resolved(env, intensity, dt, scale), dt, spec, dw, phi))


_PAD = 4
_MAPPED = 10.0  # the stationary-phase mapping is taken only for a pulse stretched past this many τ0


def measure_set(env: Envelope, terms, omega0: float, points) -> list[Measures]:
    """``measure`` at each (scale, extra GDD, extra TOD) of ``points``, on one grid wide enough for all
    of them, with the terms' phase computed once (the corners of one column)."""
    points = list(points)
    widest = min(p[0] for p in points)
    g = max(abs(p[1]) for p in points)
    t = max(abs(p[2]) for p in points)
    half, window, n = sample(env, terms, omega0, widest)
    # the corners' extra group delay at the edge of the spectrum that matters widens the window
    reach = min(_support(env, widest), half)
    extra_window = 2.0 * 2.5 * (g * reach + t * reach * reach / 2.0)
    if extra_window > 0:
        base = 32.0 * env.tl
        window = base * 2.0 ** max(0, math.ceil(math.log2((window + extra_window) / base)))
        n = 1 << max(9, (int(math.ceil(2.0 * half * window / (2.0 * math.pi))) - 1).bit_length())
    if n > MAX_POINTS:
        return [measure(env, terms, omega0, *p[:1], p[1:]) for p in points]
    step = 2.0 * math.pi / window
    dw = np.fft.fftfreq(n, 1.0 / (n * step))
    inside = np.abs(dw) < 0.95 * omega0
    with np.errstate(invalid="ignore"):
        base_phase = total_phase(terms, omega0, np.where(inside, dw, 0.0))
    finite = bool(np.all(np.isfinite(base_phase)))
    m = _PAD * n
    dt = window / m
    times = (np.arange(m) - m // 2) * dt
    # every corner on one grid, one FFT for all of them (a row each), the measures of all rows at once
    scales = [p[0] for p in points]
    amplitudes: dict = {}
    for scale in scales:
        if scale not in amplitudes:
            amp = env.at(dw, scale)
            mag = np.abs(amp)
            amplitudes[scale] = (amp, mag, (mag > _FLOOR * mag.max()) & inside)
    amp = np.array([amplitudes[s][0] for s in scales])
    live = np.array([amplitudes[s][2] for s in scales])
    gdds = np.array([[p[1]] for p in points], dtype=float)
    tods = np.array([[p[2]] for p in points], dtype=float)
    phi = base_phase + gdds * (dw * dw / 2.0) + tods * (dw * dw * dw / 6.0)
    if not finite:
        undefined = live & ~np.isfinite(phi)
        mags = np.array([amplitudes[s][1] for s in scales])
        if np.any(undefined & (mags > _UNDEFINED_OK * mags.max(axis=1, keepdims=True))):
            raise OutOfModelRange("a phase is not defined across the pulse's spectrum (beyond the range of "
                                  "its formula)")
        live = live & ~undefined
    phi = np.where(live, phi, 0.0)
    spec = np.where(live, amp, 0.0) * _exp_i(phi, gdds, tods, base_phase, dw)
    # (-1)^j on the input puts t = 0 at the middle of the FFT's output (fftshift without a copy): the
    # padded index of each of the n points has the parity of its own index, as n and m are even
    padded = np.zeros((len(points), m), dtype=complex)
    signed = spec * _ALTERNATING[n] if n in _ALTERNATING else spec * _alternating(n)
    padded[:, : n // 2], padded[:, -(n // 2):] = signed[:, : n // 2], signed[:, n // 2:]
    transformed = np.fft.fft(padded, axis=1)
    intensity = (transformed * transformed.conj()).real
    if env.shape == "flat_top":
        intensity = np.array([_resolved(env, intensity[row], dt, scales[row]) for row in range(len(points))])
    rows = _row_measures(times, intensity, dt)
    # the residual phase only at the first point (the typical one): the only one a column shows
    rms = _phase_rms(spec[0], dw, phi[0])
    return [_whole(env, Measures(d, a, share, rms if row == 0 else float("nan"), "fft"))
            for row, (d, a, share) in enumerate(rows)]


_ALTERNATING: dict = {}


def _alternating(n: int) -> np.ndarray:
    sign = np.ones(n)
    sign[1::2] = -1.0
    _ALTERNATING[n] = sign
    return sign


def _exp_i(phi: np.ndarray, gdds: np.ndarray, tods: np.ndarray, base: np.ndarray, dw: np.ndarray) -> np.ndarray:
    """exp(i φ) for every row, φ = base + GDD Δω²/2 + TOD Δω³/6 (zero where not live): the rows share few
    GDDs and TODs, so it is the product of one exponential per distinct term (fewer complex
    exponentials, the costliest step); where a row's φ was zeroed (not live) its amplitude is zero too."""
    rows = len(phi)
    g_values, g_rows = np.unique(gdds[:, 0], return_inverse=True)
    t_values, t_rows = np.unique(tods[:, 0], return_inverse=True)
    if len(g_values) + len(t_values) + 1 >= rows or not np.all(np.isfinite(base)):
        return np.exp(1j * phi)
    out = np.exp(1j * base) * np.exp(1j * (g_values[:, None] * (dw * dw / 2.0)))[g_rows.ravel()]
    if len(t_values) > 1 or t_values[0]:
        out *= np.exp(1j * (t_values[:, None] * (dw * dw * dw / 6.0)))[t_rows.ravel()]
    return out


# The share of a rectangle's energy inside the flat top's cut at ±60/τ0: ∫ sinc²(x/2π) dx over ±60, by
# quadrature (2π for all of it).  The rest lies in the far wings, spread over long times by any chirp.
_FLAT_TOP_KEPT = 0.9894379


def _whole(env: Envelope, m: Measures) -> Measures:
    """The measures against the whole pulse's energy: a flat top's cut spectrum leaves out 1.06 % of it."""
    if env.shape != "flat_top":
        return m
    return Measures(m.duration, m.peak_factor * _FLAT_TOP_KEPT, m.main_peak * _FLAT_TOP_KEPT, m.phase_rms, m.method)


def _resolved(env: Envelope, intensity: np.ndarray, dt: float, scale: float) -> np.ndarray:
    """The intensity as the measures take it.  A flat top's spectrum is cut at ±60/τ0 (its sinc falls
    only as 1/x), and the cut rings at the pulse's edges: a spike of about 18 % over the plateau, a
    sixtieth of τ0 wide (Gibbs), which an unchirped pulse keeps and a chirp spreads out.  Averaged over
    0.16 τ0 the spike is all but gone (P_pk·τ/E 1.014 unchirped, against the rectangle's 1) and the
    plateau, the edges (symmetric) and a chirped profile stay as they are (tests/test_field.py: against
    a direct quadrature of the chirped rectangle in time, 0.1 % after 1000 fs² on 63 fs)."""
    if env.shape != "flat_top":
        return intensity
    k = int(round(0.16 * env.tl * scale / dt))
    if k < 2:
        return intensity
    return np.convolve(intensity, np.ones(k) / k, mode="same")


def _spectrum(env, terms, omega0, scale, extra, window, n):
    """(offsets in numpy's order, the complex spectrum, its phase) on n points over ``window``."""
    step = 2.0 * math.pi / window
    dw = np.fft.fftfreq(n, 1.0 / (n * step))
    amp = env.at(dw, scale)
    mag = np.abs(amp)
    live = (mag > _FLOOR * mag.max()) & (np.abs(dw) < 0.95 * omega0)  # the grid may reach past zero frequency
    with np.errstate(invalid="ignore"):
        phi = np.where(live, _phase(terms, omega0, np.where(live, dw, 0.0), extra), 0.0)
    undefined = ~np.isfinite(phi)
    if np.any(undefined):  # beyond a glass formula's range: only where the spectrum carries nothing
        if np.any(undefined & (mag > _UNDEFINED_OK * mag.max())):
            raise OutOfModelRange("a phase is not defined across the pulse's spectrum (beyond the range of its "
                             "formula)")
        live &= ~undefined
        phi = np.where(undefined, 0.0, phi)
    return dw, np.where(live, amp, 0.0) * np.exp(1j * phi), phi


def _measures(t, intensity, dt, spec, dw, phi) -> Measures:
    if not np.all(np.isfinite(intensity)) or not intensity.max() > 0.0:
        raise OutOfModelRange("the field is not finite")
    k = int(np.argmax(intensity))
    peak = _peak(intensity, k)
    half = peak / 2.0
    above = np.flatnonzero(intensity >= half)
    lo, hi = int(above[0]), int(above[-1])
    t_lo = _crossing(t, intensity, lo - 1, half)
    t_hi = _crossing(t, intensity, hi, half)
    duration = t_hi - t_lo
    energy = float(np.sum(intensity)) * dt
    a = peak * duration / energy
    # out to the nearest minima below half the peak
    low = intensity < half
    falls = np.flatnonzero((intensity[:-1] > intensity[1:]) & low[1:]) + 1  # a minimum seen from the right
    rises = np.flatnonzero((intensity[1:] > intensity[:-1]) & low[:-1])  # … from the left
    left = int(falls[falls <= k].max()) if np.any(falls <= k) else 0
    right = int(rises[rises >= k].min()) if np.any(rises >= k) else len(t) - 1
    main = float(np.sum(intensity[left:right + 1])) * dt / energy
    if spec is None:
        return Measures(float(duration), float(a), min(main, 1.0), float("nan"), "fft")
    return Measures(float(duration), float(a), min(main, 1.0), _phase_rms(spec, dw, phi), "fft")


def _phase_rms(spec, dw, phi) -> float:
    """The intensity-weighted rms of the spectral phase beyond its constant and linear parts."""
    w = np.abs(spec) ** 2
    mean = float(np.sum(w * phi) / np.sum(w))
    slope = float(np.sum(w * (phi - mean) * dw) / max(np.sum(w * dw * dw), 1e-300))
    return math.sqrt(float(np.sum(w * (phi - mean - slope * dw) ** 2) / np.sum(w)))



def _row_measures(t: np.ndarray, intensity: np.ndarray, dt: float) -> list[tuple[float, float, float]]:
    """``_measures``' duration, peak-power factor and main-peak share for every row of ``intensity``: the
    same steps (the parabola through the peak, the outermost half-maximum crossings by inverse cubic
    interpolation, the energy between the minima that bound the main peak), the whole-row operations
    done for all rows at once and the few-sample ones on each row."""
    if not np.all(np.isfinite(intensity)):
        raise OutOfModelRange("the field is not finite")
    m = intensity.shape[1]
    ks = intensity.argmax(axis=1).tolist()
    peaks = [_peak(row, k) for row, k in zip(intensity, ks)]
    if not min(peaks) > 0.0:
        raise OutOfModelRange("the field is not finite")
    halves = np.array(peaks)[:, None] / 2.0
    above = intensity >= halves
    los = above.argmax(axis=1).tolist()
    his = (m - 1 - above[:, ::-1].argmax(axis=1)).tolist()
    energies = (intensity.sum(axis=1) * dt).tolist()
    # the minima below half the peak: seen from the right (falls at j: I[j-1] > I[j]), from the left (rises)
    low = ~above
    falls = (intensity[:, :-1] > intensity[:, 1:]) & low[:, 1:]  # index i: the minimum at j = i + 1
    rises = (intensity[:, 1:] > intensity[:, :-1]) & low[:, :-1]  # index i: the minimum at j = i
    out = []
    for r, (k, peak, lo, hi, energy) in enumerate(zip(ks, peaks, los, his, energies)):
        row, half = intensity[r], peak / 2.0
        duration = _crossing(t, row, hi, half) - _crossing(t, row, lo - 1, half)
        left = np.flatnonzero(falls[r, :k])
        right = np.flatnonzero(rises[r, k:])
        left = int(left[-1]) + 1 if left.size else 0
        right = k + int(right[0]) if right.size else m - 1
        main = float(np.sum(row[left:right + 1])) * dt / energy
        out.append((float(duration), float(peak * duration / energy), min(main, 1.0)))
    return out
