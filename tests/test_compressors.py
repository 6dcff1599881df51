"""Tests for speccheck.physics.compressors: grating and prism pairs, exact phase vs closed form.

The independent method throughout: the exact spectral phase (ray geometry,
Snell's law, the grating equation) is differentiated numerically and set
against the closed forms (Treacy 1969; Fork, Martinez and Gordon 1984).
"""

from __future__ import annotations

import math

import numpy as np
import pint
import pytest

from speccheck.physics import compressors as comp
from speccheck.physics import materials as m

# Speed of light from pint (never typed in).
c = (1 * pint.UnitRegistry().speed_of_light).to("m/s").magnitude

FS2 = 1e-30  # fs^2 in s^2 (unit conversion)
FS3 = 1e-45  # fs^3 in s^3 (unit conversion)
LAM0 = 800e-9
W0 = 2 * math.pi * c / LAM0
LINES_1200 = 1.2e6  # 1200 lines/mm in lines/m
LITTROW_1200_800 = math.asin(LAM0 * LINES_1200 / 2)  # 28.69 degrees


# Every pytest.approx here sets abs=0: its default absolute tolerance (1e-12) would
# pass any two values in s^2 or s^3.


def _derivatives(phase, w0: float = W0, half_width: float = 2e13) -> list[float]:
    """d^k phi / d omega^k at w0, k = 0..4, from a degree-10 polynomial fit.

    201 samples over w0 +- half_width (2e13 rad/s is +-8.5 nm at 800 nm);
    the fit is in the scaled variable x = (omega - w0) / half_width.
    """
    x = np.linspace(-1.0, 1.0, 201)
    coef = np.polynomial.polynomial.polyfit(x, phase(w0 + x * half_width), 10)
    return [coef[k] * math.factorial(k) / half_width**k for k in range(5)]


# --- grating pair -----------------------------------------------------------


@pytest.mark.parametrize("incidence_deg", [30.0, 45.0, 10.0])  # near Littrow (28.7), and two off it
def test_grating_closed_form_matches_the_exact_phase(incidence_deg: float) -> None:
    # Treacy's closed forms vs numerical derivatives of the ray-geometry phase.
    # Measured agreement: GDD within 1e-10, TOD within 3e-8 (relative) at all three angles.
    angle = math.radians(incidence_deg)
    gdd, tod = comp.grating_pair_dispersion(LAM0, LINES_1200, angle, 0.1, c)
    d = _derivatives(lambda w: comp.grating_pair_phase(w, LINES_1200, angle, 0.1, c))
    assert gdd < 0
    assert d[2] == pytest.approx(gdd, rel=1e-7, abs=0)
    assert d[3] == pytest.approx(tod, rel=1e-6, abs=0)


def test_grating_group_delay_is_treacys_ray_path() -> None:
    # Treacy 1969: group delay = b (1 + cos theta) / c, b = G / cos theta_d the slant
    # distance, theta = theta_i - theta_d the angle between incident and diffracted
    # rays. It holds only with the grating phase term in the phase.
    angle, gap = math.radians(40.0), 0.2
    theta_d = math.asin(LAM0 * LINES_1200 - math.sin(angle))
    b = gap / math.cos(theta_d)
    d = _derivatives(lambda w: comp.grating_pair_phase(w, LINES_1200, angle, gap, c, passes=1))
    assert d[1] == pytest.approx(b * (1 + math.cos(angle - theta_d)) / c, rel=1e-10, abs=0)


