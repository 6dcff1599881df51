"""The beam in space along the path, end to end: distances, lenses, sample planes, the beam size on
each optic and what depends on it.  Each expected number is computed here by a different method
than the checker's ABCD matrices: the Gaussian-beam closed forms (H. Kogelnik and T. Li, Appl. Opt.
5, 1550 (1966); S. A. Self, Appl. Opt. 22, 658 (1983)) or numerical quadrature."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from conftest import cell, rules_of
from speccheck.physics import materials


def _self_focus(w0: float, s: float, f: float, lam: float) -> tuple[float, float]:
    """Self's closed form: the waist radius and its distance after a thin lens f for an input waist
    w0 a distance s before it (M² = 1)."""
    zr = math.pi * w0**2 / lam
    m = 1.0 / math.sqrt((1 - s / f) ** 2 + (zr / f) ** 2)
    return m * w0, 1.0 / (1.0 / f - 1.0 / (s + zr**2 / (s - f)))


def _w(w0: float, z: float, lam: float) -> float:
    """Kogelnik and Li: w(z) = w0 √(1 + (λz/(π w0²))²)."""
    return w0 * math.sqrt(1 + (lam * z / (math.pi * w0**2)) ** 2)


WINDOW = """
laser:
  wavelength: 1030 nm
  repetition_rate: 1 kHz
  pulse_energy: 200 µJ
  pulse_duration: 300 fs
  pulse_shape: gaussian
  beam_diameter: 8 mm
  beam_profile: gaussian
  m2: 1
path:
  - {name: lens, kind: lens, focal_length: 300 mm}
  - {name: window, kind: material, material: fused_silica, thickness: 3 mm, distance: 250 mm}
