"""What is made from a field beyond its measures: the n-th harmonic (E(t)^n, thin crystal), a
sampled spectrum as an envelope, and the normalised time profile for plots."""

from __future__ import annotations

import math

import numpy as np

from speccheck.physics.field import MAX_POINTS, Envelope, _spectrum, measure, sample
from speccheck.physics.model_range import OutOfModelRange
from speccheck.physics.phase_terms import total_phase

def time_profile(env: Envelope, terms, omega0: float, scale: float = 1.0, points: int = 400):
    """(t, I(t)/max) around the pulse, for plots."""
    half, window, n = sample(env, terms, omega0, scale)
    n = min(n, MAX_POINTS)
    _, spec, _ = _spectrum(env, terms, omega0, scale, (0.0, 0.0), window, n)
    pad = 8  # zero-padded: the time step an eighth of the grid's, a smooth curve over the pulse
    padded = np.zeros(pad * n, dtype=complex)
    padded[: n // 2], padded[-(n // 2):] = spec[: n // 2], spec[n // 2:]
    n *= pad
    inten = np.abs(np.fft.fftshift(np.fft.fft(padded))) ** 2
    t = (np.arange(n) - n // 2) * (window / n)
    hot = np.flatnonzero(inten > 1e-3 * inten.max())
    lo, hi = max(hot[0] - 2, 0), min(hot[-1] + 3, n)
    stride = max(1, (hi - lo) // points)
    return t[lo:hi:stride], inten[lo:hi:stride] / inten.max()


def harmonic(env: Envelope, terms, omega0: float, order: int, gdd: float = 0.0) -> Envelope:
    """The n-th harmonic's envelope in the thin-crystal limit, E_n(t) ∝ E(t)^n, carried as a sampled
    spectrum about n·ω0 (its own τ0 from its flat-phase transform), with the GDD φ2/n that a pump GDD
    ``gdd`` gives it taken out (the caller carries it as a phase term: a stretched harmonic's spectrum
    then has a smooth phase to interpolate).

    On a grid where one fits: E(t)^n by FFT, exact.  For a pump chirped beyond any grid, stationary
    phase: each frequency ω0 + Δω arrives alone at its group delay, so E^n there oscillates at
    n(ω0 + Δω) with amplitude A(Δω)^n and phase n·φ(Δω) (A. M. Weiner, *Ultrafast Optics*, ch. 4; for a
    Gaussian with GDD alone this is exact at any chirp: the harmonic is √n wider with φ2/n)."""
    half, window, n = sample(env, terms, omega0, oversample=8.0)  # a fine spectral step: it is interpolated
    if n <= MAX_POINTS:
        dw, spec, _ = _spectrum(env, terms, omega0, 1.0, (0.0, 0.0), window, n)
        e_t = np.fft.fft(spec)
        out = np.fft.ifft(e_t ** order)
        order_idx = np.argsort(dw)
        offsets, values = dw[order_idx], out[order_idx]
        if gdd:
            values = values * np.exp(-0.5j * (gdd / order) * offsets**2)
    else:
        reach = min(env.half_span(), 0.95 * omega0)
        dw = np.linspace(-reach, reach, 8193)
        with np.errstate(invalid="ignore"):
            phase = total_phase(terms, omega0, dw) - 0.5 * gdd * dw**2
        amp = env.at(dw)
        if not np.all(np.isfinite(phase[np.abs(amp) > 1e-2 * np.abs(amp).max()])):
            raise OutOfModelRange("a phase is not defined across the pump's spectrum (beyond the range of its "
                                  "formula)")
        offsets, values = order * dw, np.where(np.isfinite(phase), (amp * np.exp(1j * phase)) ** order, 0.0)
    values = values / np.abs(values).max()
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
