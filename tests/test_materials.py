"""Tests for speccheck.physics.materials: published index values, derivatives, lookup."""

from __future__ import annotations

import dataclasses

import numpy as np
import pint
import pytest

from speccheck.physics import materials as m

# Speed of light from pint (never typed in). pint returns a Unit for the
# bare constant, so it is multiplied by 1 to make a Quantity first.
c = (1 * pint.UnitRegistry().speed_of_light).to("m/s").magnitude

FS2_PER_MM = 1e-30 / 1e-3  # fs^2/mm in s^2/m (unit conversion)
FS3 = 1e-45  # fs^3 in s^3 (unit conversion)


# --- refractive index against published / derived values -------------------


def test_fused_silica_index_800nm() -> None:
    # 1.4533 at 800 nm, evaluated from the Malitson 1965 Sellmeier
    # coefficients (J. Opt. Soc. Am. 55, 1205); 4 decimals -> tol 1e-4.
    assert m.refractive_index("fused_silica", 800e-9) == pytest.approx(1.4533, abs=1e-4)


def test_fused_silica_index_d_line() -> None:
    # n_d = 1.4585 at 587.56 nm: common catalogue value for fused silica
    # (from memory); Malitson 1965 formula must reproduce it to 1e-4.
    assert m.refractive_index("fused_silica", 587.5618e-9) == pytest.approx(
        1.4585, abs=1e-4
    )


def test_bk7_index() -> None:
    # n_d = 1.5168 at 587.5618 nm: SCHOTT N-BK7 data sheet (nd, 5 digits).
    assert m.refractive_index("n_bk7", 587.5618e-9) == pytest.approx(1.5168, abs=5e-5)
    # 1.5108 at 800 nm, evaluated from the SCHOTT Sellmeier coefficients.
    assert m.refractive_index("n_bk7", 800e-9) == pytest.approx(1.5108, abs=1e-4)


def test_sapphire_ordinary_index() -> None:
    # 1.7602 at 800 nm from Malitson & Dodge 1972 coefficients (ordinary ray).
    assert m.refractive_index("sapphire", 800e-9) == pytest.approx(1.7602, abs=1e-4)
    # Independent tabulated n_o: 1.7659 (633 nm), 1.76013 (800 nm),
    # 1.75449 (1064 nm) -- Valley Design Corp. sapphire index table.
    got = m.refractive_index("sapphire", np.array([633e-9, 800e-9, 1064e-9]))
    np.testing.assert_allclose(got, [1.7659, 1.76013, 1.75449], atol=1e-4)


def test_caf2_index() -> None:
    # 1.4305 at 800 nm, evaluated from Malitson 1963 (Appl. Opt. 2, 1103).
    assert m.refractive_index("calcium_fluoride", 800e-9) == pytest.approx(
        1.4305, abs=1e-4
    )
    # n_d = 1.4338 for CaF2, common catalogue value (from memory).
    assert m.refractive_index("caf2", 587.5618e-9) == pytest.approx(1.4338, abs=1e-4)


def test_air_index_matches_ciddor_expression() -> None:
    # Ciddor 1996 (Appl. Opt. 35, 1566) standard air, written out by hand:
    # 1e8 (n - 1) = 5792105/(238.0185 - s^2) + 167917/(57.362 - s^2), s = 1/0.6328 um.
    s2 = 1.0 / 0.6328**2
    expected = 5792105.0 / (238.0185 - s2) + 167917.0 / (57.362 - s2)
    got = (m.refractive_index("air", 632.8e-9) - 1.0) * 1e8
    assert got == pytest.approx(expected, rel=1e-9)
    # The hand evaluation gives 27653 (n = 1.00027653) at 632.8 nm.
    assert got == pytest.approx(27653.3, abs=0.1)


def test_water_index() -> None:
    # n = 1.3333 at 589.3 nm, 20 °C: common handbook value for water
    # (from memory); Daimon & Masumura 2007 formula, tol 2e-4.
    assert m.refractive_index("water", 589.3e-9) == pytest.approx(1.3333, abs=2e-4)


