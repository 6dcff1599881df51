"""``speccheck solve FILE --for INPUT``: the range of one input over which every target is met and no
error is reported, checked against a brute-force scan of ``--set`` values and a closed form."""

from __future__ import annotations

import io
import json
from pathlib import Path
import math
import textwrap

import pytest

from focus_by_hand import FOCUS_LASER, focal_length_for, inverse_square_waist, waist_radius
from speccheck.checking.document import Checker, Options
from speccheck.cli import run

SPEC = FOCUS_LASER + textwrap.dedent("""\
    path:
      - {name: mirror, kind: optic, transmission: 90%}
      - {name: lens, kind: focus, focal_length: 200 mm}
    target:
      peak_intensity: ">= {intensity} W/cm^2"
      peak_fluence: "<= {fluence} J/cm^2"
    """)


def at_focus(f: float) -> tuple[float, float]:
    """Peak intensity and fluence at the focus, by hand (W/m², J/m²): the 1/e² waist radius behind a
    thin lens (Self 1983, in focus_by_hand; about 2M²λf/(πD)), F = 2E/(πw0²), I = 0.9394 F/τ."""
    w0 = waist_radius(5e-3, f)
    fluence = 2 * 0.9 * 100e-6 / (math.pi * w0 ** 2)
    return 2 * math.sqrt(math.log(2) / math.pi) * fluence / 300e-15, fluence


I0, F0 = at_focus(0.2)
C0 = inverse_square_waist(5e-3, 0.2)  # I and F ∝ 1/w0'²
LOW, HIGH = focal_length_for(2 * C0, 5e-3), focal_length_for(0.5 * C0, 5e-3)  # about 200 mm/√2 and √2·200 mm
TEXT = SPEC.replace("{intensity}", f"{0.5 * I0 / 1e4:.12g}").replace("{fluence}", f"{2 * F0 / 1e4:.12g}")


@pytest.fixture
def spec(tmp_path):
    path = tmp_path / "focus.yaml"
    path.write_text(TEXT, encoding="utf-8")
    return path


