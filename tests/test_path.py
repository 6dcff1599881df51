"""The beam path: every stage kind, dispersion from glass data, targets, branches.

References: Gaussian-beam optics (1/e² spot diameter 4 M² λ f/(π D), Rayleigh
range π w0²/(M² λ)); the Gaussian-pulse broadening formula
τ = τ0 √(1 + (4 ln2 φ/τ0²)²); GVD of fused silica 36.16 fs²/mm at 800 nm from
Malitson's (1965) Sellmeier coefficients (checked in test_materials.py);
photon-energy conservation 1/λp = 1/λs + 1/λi.
"""

import json
import math

import pytest

from conftest import cell, rules_of

LASER = """
laser:
  wavelength: 800 nm
  repetition_rate: 1 kHz
  average_power: 4 W
  pulse_duration: 30 fs
  pulse_shape: gaussian
  beam_diameter: 10 mm
  beam_profile: gaussian
  m2: 1
"""


def run(check, path: str, target: str = ""):
    return check(LASER + "path:\n" + path + (("target:\n" + target) if target else ""))


def value(result, column, quantity):
    return cell(result, quantity, column).value


def test_optic_and_attenuator_scale_energy_and_power(check):
    r = run(check, "  - {name: m1, kind: optic, transmission: 90%}\n"
                   "  - {name: nd, kind: attenuator, transmission: 10%}\n")
    assert value(r, "m1", "pulse_energy") == pytest.approx(4e-3 * 0.9)
    assert value(r, "nd", "average_power") == pytest.approx(4 * 0.9 * 0.1)
    assert value(r, "nd", "pulse_duration") == pytest.approx(30e-15)


def test_a_pulse_picker_divides_the_rate_and_keeps_the_energy(check):
    r = run(check, "  - {name: picker, kind: pulse_picker, divide_by: 10, transmission: 80%}\n")
    assert value(r, "picker", "repetition_rate") == pytest.approx(100.0)
    assert value(r, "picker", "pulse_energy") == pytest.approx(4e-3 * 0.8)
    assert value(r, "picker", "average_power") == pytest.approx(4 * 0.8 / 10)


@pytest.mark.parametrize("params, energy", [
    ("gain: 5", 20e-3), ("output_energy: 10 mJ", 10e-3), ("output_power: 12 W", 12e-3)])
def test_an_amplifier_by_gain_or_output(check, params, energy):
    r = run(check, f"  - {{name: amp, kind: amplifier, {params}}}\n")
    assert value(r, "amp", "pulse_energy") == pytest.approx(energy)
    assert value(r, "amp", "repetition_rate") == pytest.approx(1e3)


def test_dispersion_broadens_a_transform_limited_gaussian(check):
    # The laser states no bandwidth, so its 30 fs pulse is taken as transform-limited.
    # By hand: 30 fs √(1 + (4 ln2 × 500 / 900)²) = 30 × √(1 + 1.5403²) = 55.09 fs.
    r = run(check, "  - {name: stretch, kind: dispersion, gdd: 500 fs^2}\n")
    expected = 30 * math.sqrt(1 + (4 * math.log(2) * 500 / 900) ** 2)
    assert value(r, "stretch", "pulse_duration") == pytest.approx(expected * 1e-15, rel=1e-9)
    assert cell(r, "net_gdd", "stretch").value == pytest.approx(500e-30)


def test_a_compressor_undoes_the_dispersion(check):
    r = run(check, "  - {name: stretch, kind: dispersion, gdd: 2000 fs^2}\n"
                   "  - {name: comp, kind: compressor, gdd: -2000 fs^2, transmission: 60%}\n")
    assert value(r, "stretch", "pulse_duration") > 100e-15
    assert value(r, "comp", "pulse_duration") == pytest.approx(30e-15)
    assert value(r, "comp", "pulse_energy") == pytest.approx(4e-3 * 0.6)


def test_a_material_stage_takes_its_gdd_from_the_sellmeier_equation(check):
    # Fused silica at 800 nm: GVD 36.16 fs²/mm (from Malitson 1965's coefficients), so 10 mm adds 361.6 fs².
    r = run(check, "  - {name: window, kind: material, material: fused_silica, thickness: 10 mm}\n")
    assert cell(r, "stage_gdd", "window").value == pytest.approx(361.6e-30, rel=2e-3)
    expected = 30 * math.sqrt(1 + (4 * math.log(2) * 361.6 / 900) ** 2)
    assert value(r, "window", "pulse_duration") == pytest.approx(expected * 1e-15, rel=2e-3)