# --- dispersion values --------------------------------------------------------


def test_fused_silica_gvd_800nm() -> None:
    # 36.16 fs^2/mm at 800 nm, derived from Malitson 1965 coefficients.
    assert m.gvd("fused_silica", 800e-9, c) / FS2_PER_MM == pytest.approx(
        36.16, abs=0.01
    )


def test_bk7_gvd_800nm() -> None:
    # 44.65 fs^2/mm at 800 nm, derived from SCHOTT N-BK7 coefficients.
    assert m.gvd("n_bk7", 800e-9, c) / FS2_PER_MM == pytest.approx(44.65, abs=0.01)


def test_gdd_is_gvd_times_thickness() -> None:
    lam, length = 800e-9, 2.5e-3
    assert m.gdd("fused_silica", lam, length, c) == pytest.approx(
        m.gvd("fused_silica", lam, c) * length, rel=1e-12
    )


def test_fused_silica_tod_800nm() -> None:
    # 27.50 fs^3 for 1 mm at 800 nm, derived from Malitson 1965 coefficients;
    # positive (normal-dispersion region).
    tod_fs3 = m.tod("fused_silica", 800e-9, 1e-3, c) / FS3
    assert tod_fs3 == pytest.approx(27.50, abs=0.01)


def test_group_index_fused_silica_800nm() -> None:
    # 1.4671 at 800 nm, derived from Malitson 1965 coefficients.
    assert m.group_index("fused_silica", 800e-9) == pytest.approx(1.4671, abs=1e-4)


# --- analytic derivatives vs finite differences ------------------------------


def _d1_5pt(f, x, h):
    return (-f(x + 2 * h) + 8 * f(x + h) - 8 * f(x - h) + f(x - 2 * h)) / (12 * h)


def _d2_5pt(f, x, h):
    return (
        -f(x + 2 * h) + 16 * f(x + h) - 30 * f(x) + 16 * f(x - h) - f(x - 2 * h)
    ) / (12 * h * h)


def _d3_7pt(f, x, h):
    return (
        -f(x + 3 * h)
        + 8 * f(x + 2 * h)
        - 13 * f(x + h)
        + 13 * f(x - h)
        - 8 * f(x - 2 * h)
        + f(x - 3 * h)
    ) / (8 * h**3)


CASES = [
    (mat.name, lam)
    for mat in m.MATERIALS
    for lam in (400e-9, 800e-9, 1030e-9)
    if m.in_range(mat, lam)
]


def _step(name: str, scale: float) -> float:
    # Air's index differs from 1 by ~3e-4 only, so its finite differences
    # need a wider step to stay above rounding noise.
    return scale * (3.0 if name == "air" else 1.0)


@pytest.mark.parametrize(("name", "lam"), CASES)
def test_gvd_analytic_matches_finite_difference(name: str, lam: float) -> None:
    def n_of(x):
        return m.refractive_index(name, x)

    d2n = _d2_5pt(n_of, lam, _step(name, 3e-3) * lam)
    numeric = lam**3 / (2 * np.pi * c**2) * d2n
    assert m.gvd(name, lam, c) == pytest.approx(numeric, rel=1e-6)


@pytest.mark.parametrize(("name", "lam"), CASES)
def test_group_index_matches_finite_difference(name: str, lam: float) -> None:
    def n_of(x):
        return m.refractive_index(name, x)

    numeric = n_of(lam) - lam * _d1_5pt(n_of, lam, 1e-3 * lam)
    assert m.group_index(name, lam) == pytest.approx(numeric, rel=1e-9)


@pytest.mark.parametrize(("name", "lam"), CASES)
def test_gdd_and_tod_match_spectral_phase(name: str, lam: float) -> None:
    # Spectral phase of a plate: phi(w) = n(2 pi c / w) w L / c.
    # GDD = d2phi/dw2 and TOD = d3phi/dw3, by finite differences in w.
    length = 1e-3
    w0 = 2 * np.pi * c / lam

    def phi(w):
        return m.refractive_index(name, 2 * np.pi * c / w) * w * length / c

    h = _step(name, 1e-2) * w0
    assert m.gdd(name, lam, length, c) == pytest.approx(_d2_5pt(phi, w0, h), rel=1e-6)
    # third derivative: tolerance 1e-5 (truncation/rounding of the stencil)
    assert m.tod(name, lam, length, c) == pytest.approx(_d3_7pt(phi, w0, h), rel=1e-5)


