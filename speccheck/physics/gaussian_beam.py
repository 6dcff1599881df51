"""The beam in space: a Gaussian beam's complex parameter q and its ABCD matrices, on plain floats.

Conventions (settled numerically in tests/test_gaussian_beam.py):

* ``w`` is the 1/e² *intensity* radius (the beam diameter of the spec is 2w); for a beam with
  M² > 1 it is the second-moment radius of ISO 11146, which for a Gaussian is the 1/e² radius.
  The FWHM intensity diameter of a Gaussian is √(2 ln 2)·w ≈ 1.177 w (not used here).
* The embedded-Gaussian rule (A. E. Siegman, *Lasers*, ch. 17 (chapter from memory), and IEEE J. Quantum Electron. 27,
  1146 (1991)): a real beam of quality M² propagates as a Gaussian whose wavelength is M²λ.  So
  every function takes ``lam``, the *effective* wavelength M²λ (in vacuum; a path in a medium of
  index n is taken as its reduced length L/n, below).
* q = z + i z_R, with z the distance *past* the waist (negative before it) and z_R = π w0²/lam
  the Rayleigh range; 1/q = 1/R − i lam/(π w²) (H. Kogelnik and T. Li, Appl. Opt. 5, 1550 (1966)).
  The wavefront radius R is positive for a diverging beam, negative for a converging one, and
  infinite at a waist.
* An ABCD matrix is the tuple (A, B, C, D), and q' = (A q + B)/(C q + D).  A plate of thickness L
  and index n between planes in air acts as free space of length L/n (its reduced thickness), so a
  focus behind it moves on by L(1 − 1/n).

Numbers stay floats: a step costs a handful of complex operations.
"""

from __future__ import annotations

import math

Matrix = tuple  # (A, B, C, D)

IDENTITY: Matrix = (1.0, 0.0, 0.0, 1.0)


def free(d: float) -> Matrix:
    return (1.0, d, 0.0, 1.0)


def lens(f: float) -> Matrix:
    """A thin lens of focal length f (positive converges)."""
    return (1.0, 0.0, -1.0 / f, 1.0)


def plate(thickness: float, n: float) -> Matrix:
    """A plane-parallel plate between planes in air: free space of its reduced thickness L/n."""
    return free(thickness / n)


def relay(magnification: float) -> Matrix:
    """An imaging relay from its entrance plane onto its exit plane, image m times the object (the
    sign of an inverted image does not change q: q' = m² q)."""
    return (magnification, 0.0, 0.0, 1.0 / magnification)


def telescope(f1: float, magnification: float) -> Matrix:
    """Two thin lenses f1 and f2 = m·|f1| separated by f1 + f2, from the first lens to the second: a
    Keplerian telescope with f1 > 0 (f2 > 0, the beam inverted), a Galilean one with f1 < 0 (a negative
    first lens and a positive second, |f2/f1| = m, f1 + f2 = (m − 1)|f1| apart, the beam upright)."""
    f2 = magnification * abs(f1)
    return compose(lens(f1), free(f1 + f2), lens(f2))


def compose(*matrices: Matrix) -> Matrix:
    """The matrix of elements passed in this order (the first is met first)."""
    a, b, c, d = IDENTITY
    for (a2, b2, c2, d2) in matrices:
        a, b, c, d = a2 * a + b2 * c, a2 * b + b2 * d, c2 * a + d2 * c, c2 * b + d2 * d
    return (a, b, c, d)


def apply(m: Matrix, q: complex) -> complex:
    a, b, c, d = m
    return (a * q + b) / (c * q + d)


# ------------------------------------------------------------------ q and the beam it describes

def at_waist(w0: float, lam: float, past: float = 0.0) -> complex:
    """q a distance ``past`` beyond a waist of 1/e² radius w0."""
    return complex(past, math.pi * w0 * w0 / lam)


def radius(q: complex, lam: float) -> float:
    """The 1/e² intensity radius w at the plane of q."""
    return math.sqrt(-lam / (math.pi * (1.0 / q).imag))