def test_a_chirped_laser_pulse_carries_its_own_gdd(check):
    # 30 nm at 800 nm gives τ_TL = 0.4413/14.05 THz = 31.4 fs; a 35 fs pulse carries
    # φ = τ0²/(4 ln2) √((τ/τ0)² − 1) = 175 fs² (positive chirp assumed); by hand.
    r = check(LASER.replace("pulse_duration: 30 fs", "pulse_duration: 35 fs\n  spectral_bandwidth: 30 nm")
              + "path:\n  - {name: m, kind: dispersion, gdd: 0 fs^2}\n")
    tl = 0.4413 / (299792458 * 30e-9 / 800e-9**2)
    phi = tl**2 / (4 * math.log(2)) * math.sqrt((35e-15 / tl) ** 2 - 1)
    assert cell(r, "net_gdd", "m").value == pytest.approx(phi, rel=2e-3)


def test_a_second_harmonic_halves_the_wavelength(check):
    r = run(check, "  - {name: shg, kind: harmonic, order: 2, efficiency: 40%}\n")
    assert value(r, "shg", "wavelength") == pytest.approx(400e-9)
    assert value(r, "shg", "pulse_energy") == pytest.approx(1.6e-3)
    assert value(r, "shg", "pulse_duration") == pytest.approx(30e-15 / math.sqrt(2))
    assert "stage-model" in [f.rule for f in r.findings]


def test_a_harmonic_order_must_be_2_or_3(check):
    r = run(check, "  - {name: h, kind: harmonic, order: 4, efficiency: 10%}\n")
    assert ("stage-parameter", 12) in rules_of(r)


def test_a_parametric_stage_conserves_photon_energy(check):
    # 1/800 = 1/1300 + 1/λi  ⇒  λi = 1/(1/800 − 1/1300) nm = 2080 nm.
    r = run(check, "  - {name: opa, kind: parametric, signal_wavelength: 1300 nm, output: idler, efficiency: 10%}\n")
    assert value(r, "opa", "wavelength") == pytest.approx(1e-9 / (1 / 800 - 1 / 1300), rel=1e-9)
    # 1/1300 + 1/1500 would need a 696 nm pump, not 800 nm.
    bad = run(check, "  - {name: opa, kind: parametric, signal_wavelength: 1300 nm, idler_wavelength: 1500 nm,"
                     " efficiency: 10%}\n")
    assert "photon-energy-not-conserved" in [f.rule for f in bad.findings]


def test_a_telescope_scales_the_beam(check):
    r = run(check, "  - {name: tel, kind: telescope, magnification: 2.5}\n")
    assert value(r, "tel", "beam_diameter") == pytest.approx(25e-3)


def test_a_focus_gives_the_gaussian_spot_and_rayleigh_range(check):
    # 4 M² λ f / (π D) = 4 × 800e-9 × 0.2 / (π × 0.01) = 20.37 µm for a collimated beam; the waist at the
    # laser's output has z_R = π (5 mm)²/λ = 98 m, so Self's closed form (Appl. Opt. 22, 658 (1983))
    # w0' = w0 / √(1 + (z_R/f)²) differs from it only by 1/√(1 + (f/z_R)²); z_R' = π w0'²/λ = 0.4074 mm.
    r = run(check, "  - {name: lens, kind: focus, focal_length: 200 mm}\n")
    spot = 4 * 800e-9 * 0.2 / (math.pi * 0.01) / math.sqrt(1 + (0.2 / (math.pi * 0.005**2 / 800e-9)) ** 2)
    assert value(r, "lens", "beam_diameter") == pytest.approx(spot, rel=1e-9)
    assert cell(r, "rayleigh_range", "lens").value == pytest.approx(math.pi * (spot / 2) ** 2 / 800e-9)
    # and the intensity there follows from the relation table: 2 P_pk / (π w0²)
    peak = 2 * math.sqrt(math.log(2) / math.pi) * 4e-3 / 30e-15
    assert value(r, "lens", "peak_intensity") == pytest.approx(2 * peak / (math.pi * (spot / 2) ** 2))


def test_a_measured_value_that_disagrees_with_the_path(check):
    r = run(check, "  - name: m1\n    kind: optic\n    transmission: 90%\n    measured:\n"
                   "      average_power: 2 W\n")
    (finding,) = [f for f in r.findings if f.severity == "error"]
    assert finding.rule == "measured-mismatch" and finding.line == 16 and "3.6 W" in finding.message