"""


def test_a_window_before_the_focus_sees_the_beam_the_gaussian_formula_gives(check):
    r = check(WINDOW)
    lam, t = 1030e-9, 3e-3
    w0, z_w = _self_focus(4e-3, 0.0, 0.3, lam)  # the laser's waist at the lens
    n = materials.refractive_index("fused_silica", lam)
    w_entry = _w(w0, 0.25 - z_w, lam)
    w_exit = _w(w0, 0.25 + t / n - z_w, lam)  # the plate as its reduced thickness
    assert cell(r, "beam_diameter", "window").value == pytest.approx(2 * w_exit, rel=1e-6)
    assert 2 * w_entry == pytest.approx(1.335e-3, rel=2e-3)  # ≈ 8 mm × 50/300, by hand
    # the B-integral at that size: (2π/λ) n2 ∫ I(z) dz, I from the peak power on w(z) inside the glass
    # (physical depth x in the plate: free space x/n), by quadrature
    peak = cell(r, "peak_power", "laser").value
    mat = materials.lookup("fused_silica")
    n2 = math.sqrt(mat.n2[0] * mat.n2[1])
    x = np.linspace(0.0, t, 4001)
    intensity = np.array([2 * peak / (math.pi * _w(w0, 0.25 + xi / n - z_w, lam) ** 2) for xi in x])
    b = 2 * math.pi / lam * n2 * np.trapezoid(intensity, x)
    assert cell(r, "b_integral", "window").value == pytest.approx(b, rel=1e-4)
    assert 0.1 < b < 10  # radians: not the thousands a window at the waist would get
    assert not [f for f in r.findings if f.rule.startswith("self-focusing") and f.severity == "error"]


def test_a_sample_one_rayleigh_range_past_a_focus_gets_half_the_peak_intensity(check):
    lam, f = 800e-9, 0.1
    w0, _ = _self_focus(1e-3, 0.0, f, lam)
    zr = math.pi * w0**2 / lam
    r = check(f"""
        laser: {{wavelength: 800 nm, pulse_energy: 1 µJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1}}
        path:
          - {{name: lens, kind: focus, focal_length: 100 mm}}
          - {{name: plane, kind: sample, distance: {zr * 1e3:.9f} mm}}
        """)
    assert cell(r, "rayleigh_range", "lens").value == pytest.approx(zr, rel=1e-9)
    ratio = cell(r, "peak_intensity", "plane").value / cell(r, "peak_intensity", "lens").value
    assert ratio == pytest.approx(0.5, rel=1e-6)
    assert cell(r, "waist_distance", "plane").value == pytest.approx(-zr, rel=1e-6)  # the waist behind it
    assert cell(r, "wavefront_radius", "plane").value == pytest.approx(2 * zr, rel=1e-6)  # R(z_R) = 2 z_R


def test_a_laser_stated_only_by_its_peak_power_reaches_the_focus_with_an_intensity(check):
    r = check("""
        laser: {wavelength: 800 nm, peak_power: 2 GW, beam_diameter: 4 mm, m2: 1}
        path:
          - {name: mirror, kind: optic, transmission: 50%}
          - {name: lens, kind: focus, focal_length: 200 mm}
        """)
    w0, _ = _self_focus(2e-3, 0.0, 0.2, 800e-9)
    assert cell(r, "peak_power", "lens").value == pytest.approx(1e9)
    # the on-axis intensity of a Gaussian beam, 2P/(π w0²)
    assert cell(r, "peak_intensity", "lens").value == pytest.approx(2 * 1e9 / (math.pi * w0**2), rel=1e-6)


def test_a_measured_value_at_any_stage_is_compared_with_the_carried_beam(check):
    base = """
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1.1}
        path:
          - {name: lens, kind: focus, focal_length: 100 mm, measured: {beam_diameter: %s}}
        """
    spot = 4 * 1.1 * 800e-9 * 0.1 / (math.pi * 2e-3)  # 56 µm
    assert "measured-mismatch" in [rule for rule, _ in rules_of(check(base % f"{4 * spot * 1e6:.1f} µm"))]
    assert "measured-mismatch" not in [rule for rule, _ in rules_of(check(base % f"{spot * 1e6:.1f} µm"))]
    at_sample = check(base.replace(", measured: {beam_diameter: %s}", "").rstrip(" ") +
                      "          - {name: cam, kind: sample, distance: 1 m, measured: {beam_diameter: 2 mm}}\n")
    assert "measured-mismatch" in [rule for rule, _ in rules_of(at_sample)]


def test_a_high_numerical_aperture_is_noted(check):
    tight = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 nJ, pulse_duration: 100 fs, beam_diameter: 8 mm, m2: 1}
        path:
          - {name: objective, kind: focus, focal_length: 4 mm}
        """)
    (note,) = [f for f in tight.findings if f.rule == "non-paraxial-focus"]
    # the far-field half angle w/f = 1 rad: NA = sin(atan(1)) = 0.71 (paraxial cone, by hand)
    assert "0.71" in note.message and "common practice" in note.message
    loose = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 nJ, pulse_duration: 100 fs, beam_diameter: 8 mm, m2: 1}
        path:
          - {name: objective, kind: focus, focal_length: 20 mm}
        """)
    assert "non-paraxial-focus" not in [rule for rule, _ in rules_of(loose)]


@pytest.mark.parametrize("aperture, clips", [("10 mm", True), ("13 mm", False)])
def test_a_clear_aperture_that_clips_more_than_one_percent_is_a_warning(check, aperture, clips):
    r = check(f"""
        laser: {{wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 8 mm, m2: 1}}
        path:
          - {{name: mirror, kind: optic, clear_aperture: {aperture}}}
        """)
    found = [f for f in r.findings if f.rule == "aperture-clipping"]
    assert bool(found) == clips
    if clips:  # exp(−2 (a/w)²) with a = 5 mm, w = 4 mm: 4.39 % (the Gaussian integrated over the disc)
        assert f"{100 * math.exp(-2 * (5 / 4) ** 2):.3g}%" in found[0].message
    # and the numbers after it count the loss: the energy is 1 mJ times what the disc passes
    a = float(aperture.split()[0]) / 2
    share = integrated_share(a, 4.0)
    assert cell(r, "pulse_energy", "mirror").value == pytest.approx(1e-3 * share, rel=1e-9)


def integrated_share(radius: float, w: float) -> float:
    """The power of a Gaussian of 1/e² radius w inside a disc, by quadrature of 2πr I(r) (no closed form
    used): the independent check of 1 − exp(−2a²/w²)."""
    r = np.linspace(0.0, radius, 200001)
    total = np.pi * w**2 / 2  # ∫ exp(−2r²/w²) 2πr dr over the plane
    return float(np.trapezoid(np.exp(-2 * r**2 / w**2) * 2 * np.pi * r, r) / total)


def test_a_laser_waist_position_or_divergence_places_the_beam(check):
    lam, w_out, z = 1030e-9, 1e-3, -0.5  # the waist 0.5 m before the output plane
    r = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, pulse_duration: 300 fs, beam_diameter: 2 mm, m2: 1,
                waist_position: -0.5 m}
        path:
          - {name: far, kind: sample, distance: 10 m}
        """)
    # w(z) at the output fixes w0 (the larger root of w² = w0² + (λz/πw0)², solved here by bisection)
    lo, hi = w_out / math.sqrt(2), w_out
    for _ in range(200):
        mid = 0.5 * (lo + hi)
        lo, hi = (mid, hi) if _w(mid, z, lam) < w_out else (lo, mid)
    w0 = 0.5 * (lo + hi)
    assert cell(r, "waist_diameter", "laser").value == pytest.approx(2 * w0, rel=1e-6)
    assert cell(r, "beam_diameter", "far").value == pytest.approx(2 * _w(w0, 10.5, lam), rel=1e-6)
    div = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, pulse_duration: 300 fs, beam_diameter: 2 mm, m2: 1,
                beam_divergence: 1 mrad}
        path:
          - {name: far, kind: sample, distance: 10 m}
        """)
    w0 = 2 * lam / (math.pi * 1e-3)  # θ = 2λ/(π w0), full angle (Siegman, Lasers, ch. 17, chapter from memory)
    z0 = math.sqrt(w_out**2 - w0**2) / 0.5e-3
    assert cell(div, "beam_diameter", "far").value == pytest.approx(2 * _w(w0, z0 + 10, lam), rel=1e-6)
    bad = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, pulse_duration: 300 fs, beam_diameter: 0.2 mm, m2: 1,
                waist_position: 5 m}
        path:
          - {name: far, kind: sample, distance: 1 m}
        """)
    assert "beam-geometry-impossible" in [rule for rule, _ in rules_of(bad)]


