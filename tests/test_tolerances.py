"""Default tolerances by quantity, their precedence, and bounds that stay exact."""

import io
import json

import pytest

from speccheck.cli import run
from speccheck.physics.quantities import QUANTITIES
from speccheck.physics.stages import PARAM_TOLERANCES, STAGE_KINDS


def cell(result, quantity, column="laser"):
    return result.sheet[column][quantity]


def test_every_quantity_and_stage_parameter_has_a_default_tolerance_and_a_reason():
    for q in QUANTITIES:
        assert 0.0 <= q.tolerance < 0.5 and q.tolerance_why, q.name
    numeric = {p.name for k in STAGE_KINDS.values() for p in k.params if p.dimension not in ("text", "material_name")}
    assert numeric <= set(PARAM_TOLERANCES)
    assert all(why for _, why in PARAM_TOLERANCES.values())


def test_a_rate_is_known_far_better_than_a_power(check):
    # ">= 45 µJ at 1 MHz" needs 45 W; "at most 43 W" then needs a rate 4.4% below the one stated.
    # A single 5% default let that through; a repetition rate is known to 0.01% (common practice).
    result = check("""
        laser:
          repetition_rate: 1 MHz
          pulse_energy: ">= 45 µJ"
          average_power: "<= 43 W"
        """)
    assert [f.rule for f in result.findings if f.severity == "error"] == ["relation-conflict"]


def test_bounds_are_exact_whatever_the_tolerances(check):
    # 45 µJ × 1 MHz = 45 W exactly: a bound meets a bound at its edge, and no tolerance widens them
    ok = check("""
        defaults: {tolerance: 20%}
        laser:
          repetition_rate: {min: 1 MHz, max: 1 MHz}
          pulse_energy: ">= 45 µJ"
          average_power: "<= 45.0001 W"
        """)
    assert not [f for f in ok.findings if f.severity == "error"]
    bad = check("""
        defaults: {tolerance: 20%}
        laser:
          repetition_rate: {min: 1 MHz, max: 1 MHz}
          pulse_energy: ">= 45 µJ"
          average_power: "<= 44.99 W"
        """)
    assert [f.rule for f in bad.findings if f.severity == "error"] == ["relation-conflict"]


@pytest.mark.parametrize("defaults, expected", [
    ("", 0.03),  # the built-in table: an average power to 3%
    ("defaults: {tolerance: 7%}", 0.07),  # the spec's global setting beats the table
    ("defaults: {tolerance: 7%, tolerances: {average_power: 1%}}", 0.01),  # its per-quantity one beats both
])
def test_the_spec_sets_tolerances_by_quantity_before_globally(check, defaults, expected):
    result = check(f"{defaults}\nlaser:\n  average_power: 2 W\n")
    p = cell(result, "average_power")
    assert p.low == pytest.approx(2 * (1 - expected)) and p.high == pytest.approx(2 * (1 + expected))


def _power_interval(tmp_path, spec_defaults: str, config: str) -> tuple[float, float]:
    (tmp_path / "speccheck.toml").write_text(config, encoding="utf-8")
    (tmp_path / "s.yaml").write_text(f"spec_version: 1\n{spec_defaults}\nlaser:\n  average_power: 2 W\n"
                                     "  spectral_bandwidth: 10 nm\n", encoding="utf-8")
    out = io.StringIO()
    run(["check", "--config", str(tmp_path / "speccheck.toml"), "--format", "json", str(tmp_path / "s.yaml")],
        out, io.StringIO())
    sheet = json.loads(out.getvalue())["files"][0]["sheet"]["laser"]
    return sheet["average_power"]["high"] / 2 - 1, sheet["spectral_bandwidth_wavelength"]["high"] / 10e-9 - 1


@pytest.mark.parametrize("spec_defaults, config, power, bandwidth", [
    # 5. the table
    ("", "", 0.03, 0.05),
    # 4. the configuration's global tolerance beats the table
    ("", 'tolerance = "2%"\n', 0.02, 0.02),
    # 3. the spec's global tolerance beats the configuration's
    ("defaults: {tolerance: 4%}", 'tolerance = "2%"\n', 0.04, 0.04),
    # 2. the configuration's per-quantity setting beats both globals (an alias key covers its forms)
    ("defaults: {tolerance: 4%}", 'tolerance = "2%"\n[tolerances]\naverage_power = "1%"\nspectral_bandwidth = "8%"\n',
     0.01, 0.08),
    # 1. the spec's per-quantity setting beats everything
    ("defaults: {tolerances: {average_power: 0.5%}}", '[tolerances]\naverage_power = "1%"\n', 0.005, 0.05),
])
def test_the_precedence_of_tolerances(tmp_path, spec_defaults, config, power, bandwidth):
    got = _power_interval(tmp_path, spec_defaults, config)
    assert got == pytest.approx((power, bandwidth))


