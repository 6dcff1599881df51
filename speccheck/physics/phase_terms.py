"""Spectral phase terms a path adds to a pulse: ``Poly`` (c·Δω^k/k!), ``Exact`` (an exact phase
function of ω with its constant and group delay at the carrier removed, cached on the grids it
was asked for), ``glass`` (n(ω)ωL/c from the Sellmeier equation, all orders); their sum and
their GDD, TOD and FOD at the carrier."""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import Callable

import numpy as np


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
    # the phase on the grids it was asked for (the path asks again at every later column)
    cache: dict = field(default_factory=dict, compare=False, repr=False)

    def phase(self, omega0: float, dw: np.ndarray) -> np.ndarray:
        key = (omega0, dw.size, float(dw[0]), float(dw[1]) if dw.size > 1 else 0.0, float(dw[-1]))
        hit = self.cache.get(key)
        if hit is not None and hit[0].shape == dw.shape and np.array_equal(hit[0], dw):
            return hit[1]
        h = 1e-4 * omega0
        p0, pp, pm = self.fn(np.array([omega0, omega0 + h, omega0 - h]))
        out = self._values(omega0 + dw) - p0 - (pp - pm) / (2.0 * h) * dw
        if len(self.cache) >= 8:
            taylor = {k: v for k, v in self.cache.items() if k[0] == "taylor"}
            self.cache.clear()
            self.cache.update(taylor)
        self.cache[key] = (dw.copy(), out)
        return out

    def _values(self, omega: np.ndarray) -> np.ndarray:
        """fn at each ω; NaN where it is not defined (a ray that cannot be traced in a far wing)."""
        try:
            return self.fn(omega)
        except ValueError:
            out = np.full(omega.shape, np.nan)
            for k, w in enumerate(omega):
                try:
                    out[k] = self.fn(np.array([w]))[0]
                except ValueError:
                    pass
            return out

    def taylor(self, omega0: float) -> tuple[float, float, float]:
        """GDD, TOD and FOD at ω0 by central differences of the exact phase (kept: every later column
        of the path asks again)."""
        hit = self.cache.get(("taylor", omega0))
        if hit is not None:
            return hit
        h = 2e-3 * omega0
        k = np.arange(-3, 4)
        p = self.fn(omega0 + k * h)
        out = (float(_d2(p, h)), float(_d3(p, h)), float(_d4(p, h)))
        self.cache[("taylor", omega0)] = out
        return out


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