# --- vectorisation and validity range ----------------------------------------


def test_vectorised_matches_scalar() -> None:
    lam = np.linspace(500e-9, 1500e-9, 7)
    arr = m.gvd("fused_silica", lam, c)
    assert isinstance(arr, np.ndarray) and arr.shape == lam.shape
    np.testing.assert_allclose(arr, [m.gvd("fused_silica", x, c) for x in lam])
    assert isinstance(m.refractive_index("fused_silica", 800e-9), float)


def test_in_range() -> None:
    # Malitson 1965 range 0.21-3.71 um; Ciddor 1996 range 0.23-1.69 um.
    assert m.in_range("fused_silica", 800e-9)
    assert not m.in_range("fused_silica", 5e-6)
    assert not m.in_range("air", 2e-6)
    assert m.in_range("air", np.array([400e-9, 1.6e-6]))
    assert not m.in_range("air", np.array([400e-9, 2e-6]))


def test_nonpositive_wavelength_rejected() -> None:
    with pytest.raises(ValueError):
        m.refractive_index("fused_silica", 0.0)


# --- lookup ----------------------------------------------------------------


@pytest.mark.parametrize(
    ("query", "name"),
    [
        ("fused_silica", "fused_silica"),
        ("Fused Silica", "fused_silica"),
        ("SiO2", "fused_silica"),
        ("N-BK7", "n_bk7"),
        ("bk7", "n_bk7"),
        ("CaF2", "calcium_fluoride"),
        ("Al2O3", "sapphire"),
        ("AIR", "air"),
        (" h2o ", "water"),
    ],
)
def test_lookup_names_and_aliases(query: str, name: str) -> None:
    assert m.lookup(query).name == name


def test_lookup_unknown_suggests() -> None:
    with pytest.raises(KeyError) as info:
        m.lookup("fused_silca")
    message = str(info.value)
    assert "Did you mean 'fused_silica'" in message
    assert "n_bk7" in message  # known names are listed


def test_ids_are_unique() -> None:
    ids = [i for mat in m.MATERIALS for i in (mat.name, *mat.aliases)]
    assert len(ids) == len(set(ids))


def test_every_row_cites_sources() -> None:
    for mat in m.MATERIALS:
        assert mat.source
        if mat.n2 is not None:
            assert mat.n2_source and mat.n2_wavelength_m


# --- __post_init__ validation ------------------------------------------------

GOOD = m.lookup("fused_silica")


@pytest.mark.parametrize(
    "changes",
    [
        {"coefficients": (0.6961663, 0.0684043, 0.4079426)},  # odd count
        {"formula": "ciddor_air"},  # 6 coefficients for a 4-coefficient formula
        {"formula": "cauchy"},  # unknown formula
        {"valid_range_um": (3.71, 0.21)},  # reversed range
        {"valid_range_um": (0.05, 3.71)},  # resonance 0.0684 um inside range
        {"coefficients": (0.6961663, -0.0684043)},  # negative resonance term
        {"n2": (3e-20, 2e-20)},  # low > high
        {"n2": (-1e-20, 2e-20)},  # negative n2
        {"n2_source": ""},  # n2 without citation
        {"n2_wavelength_m": None},  # n2 without wavelength
        {"name": "Fused Silica"},  # not snake_case
        {"aliases": ("fs-1",)},  # alias not snake_case
        {"source": ""},  # no citation
    ],
)
def test_post_init_rejects_malformed_rows(changes: dict) -> None:
    with pytest.raises(ValueError):
        dataclasses.replace(GOOD, **changes)


def test_material_is_frozen() -> None:
    with pytest.raises(dataclasses.FrozenInstanceError):
        GOOD.name = "other"  # type: ignore[misc]
