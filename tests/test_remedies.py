"""What it would take: remedies of targets, checked against closed forms worked by hand."""

from __future__ import annotations

import io
import json
import math
import textwrap

import pytest

from focus_by_hand import FOCUS_LASER, diameter_for, focal_length_for, inverse_square_waist, m2_for, waist_radius
from speccheck.checking.document import Checker, Options
from speccheck.cli import run

GAUSS = 2.0 * math.sqrt(math.log(2.0) / math.pi)  # P_pk·τ/E of a Gaussian pulse (FWHM τ), by hand


def spec(text: str) -> str:
    return "spec_version: 1\n" + textwrap.dedent(text).lstrip("\n")


def target_finding(result, rule=None):
    [f] = [f for f in result.findings if f.rule.startswith("target-") and (rule is None or f.rule == rule)]
    return f


def by_input(finding) -> dict:
    return {r.input: r for r in finding.remedies}


# --- through the relation table: a target on the laser block itself -------------------------

LASER_ONLY = spec("""
    laser:
      wavelength: 800 nm
      repetition_rate: 1 kHz
      average_power: 1 W
      pulse_duration: 100 fs
      pulse_shape: gaussian
      beam_diameter: 100 µm
      beam_profile: gaussian
    target:
      peak_intensity: ">= 1e15 W/cm^2"
    """)


def test_remedies_through_the_relation_table_are_the_monomial_solved_by_hand(checker):
    result = checker.check_text(LASER_ONLY, "l.yaml")
    f = target_finding(result, "target-not-met")
    # By hand: E = P/f = 1 mJ, P_pk = 0.9394 E/τ, I = 2 P_pk/(π w²) with w = D/2 (Gaussian beam,
    # 1/e² radius; Siegman, Lasers, ch. 17): 2.392e14 W/cm² here, below 1e15.
    i0 = 2 * GAUSS * 1e-3 / 100e-15 / (math.pi * (50e-6) ** 2)
    k = 1e19 / i0  # the factor the intensity must grow by (1e15 W/cm² = 1e19 W/m²)
    assert result.sheet["laser"]["peak_intensity"].value == pytest.approx(i0, rel=1e-9)
    r = by_input(f)
    assert r["laser.average_power"].low == pytest.approx(1.0 * k, rel=1e-9)  # I ∝ P at a fixed rate
    assert r["laser.average_power"].high is None
    assert r["laser.pulse_duration"].high == pytest.approx(100e-15 / k, rel=1e-9)  # I ∝ 1/τ
    assert r["laser.beam_diameter"].high == pytest.approx(100e-6 / math.sqrt(k), rel=1e-9)  # I ∝ 1/D²
    assert r["laser.repetition_rate"].high == pytest.approx(1e3 / k, rel=1e-9)  # at a fixed power, E = P/f
    assert all(x.reachable and x.stated for x in f.remedies)
    assert "laser.wavelength" not in r  # the colour of the light is not offered as a knob
    # in words, the smallest changes first: ×k for the power and the rate's 1/k, √k for the diameter
    assert f"beam diameter ≤ {100 / math.sqrt(k):.4g} µm at the laser (×{1 / math.sqrt(k):.3g})" in f.message
    assert f.message.index("beam diameter") < f.message.index("average power")


def test_a_remedy_end_meets_the_target_when_set(checker, units):
    f = target_finding(checker.check_text(LASER_ONLY, "l.yaml"))
    power = by_input(f)["laser.average_power"].low
    again = Checker(units, Options(settings=(("laser.average_power", f"{power * 1.000001!r} W"),)))
    assert again.check_text(LASER_ONLY, "l.yaml").sheet["laser"]["peak_intensity"].value >= 1e19


# --- through the path: a focus, intensity ∝ E D² / (τ f²) -----------------------------------

FOCUSED = FOCUS_LASER + textwrap.dedent("""\
    path:
      - {name: attenuator, kind: attenuator, transmission: 50%}
      - {name: mirror, kind: optic}
      - {name: lens, kind: focus, focal_length: 200 mm}
    target:
      peak_intensity: ">= {need} W/cm^2"
    """)


def focused_intensity(energy=100e-6, tau=300e-15, d=5e-3, f=0.2, t=0.5) -> float:
    """By hand: the waist behind a thin lens (Self 1983, in focus_by_hand), I = 2 P_pk/(π w0²)."""
    w0 = waist_radius(d, f)
    return 2 * GAUSS * energy * t / tau / (math.pi * w0 ** 2)


C0 = inverse_square_waist(5e-3, 0.2)  # 1/w0'² of FOCUSED as stated; I ∝ E/τ · 1/w0'²