def test_a_negative_distance_is_refused_and_a_diverging_lens_is_signed(check):
    r = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1}
        path:
          - {name: back, kind: sample, distance: -5 mm}
        """)
    assert [f for f in r.findings if f.severity == "error"]
    neg = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1}
        path:
          - {name: lens, kind: lens, focal_length: -50 mm}
          - {name: later, kind: sample, distance: 100 mm}
        """)
    # geometric optics of a collimated beam through f = −50 mm: D(100 mm) = D (1 + 100/50) = 6 mm
    assert cell(neg, "beam_diameter", "later").value == pytest.approx(6e-3, rel=1e-3)
    assert cell(neg, "wavefront_radius", "lens").value == pytest.approx(0.05, rel=1e-3)  # diverging: +
    assert not [f for f in neg.findings if f.severity == "error"]


def test_a_harmonic_keeps_q_and_parametric_output_takes_the_pumps(check):
    r = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, pulse_duration: 300 fs, beam_diameter: 4 mm, m2: 1}
        path:
          - {name: lens, kind: lens, focal_length: 500 mm}
          - {name: shg, kind: harmonic, order: 2, efficiency: 40%, distance: 100 mm}
        """)
    # E² of a Gaussian beam: w/√2, the same wavefront radius and Rayleigh range (undepleted)
    lens_at = check("""
        laser: {wavelength: 1030 nm, pulse_energy: 1 mJ, pulse_duration: 300 fs, beam_diameter: 4 mm, m2: 1}
        path:
          - {name: lens, kind: lens, focal_length: 500 mm}
          - {name: here, kind: sample, distance: 100 mm}
        """)
    for q, factor in (("beam_diameter", 1 / math.sqrt(2)), ("wavefront_radius", 1.0), ("rayleigh_range", 1.0)):
        assert cell(r, q, "shg").value == pytest.approx(factor * cell(lens_at, q, "here").value, rel=1e-9)


def test_a_stage_target_is_judged_at_its_own_column(check):
    r = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1}
        path:
          - {name: lens, kind: focus, focal_length: 100 mm, target: {beam_diameter: "<= 60 µm"}}
          - {name: far, kind: sample, distance: 1 m}
        target: {beam_diameter: "<= 10 mm"}
        """)
    rules = [f.rule for f in r.findings if f.rule.startswith("target")]
    assert rules.count("target-met") == 1 and rules.count("target-not-met") == 1


