"""Physical limits a setup can exceed even when its numbers agree, and strong-field figures.

Formulas (each with its source; constants from pint's CODATA values, passed in):

* Self-focusing critical power of a Gaussian beam, Marburger's fit:
  P_cr = 3.77 λ² / (8π n0 n2), and the distance at which a collimated beam above it collapses,
  z_f = 0.367 k a² / √((√(P/P_cr) − 0.852)² − 0.0219)  (J. H. Marburger, Prog. Quantum
  Electron. 4, 35 (1975)), with a the 1/e intensity radius, a = w/√2 for the 1/e² radius w, so
  that k a² is the Rayleigh range π n0 w²/λ (tests/test_self_focusing_nlse.py settles the radius
  against a numerical solution of the nonlinear Schrödinger equation).  Above P_cr a stage is
  reported as self-focusing when z_f is shorter than the stage; otherwise the beam does not
  collapse there and the B-integral decides.
* B-integral: B = (2π/λ) Σ n2 I_peak L (the accumulated nonlinear phase; a few radians is
  the usual design limit for amplifiers: common practice).
* Laser-induced damage: the peak fluence on an optic against its rated threshold; for pulses
  longer than about 10 ps the threshold scales as √(τ/τ_ref) (common practice); for shorter
  pulses a rating does not transfer between durations.
* Ponderomotive energy U_p = e² E² / (4 m_e ω²) = e² I λ² / (8π² ε0 m_e c³)
  (≈ 9.33e-14 I[W/cm²] λ²[µm²] eV, a published rule of the field).
* Keldysh parameter γ = √(I_p / (2 U_p)) (L. V. Keldysh, Sov. Phys. JETP 20, 1307 (1965)).
* High-harmonic cutoff I_p + 3.17 U_p (three-step model: P. B. Corkum, Phys. Rev. Lett. 71,
  1994 (1993); J. L. Krause et al., Phys. Rev. Lett. 68, 3535 (1992)).
* Normalized vector potential a0 = e E / (m_e ω c) ≈ 0.855 λ[µm] √(I / 10^18 W/cm²).
"""

from __future__ import annotations

import math

MARBURGER = 3.77  # Marburger's constant for a Gaussian beam
DAMAGE_SCALING_ABOVE = 10e-12  # s: √τ scaling of damage thresholds is used only above this (common practice)
B_INTEGRAL_LIMIT = 3.0  # rad, default warning level (common practice in amplifier design)
DAMAGE_SAFETY_FACTOR = 2.0  # default margin below a rated threshold (common practice)
STRONG_FIELD_FROM = 1e16  # W/m² (1e12 W/cm²): figures are shown from this intensity on
A0_NOTE_FROM = 0.3  # a0 at which the relativistic regime is near enough to note

# First ionization energies in eV, NIST Atomic Spectra Database (ground-state ionization
# energies; from memory, to the digits shown).
IONIZATION_ENERGY_EV = {
    "helium": 24.587,
    "neon": 21.565,
    "argon": 15.760,
    "krypton": 14.000,
    "xenon": 12.130,
}
GAS_ALIASES = {"he": "helium", "ne": "neon", "ar": "argon", "kr": "krypton", "xe": "xenon"}


def critical_power(wavelength: float, n0: float, n2: float) -> float:
    return MARBURGER * wavelength**2 / (8.0 * math.pi * n0 * n2)


def collapse_distance(power: float, critical: float, wavelength: float, n0: float, radius: float) -> float:
    """Marburger's self-focusing distance of a collimated Gaussian beam; infinite below P_cr.

    z_f = 0.367 k a² / √((√(P/P_cr) − 0.852)² − 0.0219), k = 2π n0/λ, where ``a`` is the beam's
    1/e *intensity* radius, I ∝ exp(−r²/a²).  ``radius`` is the 1/e² intensity radius w that the
    callers carry, so a² = w²/2 and k a² is the Rayleigh range π n0 w²/λ.  Restatements of the fit
    differ on this radius by a factor 2 in z_f; a split-step solution of the paraxial nonlinear
    Schrödinger equation (tests/test_self_focusing_nlse.py) agrees with the 1/e radius to within
    8 % at P/P_cr = 2, 4 and 10, and is half the distance the 1/e² radius would give."""
    ratio = power / critical
    root = (math.sqrt(ratio) - 0.852) ** 2 - 0.0219
    if ratio <= 1.0 or root <= 0:
        return math.inf
    a_squared = radius**2 / 2.0  # 1/e intensity radius from the 1/e² one
    return 0.367 * (2.0 * math.pi * n0 / wavelength) * a_squared / math.sqrt(root)


def b_integral(wavelength: float, n2: float, intensity: float, length: float) -> float:
    return 2.0 * math.pi / wavelength * n2 * intensity * length


def scaled_threshold(fluence: float, tau_ref: float | None, tau: float | None) -> tuple[float, str]:
    """The rated damage fluence at the pulse duration used, and how it was obtained."""
    if tau_ref is None or tau is None or abs(tau / tau_ref - 1.0) < 0.1:
        return fluence, "as rated"
    if tau > DAMAGE_SCALING_ABOVE and tau_ref > DAMAGE_SCALING_ABOVE:
        return fluence * math.sqrt(tau / tau_ref), "scaled by √(τ/τ_ref)"
    return fluence, "does not transfer"


def ponderomotive_energy(intensity: float, wavelength: float, k) -> float:
    """U_p in J for intensity in W/m² and wavelength in m (k: CODATA constants)."""
    return k.e**2 * intensity * wavelength**2 / (8.0 * math.pi**2 * k.eps0 * k.m_e * k.c**3)


def vector_potential(intensity: float, wavelength: float, k, polarization: str = "linear") -> float:
    """a0 = e E0 / (m_e ω c) with E0 the peak field of the (linear) wave, I = c ε0 E0²/2; for circular
    light of the same intensity each of the two field components has E0/√2, so a0 is 1/√2 of the
    linear value (the convention that keeps a0 = 1 the threshold of relativistic motion for both).
    U_p = e² E0² / (4 m_e ω²) depends only on the intensity, whatever the polarization."""
    field = math.sqrt(2.0 * intensity / (k.c * k.eps0))
    omega = 2.0 * math.pi * k.c / wavelength
    a0 = k.e * field / (k.m_e * omega * k.c)
    return a0 / math.sqrt(2.0) if polarization == "circular" else a0


def barrier_suppression_intensity(ionization: float, k, charge: int = 1, polarization: str = "linear") -> float:
    """The intensity (W/m²) at which the laser field lowers the Coulomb barrier below the ground
    state: F = π ε0 I_p² / (Z e³), I = c ε0 F² / 2 (S. Augst et al., Phys. Rev. Lett. 63, 2212
    (1989); ≈ 4e9 (I_p/eV)⁴ / Z² W/cm²).  Above it the atom is ionized over the barrier."""
    field = math.pi * k.eps0 * ionization**2 / (charge * k.e**3)
    # the peak field must reach F: linear light of intensity c ε0 F²/2 does at its crests; circular
    # light holds |E| = F all the time, which takes c ε0 F² (twice the intensity)
    return (1.0 if polarization == "circular" else 0.5) * k.c * k.eps0 * field**2


def keldysh(ionization: float, up: float) -> float:
    return math.sqrt(ionization / (2.0 * up))


def hhg_cutoff(ionization: float, up: float) -> float:
    return ionization + 3.17 * up
