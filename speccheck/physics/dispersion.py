"""Pulse duration after group-delay dispersion (GDD), Gaussian pulse model.

All durations are intensity FWHM in seconds, GDD in s^2. Functions are
vectorised with numpy (floats or arrays).

Pulse shape: every formula here is exact for Gaussian pulses with a purely
quadratic spectral phase. For other shapes (e.g. sech^2) the same formulas
are used as an APPROXIMATION: the broadening trend and the compensating GDD
are right, the exact output duration is not, and higher-order phase (TOD and
beyond) is ignored.

Derivation (complex Gaussian parameter). Take the transform-limited field
E0(t) = exp(-2 ln2 t^2 / tau0^2), whose intensity FWHM is tau0. Its spectrum
is E0(w) ~ exp(-w^2 tau0^2 / (8 ln2)). A total spectral phase phi2 w^2 / 2
gives E(w) ~ exp(-A w^2) with the complex parameter
A = tau0^2 / (8 ln2) - i phi2 / 2. Transforming back, E(t) ~ exp(-t^2 / (4A))
and the intensity |E(t)|^2 ~ exp(-t^2 Re(A) / (2 |A|^2)). Its FWHM tau obeys
tau^2 = 8 ln2 |A|^2 / Re(A) = tau0^2 + (4 ln2 phi2)^2 / tau0^2, i.e.

    tau = tau0 sqrt(1 + (4 ln2 phi2 / tau0^2)^2).

A linearly chirped input pulse of duration tau_in and transform-limited
duration tau0 (set by its bandwidth) therefore already carries
|phi_in| = tau0^2 / (4 ln2) sqrt((tau_in / tau0)^2 - 1); after further GDD
phi2 the total phase is phi_in + phi2 and the same formula applies.
"""

from __future__ import annotations

import math

from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is imported only for array arguments: scalars are plain floats
    from numpy.typing import ArrayLike, NDArray

__all__ = [
    "GAUSSIAN_TBP",
    "broadened_duration",
    "chirped_output_duration",
    "intrinsic_gdd",
    "optimal_compensation",
    "transform_limited_duration",
]

#: Time-bandwidth product (FWHM x FWHM) of a transform-limited Gaussian,
#: 2 ln2 / pi ~ 0.441 (pure mathematics, no physical constant).
GAUSSIAN_TBP: float = 2.0 * math.log(2.0) / math.pi

_FOUR_LN2 = 4.0 * math.log(2.0)


def _scalar(*values) -> bool:
    return all(isinstance(v, (int, float)) and not isinstance(v, bool) for v in values)


def _out(value):
    if isinstance(value, float):
        return value
    import numpy as np

    return float(value) if np.ndim(value) == 0 else value


def _positive(name: str, value: ArrayLike):
    if _scalar(value):
        if not (math.isfinite(value) and value > 0):
            raise ValueError(f"{name} must be finite and > 0")
        return float(value)
    import numpy as np

    arr = np.asarray(value, dtype=float)
    if np.any(~np.isfinite(arr)) or np.any(arr <= 0):
        raise ValueError(f"{name} must be finite and > 0")
    return arr


def broadened_duration(
    tau_fwhm_s: ArrayLike, gdd_s2: ArrayLike
) -> float | NDArray:
    """Output FWHM of a transform-limited Gaussian after GDD ``gdd_s2``.

    tau_out = tau_in sqrt(1 + (4 ln2 GDD / tau_in^2)^2). The sign of the GDD
    does not matter for a transform-limited input. Non-Gaussian inputs: the
    Gaussian formula is used as an approximation (see module docstring).
    """
    tau = _positive("tau_fwhm_s", tau_fwhm_s)
    if _scalar(tau, gdd_s2):
        return tau * math.sqrt(1.0 + (_FOUR_LN2 * gdd_s2 / tau**2) ** 2)
    import numpy as np

    phi2 = np.asarray(gdd_s2, dtype=float)
    return _out(tau * np.sqrt(1.0 + (_FOUR_LN2 * phi2 / tau**2) ** 2))


