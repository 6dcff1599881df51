"""Physical limits and strong-field figures, each against its published formula by hand.

Sources: Marburger's critical power P_cr = 3.77 λ²/(8π n0 n2) and collapse distance
(J. H. Marburger, Prog. Quantum Electron. 4, 35 (1975)); the ponderomotive rule
U_p ≈ 9.33e-14 I[W/cm²] λ²[µm²] eV and a0 ≈ 0.855 λ[µm] √(I/1e18 W/cm²) (published rules
of the field, from memory); the Keldysh parameter (Keldysh 1965) and the three-step cutoff
I_p + 3.17 U_p (Corkum 1993); argon's ionization energy 15.76 eV (NIST ASD, from memory).
"""

import math

import pytest

from speccheck.physics import hazards
from speccheck.physics.materials import refractive_index

from conftest import cell


def test_critical_power_of_fused_silica_at_800_nm_is_a_few_mw():
    # By hand: 3.77 × (0.8e-6)² / (8π × 1.4533 × 2.5e-20) = 2.64 MW.
    p = hazards.critical_power(800e-9, 1.4533, 2.5e-20)
    assert p == pytest.approx(3.77 * 0.64e-12 / (8 * math.pi * 1.4533 * 2.5e-20))
    assert 2e6 < p < 4e6


def test_critical_power_of_air_at_800_nm_is_a_few_gw():
    p = hazards.critical_power(800e-9, 1.0003, 3.2e-23)
    assert 2e9 < p < 4e9


def test_marburger_collapse_distance_by_hand():
    # z_f = 0.367 k a² / √((√(P/Pcr) − 0.852)² − 0.0219) with a the 1/e intensity radius,
    # a² = w²/2 for the 1/e² radius w = 1 mm (the radius settled in test_self_focusing_nlse.py);
    # P/Pcr = 100, k = 2π/λ.
    k = 2 * math.pi / 800e-9
    expected = 0.367 * k * 1e-6 / 2 / math.sqrt((10 - 0.852) ** 2 - 0.0219)
    assert hazards.collapse_distance(100.0, 1.0, 800e-9, 1.0, 1e-3) == pytest.approx(expected)
    assert hazards.collapse_distance(0.5, 1.0, 800e-9, 1.0, 1e-3) == math.inf


def test_b_integral_by_hand():
    # (2π/λ) n2 I L = 2π/0.8e-6 × 2.5e-20 × 1e15 W/m² × 0.01 m = 1.963 rad.
    assert hazards.b_integral(800e-9, 2.5e-20, 1e15, 0.01) == pytest.approx(1.9635, rel=1e-4)


def test_ponderomotive_energy_and_a0_match_the_published_rules(units):
    k, ev = units.constants, units.constants.e
    intensity = 1e14 * 1e4  # 1e14 W/cm² in W/m²
    up = hazards.ponderomotive_energy(intensity, 800e-9, k) / ev
    assert up == pytest.approx(9.33e-14 * 1e14 * 0.8**2, rel=2e-3)  # 5.97 eV
    a0 = hazards.vector_potential(1e18 * 1e4, 800e-9, k)
    assert a0 == pytest.approx(0.855 * 0.8, rel=2e-3)


def test_keldysh_and_cutoff_in_argon(units):
    ev = units.constants.e
    up = hazards.ponderomotive_energy(1e18, 800e-9, units.constants)
    ip = hazards.IONIZATION_ENERGY_EV["argon"] * ev
    assert hazards.keldysh(ip, up) == pytest.approx(math.sqrt(15.76 / (2 * 5.97)), rel=3e-3)
    assert hazards.hhg_cutoff(ip, up) / ev == pytest.approx(15.76 + 3.17 * 5.97, rel=3e-3)


def test_damage_thresholds_scale_only_for_long_pulses():
    assert hazards.scaled_threshold(1.0, 10e-9, 40e-9) == (pytest.approx(2.0), "scaled by √(τ/τ_ref)")
    assert hazards.scaled_threshold(1.0, 150e-15, 30e-15)[1] == "does not transfer"
    assert hazards.scaled_threshold(1.0, 150e-15, 155e-15)[1] == "as rated"


LASER = """
laser:
  wavelength: 800 nm
  repetition_rate: 1 kHz
  pulse_energy: 2 mJ
  pulse_duration: 40 fs
  pulse_shape: gaussian
  beam_diameter: 2 mm
  beam_profile: gaussian
  m2: 1
path:
"""


