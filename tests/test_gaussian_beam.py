"""The Gaussian beam's q and ABCD matrices (physics/gaussian_beam.py) against outside references:
published closed forms, paraxial ray optics, and a numerical propagation of the sampled field by
an angular-spectrum FFT (a different method: no q, no matrices)."""

from __future__ import annotations

import math

import numpy as np
import pytest

from speccheck.physics import gaussian_beam as gb

LAM = 1030e-9


def test_free_space_matches_the_gaussian_beam_formulas():
    # H. Kogelnik and T. Li, Appl. Opt. 5, 1550 (1966): w(z) = w0 √(1 + (λz/πw0²)²),
    # R(z) = z (1 + (πw0²/λz)²); the waist's q propagated by the free-space matrix
    w0 = 0.3e-3
    zr = math.pi * w0**2 / LAM
    for z in (-3 * zr, -0.2 * zr, 0.5 * zr, zr, 7.0 * zr):
        q = gb.apply(gb.free(z), gb.at_waist(w0, LAM))
        assert gb.radius(q, LAM) == pytest.approx(w0 * math.sqrt(1 + (LAM * z / (math.pi * w0**2)) ** 2), rel=1e-12)
        assert gb.wavefront_radius(q) == pytest.approx(z * (1 + (math.pi * w0**2 / (LAM * z)) ** 2), rel=1e-12)
        assert gb.waist_ahead(q) == pytest.approx(-z)
    assert gb.wavefront_radius(gb.at_waist(w0, LAM)) == math.inf
    # one Rayleigh range past the waist the area doubles: half the on-axis intensity
    q = gb.apply(gb.free(zr), gb.at_waist(w0, LAM))
    assert (w0 / gb.radius(q, LAM)) ** 2 == pytest.approx(0.5, rel=1e-12)


@pytest.mark.parametrize("s_over_f, zr_over_f", [(0.0, 50.0), (0.5, 0.2), (1.0, 1.0), (2.0, 0.3), (3.0, 5.0),
                                                 (-4.0, 0.7)])
def test_a_lens_focuses_as_selfs_closed_form(s_over_f, zr_over_f):
    # S. A. Self, Appl. Opt. 22, 658 (1983), eqs. (9b) and (10) (numbers from memory): an input waist a distance s before a
    # thin lens f (Rayleigh range z_R) is imaged to a waist s'' after it with
    #   1/(s + z_R²/(s − f)) + 1/s'' = 1/f,   w0''/w0 = 1/√((1 − s/f)² + (z_R/f)²)
    f = 0.3
    s, zr = s_over_f * f, zr_over_f * f
    w0 = math.sqrt(zr * LAM / math.pi)
    q = gb.apply(gb.compose(gb.free(s), gb.lens(f)), gb.at_waist(w0, LAM))
    m = 1.0 / math.sqrt((1 - s / f) ** 2 + (zr / f) ** 2)
    s_out = 1.0 / (1.0 / f - 1.0 / (s + zr**2 / (s - f))) if s != f else f  # s = f: the waist lands at f
    assert gb.waist_radius(q, LAM) == pytest.approx(m * w0, rel=1e-10)
    assert gb.waist_ahead(q) == pytest.approx(s_out, rel=1e-9, abs=1e-12)


def test_a_plate_moves_a_focus_by_its_thickness_times_one_minus_one_over_n():
    # paraxial ray optics (e.g. E. Hecht, Optics, the displacement of an image by a plate): a
    # plane-parallel plate of thickness t and index n moves a focus behind it by t (1 − 1/n); the
    # plate in the beam replaces t of air by its reduced thickness t/n
    f, t, n = 0.3, 3e-3, 1.45
    w = 4e-3
    after_lens = gb.apply(gb.lens(f), gb.at_waist(w, LAM))
    without = gb.apply(gb.free(0.25 + t), after_lens)
    with_plate = gb.apply(gb.compose(gb.free(0.25), gb.plate(t, n)), after_lens)
    shift = gb.waist_ahead(with_plate) - gb.waist_ahead(without)
    assert shift == pytest.approx(t * (1 - 1 / n), rel=1e-6)