def solve(*argv) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = run(["solve", "--no-config", *argv], stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def brute_force(units, lengths) -> list[float]:
    """The focal lengths at which the check, with that value set, reports no error and the nominal
    value of each target meets it."""
    good = []
    for f in lengths:
        result = Checker(units, Options(settings=(("lens.focal_length", f"{f!r} m"),), remedies="none")).check_text(
            TEXT, "focus.yaml")
        lens = result.sheet["lens"]
        ok = lens["peak_intensity"].value >= 0.5 * I0 and lens["peak_fluence"].value <= 2 * F0
        if ok and not any(x.severity == "error" for x in result.findings):
            good.append(f)
    return good


def test_solve_on_a_path_agrees_with_a_brute_force_scan_and_the_closed_form(spec, units):
    code, out, err = solve(str(spec), "--for", "lens.focal_length", "--format", "json")
    assert code == 0 and not err
    found = json.loads(out)
    assert list(found) == ["input", "low", "high", "unit", "reachable", "searched"] and found["reachable"]
    assert found["searched"][0] < found["low"] < found["high"] < found["searched"][1]
    assert found["input"] == "lens.focal_length" and found["unit"] == "m"
    # I and F ∝ 1/w0'² (about 1/f²): I ≥ I0/2 for f ≤ HIGH, F ≤ 2F0 for f ≥ LOW
    assert found["low"] == pytest.approx(LOW, rel=1e-5)
    assert found["high"] == pytest.approx(HIGH, rel=1e-5)
    lengths = [0.05 * (16 ** (k / 80)) for k in range(81)]  # 50 mm … 800 mm, 3.5 % apart
    good = brute_force(units, lengths)
    assert good, "the scan found no focal length that meets both targets"
    step = 16 ** (1 / 80)
    # (a grid point falls on the closed-form end: the search ends within its tolerance of 1e-7 of it)
    assert good[0] / step < found["low"] <= good[0] * (1 + 1e-6) and good[-1] * (1 - 1e-6) <= found["high"] < good[-1] * step
    assert all(good[0] <= f <= good[-1] for f in good) and len(good) == sum(
        1 for f in lengths if good[0] <= f <= good[-1])  # one interval, no holes


def test_solve_in_words_and_with_a_set_value(spec):
    code, out, _ = solve(str(spec), "--for", "lens.focal_length")
    words = f"every target is met and no error is reported for lens.focal_length at {LOW * 1e3:.1f} mm … {HIGH * 1e3:.1f} mm"
    assert code == 0 and words in out and "(now 200 mm)" in out
    # at half the energy the intensity needs f ≤ 200 mm: the range narrows to 141 … 200 mm
    code, out, _ = solve(str(spec), "--for", "lens.focal_length", "--set", "laser.pulse_energy=50 µJ",
                         "--format", "json")
    assert json.loads(out)["high"] == pytest.approx(0.2, rel=1e-5)


def test_an_empty_range_exits_1(tmp_path):
    path = tmp_path / "never.yaml"
    path.write_text(SPEC.replace("{intensity}", f"{2 * I0 / 1e4:.12g}").replace("{fluence}", f"{F0 / 1e4:.12g}"),
                    encoding="utf-8")
    # I ≥ 2 I0 needs f ≤ 141 mm, F ≤ F0 needs f ≥ 200 mm: no focal length does both
    code, out, _ = solve(str(path), "--for", "lens.focal_length", "--format", "json")
    found = json.loads(out)
    assert code == 1 and {k: found[k] for k in ("input", "low", "high", "unit", "reachable")} == {
        "input": "lens.focal_length", "low": None, "high": None, "unit": "m", "reachable": False}
    code, out, _ = solve(str(path), "--for", "lens.focal_length")
    assert code == 1 and "no value of lens.focal_length in the range searched (" in out
    assert "meets every target without an error" in out


def test_solve_agrees_with_check_on_a_value_the_spec_contradicts():
    # 20 nJ against 20 W at 1 MHz: check reports it; solve must not find that any energy will do because
    # the power would follow it.  The search (20 nJ / 30 … × 30) never reaches the consistent 20 µJ.
    sheet = str(Path(__file__).resolve().parent.parent / "example_specs" / "maker-sheet-one-wrong.yaml")
    for name in ("laser.pulse_energy", "laser.average_power", "laser.repetition_rate"):
        code, out, _ = solve(sheet, "--for", name, "--format", "json")
        assert code == 1 and json.loads(out)["reachable"] is False, name
    # and with the energy set where the rest puts it, the range holds the value now
    code, out, _ = solve(sheet, "--for", "laser.pulse_energy", "--set", "laser.pulse_energy=20 uJ", "--format", "json")
    found = json.loads(out)
    assert code == 0 and (found["low"] or 0) <= 20e-6 <= (found["high"] or 1)


@pytest.mark.parametrize("argv, words", [
    (["--for", "lens.focal_lenght"], "did you mean 'lens.focal_length'"),
    (["--for", "lens.focal_length", "--set", "lens.focal_length=1 fs"], "is a time, expected a length"),
    (["--for", "laser.pulse_shape"], "is not a number"),
])
def test_solve_usage_errors_exit_2(spec, argv, words):
    code, out, err = solve(str(spec), *argv)
    assert code == 2 and out == "" and words in err and "Traceback" not in err


def test_solve_of_a_file_that_cannot_be_read_exits_2(tmp_path):
    code, out, err = solve(str(tmp_path / "missing.yaml"), "--for", "laser.pulse_energy")
    assert code == 2 and "cannot read" in err


def test_solve_meets_the_target_at_every_operating_point(tmp_path):
    path = tmp_path / "points.yaml"
    path.write_text(textwrap.dedent("""\
        spec_version: 1
        laser: {wavelength: 1030 nm, average_power: <= 200 W, pulse_duration: 300 fs, pulse_shape: sech2}
        operating_points:
          - {name: 100 kHz, repetition_rate: 100 kHz, pulse_energy: 150 µJ}
          - {name: 1 MHz, repetition_rate: 1 MHz, pulse_energy: 20 µJ}
        target:
          peak_power: ">= 100 MW"
        """), encoding="utf-8")
    code, out, _ = solve(str(path), "--for", "laser.pulse_duration", "--format", "json")
    # the 1 MHz point decides: P = 0.8814 E/τ ≥ 100 MW needs τ ≤ 0.8814 × 20 µJ / 100 MW (sech², by hand);
    # the 100 kHz point alone would allow 1.32 ps
    assert code == 0 and json.loads(out)["high"] == pytest.approx(0.8814 * 20e-6 / 100e6, rel=2e-3)


def test_solve_on_a_target_the_numbers_do_not_determine_says_what_would(tmp_path):
    path = tmp_path / "undetermined.yaml"
    path.write_text(textwrap.dedent("""\
        spec_version: 1
        laser: {wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 100 µJ, pulse_duration: 300 fs}
        path:
          - {name: obj, kind: focus, focal_length: 200 mm}
        target:
          peak_intensity: ">= 1e13 W/cm^2"
        """), encoding="utf-8")
    code, out, _ = solve(str(path), "--for", "obj.focal_length")
    assert code == 1 and "stating laser.beam_diameter would determine it" in out
