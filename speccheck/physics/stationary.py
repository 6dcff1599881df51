"""The duration of a strongly chirped pulse by stationary phase: each frequency arrives at its group
delay, and the energy arrived by each time gives the intensity (no FFT, no grid as long as the chirp)."""

from __future__ import annotations

import math

import numpy as np

from speccheck.physics.measures import _UNDEFINED_OK, Measures, _crossing
from speccheck.physics.model_range import OutOfModelRange
from speccheck.physics.phase_terms import total_phase


def stationary_phase(env, terms, omega0, scale, extra, half) -> Measures:
    """Duration and peak-power factor of a strongly chirped pulse by stationary phase: each
    frequency arrives at its group delay t(ω) = φ'(ω) (A. M. Weiner, *Ultrafast Optics*, ch. 4,
    exact in the limit of large chirp).  The spectral energy |A(ω)|² dω is summed into bins of
    arrival time, so a delay that turns (a glass's zero-dispersion wavelength inside the
    spectrum) gives a finite peak, not the caustic |A|²/|φ''| → ∞, and frequencies beyond a
    formula's range (a NaN phase) carry nothing."""
    dw = np.linspace(-half, half, 16385)
    step = dw[1] - dw[0]
    amp = np.abs(env.at(dw, scale)) ** 2
    with np.errstate(invalid="ignore", divide="ignore", over="ignore"):
        phi = total_phase(terms, omega0, dw) + extra[0] * dw**2 / 2.0 + extra[1] * dw**3 / 6.0
        delay = np.gradient(phi, dw)
    live = (amp > 1e-9 * amp.max()) & np.isfinite(delay)
    if np.any(~live & (amp > _UNDEFINED_OK**2 * amp.max())):  # amp is an intensity here
        raise OutOfModelRange("a phase is not defined across the pulse's spectrum (beyond the range of its formula)")
    # between neighbouring frequency samples the energy arrives evenly between their delays: a ramp of
    # the arrived energy per interval, so branches of a delay that turns back overlap without noise
    both = live[:-1] & live[1:]
    a, b = np.minimum(delay[:-1], delay[1:])[both], np.maximum(delay[:-1], delay[1:])[both]
    m = 0.5 * (amp[:-1] + amp[1:])[both] * step
    energy = float(np.sum(m))
    mid = 0.5 * (a + b)
    mean = float(np.sum(m * mid)) / energy
    spread = math.sqrt(float(np.sum(m * (mid - mean) ** 2)) / energy)
    order = np.argsort(mid)
    cum = np.cumsum(m[order]) / energy
    t_lo = float(a[order][np.searchsorted(cum, 5e-7)])
    t_hi = float(b[order][min(np.searchsorted(cum, 1.0 - 5e-7), len(cum) - 1)])
    width = max(spread / 400.0, env.tl * scale / 4.0)
    bins = int(min(max((t_hi - t_lo) / width, 8), 200000)) + 1
    edges = np.linspace(t_lo - width, t_hi + width, bins + 1)
    # times from the mean (no cancellation of large sums); a ramp narrower than a tenth of a bin is a
    # deposit within the bin
    arrived = _ramps(a - mean, np.maximum(b, a + width / 10.0) - mean, m, edges - mean)
    inten = np.diff(arrived) / (edges[1] - edges[0])
    centres = 0.5 * (edges[:-1] + edges[1:])
    k = int(np.argmax(inten))
    peak = float(inten[k])
    above = np.flatnonzero(inten >= peak / 2.0)
    lo, hi = int(above[0]), int(above[-1])
    duration = _crossing(centres, inten, hi, peak / 2.0) - _crossing(centres, inten, lo - 1, peak / 2.0)
    return Measures(float(duration), float(peak * duration / energy), 1.0, float("nan"), "stationary-phase")


def _ramps(a, b, m, t):
    """Σ_k m_k·clip((t − a_k)/(b_k − a_k), 0, 1) at each t: the energy arrived by t when m_k
    arrives evenly over [a_k, b_k].  Each ramp is (relu(t − a) − relu(t − b))/(b − a), and a sum of
    c·relu(t − s) is t·Σc − Σc·s over the knots s below t (cumulative sums)."""
    span = b - a
    knots = np.concatenate((a, b))
    slope = np.concatenate((m / span, -m / span))
    order = np.argsort(knots, kind="stable")
    knots, slope = knots[order], slope[order]
    c = np.concatenate(([0.0], np.cumsum(slope)))
    cs = np.concatenate(([0.0], np.cumsum(slope * knots)))
    j = np.searchsorted(knots, t, side="right")
    return t * c[j] - cs[j]
