"""Pulse compressors: a grating pair and a Brewster prism pair, exact phase and closed form.

Conventions. Spectral phase phi(omega) in rad, with phi = omega P / c for an
optical path P, so a glass plate has phi = omega n L / c and positive GDD;
GDD = d2phi/domega2 (s^2), TOD = d3phi/domega3 (s^3); omega in rad/s,
wavelengths in m, angles in rad. The speed of light is the argument ``c``
(m/s). Air is taken as vacuum (n = 1). A compressor has GDD < 0.

``passes`` counts traversals of the pair. The default 2 is the usual
double pass (a roof or plane mirror normal to the output direction sends the
light back through the same pair); it retraces the path, so its phase is
exactly twice the single-pass phase and the spatial chirp of one pass is
undone. Every result here is ``passes`` times the single-pass value.

Grating pair (E. B. Treacy, IEEE J. Quantum Electron. 5, 454 (1969)). Two
identical parallel reflection gratings, groove spacing d = 1/groove_density,
perpendicular distance G between the grating planes (the slant distance
along the ray is b = G / cos theta_d). First order, m = 1, with the grating
equation sin theta_d = m lambda / d - sin theta_i; theta_i and theta_d are
measured from the grating normal and are positive on the same side of it, so
Littrow is theta_d = theta_i. The ray hits grating 1 at a fixed point x1,
travels b to grating 2 at x2 = x1 - G tan theta_d (along the grating) and
leaves parallel to the input. To a plane normal to the output direction the
ray path is P = b (1 + cos(theta_i - theta_d)); each diffraction adds the
grating phase -/+ m 2 pi x / d, together m 2 pi (x2 - x1) / d
= -2 pi m G tan theta_d / d. So, per pass,

    phi(omega) = (omega / c) P - 2 pi m G tan theta_d / d = (omega / c) G cos theta_d

(the second form uses the grating equation). Differentiating (q = m lambda/d,
dtheta_d/domega = -q / (omega cos theta_d)) gives the group delay
b (1 + cos(theta_i - theta_d)) / c (Treacy) and, per pass,

    GDD = -m^2 lambda^3 G / (2 pi c^2 d^2 cos^3 theta_d)
    TOD = -(3 lambda / (2 pi c)) GDD (1 + q sin theta_i - sin^2 theta_i) / cos^2 theta_d,

the bracket being cos^2 theta_d + q sin theta_d. TOD / GDD < 0 whenever the
bracket is positive: the pair's TOD is positive like a glass's, so a pair
cancelling a glass's GDD adds to its TOD.

Prism pair (R. L. Fork, O. E. Martinez and J. P. Gordon, Opt. Lett. 9, 150
(1984)). Two identical prisms of ``material``, cut so that the ray at the
design wavelength lambda0 crosses each at minimum deviation and Brewster
incidence: tan theta_B = n0 = n(lambda0), apex angle alpha = pi - 2 theta_B,
the ray inside parallel to the base. Prism 2 is prism 1 turned by 180
degrees, its faces parallel to those of prism 1, so every wavelength leaves
it parallel to the input. The input ray enters prism 1 at its apex (no glass
in prism 1). ``apex_separation`` l is the apex-to-apex distance.
``insertion`` is how far the lambda0 ray passes inside prism 2, measured
from its apex along its symmetry axis (perpendicular to its base); its glass
path in prism 2 is then 2 insertion tan(alpha/2) = 2 insertion / n0 per
pass, and its distance from apex 2 is h = insertion / n0 = l sin beta0,
beta0 being the angle between the lambda0 ray and the line from apex 1 to
apex 2. The faces are taken as unbounded planes, so a ray passing beyond
the apex has a formally negative glass path (the phase stays analytic).

All rays leave apex 1 as from a point; by Malus's theorem the path from
apex 1 to a plane normal to the output direction is l cos beta(lambda) plus
a constant, with beta(lambda) = beta0 - (theta(n(lambda)) - theta(n0)) and
theta(n) the exit angle of prism 1. At Brewster minimum deviation
theta' = 2, theta'' = 4 n - 2/n^3 (Fork et al.) and
theta''' = 24 n^2 + 8 - 12/n^2 + 6/n^4 + 6/n^6 (derived here by
differentiating Snell's law three times). With beta' = -theta' n' etc.,

    d2P/dlambda2 = -l (sin beta beta'' + cos beta beta'^2)  per pass,

which for passes = 2 is Fork's 4 l [n'' + (2n - 1/n^3) n'^2] sin beta
- 8 l n'^2 cos beta, and d3P/dlambda3 = l (sin beta beta'^3
- 3 cos beta beta' beta'' - sin beta beta''') per pass, the same geometry
differentiated once more. GDD = lambda^3 / (2 pi c^2) d2P/dlambda2 and
TOD = -lambda^4 / (4 pi^2 c^3) (3 d2P/dlambda2 + lambda d3P/dlambda3).
No small-angle step is taken: for this geometry (beam at the apex of prism
1, Brewster minimum deviation at lambda0) the closed form is exact at
lambda0. Glass met in prism 1 by a real beam is not modelled; adding it to
``insertion`` is the usual approximation.

numpy is imported at module level: this module is imported only when a
compressor is used.
"""

