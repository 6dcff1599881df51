"""The material table: one row per optical material, with its published dispersion formula,
validity range and nonlinear index, each with its source (``materials`` computes with it)."""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

FORMULAS: tuple[str, ...] = ("sellmeier", "sellmeier_pole", "ciddor_air")

_ID_PATTERN = re.compile(r"^[a-z0-9]+(?:_[a-z0-9]+)*$")


def rational_terms(material: Material) -> tuple[list[float], list[float]]:
    """Map any formula to f(x) = sum b_i x / (x - c_i), x = lambda^2 in um^2."""
    coeffs = material.coefficients
    first, second = list(coeffs[0::2]), list(coeffs[1::2])
    if material.formula == "sellmeier":
        return first, second
    if material.formula == "sellmeier_pole":
        return first, [lam**2 for lam in second]
    # ciddor_air: A / (K - 1/x) = (A/K) x / (x - 1/K)
    return [a / k for a, k in zip(first, second)], [1.0 / k for k in second]


@dataclass(frozen=True)
class Material:
    """One optical material: published dispersion formula plus n2 range.

    Attributes:
        name: snake_case identifier, e.g. ``"fused_silica"``.
        label: human-readable name.
        aliases: extra accepted identifiers (snake_case).
        formula: one of :data:`FORMULAS`.
        coefficients: formula coefficients as published (micrometre units).
        valid_range_um: ``(lo, hi)`` published validity range in micrometres.
        source: citation of the dispersion formula.
        n2: ``(low, high)`` nonlinear index in m^2/W, or ``None`` when no
            value with a checked published source is stored.
        n2_wavelength_m: wavelength (m) at which the n2 range applies.
        n2_source: citation(s) for the n2 range.
    """

    name: str
    label: str
    aliases: tuple[str, ...]
    formula: str
    coefficients: tuple[float, ...]
    valid_range_um: tuple[float, float]
    source: str
    n2: tuple[float, float] | None
    n2_wavelength_m: float | None
    n2_source: str

    def __post_init__(self) -> None:
        for ident in (self.name, *self.aliases):
            if not _ID_PATTERN.match(ident):
                raise ValueError(f"material id {ident!r} is not snake_case")
        if not self.label.strip():
            raise ValueError(f"{self.name}: empty label")
        if not self.source.strip():
            raise ValueError(f"{self.name}: empty source citation")
        if self.formula not in FORMULAS:
            raise ValueError(
                f"{self.name}: unknown formula {self.formula!r}; "
                f"expected one of {', '.join(FORMULAS)}"
            )
        coeffs = self.coefficients
        if not all(isinstance(v, (int, float)) and math.isfinite(v) for v in coeffs):
            raise ValueError(f"{self.name}: coefficients must be finite numbers")
        if self.formula == "ciddor_air":
            if len(coeffs) != 4:
                raise ValueError(
                    f"{self.name}: formula 'ciddor_air' needs 4 coefficients, "
                    f"got {len(coeffs)}"
                )
            if any(v <= 0 for v in coeffs):
                raise ValueError(f"{self.name}: 'ciddor_air' coefficients must be > 0")
        else:
            if len(coeffs) < 2 or len(coeffs) % 2:
                raise ValueError(
                    f"{self.name}: formula {self.formula!r} needs an even number "
                    f"(>= 2) of coefficients, got {len(coeffs)}"
                )
            if any(v <= 0 for v in coeffs[1::2]):
                raise ValueError(f"{self.name}: resonance terms must be > 0")
        lo, hi = self.valid_range_um
        if not (0 < lo < hi and math.isfinite(hi)):
            raise ValueError(
                f"{self.name}: valid_range_um must be 0 < lo < hi, got {(lo, hi)}"
            )
        # No resonance may fall inside the validity range.
        _, c_terms = rational_terms(self)
        if any(lo**2 <= ci <= hi**2 for ci in c_terms):
            raise ValueError(f"{self.name}: a resonance lies inside valid_range_um")
        if self.n2 is None:
            if self.n2_wavelength_m is not None:
                raise ValueError(f"{self.name}: n2_wavelength_m given without n2")
        else:
            n2_lo, n2_hi = self.n2
            if not (0 < n2_lo <= n2_hi and math.isfinite(n2_hi)):
                raise ValueError(
                    f"{self.name}: n2 must be 0 < low <= high, got {self.n2}"
                )
            if self.n2_wavelength_m is None or not self.n2_wavelength_m > 0:
                raise ValueError(f"{self.name}: n2 needs a positive n2_wavelength_m")
            if not self.n2_source.strip():
                raise ValueError(f"{self.name}: n2 needs an n2_source citation")