def test_a_telescope_images_its_entrance_and_scales_q_by_m_squared():
    # two lenses f1, f2 = m f1 a distance f1 + f2 apart: ABCD (−m, f1 + f2, 0, −1/m) (Siegman, Lasers,
    # ch. 15, chapter from memory), i.e. the relay m² q after free space f1 (1 + m)/m, worked out by hand
    f1, m = 0.1, 3.0
    a, b, c, d = gb.telescope(f1, m)
    assert (a, b, c, d) == pytest.approx((-m, f1 * (1 + m), 0.0, -1.0 / m), abs=1e-15)
    q = complex(-0.4, 2.0)
    assert gb.apply(gb.telescope(f1, m), q) == pytest.approx(m * m * (q - f1 * (1 + m) / m))
    assert gb.apply(gb.relay(m), q) == pytest.approx(m * m * q)
    assert gb.radius(gb.apply(gb.relay(m), q), LAM) == pytest.approx(m * gb.radius(q, LAM))


def test_a_galilean_telescope_is_a_negative_lens_and_a_positive_one():
    # f1 = −50 mm, m = 3: f2 = +150 mm, 100 mm apart, upright (A = +m, C = 0): checked against the
    # product of the three matrices written out by hand (thin lens (1, 0, −1/f, 1), free space
    # (1, d, 0, 1); Kogelnik and Li 1966); a 1 mm beam leaves m times wider (to the 2e-4 its
    # diffraction over the 100 mm adds)
    f1, f2, d = -0.05, 0.15, 0.10
    by_hand = (1 - d / f1, d, -1 / f1 - 1 / f2 + d / (f1 * f2), 1 - d / f2)
    assert gb.telescope(f1, 3.0) == pytest.approx(by_hand, abs=1e-12)
    assert by_hand[0] == pytest.approx(3.0) and by_hand[2] == pytest.approx(0.0, abs=1e-12)
    q = gb.at_waist(1e-3, LAM)
    out = gb.apply(gb.telescope(f1, 3.0), q)
    assert gb.radius(out, LAM) == pytest.approx(3 * gb.radius(q, LAM), rel=1e-3)


def test_a_beam_is_found_from_its_size_at_a_plane_and_its_waist_or_divergence():
    w0, z = 1e-3, 0.8
    q = gb.at_waist(w0, LAM, past=z)  # 0.8 m past the waist
    w = gb.radius(q, LAM)
    back = gb.at_plane(w, LAM, waist_after=-z)
    assert back == pytest.approx(q, rel=1e-9)
    theta = 2 * LAM / (math.pi * w0)  # full angle of the 1/e² radius (Siegman, Lasers, ch. 17, chapter from memory)
    assert gb.from_divergence(w, LAM, theta) == pytest.approx(q, rel=1e-9)
    assert gb.divergence(q, LAM) == pytest.approx(theta / 2)
    assert gb.at_plane(1e-4, LAM, waist_after=10.0) is None  # too narrow this far from its waist
    assert gb.from_divergence(1e-3, LAM, 1e-5) is None  # below the diffraction limit of 1 mm


def test_the_kerr_length_is_the_integral_of_the_intensity_through_the_plate():
    # the closed form against numerical quadrature of w(0)²/w(z)², w(z) from q stepped through the
    # plate in slices (free space of z/n each)
    n, t = 1.45, 3e-3
    for q in (complex(-0.05, 2e-3), complex(-1e-3, 4e-4), complex(0.2, 30.0), complex(-2e-3, 1e-4)):
        z = np.linspace(0.0, t, 20001)
        w_sq = np.array([gb.radius(gb.apply(gb.plate(x, n), q), LAM) ** 2 for x in z])
        numeric = np.trapezoid(w_sq[0] / w_sq, z)
        assert gb.kerr_length(q, t, n) == pytest.approx(numeric, rel=1e-6)
    assert gb.kerr_length(complex(0.0, 1e6), t, n) == pytest.approx(t, rel=1e-9)  # collimated: L


def test_marburgers_lens_transformation():
    # J. H. Marburger, Prog. Quantum Electron. 4, 35 (1975): z_f' = z_f R / (z_f + R) for a beam
    # converging to a geometric focus R away; a collimated beam keeps z_f, a diverging one that
    # spreads faster than it focuses never collapses
    assert gb.converging_collapse(0.5, -0.5) == pytest.approx(0.25)
    assert gb.converging_collapse(0.5, math.inf) == pytest.approx(0.5)
    assert gb.converging_collapse(0.5, 1.0) == pytest.approx(1.0)
    assert gb.converging_collapse(0.5, 0.4) == math.inf
    assert gb.converging_collapse(math.inf, -0.5) == math.inf  # below the critical power


# ------------------------------------------------------------ a different method: the sampled field

def _propagate(field: np.ndarray, dx: float, z: float, lam: float) -> np.ndarray:
    """The angular-spectrum method: the field's plane waves, each advanced by exp(i kz z)."""
    k = 2 * math.pi / lam
    kx = 2 * math.pi * np.fft.fftfreq(field.shape[0], dx)
    kz = np.sqrt(np.maximum(k * k - kx[:, None] ** 2 - kx[None, :] ** 2, 0.0))
    return np.fft.ifft2(np.fft.fft2(field) * np.exp(1j * (kz - k) * z))