def test_grating_gdd_worked_number_at_littrow() -> None:
    # 1200 lines/mm, 800 nm, Littrow (theta_i = theta_d = 28.69 deg), by hand from
    # Treacy's formula with the perpendicular distance G:
    # lambda/d = 0.96; cos theta_d = sqrt(1 - 0.48^2) = 0.87727; cos^3 = 0.67514;
    # GDD/G = -0.96^2 * 800e-9 m / (2 pi c^2 * 0.67514) = -1.934e-24 s^2/m,
    # i.e. -1934 fs^2 per mm per pass, -3867 fs^2/mm double pass. From memory, such a
    # compressor gives a few thousand fs^2 per mm of grating distance.
    gdd, _ = comp.grating_pair_dispersion(LAM0, LINES_1200, LITTROW_1200_800, 1e-3, c, passes=1)
    assert gdd / FS2 == pytest.approx(-1934, rel=1e-3, abs=0)
    double, _ = comp.grating_pair_dispersion(LAM0, LINES_1200, LITTROW_1200_800, 1e-3, c)
    assert double == pytest.approx(2 * gdd, rel=1e-12, abs=0)


def test_grating_tod_adds_to_the_glass_tod_it_compensates() -> None:
    # 100 mm of fused silica (GDD ~ +3610 fs^2, TOD ~ +2750 fs^3) and the grating
    # distance that cancels its GDD: the grating's TOD has the glass's sign, so the
    # total TOD grows (measured: 3.6 times the glass's). Exact phases summed and
    # differentiated numerically; the glass phase is omega n(omega) L / c.
    length, angle = 0.1, math.radians(30.0)
    glass_gdd = m.gdd("fused_silica", LAM0, length, c)
    glass_tod = m.tod("fused_silica", LAM0, length, c)
    per_metre, _ = comp.grating_pair_dispersion(LAM0, LINES_1200, angle, 1.0, c)
    gap = -glass_gdd / per_metre

    def total(w):
        glass = w * m.refractive_index("fused_silica", 2 * math.pi * c / w) * length / c
        return glass + comp.grating_pair_phase(w, LINES_1200, angle, gap, c)

    d = _derivatives(total)
    assert abs(d[2]) < 1e-6 * glass_gdd
    assert glass_tod > 0 and d[3] > 2 * glass_tod


@pytest.mark.parametrize("density, angle_deg", [(1.8e6, 0.0), (LINES_1200, -10.0)])
def test_grating_missing_order_is_a_value_error(density: float, angle_deg: float) -> None:
    # 1800 l/mm at 800 nm, normal incidence: lambda/d = 1.44; 1200 l/mm at -10 deg: 1.13.
    with pytest.raises(ValueError, match="no first diffraction order"):
        comp.grating_pair_dispersion(LAM0, density, math.radians(angle_deg), 0.1, c)
    with pytest.raises(ValueError, match="no first diffraction order"):
        comp.grating_pair_phase(W0, density, math.radians(angle_deg), 0.1, c)


def test_grating_order_lost_inside_the_band_is_a_value_error() -> None:
    # At 10 deg, 1200 l/mm: sin theta_d = 0.96 - 0.17 = 0.79 at 800 nm, but 1.03 at 1000 nm.
    omega = 2 * math.pi * c / np.array([800e-9, 1000e-9])
    with pytest.raises(ValueError, match="no first diffraction order"):
        comp.grating_pair_phase(omega, LINES_1200, math.radians(10.0), 0.1, c)
    assert np.all(np.isfinite(comp.grating_pair_phase(omega[:1], LINES_1200, math.radians(10.0), 0.1, c)))


@pytest.mark.parametrize("bad", [{"separation": 0.0}, {"groove_density": -1.0}, {"passes": 0},
                                 {"passes": 1.5}, {"incidence_angle": math.pi / 2}])
def test_grating_rejects_bad_parameters(bad: dict) -> None:
    args = {"groove_density": LINES_1200, "incidence_angle": 0.5, "separation": 0.1, "passes": 2} | bad
    with pytest.raises(ValueError):
        comp.grating_pair_dispersion(LAM0, c=c, **args)


# --- prism pair ---------------------------------------------------------------


