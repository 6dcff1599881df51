"""Optical materials as data: dispersion formulas, validity ranges and n2.

Every material is one row of :data:`MATERIALS`. A row stores the published
dispersion coefficients exactly as printed (wavelengths in micrometres), the
published validity range, the citation, and the nonlinear index n2 as a
``(low, high)`` range in m^2/W because published values spread.

Supported dispersion formulas (lambda in micrometres, sigma = 1/lambda):

``"sellmeier"``
    n^2 = 1 + sum_i B_i lambda^2 / (lambda^2 - C_i), coefficients
    ``(B1, C1, B2, C2, ...)`` with C_i in um^2 (catalogue form).
``"sellmeier_pole"``
    n^2 = 1 + sum_i B_i lambda^2 / (lambda^2 - L_i^2), coefficients
    ``(B1, L1, B2, L2, ...)`` with resonance wavelengths L_i in um.
``"ciddor_air"``
    n - 1 = A1 / (K1 - sigma^2) + A2 / (K2 - sigma^2), coefficients
    ``(A1, K1, A2, K2)`` with K_i in um^-2.

All three reduce to one rational function of x = lambda^2,
f(x) = sum_i b_i x / (x - c_i), with n^2 = 1 + f for the Sellmeier forms and
n = 1 + f for the gas form (b_i = A_i / K_i, c_i = 1 / K_i). Derivatives are
taken analytically from that common form.

Note on wavelength scale: the solid-state fits are published against
wavelength in air, the air formula against vacuum wavelength. The difference
(about 3 parts in 10^4 in wavelength) is ignored here, as is common practice
for pulse-dispersion estimates.

All public functions take wavelengths in metres (SI) and are vectorised:
pass a float or a numpy array. Functions needing the speed of light take it
as the argument ``c`` in m/s.
"""

from __future__ import annotations

import difflib
import math
import re

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported only for array arguments: a scalar wavelength needs none
    from numpy.typing import ArrayLike, NDArray

__all__ = [
    "FORMULAS",
    "MATERIALS",
    "Material",
    "gdd",
    "group_index",
    "gvd",
    "in_range",
    "lookup",
    "refractive_index",
    "tod",
]

from speccheck.physics.material_data import FORMULAS, MATERIALS, Material, rational_terms

# Unit conversion: metres -> micrometres (a unit factor, not a physical constant).
_UM_PER_M = 1e6


def _normalise(name: str) -> str:
    return re.sub(r"[\s\-]+", "_", name.strip().lower())


def lookup(name: str) -> Material:
    """Return the material whose name or alias matches ``name``.

    Matching ignores case; spaces and hyphens count as underscores
    (``"N-BK7"`` finds ``n_bk7``).

    Raises:
        KeyError: unknown name; the message lists known names and, where
            one is close, suggests it.
    """
    key = _normalise(name)
    ids: dict[str, Material] = {}
    for material in MATERIALS:
        for ident in (material.name, *material.aliases):
            ids[ident] = material
    if key in ids:
        return ids[key]
    close = difflib.get_close_matches(key, list(ids), n=1, cutoff=0.6)
    hint = f" Did you mean {close[0]!r}?" if close else ""
    known = ", ".join(m.name for m in MATERIALS)
    raise KeyError(f"unknown material {name!r}.{hint} Known materials: {known}")


MaterialLike = Material | str


def _resolve(material: MaterialLike) -> Material:
    return lookup(material) if isinstance(material, str) else material


def _scalar(x) -> bool:
    return isinstance(x, (int, float)) and not isinstance(x, bool)


def _as_um(wavelength_m: ArrayLike) -> float | NDArray:
    if _scalar(wavelength_m):
        if not (math.isfinite(wavelength_m) and wavelength_m > 0):
            raise ValueError("wavelength must be finite and > 0 (metres)")
        return float(wavelength_m) * _UM_PER_M
    import numpy as np

    lam = np.asarray(wavelength_m, dtype=float)
    if np.any(~np.isfinite(lam)) or np.any(lam <= 0):
        raise ValueError("wavelength must be finite and > 0 (metres)")
    return lam * _UM_PER_M


def _out(value) -> float | NDArray:
    if isinstance(value, float):
        return value
    import numpy as np

    return float(value) if np.ndim(value) == 0 else value


def _times(a, b):
    """a × b for floats or arrays (numpy only for arrays)."""
    if _scalar(a) and _scalar(b):
        return float(a) * float(b)
    import numpy as np

    return np.asarray(a, float) * np.asarray(b, float)