from __future__ import annotations

import math

import numpy as np

from speccheck.physics import materials

__all__ = [
    "grating_pair_dispersion",
    "grating_pair_phase",
    "prism_pair_dispersion",
    "prism_pair_phase",
]

_ORDER = 1  # diffraction order m used throughout


def _out(value):
    return float(value) if np.ndim(value) == 0 else value


def _positive(name: str, value) -> float:
    if isinstance(value, bool) or not (math.isfinite(value) and value > 0):
        raise ValueError(f"{name} must be finite and > 0, got {value!r}")
    return float(value)


def _passes(passes) -> int:
    if isinstance(passes, bool) or not isinstance(passes, int) or passes < 1:
        raise ValueError(f"passes must be a whole number >= 1, got {passes!r}")
    return passes


def _positive_array(name: str, value) -> np.ndarray:
    arr = np.asarray(value, dtype=float)
    if np.any(~np.isfinite(arr)) or np.any(arr <= 0):
        raise ValueError(f"{name} must be finite and > 0")
    return arr


def _diffraction_sine(wavelength, groove_density: float, incidence_angle: float):
    """sin theta_d = m lambda / d - sin theta_i; ValueError where no such order."""
    if not (math.isfinite(incidence_angle) and abs(incidence_angle) < math.pi / 2):
        raise ValueError(f"incidence_angle must lie strictly between -pi/2 and pi/2 rad, got {incidence_angle!r}")
    q = _ORDER * wavelength * groove_density
    sin_d = q - math.sin(incidence_angle)
    if np.any(np.abs(sin_d) >= 1.0):
        worst = float(np.max(np.abs(sin_d)))
        raise ValueError(
            f"no first diffraction order: |sin theta_d| = |m lambda/d - sin theta_i| reaches {worst:.4g} >= 1 "
            f"({groove_density:.6g} lines/m at incidence {incidence_angle:.6g} rad)")
    return q, sin_d


def grating_pair_phase(omega, groove_density, incidence_angle, separation, c, passes=2):
    """Exact spectral phase (rad) of a parallel grating pair, from ray geometry.

    Per pass phi = (omega/c) b (1 + cos(theta_i - theta_d)) - 2 pi m G tan theta_d / d,
    b = G / cos theta_d, G the perpendicular distance between the grating
    planes (m), d = 1/groove_density (groove_density in lines/m), first order
    with sin theta_d = lambda/d - sin theta_i, lambda = 2 pi c / omega; the
    path is from the point where the ray meets grating 1 to a plane normal
    to the output direction through that point. Times ``passes``.

    Raises:
        ValueError: where the first order does not exist (|sin theta_d| >= 1)
            or a parameter is out of range.
    """
    density = _positive("groove_density", groove_density)
    gap = _positive("separation", separation)
    count = _passes(passes)
    w = _positive_array("omega", omega)
    _, sin_d = _diffraction_sine(2.0 * math.pi * c / w, density, incidence_angle)
    cos_d = np.sqrt(1.0 - sin_d**2)
    slant = gap / cos_d
    path = slant + gap * (sin_d / cos_d) * math.sin(incidence_angle) + gap * math.cos(incidence_angle)
    grating = -2.0 * math.pi * _ORDER * density * gap * sin_d / cos_d
    return _out(count * (w / c * path + grating))