@pytest.mark.parametrize("material, apex, insertion, tod_tol", [
    ("fused_silica", 0.5, 0.0, 2e-4), ("fused_silica", 0.5, 3e-3, 2e-4), ("n_bk7", 0.5, 5e-3, 2e-4),
    ("sapphire", 0.5, 2e-3, 2e-4), ("fused_silica", 0.05, 0.02, 1e-5), ("sapphire", 0.05, 0.03, 1e-5)])
def test_prism_closed_form_matches_the_ray_trace(material: str, apex: float, insertion: float,
                                                 tod_tol: float) -> None:
    # Fork-Martinez-Gordon closed form vs numerical derivatives of the Snell's-law ray
    # trace. Measured agreement: GDD within 1.3e-7, TOD within 5e-5 at 0.5 m apex to apex
    # and within 2e-6 at 5 cm -- the numerical differentiation's own scatter, larger where
    # the phase is larger: for this geometry (beam at prism 1's apex) the formula has no
    # approximation left (module docstring). The short pairs with deep insertion
    # (sin beta ~ 0.3) test the sin beta terms of d3P/dlambda3, which add ~1e-3 there.
    gdd, tod = comp.prism_pair_dispersion(LAM0, material, apex, insertion, c)
    d = _derivatives(lambda w: comp.prism_pair_phase(w, material, apex, insertion, LAM0, c))
    assert d[2] == pytest.approx(gdd, rel=1e-6, abs=0)
    assert d[3] == pytest.approx(tod, rel=tod_tol, abs=0)


def test_prism_gdd_is_forks_printed_formula() -> None:
    # Fork et al. 1984, transcribed: d2P/dlambda2 = 4 l [n'' + (2n - 1/n^3) n'^2] sin beta
    # - 8 l n'^2 cos beta (two passes), GDD = lambda^3/(2 pi c^2) d2P/dlambda2, with
    # the derivatives of n taken here by finite differences of the index itself
    # (measured agreement 5e-6, set by those differences).
    apex, insertion, h = 0.6, 4e-3, 1e-9
    n = m.refractive_index("fused_silica", LAM0)
    n_at = [m.refractive_index("fused_silica", LAM0 + k * h) for k in (-1, 0, 1)]
    n1 = (n_at[2] - n_at[0]) / (2 * h)
    n2 = (n_at[2] - 2 * n_at[1] + n_at[0]) / h**2
    sin_b = insertion / n / apex
    d2p = 4 * apex * (n2 + (2 * n - 1 / n**3) * n1**2) * sin_b - 8 * apex * n1**2 * math.sqrt(1 - sin_b**2)
    gdd, _ = comp.prism_pair_dispersion(LAM0, "fused_silica", apex, insertion, c)
    assert gdd == pytest.approx(LAM0**3 / (2 * math.pi * c**2) * d2p, rel=1e-4, abs=0)


@pytest.mark.parametrize("material, excess", [("fused_silica", 0.0194), ("n_bk7", 0.0219), ("sapphire", 0.0375)])
def test_prism_insertion_adds_the_gdd_of_the_extra_glass(material: str, excess: float) -> None:
    # 4 mm more insertion puts 2 * 4 mm / n0 more glass in the lambda0 ray per pass.
    # Ray-traced GDD change vs materials.gdd of that glass path: more insertion, more
    # positive GDD, at the material rate plus Fork's angular term (2n - 1/n^3) n'^2 next
    # to n''. Measured excess over the material rate: 1.94 % (fused silica), 2.19 %
    # (N-BK7), 3.75 % (sapphire); asserted to 0.2 percentage points.
    n0 = m.refractive_index(material, LAM0)

    def gdd_at(insertion):
        return _derivatives(lambda w: comp.prism_pair_phase(w, material, 0.5, insertion, LAM0, c))[2]

    change = gdd_at(5e-3) - gdd_at(1e-3)
    glass = m.gdd(material, LAM0, 2 * 2 * 4e-3 / n0, c)
    assert change > 0
    assert change / glass - 1 == pytest.approx(excess, abs=2e-3)