def test_a_thick_glass_rod_self_focuses(check):
    r = check(LASER + "  - {name: rod, kind: material, material: n_bk7, thickness: 50 mm}\n")
    rules = [f.rule for f in r.findings]
    assert "self-focusing" in rules and "b-integral" in rules
    assert cell(r, "critical_power", "rod").value == pytest.approx(
        hazards.critical_power(800e-9, float(refractive_index("n_bk7", 800e-9)), 3.4e-20), rel=1e-6)


def test_a_thin_window_above_the_critical_power_does_not_collapse(check):
    r = check(LASER.replace("beam_diameter: 2 mm", "beam_diameter: 20 mm")
              + "  - {name: w, kind: material, material: fused_silica, thickness: 1 mm}\n")
    rules = [f.rule for f in r.findings]
    assert "self-focusing-risk" in rules and "self-focusing" not in rules


def test_long_air_paths_are_a_warning(check):
    r = check(LASER.replace("beam_diameter: 2 mm", "beam_diameter: 1 mm")
              + "  - {name: air, kind: material, material: air, thickness: 20 m}\n")
    assert "self-focusing-air" in [f.rule for f in r.findings]


def test_the_b_integral_accumulates_over_stages(check):
    r = check(LASER.replace("beam_diameter: 2 mm", "beam_diameter: 10 mm")
              + "  - {name: w1, kind: material, material: fused_silica, thickness: 5 mm}\n"
              + "  - {name: m, kind: optic}\n"
              + "  - {name: w2, kind: material, material: fused_silica, thickness: 5 mm}\n")
    b1, b2 = cell(r, "b_integral", "w1").value, cell(r, "b_integral", "w2").value
    assert cell(r, "b_integral_total", "m").value == pytest.approx(b1)
    assert cell(r, "b_integral_total", "w2").value == pytest.approx(b1 + b2)


def test_a_mirror_beyond_its_rated_fluence(check):
    # Incident peak fluence 2E/(πw²) = 2 × 2 mJ / (π × 0.01 cm²) = 0.127 J/cm².
    r = check(LASER + "  - name: mirror\n    kind: optic\n"
                      "    damage_threshold: {fluence: 0.1 J/cm^2, pulse_duration: 40 fs}\n")
    (finding,) = [f for f in r.findings if f.rule.startswith("optic-damage")]
    assert finding.rule == "optic-damage" and "0.127" in finding.message


def test_a_mirror_inside_its_rating_but_within_the_safety_factor(check):
    r = check(LASER + "  - name: mirror\n    kind: optic\n    damage_threshold: {fluence: 0.2 J/cm^2}\n")
    assert "optic-damage-margin" in [f.rule for f in r.findings]


def test_a_rating_for_another_short_duration_does_not_transfer(check):
    r = check(LASER + "  - name: mirror\n    kind: optic\n"
                      "    damage_threshold: {fluence: 1 J/cm^2, pulse_duration: 10 ns}\n")
    (finding,) = [f for f in r.findings if "damage" in f.rule]
    assert finding.rule == "damage-rating-not-transferable" and "does not transfer" in finding.message


def test_a_focus_below_the_diffraction_limit_is_impossible(check):
    # 4 λ f / (π D) = 4 × 0.8 µm × 100 mm / (π × 2 mm) = 50.9 µm.
    r = check(LASER + "  - name: lens\n    kind: focus\n    focal_length: 100 mm\n"
                      "    measured: {beam_diameter: 10 µm}\n")
    assert "spot-below-diffraction-limit" in [f.rule for f in r.findings]
    ok = check(LASER + "  - name: lens\n    kind: focus\n    focal_length: 100 mm\n"
                       "    measured: {beam_diameter: 52 µm}\n")
    assert not [f for f in ok.findings if f.severity == "error"]
    assert cell(ok, "beam_diameter", "lens").value == pytest.approx(52e-6)  # the measured spot, narrowed
    # larger than M² = 1 allows: the measurement contradicts the carried beam (a larger M², or a
    # misplaced camera), whatever the kind of the stage
    wide = check(LASER + "  - name: lens\n    kind: focus\n    focal_length: 100 mm\n"
                         "    measured: {beam_diameter: 200 µm}\n")
    assert [f.rule for f in wide.findings if f.severity == "error"] == ["measured-mismatch"]
    # with M² unstated the spot has no upper end, and a wide one is possible
    loose = check(LASER.replace("  m2: 1\n", "") + "  - name: lens\n    kind: focus\n    focal_length: 100 mm\n"
                  "    measured: {beam_diameter: 200 µm}\n")
    assert not [f for f in loose.findings if f.severity == "error"]