def grating_pair_dispersion(wavelength_m, groove_density, incidence_angle, separation, c, passes=2):
    """(GDD in s^2, TOD in s^3) of a parallel grating pair, Treacy's closed form.

    Per pass GDD = -m^2 lambda^3 G / (2 pi c^2 d^2 cos^3 theta_d) with G the
    PERPENDICULAR grating distance (m), and
    TOD = -(3 lambda/(2 pi c)) GDD (1 + (m lambda/d) sin theta_i - sin^2 theta_i) / cos^2 theta_d;
    times ``passes``. Sign convention and geometry as :func:`grating_pair_phase`.

    Raises:
        ValueError: where the first order does not exist, or a parameter is out of range.
    """
    density = _positive("groove_density", groove_density)
    gap = _positive("separation", separation)
    count = _passes(passes)
    lam = _positive_array("wavelength_m", wavelength_m)
    q, sin_d = _diffraction_sine(lam, density, incidence_angle)
    cos_sq = 1.0 - sin_d**2
    gdd = -(q**2) * lam * gap / (2.0 * math.pi * c**2 * cos_sq**1.5)
    sin_i = math.sin(incidence_angle)
    tod = -3.0 * lam / (2.0 * math.pi * c) * gdd * (1.0 + q * sin_i - sin_i**2) / cos_sq
    return _out(count * gdd), _out(count * tod)


# --- prism pair -----------------------------------------------------------


def _material(material) -> materials.Material:
    return materials.lookup(material) if isinstance(material, str) else material


def _prism_geometry(mat, apex_separation, insertion, wavelength0):
    """Common checks; returns (n0, sin beta0) at the design wavelength."""
    lap = _positive("apex_separation", apex_separation)
    if isinstance(insertion, bool) or not (math.isfinite(insertion) and insertion >= 0):
        raise ValueError(f"insertion must be finite and >= 0, got {insertion!r}")
    n0 = materials.refractive_index(mat, wavelength0)
    if np.any(np.asarray(n0) <= 1.0):
        raise ValueError("prism material must have n > 1 at the design wavelength")
    sin_b0 = insertion / n0 / lap
    if np.any(np.asarray(sin_b0) >= 1.0):
        raise ValueError("the insertion is too deep for the apex separation: the beam would pass beyond the second "
                         "prism (insertion / n must be less than apex_separation)")
    return n0, sin_b0


def _refract(dx, dy, nx, ny, n1, n2):
    """Snell's law in vector form; (nx, ny) is the unit face normal pointing to the incoming side."""
    cos_i = -(dx * nx + dy * ny)
    r = n1 / n2
    sin_t_sq = r**2 * (1.0 - cos_i**2)
    if np.any(sin_t_sq >= 1.0):
        raise ValueError("total internal reflection in the prism: frequency too far from the design wavelength")
    k = r * cos_i - np.sqrt(1.0 - sin_t_sq)
    return r * dx + k * nx, r * dy + k * ny


def _cross(ax, ay, bx, by):
    return ax * by - ay * bx


def _single_pass_path(n, n0, apex_separation, sin_b0):
    """Ray-traced optical path (m) of one pass through the pair for index n (array)."""
    s = 1.0 / math.sqrt(1.0 + n0**2)  # sin(alpha/2) = cos theta_B
    co = n0 * s  # cos(alpha/2) = sin theta_B
    # Prism 1: apex at the origin pointing +y. Outward face normals:
    # entrance (-co, s), exit (co, s). Prism 2 is turned by 180 degrees:
    # entrance normal (-co, -s), exit normal (co, -s); its faces run from
    # its apex along (-s, co) and (s, co).
    # Input direction: the lambda0 ray inside prism 1 runs along +x; leave it
    # backwards through the entrance face to find the input direction.
    bx, by = _refract(-1.0, 0.0, co, -s, n0, 1.0)
    ux, uy = -bx, -by
    one = np.ones_like(n)
    gx, gy = _refract(ux * one, uy * one, -co, s, 1.0, n)  # into prism 1 at its apex
    ox, oy = _refract(gx, gy, -co, -s, n, 1.0)  # out of prism 1, still at its apex
    # apex 2: distance l from apex 1, at angle beta0 from the lambda0 ray, on its outer side
    g0x, g0y = _refract(ux, uy, -co, s, 1.0, n0)
    u0x, u0y = _refract(g0x, g0y, -co, -s, n0, 1.0)
    cos_b0 = math.sqrt(1.0 - sin_b0**2)
    ax = apex_separation * (cos_b0 * u0x + sin_b0 * u0y)
    ay = apex_separation * (cos_b0 * u0y - sin_b0 * u0x)
    # apex 1 -> entrance face of prism 2 (line through apex 2 along (-s, co))
    t_air = _cross(ax, ay, -s, co) / _cross(ox, oy, -s, co)
    px, py = t_air * ox, t_air * oy
    hx, hy = _refract(ox, oy, -co, -s, 1.0, n)  # into prism 2
    t_glass = _cross(ax - px, ay - py, s, co) / _cross(hx, hy, s, co)  # to its exit face
    qx, qy = px + t_glass * hx, py + t_glass * hy
    # out of prism 2 (parallel to the input, since its faces are parallel to prism 1's);
    # the output reference plane is normal to the input direction through apex 2.
    _refract(hx, hy, -co, s, n, 1.0)  # raises on total internal reflection
    t_out = (ax - qx) * ux + (ay - qy) * uy
    return t_air + n * t_glass + t_out