def test_a_splitter_feeds_two_branches_that_cannot_exceed_the_input(check):
    split = ("  - name: bs\n    kind: splitter\n    ratio: 70%\n    branches:\n"
             "      pump: {path: [{name: pl, kind: focus, focal_length: 100 mm}]}\n"
             "      probe: {path: [{name: window, kind: optic, transmission: 95%}]}\n")
    r = run(check, split)
    assert value(r, "pump", "pulse_energy") == pytest.approx(2.8e-3)
    assert value(r, "probe", "pulse_energy") == pytest.approx(1.2e-3)
    assert value(r, "window", "pulse_energy") == pytest.approx(1.2e-3 * 0.95)
    over = run(check, split.replace("pump: {path", "pump: {fraction: 70%, path").replace(
        "probe: {path", "probe: {fraction: 40%, path"))
    assert "splitter-exceeds-input" in [f.rule for f in over.findings]


def test_targets_met_missed_and_the_costliest_stage(check):
    path = ("  - {name: m1, kind: optic, transmission: 95%}\n"
            "  - {name: nd, kind: attenuator, transmission: 1%}\n"
            "  - {name: lens, kind: focus, focal_length: 200 mm}\n")
    r = run(check, path, "  peak_intensity: '>= 1e17 W/cm^2'\n  pulse_duration: '<= 45 fs'\n")
    rules = {f.rule: f for f in r.findings}
    assert rules["target-met"].message.startswith("target pulse_duration")
    missed = rules["target-not-met"]
    assert "'nd'" in missed.message and "factor 100" in missed.message


def test_a_ten_stage_path_is_checked_end_to_end(check):
    path = "".join(f"  - {s}\n" for s in (
        "{name: periscope, kind: optic, transmission: 96%}",
        "{name: picker, kind: pulse_picker, divide_by: 2}",
        "{name: amp, kind: amplifier, gain: 3}",
        "{name: stretch, kind: dispersion, gdd: 3000 fs^2}",
        "{name: window, kind: material, material: n_bk7, thickness: 5 mm}",
        "{name: comp, kind: compressor, gdd: -3220 fs^2, transmission: 70%}",
        "{name: shg, kind: harmonic, order: 2, efficiency: 30%}",
        "{name: expander, kind: beam_expander, magnification: 2}",
        "{name: turning, kind: optic, transmission: 98%}",
        "{name: lens, kind: focus, focal_length: 250 mm}"))
    r = run(check, path, "  peak_intensity: '>= 1e15 W/cm^2'\n")
    assert list(r.sheet) == ["laser", "periscope", "picker", "amp", "stretch", "window", "comp", "shg",
                             "expander", "turning", "lens"]
    assert not [f for f in r.findings if f.severity == "error"]
    # N-BK7 at 800 nm: 44.65 fs²/mm × 5 mm = 223 fs² (SCHOTT coefficients); 3000 + 223 − 3220 ≈ 3 fs².
    assert abs(cell(r, "net_gdd", "comp").value) < 10e-30
    assert value(r, "lens", "wavelength") == pytest.approx(400e-9)


def test_stage_errors_are_findings(check):
    r = run(check, "  - {name: lens, kind: focus}\n"
                   "  - {name: w, kind: material, material: unobtainium, thickness: 1 mm}\n"
                   "  - {name: o, kind: optic, transmission: 150%}\n"
                   "  - {name: o2, kind: optic, gdd: 100 fs^2}\n"
                   "  - {name: o2, kind: optic}\n"
                   "  - {name: x, kind: mirror}\n")
    got = rules_of(r)
    assert ("stage-parameter", 12) in got and ("unknown-material", 13) in got
    assert ("stage-parameter", 14) in got and ("stage-parameter", 15) in got
    assert ("duplicate-name", 16) in got and ("schema-violation", 17) in got


def test_the_json_sheet_has_one_entry_per_stage_in_path_order(tmp_path):
    import io

    from speccheck.cli import run as cli_run

    spec = tmp_path / "p.yaml"
    spec.write_text("spec_version: 1" + LASER + "path:\n  - {name: a, kind: optic}\n  - {name: b, kind: optic}\n")
    out = io.StringIO()
    cli_run(["check", "--format", "json", str(spec)], stdout=out, stderr=io.StringIO())
    assert list(json.loads(out.getvalue())["files"][0]["sheet"]) == ["laser", "a", "b"]


def test_a_target_before_a_split_is_reported_not_ignored(check):
    r = run(check, "  - name: bs\n    kind: splitter\n    ratio: 50%\n    branches:\n"
                   "      a: {path: [{name: a1, kind: optic}]}\n      b: {path: []}\n",
            "  peak_power: '>= 1 GW'\n")
    assert ("target-unknown", 18) in rules_of(r)