def wavefront_radius(q: complex) -> float:
    """R: positive diverging, negative converging, infinite at a waist."""
    curvature = (1.0 / q).real
    return math.inf if curvature == 0.0 else 1.0 / curvature


def rayleigh_range(q: complex) -> float:
    return q.imag


def waist_ahead(q: complex) -> float:
    """The distance from this plane to the waist: positive ahead (converging), negative behind."""
    return -q.real


def waist_radius(q: complex, lam: float) -> float:
    return math.sqrt(lam * q.imag / math.pi)


def divergence(q: complex, lam: float) -> float:
    """The far-field half angle of the 1/e² radius, lam/(π w0)."""
    return lam / (math.pi * waist_radius(q, lam))


def at_plane(w: float, lam: float, waist_after: float) -> complex | None:
    """q at a plane where the beam's 1/e² radius is w and its waist lies ``waist_after`` beyond it
    (negative: before it).  w² = w0² + (lam z/(π w0))² has two roots in w0²; the larger one (the
    plane within the Rayleigh range, the nearly collimated beam of a laser's output) is taken.
    None when no Gaussian beam is this narrow this far from its waist (w² < 2 lam |z| / π)."""
    a = lam * waist_after / math.pi
    disc = w**4 - 4.0 * a * a
    if disc < 0.0:
        return None
    w0_sq = 0.5 * (w * w + math.sqrt(disc))
    return complex(-waist_after, math.pi * w0_sq / lam)


def from_divergence(w: float, lam: float, full_angle: float) -> complex | None:
    """q at a plane of 1/e² radius w for a beam of far-field full angle ``full_angle`` (1/e²),
    diverging (its waist behind the plane).  None when the angle is below the diffraction limit of
    this radius (w0 = 2 lam/(π θ) would be wider than w)."""
    half = 0.5 * full_angle
    w0 = lam / (math.pi * half)
    if w0 > w:
        return None
    return complex(math.sqrt(w * w - w0 * w0) / half, math.pi * w0 * w0 / lam)


# ------------------------------------------------------------------ nonlinear propagation

def kerr_length(q: complex, thickness: float, n: float) -> float:
    """L_eff = ∫₀ᴸ w(0)²/w(z)² dz through a plate whose entrance plane has q: the length over which
    the entrance's peak intensity gives the plate's B-integral, B = (2π/λ) n2 I(0) L_eff.

    Inside the plate the beam at depth z has the radius of free space propagated by z/n, so with
    q = z0 + i z_R at the entrance, w(0)²/w(z)² = (z_R² + z0²)/(z_R² + (z0 + z/n)²) and
    L_eff = n (z_R² + z0²)/z_R · [atan((z0 + L/n)/z_R) − atan(z0/z_R)]; L_eff → L collimated."""
    z0, zr = q.real, q.imag
    return n * (zr * zr + z0 * z0) / zr * (math.atan((z0 + thickness / n) / zr) - math.atan(z0 / zr))


def converging_collapse(z_collimated: float, wavefront: float) -> float:
    """Marburger's lens transformation: the self-focusing distance of a beam whose wavefront radius
    at the entrance is ``wavefront`` (in the medium; negative converging, our sign), from the
    distance ``z_collimated`` of the same beam collimated: 1/z_f' = 1/z_f + 1/R_c, R_c = −R the
    distance to the geometric focus (J. H. Marburger, Prog. Quantum Electron. 4, 35 (1975); V. I.
    Talanov, JETP Lett. 11, 199 (1970)).  Infinite when a diverging beam never collapses."""
    if not math.isfinite(z_collimated):
        return math.inf
    inverse = 1.0 / z_collimated - (1.0 / wavefront if math.isfinite(wavefront) and wavefront else 0.0)
    return 1.0 / inverse if inverse > 0.0 else math.inf


def numerical_aperture(q: complex, lam: float) -> float:
    """sin θ of the focused cone, θ = atan of the far-field half angle lam/(π w0) (paraxial angle)."""
    return math.sin(math.atan(divergence(q, lam)))