def _second_moment_radius(field: np.ndarray, x: np.ndarray) -> float:
    """The 1/e² radius of a Gaussian is twice its intensity's rms width along x (ISO 11146)."""
    intensity = np.abs(field) ** 2
    px = intensity.sum(axis=1)
    mean = (px * x).sum() / px.sum()
    return 2.0 * math.sqrt((px * (x - mean) ** 2).sum() / px.sum())


def test_abcd_agrees_with_the_angular_spectrum_of_a_sampled_beam_through_a_lens():
    # a 1 mm (1/e²) beam at 1030 nm through f = 200 mm, sampled on 512² points; second-moment radius
    # of the propagated field at several planes against the ABCD radius
    n, span = 512, 8e-3
    x = (np.arange(n) - n / 2) * (span / n)
    w0, f = 1e-3, 0.2
    r2 = x[:, None] ** 2 + x[None, :] ** 2
    k = 2 * math.pi / LAM
    field = np.exp(-r2 / w0**2) * np.exp(-1j * k * r2 / (2 * f))
    q_lens = gb.apply(gb.lens(f), gb.at_waist(w0, LAM))
    for z in (0.05, 0.12, 0.17):
        numeric = _second_moment_radius(_propagate(field, span / n, z, LAM), x)
        assert numeric == pytest.approx(gb.radius(gb.apply(gb.free(z), q_lens), LAM), rel=2e-3)


def test_the_embedded_gaussian_rule_holds_for_a_beam_of_m2_three():
    # A Hermite–Gaussian TEM10 mode has M²_x = 3 (Siegman, Lasers, ch. 17, chapter from memory): its second-moment radius is
    # √3 times that of its embedded Gaussian and it propagates as a Gaussian of wavelength 3λ.  The
    # sampled field goes through a lens by the angular spectrum; the rule is applied along x
    n, span = 512, 12e-3
    x = (np.arange(n) - n / 2) * (span / n)
    w, f = 0.8e-3, 0.25
    X, Y = np.meshgrid(x, x, indexing="ij")
    k = 2 * math.pi / LAM
    field = X * np.exp(-(X**2 + Y**2) / w**2) * np.exp(-1j * k * (X**2 + Y**2) / (2 * f))
    start = _second_moment_radius(field, x)
    assert start == pytest.approx(math.sqrt(3) * w, rel=1e-3)
    lam_eff = 3.0 * LAM
    q_lens = gb.apply(gb.lens(f), gb.at_waist(start, lam_eff))
    for z in (0.1, 0.2, 0.24):
        numeric = _second_moment_radius(_propagate(field, span / n, z, LAM), x)
        assert numeric == pytest.approx(gb.radius(gb.apply(gb.free(z), q_lens), lam_eff), rel=3e-3)


def test_the_carried_geometry_gives_the_same_numbers_and_the_focus_interval_of_the_closed_form():
    from speccheck.physics import beam_geometry

    # a 5 mm beam at 800 nm, M² 1.2, each ± its default tolerance, through f = 100 mm ± 1 % to its waist
    d, lam, m2, f = (4.75e-3, 5e-3, 5.25e-3), (792e-9, 800e-9, 808e-9), (1.14, 1.2, 1.26), (0.099, 0.1, 0.101)
    g = beam_geometry.start(d, lam, m2).step(lambda f: gb.lens(f), f=f).to_waists()
    plane = g.plane()
    q, lam_eff = g.q[0], g.lam[0]
    assert plane["rayleigh_range"][1] == pytest.approx(gb.rayleigh_range(q))
    assert plane["waist_diameter"][1] == pytest.approx(2 * gb.waist_radius(q, lam_eff))
    assert plane["waist_distance"][1] == pytest.approx(gb.waist_ahead(q), abs=1e-15)
    assert plane["wavefront_radius"][1] == math.inf
    # the waist 4 M²λf/(πD) of a collimated beam (f ≪ z_R): the interval of interval arithmetic on the product
    spot = g.diameter()
    k = 4 / math.pi
    assert spot[1] == pytest.approx(k * m2[1] * lam[1] * f[1] / d[1], rel=1e-4)
    assert spot[0] == pytest.approx(k * m2[0] * lam[0] * f[0] / d[2], rel=1e-3)
    assert spot[2] == pytest.approx(k * m2[2] * lam[2] * f[2] / d[0], rel=1e-3)