def test_a_stage_parameter_takes_its_own_default_tolerance(check):
    result = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ}
        path:
          - {name: lens, kind: optic, transmission: 90%}
        """)
    e = cell(result, "pulse_energy", "lens")  # energy to 5%, a transmission to 1%
    assert e.high == pytest.approx(1e-3 * 1.05 * 0.9 * 1.01)


def test_an_unknown_name_in_the_configurations_tolerances_is_a_mistake(tmp_path):
    (tmp_path / "speccheck.toml").write_text('[tolerances]\nrepetition_rat = "0.1%"\n', encoding="utf-8")
    (tmp_path / "s.yaml").write_text("spec_version: 1\nlaser: {wavelength: 800 nm}\n", encoding="utf-8")
    err = io.StringIO()
    assert run(["check", "--config", str(tmp_path / "speccheck.toml"), str(tmp_path / "s.yaml")],
               io.StringIO(), err) == 2
    assert "repetition_rate" in err.getvalue()  # did you mean


# -- typical values must agree


def typical_warnings(result):
    return [f for f in result.findings if f.rule == "typical-values-disagree"]


def test_typical_values_that_break_a_relation_are_a_warning_naming_the_numbers(check):
    # 20 W at 1 MHz is 20 µJ (E = P / f, by hand); 21 µJ is within 5% of it, so the intervals agree
    result = check("laser: {repetition_rate: 1 MHz, pulse_energy: 21 µJ, average_power: 20 W}\n")
    assert not [f for f in result.findings if f.severity == "error"]
    (w,) = typical_warnings(result)
    assert w.severity == "warning" and "20 µJ" in w.message and "21 µJ" in w.message and "+5%" in w.message
    assert not typical_warnings(check("laser: {repetition_rate: 1 MHz, pulse_energy: 20.1 µJ, average_power: 20 W}\n"))


def test_typical_values_below_the_transform_limit_are_a_warning(check):
    # 180 fs × c·6 nm/(1040 nm)² = 0.299 < 0.315 for sech² (published pulse-shape tables: 0.3148)
    result = check("laser: {wavelength: 1040 nm, pulse_duration: 180 fs, spectral_bandwidth: 6 nm, pulse_shape: sech2}\n")
    (w,) = typical_warnings(result)
    assert "0.2993" in w.message and "0.3148" in w.message
    assert not [f for f in result.findings if f.rule == "below-transform-limit"]  # the intervals agree


def test_a_typical_value_beyond_a_stated_bound_is_a_warning(check):
    result = check("laser: {repetition_rate: 1 MHz, pulse_energy: 20 µJ, average_power: '<= 19.5 W'}\n")
    (w,) = typical_warnings(result)
    assert "20 W" in w.message and "<= 19.5 W" in w.message


def test_the_margin_is_a_setting(check):
    text = "laser: {repetition_rate: 1 MHz, pulse_energy: 21 µJ, average_power: 20 W}\n"
    assert not typical_warnings(check("defaults: {nominal_margin: 6%}\n" + text))
    assert typical_warnings(check("defaults: {nominal_margin: 4%}\n" + text))


def test_the_examples_and_the_starters_have_no_such_warning(check):
    from pathlib import Path

    from speccheck.starter import KINDS, starter

    root = Path(__file__).resolve().parent.parent / "example_specs"
    texts = [p.read_text(encoding="utf-8") for p in root.glob("*.yaml")] + [starter(k, "s.yaml", None) for k in KINDS]
    for text in texts:
        assert not typical_warnings(check(text))


def test_a_feasible_bound_shows_what_the_rest_implies_and_keeps_its_text(tmp_path):
    # <= 80 µJ with >= 30 W at 600 kHz: E >= 30 W / 600 kHz = 50 µJ (by hand), so 50 … 80 µJ
    spec = tmp_path / "b.yaml"
    spec.write_text("spec_version: 1\nlaser:\n  repetition_rate: 600 kHz\n  pulse_energy: '<= 80 µJ'\n"
                    "  average_power: '>= 30 W'\n", encoding="utf-8")
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", str(spec)], out, io.StringIO())
    energy = json.loads(out.getvalue())["files"][0]["sheet"]["laser"]["pulse_energy"]
    assert energy["status"] == "stated" and energy["stated"] == "<= 80 µJ"
    assert energy["low"] == pytest.approx(30 / (600e3 * 1.0001)) and energy["high"] == pytest.approx(80e-6)


def test_the_sheet_shows_a_narrowed_bound_beside_its_text(tmp_path):
    spec = tmp_path / "b.yaml"
    spec.write_text("spec_version: 1\nlaser:\n  repetition_rate: 600 kHz\n  pulse_energy: '<= 80 µJ'\n"
                    "  average_power: '>= 30 W'\n", encoding="utf-8")
    out = io.StringIO()
    run(["check", "--no-config", "--no-color", str(spec)], out, io.StringIO())
    row = next(line for line in out.getvalue().splitlines() if "pulse_energy" in line)
    assert "<= 80 µJ" in row and "[50 … 80] µJ" in row


def test_typical_values_are_checked_through_derived_numbers_too(check):
    # I = 2 · 0.9394 E/τ / (π w²) (Gaussian pulse and beam; relation table, by hand) = 3.99e11 W/cm²
    # for 5 mJ, 30 fs and a 10 mm diameter: a stated 5.5e11 is 38 % high, within the wide intervals
    result = check("laser: {wavelength: 800 nm, pulse_energy: 5 mJ, pulse_duration: 30 fs, pulse_shape: gaussian,"
                   " beam_diameter: 10 mm, beam_profile: gaussian, peak_intensity: 5.5e11 W/cm^2}\n")
    assert not [f for f in result.findings if f.severity == "error"]
    (w,) = typical_warnings(result)
    assert "3.987e11 W/cm²" in w.message and "+38%" in w.message