def test_third_order_dispersion_is_accumulated_and_reported(check, units):
    from speccheck.physics import materials

    # TOD of 10 mm fused silica at 800 nm from its Sellmeier equation (27.5 fs³/mm, Malitson 1965,
    # checked in test_materials.py) plus a stage's own 1000 fs³.
    r = run(check, "  - {name: w, kind: material, material: fused_silica, thickness: 10 mm}\n"
                   "  - {name: d, kind: dispersion, gdd: -300 fs^2, tod: 1000 fs^3}\n")
    glass = materials.tod("fused_silica", 800e-9, 0.01, units.constants.c)
    assert glass == pytest.approx(275e-45, rel=0.01)
    assert cell(r, "net_tod", "w").value == pytest.approx(glass)
    assert cell(r, "net_tod", "d").value == pytest.approx(glass + 1000e-45)


@pytest.mark.parametrize("efficiency, impossible", [("70%", True), ("60%", False)])
def test_a_parametric_output_cannot_take_more_than_its_photons_carry(check, efficiency, impossible):
    # Manley–Rowe: the signal at 1300 nm takes at most λp/λs = 800/1300 = 61.5% of the pump energy
    # (J. M. Manley and H. E. Rowe, Proc. IRE 44, 904 (1956); worked by hand)
    result = check(f"""
        laser: {{wavelength: 800 nm, pulse_energy: 1 mJ, repetition_rate: 1 kHz}}
        path:
          - {{name: opa, kind: parametric, signal_wavelength: 1300 nm, output: signal, efficiency: {efficiency}}}
        """)
    found = [f for f in result.findings if f.rule == "manley-rowe-limit"]
    assert bool(found) is impossible
    if found:
        assert "61.5%" in found[0].message and found[0].severity == "error"


@pytest.mark.parametrize("wavelength, bandwidth, outside", [
    ("800 nm", "40 nm", False),
    ("3.5 µm", "100 nm", True),  # beyond N-BK7's fit range (0.3–2.5 µm, SCHOTT catalogue data, from memory)
    ("2.45 µm", "100 nm", True),  # the centre is inside, the energy-carrying part is not
])
def test_a_glass_used_outside_its_dispersion_formula_is_a_warning(check, wavelength, bandwidth, outside):
    from speccheck.physics.materials import lookup

    lo, hi = lookup("n_bk7").valid_range_um
    assert lo < 0.8 < hi < 3.5
    result = check(f"""
        laser: {{wavelength: {wavelength}, spectral_bandwidth: {bandwidth}, pulse_energy: 1 µJ}}
        path:
          - {{name: w, kind: material, material: n_bk7, thickness: 1 mm}}
        """)
    assert bool([f for f in result.findings if f.rule == "outside-dispersion-range"]) is outside


def test_an_intensity_above_the_gas_barrier_suppression_is_a_warning(check):
    # argon's barrier-suppression intensity is about 2.5e14 W/cm² (Augst et al., PRL 63, 2212 (1989))
    def run(energy):
        return check(f"""
            laser: {{wavelength: 800 nm, repetition_rate: 1 kHz, pulse_energy: {energy}, pulse_duration: 30 fs,
                    pulse_shape: gaussian, beam_diameter: 10 mm, beam_profile: gaussian}}
            path:
              - {{name: lens, kind: focus, focal_length: 750 mm}}
            target: {{gas: argon}}
            """)
    assert [f for f in run("1.5 mJ").findings if f.rule == "above-barrier-suppression"]
    assert not [f for f in run("0.1 mJ").findings if f.rule == "above-barrier-suppression"]  # 1.37e14 W/cm²