def test_path_cells_are_signed_and_null_for_infinity_in_json(check):
    from speccheck.formats import json_format

    r = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1}
        path:
          - {name: lens, kind: lens, focal_length: 200 mm}
        """)
    doc = json_format.document([r])
    sheet = doc["files"][0]["sheet"]
    assert sheet["laser"]["wavefront_radius"]["value"] is None  # flat at the laser's waist
    assert sheet["lens"]["wavefront_radius"]["value"] == pytest.approx(-0.2, rel=1e-12)  # converging: −f
    assert sheet["lens"]["waist_distance"]["value"] == pytest.approx(_self_focus(1e-3, 0.0, 0.2, 800e-9)[1], rel=1e-9)
    assert json.loads(json.dumps(doc)) == doc


@pytest.mark.parametrize("key, where", [("waist_position", "laser"), ("beam_divergence", "laser"),
                                        ("distance", "stage"), ("clear_aperture", "stage"),
                                        ("focal_length", "lens")])
@pytest.mark.parametrize("raw", ["abc", "-1 mrad", "5 W", "{min: 1 mm}", "[1, 2]", "0 mm", "1e300 m", "-1e-300 m",
                                 "'>= 2 mm'", "3", "0 mrad"])
def test_bad_values_of_the_beams_keys_get_findings_not_tracebacks(check, key, raw, where, tmp_path):
    laser = "{wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 2 mm, m2: 1.1"
    stage = "{name: s, kind: lens, focal_length: 100 mm"
    if where == "laser":
        laser += f", {key}: {raw}"
    elif where == "stage":
        stage += f", {key}: {raw}"
    else:
        stage = f"{{name: s, kind: lens, focal_length: {raw}"
    text = f"spec_version: 1\nlaser: {laser}}}\npath:\n  - {stage}}}\n  - {{name: after, kind: sample, distance: 50 mm}}\n"
    r = check(text)
    assert not [f for f in r.findings if f.rule == "internal-error"]
    if raw in ("abc", "5 W", "[1, 2]", "3") or raw == "-1 mrad" and key != "beam_divergence":
        assert [f for f in r.findings if f.severity == "error" and f.line in (2, 4)], [f.rule for f in r.findings]
    if raw in ("0 mm", "-1e-300 m"):  # every format writes the sheet's new cells
        import io

        from speccheck.cli import run

        spec = tmp_path / "spec.yaml"
        spec.write_text(text, encoding="utf-8")
        for name in ("human", "json", "review", "sarif", "junit", "github", "csv", "html"):
            out, err = io.StringIO(), io.StringIO()
            code = run(["check", "--no-config", "--format", name, str(spec)], out, err)
            assert code in (0, 1) and "Traceback" not in err.getvalue() and out.getvalue()


def test_a_plate_in_a_converging_beam_is_judged_on_its_exit_face(check):
    # 8 mm, 2 mJ at 800 nm through a 500 mm lens; a 20 mm fused-silica block 300 mm on, rated 0.11 J/cm²
    # (safety factor 2).  By the closed form (Self 1983 for the waist behind the lens, then
    # w(z) = w0' √(1 + ((z − s')/z_R')²) with the plate as its reduced length L/n, n = 1.4533 at
    # 800 nm, Malitson's Sellmeier, from memory): the entrance face sees F = 2E/(πw²) with margin
    # above 2, the exit face (the beam smaller) below it.
    r = check("""
        laser: {wavelength: 800 nm, repetition_rate: 1 kHz, pulse_energy: 2 mJ, pulse_duration: 100 fs,
                beam_diameter: 8 mm, m2: 1}
        path:
          - {name: lens, kind: lens, focal_length: 500 mm}
          - {name: block, kind: material, material: fused_silica, thickness: 20 mm, distance: 300 mm,
             transmission: 100%, damage_threshold: {fluence: 0.11 J/cm^2}}
        """)
    lam, w, f = 800e-9, 4e-3, 0.5
    z_r = math.pi * w**2 / lam
    w0 = w / math.sqrt(1 + (z_r / f) ** 2)
    s = f / (1 + (f / z_r) ** 2)
    z_r2 = math.pi * w0**2 / lam

    def fluence(z):
        return 2 * 2e-3 / (math.pi * (w0 * math.sqrt(1 + ((z - s) / z_r2) ** 2)) ** 2)

    entrance, exit_ = fluence(0.3), fluence(0.3 + 0.02 / 1.4533)
    assert 1100 / entrance > 2 > 1100 / exit_  # J/m²: the two faces fall either side of the factor
    [f] = [f for f in r.findings if f.rule == "optic-damage-margin"]
    assert "exit face" in f.message and f"{exit_ / 1e4:.4g}" in f.message.replace("J/cm²", "")


def test_a_focal_length_of_zero_is_the_stages_own_error_and_a_later_stage_target_says_it_is_not_judged(check):
    r = check("""
        laser: {wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 100 µJ, pulse_duration: 300 fs,
                beam_diameter: 5 mm, m2: 1}
        path:
          - {name: L1, kind: lens, focal_length: 0 mm}
          - {name: c, kind: focus, focal_length: 100 mm, target: {peak_intensity: ">= 1e12 W/cm^2"}}
        """)
    errors = [f for f in r.findings if f.severity == "error"]
    assert [f.rule for f in errors] == ["stage-parameter"] and "not 0" in errors[0].message
    assert any(f.rule == "target-unknown" and f.line == 6 and "'L1'" in f.message for f in r.findings)


def test_an_aperture_that_clips_much_of_the_beam_says_what_follows_is_not_reliable(check):
    r = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, pulse_duration: 50 fs, beam_diameter: 8 mm, m2: 1}
        path:
          - {name: iris, kind: optic, clear_aperture: 4 mm}
        """)
    [f] = [f for f in r.findings if f.rule == "aperture-clipping"]
    # 1 − exp(−2 (2/4)²) = 39 % passes, 61 % clipped (by hand)
    assert "60.7%" in f.message and "not reliable" in f.message