def test_remedies_through_a_focus_follow_e_d2_over_tau_f2(checker):
    k = 1.5
    need = k * focused_intensity() / 1e4  # W/cm²
    result = checker.check_text(FOCUSED.replace("{need}", f"{need:.10g}"), "f.yaml")
    f = target_finding(result, "target-not-met")
    r = by_input(f)
    # far from the Rayleigh range these are 0.2/√k and 5 mm·√k; by the exact waist, solved by hand
    assert r["lens.focal_length"].high == pytest.approx(focal_length_for(k * C0, 5e-3), rel=1e-6)
    assert r["laser.beam_diameter"].low == pytest.approx(diameter_for(k * C0, 0.2), rel=1e-6)
    assert r["laser.pulse_energy"].low == pytest.approx(100e-6 * k, rel=1e-6)
    assert r["laser.pulse_duration"].high == pytest.approx(300e-15 / k, rel=1e-6)
    # a share of the beam: met from 0.75 up to all of it
    assert (r["attenuator.transmission"].low, r["attenuator.transmission"].high) == (pytest.approx(0.75), 1.0)
    # the mirror's default transmission is 1: it would need 1.5, so it is not offered
    assert "mirror.transmission" not in r
    assert f"focal length ≤ {1e3 * focal_length_for(k * C0, 5e-3):.4g} mm at 'lens'" in f.message


def test_a_defaulted_parameter_is_offered_where_a_value_it_can_take_meets_the_target(checker):
    text = FOCUSED.replace('">= {need} W/cm^2"', '"<= {need} W/cm^2"').replace("{need}", f"{0.3 * focused_intensity() / 1e4:.10g}")
    f = target_finding(checker.check_text(text, "f.yaml"), "target-not-met")
    mirror = by_input(f)["mirror.transmission"]
    assert not mirror.stated and mirror.high == pytest.approx(0.3, rel=1e-6) and mirror.value == 1.0
    # the three smallest changes in words; far from z_R, I ∝ 1/M⁴ through the spot (M² ≥ 0.3^(-1/2))
    assert f"m2 ≥ {m2_for(0.3 * C0, 5e-3, 0.2):.4g} at the laser" in f.message and "transmission" not in f.message


# --- windows, and what no single input reaches ------------------------------------------------

DISPERSED = spec("""
    laser:
      wavelength: 800 nm
      pulse_shape: gaussian
      spectral_bandwidth: 40 nm
    path:
      - {name: stretcher, kind: dispersion, gdd: 1500 fs^2}
    target:
      pulse_duration: "<= {need} fs"
    """)


def test_a_gdd_window_is_the_closed_form_of_gaussian_broadening(checker):
    # τ(φ) = τ0 √(1 + (4 ln2 φ / τ0²)²) for a transform-limited Gaussian (Diels & Rudolph,
    # Ultrashort Laser Pulse Phenomena, ch. 1): τ ≤ 2 τ0 for |φ| ≤ √3 τ0² / (4 ln 2).
    result = checker.check_text(DISPERSED.replace("{need}", "1000"), "d.yaml")
    # the transform limit of a Gaussian: Δν·τ0 = 2 ln2 / π (the time-bandwidth table of any text)
    tl = 2 * math.log(2) / math.pi / result.sheet["laser"]["spectral_bandwidth"].value
    result = checker.check_text(DISPERSED.replace("{need}", f"{2 * tl * 1e15:.12g}"), "d.yaml")
    f = target_finding(result, "target-not-met")
    gdd = by_input(f)["stretcher.gdd"]
    edge = math.sqrt(3) * tl ** 2 / (4 * math.log(2))
    assert gdd.low == pytest.approx(-edge, rel=1e-4) and gdd.high == pytest.approx(edge, rel=1e-4)
    assert "gdd" in f.message and "(now 1500 fs²)" in f.message


def test_a_target_no_single_input_can_meet_says_so(checker):
    f = target_finding(checker.check_text(DISPERSED.replace("{need}", "5"), "d.yaml"), "target-not-met")
    # 5 fs is below the transform limit of 40 nm at 800 nm (23.5 fs): no GDD reaches it, and
    # no bandwidth within 1/100 … 100 times the stated one does without leaving what the field can hold
    assert f.remedies and not any(r.reachable for r in f.remedies)
    assert all(r.low is None and r.high is None for r in f.remedies)
    assert "No value of a single input was found to meet it" in f.message
    # and the reason is said: 0.4413 λ²/(c Δλ) at the widest bandwidth the tolerances allow (by hand, the
    # Gaussian's time-bandwidth product; the bandwidth's own tolerance is the default 5 %)
    assert "No pulse of this spectrum can be that short: its transform limit is" in f.message


