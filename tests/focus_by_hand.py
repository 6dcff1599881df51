"""The waist behind a thin lens, by hand, for tests that check what the path computes there.

A beam at its waist (1/e² radius w, Rayleigh range z_R = πw²/(M²λ)) on a thin lens of focal length f
comes to a waist of radius w0' = w / √(1 + (z_R/f)²) (S. A. Self, Appl. Opt. 22, 658 (1983), eq. 9b with
the input waist on the lens; Kogelnik and Li, Appl. Opt. 5, 1550 (1966)). Far from z_R ≫ f this is the
familiar 2M²λf/(πD); the exact form differs from it by (f/z_R)²/2, about 1e-4 for the specs here, which
is more than the tests' tolerances. This is the closed form the path's ABCD propagation is checked against.
"""

from __future__ import annotations

import math
import textwrap

# The laser of the focus tests (remedies, solve): 100 µJ, 300 fs Gaussian, 5 mm at its waist, M² 1,
# as the top of a spec; a test adds its path and targets.
FOCUS_LASER = "spec_version: 1\n" + textwrap.dedent("""\
    laser:
      wavelength: 1030 nm
      repetition_rate: 10 kHz
      pulse_energy: 100 µJ
      pulse_duration: 300 fs
      pulse_shape: gaussian
      beam_diameter: 5 mm
      m2: 1
    """)


def waist_radius(diameter: float, f: float, wavelength: float = 1030e-9, m2: float = 1.0) -> float:
    """1/e² radius of the waist behind a thin lens for a beam of 1/e² ``diameter`` at its waist on it."""
    w = diameter / 2
    z_r = math.pi * w ** 2 / (m2 * wavelength)
    return w / math.sqrt(1 + (z_r / f) ** 2)


def inverse_square_waist(diameter: float, f: float, wavelength: float = 1030e-9, m2: float = 1.0) -> float:
    """1/w0'² = (πw/(M²λf))² + 1/w², the form in which intensity at the waist is solved for f or D."""
    w = diameter / 2
    return (math.pi * w / (m2 * wavelength * f)) ** 2 + 1 / w ** 2


def focal_length_for(inverse_square: float, diameter: float, wavelength: float = 1030e-9, m2: float = 1.0) -> float:
    """The focal length at which 1/w0'² takes a given value (the inverse of ``inverse_square_waist``)."""
    w = diameter / 2
    return math.pi * w / (m2 * wavelength) / math.sqrt(inverse_square - 1 / w ** 2)


def diameter_for(inverse_square: float, f: float, wavelength: float = 1030e-9, m2: float = 1.0) -> float:
    """The beam diameter at the lens at which 1/w0'² takes a given value: a x + 1/x = c with x = w²,
    a = (π/(M²λf))², the larger root (the far-field branch, where a larger beam gives a smaller spot)."""
    a = (math.pi / (m2 * wavelength * f)) ** 2
    x = (inverse_square + math.sqrt(inverse_square ** 2 - 4 * a)) / (2 * a)
    return 2 * math.sqrt(x)


def m2_for(inverse_square: float, diameter: float, f: float, wavelength: float = 1030e-9) -> float:
    """The M² at which 1/w0'² takes a given value."""
    w = diameter / 2
    return math.pi * w / (wavelength * f) / math.sqrt(inverse_square - 1 / w ** 2)