def test_prism_pair_fused_silica_ballpark() -> None:
    # Tip to tip (no insertion) only the angular term is left: GDD = -8 l n'^2 lambda^3/(2 pi c^2).
    # With dn/dlambda = -0.0172 per um for fused silica at 800 nm (from memory) that is
    # -8 * (1.72e4 /m)^2 * 5.12e-19 m^3 / (2 pi c^2) = -2.15e-27 s^2 per m, -21.5 fs^2/cm.
    # Typical prism pairs give up to a few thousand fs^2 (from memory).
    gdd, _ = comp.prism_pair_dispersion(LAM0, "fused_silica", 0.01, 0.0, c)
    assert gdd / FS2 == pytest.approx(-21.5, rel=0.03, abs=0)
    # apex separation for -1000 fs^2: about 46 cm, within the usual tens of cm
    per_metre, _ = comp.prism_pair_dispersion(LAM0, "fused_silica", 1.0, 0.0, c)
    assert 0.3 < -1000 * FS2 / per_metre < 0.6


def test_prism_tod_opposes_the_glass_tod() -> None:
    # A prism pair cancelling 100 mm of fused silica's GDD leaves TOD of the other sign
    # than the glass's (measured: total -0.48 times the glass's), unlike a grating pair;
    # from memory, this is why prisms and gratings are combined to cancel cubic phase.
    length = 0.1
    glass_gdd = m.gdd("fused_silica", LAM0, length, c)
    glass_tod = m.tod("fused_silica", LAM0, length, c)
    per_metre, _ = comp.prism_pair_dispersion(LAM0, "fused_silica", 1.0, 0.0, c)
    apex = -glass_gdd / per_metre

    def total(w):
        glass = w * m.refractive_index("fused_silica", 2 * math.pi * c / w) * length / c
        return glass + comp.prism_pair_phase(w, "fused_silica", apex, 0.0, LAM0, c)

    d = _derivatives(total)
    assert abs(d[2]) < 1e-5 * glass_gdd
    assert d[3] < 0 < glass_tod


def test_prism_passes_scale_the_phase_and_array_wavelengths_work() -> None:
    omega = W0 * np.array([0.98, 1.0, 1.02])
    one = comp.prism_pair_phase(omega, "fused_silica", 0.5, 2e-3, LAM0, c, passes=1)
    two = comp.prism_pair_phase(omega, "fused_silica", 0.5, 2e-3, LAM0, c)
    np.testing.assert_allclose(two, 2 * one, rtol=1e-14)
    half = comp.prism_pair_dispersion(LAM0, "fused_silica", 0.5, 2e-3, c, passes=1)
    np.testing.assert_allclose(np.array(comp.prism_pair_dispersion(LAM0, "fused_silica", 0.5, 2e-3, c)),
                               2 * np.array(half), rtol=1e-14)
    lams = np.array([700e-9, 800e-9])
    gdd, _ = comp.prism_pair_dispersion(lams, "fused_silica", 0.5, 2e-3, c)
    assert gdd[1] == pytest.approx(comp.prism_pair_dispersion(800e-9, "fused_silica", 0.5, 2e-3, c)[0], rel=1e-12, abs=0)


@pytest.mark.parametrize("bad", [{"insertion": -1e-3}, {"insertion": 1.0}, {"apex_separation": 0.0},
                                 {"passes": 0}])
def test_prism_rejects_bad_parameters(bad: dict) -> None:
    args = {"material": "fused_silica", "apex_separation": 0.5, "insertion": 1e-3, "passes": 2} | bad
    with pytest.raises(ValueError):
        comp.prism_pair_dispersion(LAM0, c=c, **args)
    with pytest.raises(ValueError):
        comp.prism_pair_phase(W0, wavelength0=LAM0, c=c, **args)


def test_prism_unknown_material_is_a_key_error() -> None:
    with pytest.raises(KeyError):
        comp.prism_pair_phase(W0, "unobtainium", 0.5, 1e-3, LAM0, c)