def test_a_target_the_numbers_do_not_determine_names_what_would(checker):
    text = spec("""
        laser: {wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 100 µJ, pulse_duration: 300 fs}
        path:
          - {name: lens, kind: focus, focal_length: 200 mm}
        target:
          peak_intensity: ">= 1e13 W/cm^2"
        """)
    f = target_finding(checker.check_text(text, "u.yaml"), "target-unknown")
    assert "stating laser.beam_diameter would determine it" in f.message


# --- where remedies go ---------------------------------------------------------------------------

def test_a_met_target_has_remedies_only_in_a_review(units):
    text = FOCUSED.replace("{need}", f"{0.5 * focused_intensity() / 1e4:.10g}")
    f = target_finding(Checker(units).check_text(text, "f.yaml"), "target-met")
    assert f.remedies is None
    f = target_finding(Checker(units, Options(remedies="all")).check_text(text, "f.yaml"), "target-met")
    assert by_input(f)["lens.focal_length"].high == pytest.approx(focal_length_for(0.5 * C0, 5e-3), rel=1e-6)
    assert "It stays met with" in f.message


def test_remedies_in_json_have_exactly_the_documented_keys(tmp_path):
    path = tmp_path / "l.yaml"
    path.write_text(LASER_ONLY, encoding="utf-8")
    out = io.StringIO()
    assert run(["check", "--no-config", "--format", "json", str(path)], stdout=out) == 1
    [f] = [f for f in json.loads(out.getvalue())["files"][0]["findings"] if f["rule"] == "target-not-met"]
    assert f["remedies"] and all(list(r) == ["input", "column", "parameter", "low", "high", "unit", "reachable",
                                             "stated"] for r in f["remedies"])
    power = next(r for r in f["remedies"] if r["input"] == "laser.average_power")
    assert power["unit"] == "W" and power["column"] == "laser" and power["parameter"] == "average_power"
    out = io.StringIO()
    run(["check", "--no-config", "--format", "sarif", str(path)], stdout=out)
    [result] = [r for r in json.loads(out.getvalue())["runs"][0]["results"] if r["ruleId"] == "target-not-met"]
    assert result["properties"]["remedies"] == f["remedies"]
    for fmt in ("human", "review", "html", "junit", "github"):
        out = io.StringIO()
        run(["check", "--no-config", "--format", fmt, str(path)], stdout=out)
        assert "Reach it with" in out.getvalue().replace("\n", " "), fmt


def test_a_met_target_measures_each_remedy_against_where_it_stops_being_met(units):
    from speccheck.checking.remedies import phrase

    # met at twice what is needed: the attenuator (50 %) may go down to 25 %, and up to all of the
    # beam, which is what a share can be, not where the target stops being met
    text = FOCUSED.replace("{need}", f"{0.5 * focused_intensity() / 1e4:.10g}")
    f = target_finding(Checker(units, Options(remedies="all")).check_text(text, "f.yaml"), "target-met")
    share = by_input(f)["attenuator.transmission"]
    assert (share.low, share.high, share.binding) == (pytest.approx(0.25, rel=1e-6), 1.0, (True, False))
    assert phrase(units, share) == "transmission ≥ 25% at 'attenuator' (×0.5)"
    # M² searched from its least value 1 (no error refuses it): open below, bounded above by the target
    m2 = by_input(f)["laser.m2"]
    assert m2.low is None and m2.binding == (False, True)
    assert m2.high == pytest.approx(m2_for(0.5 * C0, 5e-3, 0.2), rel=1e-6)


def test_the_search_tells_the_end_of_what_an_input_can_be_from_the_end_of_the_target():
    from speccheck.checking import seek

    calls = []

    def line(t):  # a straight line in these coordinates, as through the relation table
        calls.append(t)
        return 2.0 * t

    found = seek.seek(line, 0.0, 0.0, -3.0, 3.0, (-math.inf, 1.0), 0.1, 60)
    assert found.high == pytest.approx(0.5, abs=1e-9) and found.low is None and found.domain == (False, False)
    # the secant through two points lands past the bound at once: a handful of evaluations, not a walk
    assert len(calls) <= 8
    # where the function fails (an error at the input itself), the end is the input's, found by bisection
    found = seek.seek(lambda t: t if t < 1.0 else None, 0.0, 0.0, -3.0, 3.0, (-math.inf, 5.0), 0.1, 60)
    assert found.high == pytest.approx(1.0, abs=1e-3) and found.domain == (False, True)