def test_a_wavefront_radius_near_a_waist_is_open_where_the_tolerances_put_the_waist_on_both_sides(check):
    # 1 mm (± 5 %) at its waist on a 1 m lens: the waist lands at s' = f/(1 + (f/z_R)²) (Self 1983), which
    # moves with the diameter; a plane between the two ends of s' has R of either sign (|R| ≥ 2 z_R),
    # so its interval is open on both sides, not one through 0
    lam, f = 1030e-9, 1.0
    ends = []
    for d in (0.95e-3, 1.05e-3):
        z_r = math.pi * (d / 2) ** 2 / lam
        ends.append(f / (1 + (f / z_r) ** 2))
    plane = round(sum(ends) / 2, 9)  # as written in the spec, to the nanometre
    r = check(f"""
        laser: {{wavelength: 1030 nm, pulse_energy: 1 µJ, pulse_duration: 300 fs, beam_diameter: 1 mm, m2: 1}}
        path:
          - {{name: lens, kind: lens, focal_length: 1000 mm}}
          - {{name: here, kind: sample, distance: {plane * 1e3:.6f} mm}}
        """)
    radius = cell(r, "wavefront_radius", "here")
    assert min(ends) < plane < max(ends) and radius.low is None and radius.high is None
    # the typical value is R = z + z_R'²/z of the typical beam (z past its waist), by hand
    z_r = math.pi * 0.5e-3**2 / lam
    w0 = 0.5e-3 / math.sqrt(1 + (z_r / f) ** 2)
    z, z_r2 = plane - f / (1 + (f / z_r) ** 2), math.pi * w0**2 / lam
    assert radius.value == pytest.approx(z + z_r2**2 / z, rel=1e-6)