def test_a_harmonic_beam_is_narrower_by_the_root_of_its_order(check):
    # the n-th power of a Gaussian intensity profile: its 1/e² radius found by bisection on the
    # sampled profile, against w/√n (independent of the code's closed form)
    import numpy as np

    r = np.linspace(0, 3, 300001)
    for n in (2, 3):
        profile = np.exp(-2 * r**2) ** n
        radius = r[np.argmin(abs(profile - np.exp(-2)))]
        assert radius == pytest.approx(1 / math.sqrt(n), rel=1e-4)
    result = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, beam_diameter: 4 mm}
        path:
          - {name: shg, kind: harmonic, order: 2, efficiency: 50%}
        """)
    assert result.sheet["shg"]["beam_diameter"].value == pytest.approx(4e-3 / math.sqrt(2))


def test_circular_light_at_a_gas_target_says_harmonics_are_suppressed(check):
    text = """
        laser: {{wavelength: 800 nm, repetition_rate: 1 kHz, pulse_energy: 0.1 mJ, pulse_duration: 30 fs,
                pulse_shape: gaussian, beam_diameter: 10 mm, beam_profile: gaussian}}
        path:
          - {{name: lens, kind: focus, focal_length: 750 mm}}
        target: {{gas: argon{extra}}}
        """
    (linear,) = [f for f in check(text.format(extra="")).findings if f.rule == "strong-field-figures"]
    (circular,) = [f for f in check(text.format(extra=", polarization: circular")).findings
                   if f.rule == "strong-field-figures"]
    assert "suppressed" in circular.message and "suppressed" not in linear.message
    assert "circular polarization" in circular.message


def test_an_unstated_m2_makes_the_focus_a_bound(check):
    # 4 λ f / (π D) with M² = 1 (Gaussian-beam optics, by hand): 4 · 800 nm · 100 mm / (π · 5 mm) = 20.37 µm
    result = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 100 fs, beam_diameter: 5 mm}
        path:
          - {name: lens, kind: focus, focal_length: 100 mm}
        """)
    spot = result.sheet["lens"]["beam_diameter"]
    # the low end: λ and f at -1 %, D at +5 % (their default tolerances); no upper end
    # (to first order in each: the moves of the propagated beam combine as factors)
    assert spot.low == pytest.approx(4 * 800e-9 * 0.99 * 0.1 * 0.99 / (math.pi * 5e-3 * 1.05), rel=1e-3)
    assert spot.high is None
    # typical: M² = 1 (the exact waist is 1/√(1 + (f/z_R)²) ≈ 1 − 8e-6 of it, z_R = 24.5 m)
    assert spot.value == pytest.approx(4 * 800e-9 * 0.1 / (math.pi * 5e-3), rel=1e-4)
    assert result.sheet["lens"]["peak_intensity"].low is None  # an upper bound only
    assert any(f.rule == "stage-model" and "M² is not stated" in f.message for f in result.findings)


# ------------------------------------------------------------ compressors from their geometry
COMPRESSED = """spec_version: 1
laser:
  wavelength: 800 nm
  pulse_energy: 1 mJ
  repetition_rate: 1 kHz
  spectral_bandwidth: 40 nm
  beam_diameter: 8 mm
path:
"""


def test_a_grating_compressor_adds_treacys_gdd_and_tod(check):
    # Treacy's closed form, double pass (physics/compressors.py, itself tested against the exact phase):
    # GDD = -2 λ³ G / (2π c² d² cos³θd), here recomputed by hand from the grating equation
    lam, d, theta_i, gap = 800e-9, 1e-3 / 1200, math.radians(28), 5.43e-3
    sin_d = lam / d - math.sin(theta_i)
    cos_d = math.sqrt(1 - sin_d**2)
    gdd = -2 * lam**3 * gap / (2 * math.pi * 299792458**2 * d**2 * cos_d**3)
    r = check(COMPRESSED + "  - {name: g, kind: grating_compressor, groove_density: 1200 lines/mm, "
              "incidence_angle: 28 deg, separation: 5.43 mm}\n")
    assert not [f for f in r.findings if f.severity == "error"], r.findings
    assert cell(r, "stage_gdd", "g").value == pytest.approx(gdd, rel=1e-6)
    assert cell(r, "net_tod", "g").value > 0  # a grating pair's TOD has the sign of a glass's


def test_a_grating_compressor_cancels_a_stretcher_but_leaves_the_tod(check):
    # the same pair after +21426 fs² (its own −GDD): the pulse is shortest with the GDD gone, and the
    # grating's TOD leaves it longer than its 23.55 fs transform limit
    r = check(COMPRESSED + "  - {name: s, kind: dispersion, gdd: 21426 fs^2}\n"
              "  - {name: g, kind: grating_compressor, groove_density: 1200 lines/mm, "
              "incidence_angle: 28 deg, separation: 5.43 mm}\n")
    assert abs(cell(r, "net_gdd", "g").value) < 100e-30
    assert 24e-15 < value(r, "g", "pulse_duration") < 60e-15


@pytest.mark.parametrize("angle, says", [("10 deg", "no first diffracted order at 800 nm"),
                                         ("80 deg", "does not exist at 8")])
