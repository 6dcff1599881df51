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
from functools import lru_cache
from typing import Callable

import numpy as np

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
_SUPPORT = {"gaussian": 9.0, "sech2": 16.0, "flat_top": 600.0}


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
        h = 0.15 * self.bandwidth()
        p = np.angle(self.at(np.arange(-3, 4) * h))
        p = np.unwrap(p)
        return _d2(p, h), _d3(p, h), _d4(p, h)

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


# ---------------------------------------------------------------- phase terms
@dataclass(frozen=True)
class Poly:
    """c·Δω^k/k!: GDD (k = 2, s²), TOD (k = 3, s³), FOD (k = 4, s⁴)."""

    order: int
    coefficient: float

    def phase(self, omega0: float, dw: np.ndarray) -> np.ndarray:
        return self.coefficient * dw**self.order / math.factorial(self.order)

    def taylor(self, omega0: float) -> tuple[float, float, float]:
        return tuple(self.coefficient if self.order == k else 0.0 for k in (2, 3, 4))


@dataclass(frozen=True)
class Exact:
    """An exact phase φ(ω) (absolute ω, rad/s), its constant and group delay at ω0 removed:
    a glass's k(ω)·L, a grating or prism pair.  ``fn`` is vectorised."""

    name: str
    fn: Callable[[np.ndarray], np.ndarray] = field(compare=False)

    def phase(self, omega0: float, dw: np.ndarray) -> np.ndarray:
        h = 1e-4 * omega0
        p0, pp, pm = self.fn(np.array([omega0, omega0 + h, omega0 - h]))
        return self.fn(omega0 + dw) - p0 - (pp - pm) / (2.0 * h) * dw

    def taylor(self, omega0: float) -> tuple[float, float, float]:
        """GDD, TOD and FOD at ω0 by central differences of the exact phase."""
        h = 2e-3 * omega0
        k = np.arange(-3, 4)
        p = self.fn(omega0 + k * h)
        return _d2(p, h), _d3(p, h), _d4(p, h)


def _d2(p, h):  # sixth-order central differences on seven points
    return (2 * p[0] - 27 * p[1] + 270 * p[2] - 490 * p[3] + 270 * p[4] - 27 * p[5] + 2 * p[6]) / (180 * h**2)


def _d3(p, h):
    return (p[0] - 8 * p[1] + 13 * p[2] - 13 * p[4] + 8 * p[5] - p[6]) / (8 * h**3)


def _d4(p, h):
    return (-p[0] + 12 * p[1] - 39 * p[2] + 56 * p[3] - 39 * p[4] + 12 * p[5] - p[6]) / (6 * h**4)


def glass(material: str, thickness: float, c: float) -> Exact:
    """The exact phase of a glass plate: φ(ω) = n(ω) ω L / c (Sellmeier equation)."""
    from speccheck.physics import materials

    mat = materials.lookup(material)

    def fn(omega: np.ndarray) -> np.ndarray:
        lam = 2.0 * math.pi * c / omega
        return materials.refractive_index(mat, lam) * omega * thickness / c

    return Exact(f"{mat.name} {thickness:g} m", fn)


def total_phase(terms, omega0: float, dw: np.ndarray) -> np.ndarray:
    out = np.zeros_like(dw)
    for term in terms:
        out = out + term.phase(omega0, dw)
    return out


def taylor(terms, omega0: float) -> tuple[float, float, float]:
    """Net GDD, TOD and FOD at ω0 of the phase terms."""
    parts = [t.taylor(omega0) for t in terms]
    return tuple(float(sum(p[k] for p in parts)) for k in range(3)) if parts else (0.0, 0.0, 0.0)


# ---------------------------------------------------------------- the field
@dataclass(frozen=True)
class Measures:
    duration: float  # s, intensity FWHM
    peak_factor: float  # a = P_peak τ / E
    main_peak: float  # share of the energy between the minima that bound the main peak
    phase_rms: float  # rad, intensity-weighted rms of the phase beyond its linear part
    method: str  # "fft" or "stationary-phase"


def _support(env: Envelope, scale: float) -> float:
    return env.half_span() / scale