def test_a_focus_says_where_its_waist_lies_when_that_is_not_at_its_focal_length(check):
    # 0.5 mm at 1030 nm on a 200 mm focus: z_R = 191 mm, so the waist is at s' = f/(1 + (f/z_R)²) = 95.21 mm
    # (Self 1983, by hand), which is where the next stage's distance starts
    r = check("""
        laser: {wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 100 µJ, pulse_duration: 300 fs,
                beam_diameter: 0.5 mm, m2: 1}
        path:
          - {name: f, kind: focus, focal_length: 200 mm}
        """)
    z_r = math.pi * 0.25e-3**2 / 1030e-9
    s = 0.2 / (1 + (0.2 / z_r) ** 2)
    assert any(f.rule == "stage-model" and f"{s * 1e3:.4g} mm after the optic" in f.message for f in r.findings)


def test_a_waist_position_names_both_beams_it_fits_and_a_divergence_stated_too_is_checked(check):
    # w² = w0² + (M²λz/(π w0))² has two roots in w0² (by hand): the larger is taken, the other named
    lam_eff, w, z = 1.3 * 1030e-9, 2.5e-3, 2.0
    a = lam_eff * z / math.pi
    big = math.sqrt((w**2 + math.sqrt(w**4 - 4 * a * a)) / 2)
    small = math.sqrt((w**2 - math.sqrt(w**4 - 4 * a * a)) / 2)
    laser = ("{wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 20 µJ, pulse_duration: 250 fs, "
             "beam_diameter: 5 mm, m2: 1.3, %s}")
    spec = "laser: " + laser + "\npath:\n  - {name: s, kind: sample, distance: 1 m}\n"
    r = check(spec % "waist_position: -2 m")
    [note] = [f for f in r.findings if f.rule == "stage-model" and "two beams" in f.message]
    assert f"{2 * big * 1e3:.4g} mm waist" in note.message and f"{2 * small * 1e6:.4g} µm waist" in note.message
    # with a divergence, the beam it gives (waist √(w² − w0²)/θ½ behind, w0 = M²λ/(π θ½)) is checked
    # against the stated position, within its 10 % and 5 % more
    half = 0.25e-3
    w0 = lam_eff / (math.pi * half)
    behind = math.sqrt(w**2 - w0**2) / half  # 7.31 m
    good = check(spec % f"waist_position: -{behind:.4f} m, beam_divergence: 0.5 mrad")
    assert not [f for f in good.findings if f.severity == "error"]
    bad = check(spec % "waist_position: -4 m, beam_divergence: 0.5 mrad")
    [f] = [f for f in bad.findings if f.rule == "beam-geometry-impossible"]
    assert f"{-behind * 1e3:.4g} mm" in f.message.replace("−", "-") or f"{-behind:.4g} m" in f.message