def test_a_grating_without_a_first_order_is_a_stage_parameter_error(check, angle, says):
    # 2400 lines/mm at 800 nm: sin θd = λ/d − sin θi = 1.92 − sin θi, no order at 10°; at 80° the centre
    # diffracts (0.935) but the red side of a 40 nm spectrum does not (by hand)
    r = check(COMPRESSED + "  - {name: g, kind: grating_compressor, groove_density: 2400 lines/mm, "
              f"incidence_angle: {angle}, separation: 5 mm}}\n")
    assert ("stage-parameter", 9) in rules_of(r)
    assert says in next(f.message for f in r.findings if f.rule == "stage-parameter")


@pytest.mark.parametrize("angle, rule", [("28", "missing-unit"), ("28 furlongs", "invalid-value"),
                                         ("400 deg", "invalid-value")])
def test_an_angle_needs_deg_or_rad(check, angle, rule):
    r = check(COMPRESSED + "  - {name: g, kind: grating_compressor, groove_density: 1200 lines/mm, "
              f"incidence_angle: {angle}, separation: 5 mm}}\n")
    assert (rule, 9) in rules_of(r)


def test_a_prism_compressor_gives_negative_gdd_and_insertion_adds_glass(check):
    base = COMPRESSED + "  - {name: p, kind: prism_compressor, material: fused_silica, apex_separation: 50 cm"
    tip = check(base + "}\n")
    deep = check(base + ", insertion: 5 mm}\n")
    # tip to tip: −21.7 fs²/cm double pass for fused silica at 800 nm (tests/test_compressors.py)
    assert cell(tip, "stage_gdd", "p").value == pytest.approx(-21.67e-30 * 50, rel=0.02)
    # 5 mm insertion: 2 × 2·5 mm/n of extra glass at ≈ 36.2 fs²/mm, about +500 fs²
    extra = cell(deep, "stage_gdd", "p").value - cell(tip, "stage_gdd", "p").value
    assert extra == pytest.approx(4 * 5e-3 / 1.4533 * 36.16e-27, rel=0.05)


def test_a_few_cycle_sech2_pulse_through_glass_is_computed_not_refused(check):
    # a 9.4 fs sech² pulse at 780 nm: its spectrum's far wings reach past fused silica's formula and past
    # zero frequency on the grid, where it carries nothing; that must not stop the stage (found by the
    # benchmark's generated specs)
    r = check("""spec_version: 1
laser:
  wavelength: 780 nm
  pulse_energy: 37.9 nJ
  pulse_duration: 9.4 fs
  spectral_bandwidth: {min: 70.3 nm, typical: 78.1 nm, max: 85.9 nm}
  beam_diameter: 1.4 mm
  pulse_shape: sech2
path:
  - {name: s0, kind: material, material: fused_silica, thickness: 3 mm}
  - {name: s1, kind: compressor, gdd: -50 fs^2, transmission: 80%}
""")
    assert not [f for f in r.findings if f.rule in ("out-of-model-range", "internal-error")], r.findings
    assert value(r, "s0", "pulse_duration") > 9.4e-15


# ---- the laser's own chirp against its stated duration
_CHIRPED = """
laser:
  wavelength: 800 nm
  pulse_energy: 1 mJ
  repetition_rate: 1 kHz
  spectral_bandwidth: 30 nm
{extra}
path:
  - {{name: m, kind: dispersion, gdd: 0 fs^2}}
"""


def test_a_laser_gdd_that_gives_another_duration_is_a_mismatch(check):
    # τ0 = 0.4413 λ²/(c Δλ) = 31.4 fs; 5000 fs² stretches it to τ0 √(1 + (4 ln2·5000/τ0²)²) = 442 fs
    # (the Gaussian closed form, by hand), far from the stated 35 fs
    r = check(_CHIRPED.format(extra="  pulse_duration: 35 fs\n  gdd: 5000 fs^2"))
    mismatch = [f for f in r.findings if f.rule == "laser-chirp-mismatch"]
    assert len(mismatch) == 1 and mismatch[0].line == 8  # spec_version is line 1
    assert "442" in mismatch[0].message or "441" in mismatch[0].message
    # 175 fs² gives 35 fs (the same closed form inverted): no mismatch
    r = check(_CHIRPED.format(extra="  pulse_duration: 35 fs\n  gdd: 175 fs^2"))
    assert "laser-chirp-mismatch" not in [f.rule for f in r.findings]