MATERIALS: tuple[Material, ...] = (
    Material(
        name="fused_silica",
        label="Fused silica",
        aliases=("silica", "fused_quartz", "sio2"),
        formula="sellmeier_pole",
        # I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965), 20 °C:
        # B_i and resonance wavelengths L_i (um) as printed there.
        coefficients=(
            0.6961663, 0.0684043,  # Malitson 1965
            0.4079426, 0.1162414,  # Malitson 1965
            0.8974794, 9.896161,  # Malitson 1965
        ),
        valid_range_um=(0.21, 3.71),  # Malitson 1965 fit range
        source="I. H. Malitson, J. Opt. Soc. Am. 55, 1205 (1965)",
        # Published n2 near 1 um: 2.14e-20 (DeSalvo et al., IEEE J. Quantum
        # Electron. 32, 1324 (1996), 1064 nm, Z-scan) up to 2.74e-20
        # (Milam, Appl. Opt. 37, 546 (1998), recommended value at 1053 nm).
        # Flom et al., Appl. Opt. 54, F123 (2015) give 2.23e-20 at 1030 nm
        # and 2.07e-20 at 772 nm.
        n2=(2.14e-20, 2.74e-20),
        n2_wavelength_m=1.053e-6,
        n2_source=(
            "R. DeSalvo et al., IEEE J. Quantum Electron. 32, 1324 (1996); "
            "D. Milam, Appl. Opt. 37, 546 (1998); "
            "S. R. Flom et al., Appl. Opt. 54, F123 (2015)"
        ),
    ),
    Material(
        name="n_bk7",
        label="SCHOTT N-BK7",
        aliases=("bk7", "nbk7"),
        formula="sellmeier",
        # SCHOTT optical glass data sheet / catalogue, N-BK7:
        # B_i and C_i (um^2) as printed there.
        coefficients=(
            1.03961212, 0.00600069867,  # SCHOTT N-BK7 data sheet
            0.231792344, 0.0200179144,  # SCHOTT N-BK7 data sheet
            1.01046945, 103.560653,  # SCHOTT N-BK7 data sheet
        ),
        valid_range_um=(0.3, 2.5),  # SCHOTT data sheet range
        source="SCHOTT AG, optical glass data sheet N-BK7 (Sellmeier coefficients)",
        # From memory, not checked: about 3.4e-20 m^2/W at 1064 nm for BK-7,
        # M. J. Weber, D. Milam, W. L. Smith, Opt. Eng. 17, 175463 (1978).
        n2=(3.4e-20, 3.4e-20),
        n2_wavelength_m=1.064e-6,
        n2_source=(
            "from memory (unchecked): M. J. Weber, D. Milam, W. L. Smith, "
            "Opt. Eng. 17, 175463 (1978), BK-7 at 1064 nm"
        ),
    ),
    Material(
        name="sapphire",
        label="Sapphire (ordinary ray)",
        aliases=("al2o3", "sapphire_o"),
        formula="sellmeier_pole",
        # I. H. Malitson and M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972);
        # formula printed in M. J. Dodge, Handbook of Laser Science and
        # Technology Vol. IV, CRC Press (1986), p. 30. Ordinary ray, 20 °C.
        coefficients=(
            1.4313493, 0.0726631,  # Malitson & Dodge 1972 / Dodge 1986
            0.65054713, 0.1193242,  # Malitson & Dodge 1972 / Dodge 1986
            5.3414021, 18.028251,  # Malitson & Dodge 1972 / Dodge 1986
        ),
        valid_range_um=(0.2, 5.0),  # Malitson & Dodge 1972 range
        source=(
            "I. H. Malitson and M. J. Dodge, J. Opt. Soc. Am. 62, 1405 (1972); "
            "M. J. Dodge, Handbook of Laser Science and Technology IV, CRC (1986)"
        ),
        # 2.9e-20 (ordinary ray, R. Adair, L. L. Chase, S. A. Payne,
        # Phys. Rev. B 39, 3337 (1989), 1064 nm) to 3.12e-20 (DeSalvo et al.
        # 1996, extraordinary ray, 1064 nm).
        n2=(2.9e-20, 3.12e-20),
        n2_wavelength_m=1.064e-6,
        n2_source=(
            "R. Adair, L. L. Chase, S. A. Payne, Phys. Rev. B 39, 3337 (1989); "
            "R. DeSalvo et al., IEEE J. Quantum Electron. 32, 1324 (1996)"
        ),
    ),
    Material(
        name="calcium_fluoride",
        label="Calcium fluoride",
        aliases=("caf2", "fluorite"),
        formula="sellmeier_pole",
        # I. H. Malitson, Appl. Opt. 2, 1103 (1963), 24 °C:
        # B_i and resonance wavelengths L_i (um) as printed there.
        coefficients=(
            0.5675888, 0.050263605,  # Malitson 1963
            0.4710914, 0.1003909,  # Malitson 1963
            3.8484723, 34.649040,  # Malitson 1963
        ),
        valid_range_um=(0.23, 9.7),  # Malitson 1963 range
        source="I. H. Malitson, Appl. Opt. 2, 1103 (1963)",
        # 1.26e-20 (Adair, Chase, Payne 1989, 1064 nm, 3 ns) to 1.71e-20
        # (P. Kabaciński et al., Opt. Express 27, 11018 (2019), 1030 nm, 210 fs).
        n2=(1.26e-20, 1.71e-20),
        n2_wavelength_m=1.064e-6,
        n2_source=(
            "R. Adair, L. L. Chase, S. A. Payne, Phys. Rev. B 39, 3337 (1989); "
            "P. Kabaciński et al., Opt. Express 27, 11018 (2019)"
        ),
    ),
    Material(
        name="air",
        label="Standard dry air (15 °C, 101 325 Pa, 450 ppm CO2)",
        aliases=("standard_air", "dry_air"),
        formula="ciddor_air",
        # P. E. Ciddor, Appl. Opt. 35, 1566 (1996), standard-air dispersion:
        # 1e8 (n - 1) = k1/(k0 - s^2) + k3/(k2 - s^2) with k0 = 238.0185,
        # k1 = 5792105, k2 = 57.362, k3 = 167917 (um^-2); stored as
        # (k1*1e-8, k0, k3*1e-8, k2).
        coefficients=(
            0.05792105, 238.0185,  # Ciddor 1996
            0.00167917, 57.362,  # Ciddor 1996
        ),
        valid_range_um=(0.23, 1.69),  # Ciddor 1996 range
        source="P. E. Ciddor, Appl. Opt. 35, 1566 (1996)",
        # 3.01e-23 (Yu. E. Geints et al., Appl. Phys. Lett. 99, 181114 (2011),
        # 40 fs) to 4.0e-23 (E. T. J. Nibbering et al., J. Opt. Soc. Am. B 14,
        # 650 (1997), 120 fs), both at 800 nm. Longer pulses see a larger
        # (rotational Raman) contribution.
        n2=(3.0e-23, 4.0e-23),
        n2_wavelength_m=800e-9,
        n2_source=(
            "Yu. E. Geints et al., Appl. Phys. Lett. 99, 181114 (2011); "
            "E. T. J. Nibbering et al., J. Opt. Soc. Am. B 14, 650 (1997)"
        ),
    ),
    Material(
        name="water",
        label="Water (distilled, 20 °C)",
        aliases=("h2o",),
        formula="sellmeier",
        # M. Daimon and A. Masumura, Appl. Opt. 46, 3811 (2007), 20.0 °C:
        # four-term Sellmeier, B_i and C_i (um^2) as printed there.
        coefficients=(
            5.684027565e-1, 5.101829712e-3,  # Daimon & Masumura 2007
            1.726177391e-1, 1.821153936e-2,  # Daimon & Masumura 2007
            2.086189578e-2, 2.620722293e-2,  # Daimon & Masumura 2007
            1.130748688e-1, 1.069792721e1,  # Daimon & Masumura 2007
        ),
        valid_range_um=(0.182, 1.129),  # Daimon & Masumura 2007 range
        source="M. Daimon and A. Masumura, Appl. Opt. 46, 3811 (2007)",
        # Published n2 of water near 800 nm spreads widely; the range below is
        # from memory (Kerr-lens and Z-scan measurements, about 1.6-4.1e-20 m²/W),
        # not checked against a paper: the widest reasonable bracket.
        n2=(1.6e-20, 4.1e-20),
        n2_wavelength_m=800e-9,
        n2_source="range from memory of published Z-scan / Kerr measurements near 800 nm",
    ),
)
