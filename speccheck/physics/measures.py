"""What the field's numbers are made of: the measures of a pulse (``Measures``), the peak of a sampled
intensity and its half-maximum crossings, and how far a phase may be undefined across a spectrum."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

# a phase may be undefined (beyond a formula's range, where a glass absorbs) only where the spectrum's
# intensity is below 1e-4 of its peak: what it leaves out changes no width visibly
_UNDEFINED_OK = 1e-2


@dataclass(frozen=True)
class Measures:
    duration: float  # s, intensity FWHM
    peak_factor: float  # a = P_peak τ / E
    main_peak: float  # share of the energy between the minima that bound the main peak
    phase_rms: float  # rad, intensity-weighted rms of the phase beyond its linear part
    method: str  # "fft" or "stationary-phase"


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
    ys, xs = intensity[j - 1: j + 3].tolist(), t[j - 1: j + 3].tolist()
    rising = ys[0] < ys[1] < ys[2] < ys[3]
    if not (rising or ys[0] > ys[1] > ys[2] > ys[3]):  # not monotonic: linear
        y0, y1 = ys[1], ys[2]
        return float(xs[1] + (level - y0) / (y1 - y0) * (xs[2] - xs[1])) if y1 != y0 else float(xs[1])
    out = 0.0
    for i in range(4):
        term = xs[i]
        for m in range(4):
            if m != i:
                term *= (level - ys[m]) / (ys[i] - ys[m])
        out += term
    return float(out)