def test_a_laser_gdd_without_a_duration_says_the_duration_it_gives(check):
    r = check(_CHIRPED.format(extra="  gdd: 5000 fs^2"))
    note = [f for f in r.findings if f.rule == "stage-model" and f.line == 7]
    assert note and ("442" in note[0].message or "441" in note[0].message)
    tl = 0.4413 / (299792458 * 30e-9 / 800e-9**2)
    expected = tl * math.sqrt(1 + (4 * math.log(2) * 5000e-30 / tl**2) ** 2)
    assert cell(r, "pulse_duration", "m").value == pytest.approx(expected, rel=2e-3)
    # the laser column shows it too (from its field, by FFT), and what follows from it
    laser = cell(r, "pulse_duration", "laser")
    assert laser.status == "derived" and laser.value == pytest.approx(expected, rel=2e-3)
    energy = cell(r, "pulse_energy", "laser").value
    assert cell(r, "peak_power", "laser").value == pytest.approx(0.9394 * energy / laser.value, rel=1e-3)


def test_a_duration_at_its_transform_limit_keeps_the_chirp_its_tolerance_allows(check):
    # 31.4 fs ± 10 % on a 31.4 fs transform limit: up to 34.5 fs, i.e. |φ| ≤ τ0²/(4 ln2) √(1.1² − 1) = 163 fs²
    # of either sign (the closed form inverted, by hand).  After +300 fs² the pulse lasts from
    # τ(300 − 163) to τ(300 + 163), not only τ(300).
    tl = 0.4413 / (299792458 * 30e-9 / 800e-9**2)
    r = check(_CHIRPED.format(extra=f"  pulse_duration: {tl * 1e15:.3f} fs ± 10%").replace("gdd: 0 fs^2", "gdd: 300 fs^2 ± 0.1%"))
    phi = tl**2 / (4 * math.log(2)) * math.sqrt(1.1**2 - 1)
    tau = lambda g: tl * math.sqrt(1 + (4 * math.log(2) * g / tl**2) ** 2)  # noqa: E731
    d = cell(r, "pulse_duration", "m")
    assert d.value == pytest.approx(tau(300e-30), rel=2e-3)
    assert d.low == pytest.approx(tau(300e-30 - phi), rel=0.02)
    assert d.high == pytest.approx(tau(300e-30 + phi), rel=0.02)


def test_a_model_failure_in_its_own_words_is_said_at_the_stage():
    from speccheck.checking.failures import failure as _failure
    from speccheck.physics.model_range import OutOfModelRange

    assert _failure(OutOfModelRange("the spectrum reaches zero frequency")) == "the spectrum reaches zero frequency"
    assert _failure(ValueError("math domain error")) == "a number outside a formula's domain"


def test_a_signed_stage_gdd_may_be_given_as_min_and_max(check):
    # the compressor's −5000 fs² ± 1000 fs² as {min, max}: its middle cancels 5000 fs² of laser chirp
    r = check(_CHIRPED.format(extra="  gdd: 5000 fs^2").replace(
        "{name: m, kind: dispersion, gdd: 0 fs^2}", "{name: m, kind: compressor, gdd: {min: -6000 fs^2, max: -4000 fs^2}}"))
    assert not [f for f in r.findings if f.severity == "error"]
    d = cell(r, "pulse_duration", "m")
    tl = 0.4413 / (299792458 * 30e-9 / 800e-9**2)
    # the interval holds the transform limit (GDD 0 inside) and reaches τ(±1000 fs²) (closed form, by hand)
    assert d.low == pytest.approx(tl, rel=2e-3)
    assert d.high == pytest.approx(tl * math.sqrt(1 + (4 * math.log(2) * 1000e-30 / tl**2) ** 2), rel=0.02)


def test_a_signed_stage_gdd_open_on_one_side_is_refused_and_the_target_is_not_judged(check):
    r = check(_CHIRPED.format(extra="  gdd: 5000 fs^2").replace(
        "{name: m, kind: dispersion, gdd: 0 fs^2}", "{name: m, kind: compressor, gdd: {max: -4000 fs^2}}")
        + "target:\n  pulse_duration: '<= 50 fs'\n")
    got = rules_of(r)
    assert ("stage-parameter", 9) in got
    assert ("target-unknown", 10) in got and "target-met" not in [f.rule for f in r.findings]