def _index_derivatives(
    material: Material, lam_um: NDArray
) -> tuple[NDArray, ...]:
    """n and dn/dlambda, d2n/dlambda2, d3n/dlambda3 with lambda in um.

    With x = lambda^2 and g(lambda) = f(x):
        g'   = 2 lambda f'
        g''  = 2 f' + 4 lambda^2 f''
        g''' = 12 lambda f'' + 8 lambda^3 f'''
    where f' = -sum b c/(x-c)^2, f'' = 2 sum b c/(x-c)^3,
    f''' = -6 sum b c/(x-c)^4.
    Sellmeier forms: n^2 = 1 + g, so n' = g'/(2n),
    n'' = (g'' - 2 n'^2)/(2n), n''' = (g''' - 6 n' n'')/(2n).
    Gas form: n = 1 + g.
    """
    b_terms, c_terms = rational_terms(material)
    x = lam_um**2
    # zeros of the argument's kind (float or array); four separate objects, as += works in place
    f, f1, f2, f3 = x * 0.0, x * 0.0, x * 0.0, x * 0.0
    for b, c in zip(b_terms, c_terms):
        d = x - c
        f += b * x / d
        f1 += -b * c / d**2
        f2 += 2.0 * b * c / d**3
        f3 += -6.0 * b * c / d**4
    g1 = 2.0 * lam_um * f1
    g2 = 2.0 * f1 + 4.0 * x * f2
    g3 = 12.0 * lam_um * f2 + 8.0 * lam_um**3 * f3
    if material.formula == "ciddor_air":
        return 1.0 + f, g1, g2, g3
    n = (1.0 + f) ** 0.5
    n1 = g1 / (2.0 * n)
    n2 = (g2 - 2.0 * n1**2) / (2.0 * n)
    n3 = (g3 - 6.0 * n1 * n2) / (2.0 * n)
    return n, n1, n2, n3


def refractive_index(
    material: MaterialLike, wavelength_m: ArrayLike
) -> float | NDArray:
    """Phase refractive index n at the given wavelength(s) in metres."""
    mat = _resolve(material)
    n, _, _, _ = _index_derivatives(mat, _as_um(wavelength_m))
    return _out(n)


def group_index(
    material: MaterialLike, wavelength_m: ArrayLike
) -> float | NDArray:
    """Group index n_g = n - lambda dn/dlambda (dimensionless)."""
    mat = _resolve(material)
    lam_um = _as_um(wavelength_m)
    n, n1, _, _ = _index_derivatives(mat, lam_um)
    return _out(n - lam_um * n1)


def gvd(
    material: MaterialLike, wavelength_m: ArrayLike, c: float
) -> float | NDArray:
    """Group-velocity dispersion beta2 = lambda^3/(2 pi c^2) d2n/dlambda2 in s^2/m.

    ``c`` is the speed of light in m/s.
    """
    mat = _resolve(material)
    lam_um = _as_um(wavelength_m)
    _, _, n2_um, _ = _index_derivatives(mat, lam_um)
    lam = lam_um / _UM_PER_M
    d2n = n2_um * _UM_PER_M**2  # per um^2 -> per m^2
    return _out(lam**3 / (2.0 * math.pi * c**2) * d2n)


def gdd(
    material: MaterialLike, wavelength_m: ArrayLike, thickness_m: ArrayLike, c: float
) -> float | NDArray:
    """Group-delay dispersion of a plate, GVD x thickness, in s^2."""
    return _out(_times(gvd(material, wavelength_m, c), thickness_m))


def tod(
    material: MaterialLike, wavelength_m: ArrayLike, thickness_m: ArrayLike, c: float
) -> float | NDArray:
    """Third-order dispersion of a plate in s^3.

    TOD = d3(phi)/d(omega)3 = -lambda^4/(4 pi^2 c^3)
          (3 d2n/dlambda2 + lambda d3n/dlambda3) L,
    positive for glasses in their normal-dispersion region.
    """
    mat = _resolve(material)
    lam_um = _as_um(wavelength_m)
    _, _, n2_um, n3_um = _index_derivatives(mat, lam_um)
    lam = lam_um / _UM_PER_M
    d2n = n2_um * _UM_PER_M**2
    d3n = n3_um * _UM_PER_M**3
    beta3 = -(lam**4) / (4.0 * math.pi**2 * c**3) * (3.0 * d2n + lam * d3n)
    return _out(_times(beta3, thickness_m))


def in_range(material: MaterialLike, wavelength_m: ArrayLike) -> bool:
    """True when every given wavelength lies inside the published fit range."""
    mat = _resolve(material)
    lam_um = _as_um(wavelength_m)
    lo, hi = mat.valid_range_um
    if _scalar(lam_um):
        return lo <= lam_um <= hi
    import numpy as np

    return bool(np.all((lam_um >= lo) & (lam_um <= hi)))