def optimal_compensation(net_gdd_s2: ArrayLike) -> float | NDArray:
    """GDD that cancels a net GDD: simply ``-net_gdd_s2``.

    This returns a transform-limited input to its transform limit (only
    quadratic phase is cancelled; TOD and higher orders remain). For an
    input that is already chirped, pass ``net_gdd_s2 + intrinsic_gdd(...)``.
    """
    if _scalar(net_gdd_s2):
        return -float(net_gdd_s2)
    import numpy as np

    return _out(-np.asarray(net_gdd_s2, dtype=float))


def transform_limited_duration(
    tau_fwhm_s: ArrayLike, tbp: ArrayLike
) -> float | NDArray:
    """Transform-limited Gaussian FWHM for a pulse with stated FWHM and TBP.

    The bandwidth is tbp / tau, so tau0 = GAUSSIAN_TBP / bandwidth
    = tau * GAUSSIAN_TBP / tbp. A TBP below the Gaussian limit is not
    physical for a Gaussian and raises ``ValueError``.
    """
    import numpy as np

    tau = _positive("tau_fwhm_s", tau_fwhm_s)
    product = _positive("tbp", tbp)
    # small relative slack so a stated 0.441 counts as transform limited
    if np.any(product < GAUSSIAN_TBP * (1.0 - 1e-3)):
        raise ValueError(
            f"time-bandwidth product below the Gaussian limit {GAUSSIAN_TBP:.3f}"
        )
    return _out(tau * GAUSSIAN_TBP / np.maximum(product, GAUSSIAN_TBP))


def intrinsic_gdd(
    tau_fwhm_s: ArrayLike, tau_tl_s: ArrayLike, chirp_sign: float = 1.0
) -> float | NDArray:
    """GDD already carried by a linearly chirped Gaussian.

    phi_in = sign * tau0^2 / (4 ln2) * sqrt((tau / tau0)^2 - 1), with
    ``chirp_sign`` +1 for up-chirp (the chirp normal dispersion adds) and
    -1 for down-chirp. Duration and bandwidth alone cannot tell the sign.
    """
    tau = _positive("tau_fwhm_s", tau_fwhm_s)
    tau0 = _positive("tau_tl_s", tau_tl_s)
    if chirp_sign not in (1, -1):
        raise ValueError("chirp_sign must be +1 or -1")
    if _scalar(tau, tau0):
        if tau < tau0 * (1.0 - 1e-9):
            raise ValueError("pulse duration shorter than its transform limit")
        return chirp_sign * tau0**2 / _FOUR_LN2 * math.sqrt(max((tau / tau0) ** 2 - 1.0, 0.0))
    import numpy as np

    if np.any(tau < tau0 * (1.0 - 1e-9)):
        raise ValueError("pulse duration shorter than its transform limit")
    ratio_sq = np.maximum((tau / tau0) ** 2 - 1.0, 0.0)
    return _out(chirp_sign * tau0**2 / _FOUR_LN2 * np.sqrt(ratio_sq))


def chirped_output_duration(
    tau_fwhm_s: ArrayLike,
    gdd_s2: ArrayLike,
    *,
    tau_tl_s: ArrayLike | None = None,
    tbp: ArrayLike | None = None,
    chirp_sign: float = 1.0,
) -> float | NDArray:
    """Output FWHM of a linearly chirped Gaussian after extra GDD ``gdd_s2``.

    Give the transform-limited duration either directly (``tau_tl_s``) or
    through the stated time-bandwidth product ``tbp`` (>= 2 ln2/pi). Then

        tau_out = tau0 sqrt(1 + (4 ln2 (phi_in + GDD) / tau0^2)^2),

    with phi_in from :func:`intrinsic_gdd` (derivation in the module
    docstring). With tau_in = tau0 this reduces to
    :func:`broadened_duration`. Non-Gaussian shapes: approximation only.
    """
    import numpy as np

    if (tau_tl_s is None) == (tbp is None):
        raise ValueError("give exactly one of tau_tl_s or tbp")
    tau0 = (
        np.asarray(transform_limited_duration(tau_fwhm_s, tbp))
        if tau_tl_s is None
        else _positive("tau_tl_s", tau_tl_s)
    )
    phi_in = np.asarray(intrinsic_gdd(tau_fwhm_s, tau0, chirp_sign))
    total = phi_in + np.asarray(gdd_s2, dtype=float)
    return _out(tau0 * np.sqrt(1.0 + (_FOUR_LN2 * total / tau0**2) ** 2))