def test_a_dispersion_stage_may_add_only_third_order(check):
    # +1000 fs³ then −1000 fs³: the second cancels the first, back to the transform limit
    r = check(_CHIRPED.format(extra="").replace(
        "{name: m, kind: dispersion, gdd: 0 fs^2}",
        "{name: m, kind: dispersion, tod: 1000 fs^3}\n  - {name: n, kind: compressor, tod: -1000 fs^3}"))
    tl = 0.4413 / (299792458 * 30e-9 / 800e-9**2)
    assert cell(r, "pulse_duration", "m").value > tl * 1.001
    assert cell(r, "pulse_duration", "n").value == pytest.approx(tl, rel=1e-3)


def test_a_prism_pair_of_air_is_refused(check):
    r = check(_CHIRPED.format(extra="").replace(
        "{name: m, kind: dispersion, gdd: 0 fs^2}", "{name: m, kind: prism_compressor, material: air, apex_separation: 500 mm}"))
    assert ("stage-parameter", 9) in rules_of(r)


def test_a_lorentzian_laser_with_a_bandwidth_is_taken_as_a_gaussian_of_that_bandwidth(check):
    r = check(_CHIRPED.format(extra="  pulse_duration: 20 fs\n  pulse_shape: lorentzian"))
    note = " ".join(f.message for f in r.findings if f.rule == "stage-model")
    assert "no transform limit" in note and "31.4 fs" in note and "no bandwidth" not in note


def test_the_net_fod_carries_the_tolerance_of_the_stages_fod(check):
    # 1000 fs⁴ ± 20 % (the default tolerance of a FOD): the net FOD is 800 … 1200 fs⁴
    r = check(_CHIRPED.format(extra="").replace("{name: m, kind: dispersion, gdd: 0 fs^2}",
                                                "{name: m, kind: dispersion, fod: 1000 fs^4}"))
    fod = cell(r, "net_fod", "m")
    assert (fod.low, fod.value, fod.high) == pytest.approx((800e-60, 1000e-60, 1200e-60), rel=1e-6)


def test_a_laser_gdd_is_checked_against_its_duration_without_a_path(check):
    # a maker's sheet with no path: 5000 fs² on the 60 fs limit of 15.7 nm gives 238.7 fs (the closed
    # form), not the stated 100 fs; and without a duration, a note says what the chirp gives
    r = check("laser: {wavelength: 800 nm, pulse_duration: 100 fs, spectral_bandwidth: 15.7 nm, "
              "pulse_shape: gaussian, gdd: 5000 fs^2}\n")
    assert [f.rule for f in r.findings if f.severity == "error"] == ["laser-chirp-mismatch"]
    assert "dispersion-compensation" not in [f.rule for f in r.findings]
    r = check("laser: {wavelength: 800 nm, spectral_bandwidth: 15.7 nm, pulse_shape: gaussian, gdd: 5000 fs^2}\n")
    assert any(f.rule == "stage-model" and "238.7 fs" in f.message for f in r.findings)


def test_a_prism_insertion_may_be_zero_and_a_laser_gdd_may_be_given_by_its_ends(check):
    r = check(_CHIRPED.format(extra="  gdd: {min: -1800 fs^2, max: -1700 fs^2}").replace(
        "{name: m, kind: dispersion, gdd: 0 fs^2}",
        "{name: m, kind: prism_compressor, material: fused_silica, apex_separation: 500 mm, insertion: 0 mm}"))
    assert not [f for f in r.findings if f.severity == "error"]
    assert cell(r, "net_gdd", "m").value < -1750e-30  # the laser's −1750 fs² and the pair's negative GDD


def test_a_pedestal_through_a_harmonic_and_a_shape_factor_the_field_changes_are_said(check):
    r = check(_CHIRPED.format(extra="  pulse_duration: 60 fs\n  pulse_shape: sech2\n  energy_in_main_peak: 70%")
              .replace("{name: m, kind: dispersion, gdd: 0 fs^2}",
                       "{name: m, kind: material, material: fused_silica, thickness: 1 mm}\n"
                       "  - {name: h, kind: harmonic, order: 2, efficiency: 20%}"))
    notes = " ".join(f.message for f in r.findings if f.rule == "stage-model")
    assert "peak power here is a lower bound" in notes  # the pedestal converts less than the main peak
    assert "the peak power follows the field" in notes  # the chirped sech² field's P·τ/E is not the shape's


def test_a_wide_bandwidth_is_said_to_be_linearised_once(check):
    r = check("laser: {wavelength: 800 nm, spectral_bandwidth: 300 nm, pulse_duration: 4 fs, pulse_energy: 1 uJ, "
              "repetition_rate: 1 kHz}\npath:\n  - {name: a, kind: optic}\n  - {name: b, kind: optic}\n")
    assert [f.rule for f in r.findings].count("bandwidth-linearised") == 1