def prism_pair_phase(omega, material, apex_separation, insertion, wavelength0, c, passes=2):
    """Exact spectral phase (rad) of a Brewster prism pair, by ray tracing Snell's law.

    Geometry (module docstring): identical prisms of ``material`` cut for
    Brewster incidence at minimum deviation at ``wavelength0`` (m), prism 2
    turned by 180 degrees; the input enters prism 1 at its apex;
    ``apex_separation`` (m) apex to apex; ``insertion`` (m) the depth of the
    wavelength0 ray inside prism 2 from its apex, perpendicular to its base.
    phi = passes (omega/c) P(omega), P the optical path from the input
    wavefront through apex 1 to the plane normal to the output direction
    through apex 2. ``material`` is a name of the material table or a Material.

    Raises:
        ValueError: out-of-range parameters, or total internal reflection
            (a frequency too far from the design wavelength).
        KeyError: unknown material name.
    """
    mat = _material(material)
    lam0 = _positive("wavelength0", wavelength0)
    count = _passes(passes)
    n0, sin_b0 = _prism_geometry(mat, apex_separation, insertion, lam0)
    w = _positive_array("omega", omega)
    n = np.asarray(materials.refractive_index(mat, 2.0 * math.pi * c / w), dtype=float)
    return _out(count * w / c * _single_pass_path(n, n0, float(apex_separation), sin_b0))


def prism_pair_dispersion(wavelength_m, material, apex_separation, insertion, c, passes=2):
    """(GDD in s^2, TOD in s^3) of a Brewster prism pair designed for ``wavelength_m``.

    Fork, Martinez and Gordon's d2P/dlambda2 (for passes = 2:
    4 l [n'' + (2n - 1/n^3) n'^2] sin beta - 8 l n'^2 cos beta) and the same
    geometry differentiated once more for d3P/dlambda3; sin beta =
    insertion / (n l). GDD = lambda^3/(2 pi c^2) d2P/dlambda2,
    TOD = -lambda^4/(4 pi^2 c^3) (3 d2P/dlambda2 + lambda d3P/dlambda3).
    Geometry and parameters as :func:`prism_pair_phase` with the design
    wavelength equal to ``wavelength_m``.
    """
    mat = _material(material)
    count = _passes(passes)
    lam = _positive_array("wavelength_m", wavelength_m)
    n, sin_b = _prism_geometry(mat, apex_separation, insertion, lam)
    n, n1, n2, n3 = materials._index_derivatives(mat, lam * 1e6)  # per um, per um^2, per um^3
    n1, n2, n3 = n1 * 1e6, n2 * 1e12, n3 * 1e18  # per m
    t1 = 2.0
    t2 = 4.0 * n - 2.0 / n**3
    t3 = 24.0 * n**2 + 8.0 - 12.0 / n**2 + 6.0 / n**4 + 6.0 / n**6
    b1 = -t1 * n1
    b2 = -(t2 * n1**2 + t1 * n2)
    b3 = -(t3 * n1**3 + 3.0 * t2 * n1 * n2 + t1 * n3)
    cos_b = np.sqrt(1.0 - sin_b**2)
    lap = float(apex_separation)
    p2 = -lap * (sin_b * b2 + cos_b * b1**2)
    p3 = lap * (sin_b * b1**3 - 3.0 * cos_b * b1 * b2 - sin_b * b3)
    gdd = lam**3 / (2.0 * math.pi * c**2) * p2
    tod = -(lam**4) / (4.0 * math.pi**2 * c**3) * (3.0 * p2 + lam * p3)
    return _out(count * gdd), _out(count * tod)
