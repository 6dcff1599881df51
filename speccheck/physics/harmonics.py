"""What is made from a field beyond its measures: the n-th harmonic (E(t)^n, thin crystal), a
sampled spectrum as an envelope, and the normalised time profile for plots."""

from __future__ import annotations

import math

import numpy as np

from speccheck.physics.field import MAX_POINTS, Envelope, _spectrum, measure, sample

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