def test_a_focus_tighter_than_lambda_over_pi_is_noted(check):
    r = check(LASER.replace("beam_diameter: 2 mm", "beam_diameter: 50 mm")
              + "  - {name: lens, kind: focus, focal_length: 10 mm}\n")
    assert "non-paraxial-focus" in [f.rule for f in r.findings]


def test_strong_field_figures_at_the_target(check):
    r = check(LASER.replace("beam_diameter: 2 mm", "beam_diameter: 10 mm")
              + "  - {name: lens, kind: focus, focal_length: 1000 mm}\ntarget:\n  gas: argon\n")
    (finding,) = [f for f in r.findings if f.rule == "strong-field-figures"]
    assert "Keldysh" in finding.message and "cutoff" in finding.message
    sheet = r.sheet["lens"]
    up = sheet["ponderomotive_energy"].value
    intensity = sheet["peak_intensity"].value
    assert up / 1.602176634e-19 == pytest.approx(9.33e-14 * intensity * 1e-4 * 0.64, rel=3e-3)
    assert sheet["hhg_cutoff_energy"].value == pytest.approx(sheet["ionization_potential"].value + 3.17 * up)
    # the highest harmonic at or below the cutoff, and odd (a gas gives odd orders only): by hand from the sheet
    ratio = sheet["hhg_cutoff_energy"].value / sheet["photon_energy"].value
    odd = max(n for n in range(1, int(ratio) + 1, 2))
    assert f"order {odd}," in finding.message and odd % 2 == 1 and odd <= ratio < odd + 2


def test_a0_near_one_is_noted(check):
    r = check(LASER.replace("pulse_energy: 2 mJ", "pulse_energy: 2 J").replace("beam_diameter: 2 mm",
              "beam_diameter: 50 mm") + "  - {name: lens, kind: focus, focal_length: 200 mm}\ntarget: {}\n")
    assert "relativistic-intensity" in [f.rule for f in r.findings]


def test_the_barrier_suppression_intensity_agrees_with_the_published_rule_and_table(units):
    k = units.constants
    for gas, ev in hazards.IONIZATION_ENERGY_EV.items():
        got = hazards.barrier_suppression_intensity(ev * k.e, k) / 1e4  # W/cm²
        # the atomic-units rule of thumb I_BSI ≈ 4.00e9 (I_p/eV)^4 W/cm² (Augst et al. 1989)
        assert got == pytest.approx(4.00e9 * ev**4, rel=0.01), gas
    # Augst et al. give about 2.5e14 W/cm² for argon and 1.4e15 for helium (from memory)
    assert hazards.barrier_suppression_intensity(15.760 * k.e, k) / 1e4 == pytest.approx(2.5e14, rel=0.05)
    assert hazards.barrier_suppression_intensity(24.587 * k.e, k) / 1e4 == pytest.approx(1.4e15, rel=0.05)


def test_a0_by_polarization_against_the_published_rule(units):
    k = units.constants
    # linear light: a0 ≈ 0.855 λ[µm] √(I / 1e18 W/cm²) (a published rule of the field)
    lin = hazards.vector_potential(1e18 * 1e4, 0.8e-6, k)
    assert lin == pytest.approx(0.855 * 0.8, rel=0.01)
    # circular light of the same intensity: each component carries half of it
    assert hazards.vector_potential(1e18 * 1e4, 0.8e-6, k, "circular") == pytest.approx(lin / math.sqrt(2))


def test_the_b_integral_message_names_the_effective_length_where_the_beam_converges_in_the_plate(check):
    # a plate just before a focus: the beam narrows inside it, so ∫I dz is the entrance intensity times a
    # Kerr length longer than the plate (tests/test_gaussian_beam.py checks that length by quadrature);
    # a collimated plate says only the formula
    r = check(LASER + "  - {name: lens, kind: lens, focal_length: 60 mm}\n"
                      "  - {name: gap, kind: propagation, distance: 30 mm}\n"
                      "  - {name: plate, kind: material, material: fused_silica, thickness: 20 mm}\n")
    (finding,) = [f for f in r.findings if f.rule == "b-integral"]
    assert "n2 I L_eff" in finding.message and "for the 20 mm plate" in finding.message
    collimated = check(LASER + "  - {name: rod, kind: material, material: n_bk7, thickness: 50 mm}\n")
    (plain,) = [f for f in collimated.findings if f.rule == "b-integral"]
    assert "B = (2π/λ) Σ n2 ∫ I dz)" in plain.message and "L_eff" not in plain.message
