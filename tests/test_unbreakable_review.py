"""Regression tests for what a fresh review found after the unbreakable and no-false-all-clear work."""

import io
import json

import pytest

from speccheck.cli import run


def _run(*args, stdout=None, stderr=None):
    out, err = stdout or io.StringIO(), stderr or io.StringIO()
    code = run(list(args), out, err)
    return code, out.getvalue() if hasattr(out, "getvalue") else "", err.getvalue() if hasattr(err, "getvalue") else ""


def _spec(tmp_path, text, name="s.yaml"):
    path = tmp_path / name
    path.write_text("spec_version: 1\n" + text, encoding="utf-8")
    return str(path)


@pytest.mark.parametrize("unit", ["Prad/s", "krad/s", "Mcycle/s", "rpm", "turn/s", "deg/s"])
def test_angles_and_turns_in_any_unit_are_refused(tmp_path, unit):
    code, out, _ = _run("check", "--no-config", "--format", "json",
                        _spec(tmp_path, f"laser:\n  repetition_rate: 80 {unit}\n"))
    rules = [f["rule"] for f in json.loads(out)["files"][0]["findings"]]
    assert code == 1 and "unknown-unit" in rules


def test_a_chain_of_gains_beyond_a_float_is_a_finding_and_the_json_stays_valid(tmp_path):
    stages = "".join(f"  - {{name: a{i}, kind: amplifier, gain: 1e99}}\n" for i in range(4))
    code, out, _ = _run("check", "--no-config", "--format", "json",
                        _spec(tmp_path, "laser: {wavelength: 800 nm, average_power: 1 W, repetition_rate: 1 kHz}\n"
                              "path:\n" + stages))
    doc = json.loads(out)  # no bare inf
    assert code == 1 and "out-of-model-range" in [f["rule"] for f in doc["files"][0]["findings"]]


class _Broken(io.StringIO):
    def write(self, text):
        raise BrokenPipeError


def test_a_failing_standard_error_costs_neither_the_report_nor_the_exit_code(tmp_path):
    spec = _spec(tmp_path, "laser: {wavelength: 800 nm}\n")
    out = io.StringIO()
    code = run(["check", "--no-config", "--max-depth", "500", spec], out, _Broken())  # the cap's note fails
    assert code == 0 and "0 errors" in out.getvalue()


def test_yaml_1_1_numbers_are_not_read_as_numbers(tmp_path):
    code, out, _ = _run("check", "--no-config", "--format", "json",
                        _spec(tmp_path, "laser:\n  wavelength: 800 nm\n  m2: 1:30\n  refractive_index: 1_0\n"))
    lines = {f["line"] for f in json.loads(out)["files"][0]["findings"] if f["severity"] == "error"}
    assert code == 1 and {4, 5} <= lines


def test_30_dbm_plus_minus_1_db_is_an_uneven_interval(tmp_path):
    code, out, _ = _run("check", "--no-config", "--format", "json",
                        _spec(tmp_path, "laser:\n  average_power: 30 dBm ± 1 dB\n"))
    p = json.loads(out)["files"][0]["sheet"]["laser"]["average_power"]
    assert p["low"] == pytest.approx(10 ** -0.1) and p["high"] == pytest.approx(10 ** 0.1)  # 29 and 31 dBm


@pytest.mark.parametrize("args, says", [(["check", ""], "a file, a folder or '-'"),
                                        (["check", "-o", "", "x.yaml"], "name the report file, or '-'")])
def test_an_empty_path_is_a_usage_error(args, says):
    code, _, err = _run(*args)
    assert code == 2 and "empty path" in err and says in err


def test_dash_o_dash_is_standard_output(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    spec = _spec(tmp_path, "laser: {wavelength: 800 nm}\n")
    code, out, _ = _run("check", "--no-config", "--format", "json", "-o", "-", spec)
    assert code == 0 and json.loads(out)["files"] and not (tmp_path / "-").exists()


def test_circular_light_doubles_the_barrier_suppression_intensity(units):
    from speccheck.physics import hazards

    k = units.constants
    # |E| = F all the time takes I = c ε0 F², twice the linear c ε0 F²/2 (Augst et al. 1989)
    lin = hazards.barrier_suppression_intensity(15.76 * k.e, k)
    assert hazards.barrier_suppression_intensity(15.76 * k.e, k, polarization="circular") == pytest.approx(2 * lin)


def test_self_focusing_without_a_beam_size_is_a_risk_not_a_collapse(check):
    result = check("""
        laser: {wavelength: 800 nm, pulse_energy: 10 mJ, pulse_duration: 30 fs, pulse_shape: gaussian}
        path:
          - {name: w, kind: material, material: fused_silica, thickness: 10 mm}
        """)
    rules = {f.rule for f in result.findings}
    assert "self-focusing" not in rules and "self-focusing-risk" in rules


def test_an_unstated_m2_leaves_the_rayleigh_range_open_above(check):
    result = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, beam_diameter: 10 mm}
        path:
          - {name: f, kind: focus, focal_length: 500 mm}
        """)
    assert result.sheet["f"]["rayleigh_range"].high is None  # z_R = π w0²/(M² λ) with w0 ∝ M²


def test_a_parametric_efficiency_whose_typical_value_passes_manley_rowe_is_a_warning(check):
    # 800 nm pump, 1300 nm signal: at most 800/1300 = 61.5 %; 66 % ± 10 % reaches below, its typical value not
    result = check("""
        laser: {wavelength: 800 nm, pulse_energy: 1 mJ, repetition_rate: 1 kHz}
        path:
          - {name: opa, kind: parametric, signal_wavelength: 1300 nm, output: signal, efficiency: 66%}
        """)
    assert [f.severity for f in result.findings if f.rule == "typical-values-disagree"] == ["warning"]


def test_a_whole_number_of_pulses_stays_exact_under_a_global_tolerance(check):
    result = check("""
        defaults: {tolerance: 5%}
        laser: {wavelength: 800 nm, repetition_rate: 1 MHz, pulse_energy: 1 µJ}
        path:
          - {name: pick, kind: pulse_picker, divide_by: 10}
        """)
    rate = result.sheet["pick"]["repetition_rate"]
    assert rate.low == pytest.approx(1e5 * 0.95) and rate.high == pytest.approx(1e5 * 1.05)  # the rate's 5 % only