def sample(env: Envelope, terms, omega0: float, scale: float = 1.0, extra=(0.0, 0.0), oversample: float = 1.0):
    """The spectrum on a grid fitted to the pulse: (dw, complex spectrum, tl, n_needed).

    ``extra`` adds a GDD and a TOD on top of the terms (the tolerance corners)."""
    tl = env.tl * scale
    if _support(env, scale) >= 0.95 * omega0 and abs(env.at(np.array([-0.95 * omega0]), scale)[0]) > 0.5:
        raise ValueError("the spectrum reaches zero frequency: the bandwidth exceeds the carrier")
    half = min(max(_support(env, scale), math.pi * _STEPS_PER_TL / tl), 0.95 * omega0)
    coarse = np.linspace(-half, half, 257)
    amp = np.abs(env.at(coarse, scale))
    live = amp > 1e-3 * amp.max()
    phi = _phase(terms, omega0, coarse, extra)
    delay = np.gradient(phi, coarse)[live]
    spread = float(np.max(np.abs(delay))) if delay.size else 0.0
    window = 2.0 * (2.5 * spread + 16.0 * tl) * oversample
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


def measure(env: Envelope, terms, omega0: float, scale: float = 1.0, extra=(0.0, 0.0)) -> Measures:
    """Duration, peak-power factor, main-peak energy and residual phase of the field."""
    half, window, n = sample(env, terms, omega0, scale, extra)
    if n > MAX_POINTS:
        return stationary_phase(env, terms, omega0, scale, extra, half)
    dw, spec, phi = _spectrum(env, terms, omega0, scale, extra, window, n)
    # zero-padded to four times the points: the time step is a quarter of the grid's
    padded = np.zeros(_PAD * n, dtype=complex)
    padded[: n // 2], padded[-(n // 2):] = spec[: n // 2], spec[n // 2:]
    m = _PAD * n
    intensity = np.abs(np.fft.fftshift(np.fft.fft(padded))) ** 2
    dt = window / m
    t = (np.arange(m) - m // 2) * dt
    return _measures(t, intensity, dt, spec, dw, phi)


_PAD = 4


def _spectrum(env, terms, omega0, scale, extra, window, n):
    """(offsets in numpy's order, the complex spectrum, its phase) on n points over ``window``."""
    step = 2.0 * math.pi / window
    dw = np.fft.fftfreq(n, 1.0 / (n * step))
    amp = env.at(dw, scale)
    live = np.abs(amp) > _FLOOR * np.abs(amp).max()
    phi = np.where(live, _phase(terms, omega0, np.where(live, dw, 0.0), extra), 0.0)
    return dw, np.where(live, amp, 0.0) * np.exp(1j * phi), phi


def _measures(t, intensity, dt, spec, dw, phi) -> Measures:
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
    w = np.abs(spec) ** 2
    mean = float(np.sum(w * phi) / np.sum(w))
    slope = float(np.sum(w * (phi - mean) * dw) / max(np.sum(w * dw * dw), 1e-300))
    rms = math.sqrt(float(np.sum(w * (phi - mean - slope * dw) ** 2) / np.sum(w)))
    return Measures(float(duration), float(a), min(main, 1.0), rms, "fft")


def _peak(intensity: np.ndarray, k: int) -> float:
    """The maximum of the sampled intensity, refined by the parabola through the three
    samples about it (the samples are a sixteenth of τ0 apart)."""
    if k == 0 or k == len(intensity) - 1:
        return float(intensity[k])
    fm, f0, fp = intensity[k - 1], intensity[k], intensity[k + 1]
    den = fm - 2.0 * f0 + fp
    return float(f0 - (fm - fp) ** 2 / (8.0 * den)) if den < 0 else float(f0)


def _crossing(t: np.ndarray, intensity: np.ndarray, j: int, level: float) -> float:
    """Where the intensity crosses ``level`` between samples j and j + 1: inverse cubic
    (Lagrange) interpolation through the four samples about the crossing."""
    j = min(max(j, 1), len(t) - 3)
    ys, xs = intensity[j - 1: j + 3], t[j - 1: j + 3]
    if not (np.all(np.diff(ys) > 0) or np.all(np.diff(ys) < 0)):  # not monotonic: linear
        y0, y1 = intensity[j], intensity[j + 1]
        return float(t[j] + (level - y0) / (y1 - y0) * (t[j + 1] - t[j])) if y1 != y0 else float(t[j])
    out = 0.0
    for i in range(4):
        term = xs[i]
        for m in range(4):
            if m != i:
                term *= (level - ys[m]) / (ys[i] - ys[m])
        out += term
    return float(out)


def stationary_phase(env, terms, omega0, scale, extra, half) -> Measures:
    """Duration and peak-power factor of a strongly chirped pulse from t(ω) = φ'(ω),
    I(t) = |A(ω)|²/|φ''(ω)| (stationary phase; exact in the limit of large chirp)."""
    dw = np.linspace(-half, half, 16385)
    amp = np.abs(env.at(dw, scale)) ** 2
    live = amp > 1e-6 * amp.max()
    phi = _phase(terms, omega0, dw, extra)
    delay = np.gradient(phi, dw)
    curv = np.abs(np.gradient(delay, dw))
    inten = np.where(live, amp / np.maximum(curv, 1e-300), 0.0)
    peak = float(inten.max())
    hot = inten >= peak / 2.0
    duration = float(delay[hot].max() - delay[hot].min())
    energy = float(np.sum(amp)) * (dw[1] - dw[0])
    a = peak * duration / energy
    return Measures(duration, a, 1.0, float("nan"), "stationary-phase")


def time_profile(env: Envelope, terms, omega0: float, scale: float = 1.0, points: int = 400):
    """(t, I(t)/max) around the pulse, for plots."""
    half, window, n = sample(env, terms, omega0, scale)
    n = min(n, MAX_POINTS)
    _, spec, _ = _spectrum(env, terms, omega0, scale, (0.0, 0.0), window, n)
    inten = np.abs(np.fft.fftshift(np.fft.fft(spec))) ** 2
    t = (np.arange(n) - n // 2) * (window / n)
    hot = np.flatnonzero(inten > 1e-3 * inten.max())
    lo, hi = max(hot[0] - 2, 0), min(hot[-1] + 3, n)
    stride = max(1, (hi - lo) // points)
    return t[lo:hi:stride], inten[lo:hi:stride] / inten.max()


def harmonic(env: Envelope, terms, omega0: float, order: int) -> Envelope:
    """The n-th harmonic's envelope in the thin-crystal limit: E_n(t) ∝ E(t)^n, carried as a
    sampled spectrum about n·ω0 (its own τ0 from its flat-phase transform)."""
    half, window, n = sample(env, terms, omega0, oversample=8.0)  # a fine spectral step: it is interpolated
    n = min(n, MAX_POINTS)
    window = n * (2.0 * half / n) if n == MAX_POINTS else window
    dw, spec, _ = _spectrum(env, terms, omega0, 1.0, (0.0, 0.0), window, n)
    e_t = np.fft.fft(spec)
    out = np.fft.ifft(e_t ** order)
    out = out / np.abs(out).max()
    order_idx = np.argsort(dw)
    offsets, values = dw[order_idx], out[order_idx]
    return sampled(offsets, values, omega0 * order)


def sampled(offsets: np.ndarray, values: np.ndarray, omega0: float) -> Envelope:
    """A sampled complex spectrum (offsets ascending, rad/s) as an envelope, with the
    transform-limited FWHM of its flat-phase pulse as its τ0."""
    mag = np.abs(values)
    power = mag**2
    hot = offsets[power >= power.max() / 2.0]
    width = max(float(hot[-1] - hot[0]), float(np.min(np.diff(offsets))))
    guess = 2.0 * math.pi * 0.44 / width  # a Gaussian's τ0 for that FWHM: only to size the grid
    flat = Envelope(guess, None, offsets, mag.astype(complex))
    return Envelope(measure(flat, (), omega0).duration, None, offsets, values)


# -------------------------------------------------------- broadening by GDD alone
@lru_cache(maxsize=8)
def broadening_curve(shape: str) -> tuple[np.ndarray, np.ndarray]:
    """τ/τ0 of a pulse of the shape against x = GDD/τ0², for 0 ≤ x ≤ 1e3 (by FFT, once per
    process); beyond, the asymptote GDD·Δω_FWHM/τ0 of stationary phase."""
    env = Envelope(1.0, shape)
    xs = np.concatenate([[0.0], np.geomspace(1e-3, 1e3, 121)])
    ratios = np.array([measure(env, (Poly(2, x),), 1e3).duration for x in xs])
    return xs, np.maximum.accumulate(ratios)


def gdd_for_duration(shape: str, tl: float, duration: float) -> float:
    """|GDD| that stretches a flat-phase pulse of the shape from τ0 to ``duration``."""
    if shape == "gaussian":  # the closed form, τ = τ0 √(1 + (4 ln2 φ/τ0²)²)
        r = max(duration / tl, 1.0)
        return tl * tl / (4.0 * _LN2) * math.sqrt(r * r - 1.0)
    xs, ratios = broadening_curve(shape)
    r = duration / tl
    if r <= 1.0:
        return 0.0
    if r > ratios[-1]:
        return xs[-1] * tl * tl * r / ratios[-1]
    return float(np.interp(r, ratios, xs)) * tl * tl
