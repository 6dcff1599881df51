"""What-if on the command line: ``--set INPUT=VALUE`` changes the parsed document, never the file."""

from __future__ import annotations

import io
import json
import textwrap
from pathlib import Path

import pytest

from focus_by_hand import waist_radius
from speccheck.checking.document import Checker, Options
from speccheck.cli import run

ROOT = Path(__file__).resolve().parent.parent
FOCUS = ROOT / "example_specs" / "proposal-focus-path.yaml"

TRAIN = textwrap.dedent("""\
    spec_version: 1
    laser:
      wavelength: 1030 nm
      repetition_rate: 100 kHz
      pulse_energy: 20 µJ
      average_power: 2 W
      pulse_duration: 300 fs
      beam_diameter: 3 mm
    path:
      - {name: mirror, kind: optic, transmission: 90%}
      - {name: lens, kind: focus, focal_length: 200 mm}
    target:
      peak_fluence: ">= 1 J/cm^2"
    """)


def cli(*argv) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = run(["check", "--no-config", *argv], stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def as_json(*argv) -> tuple[int, dict]:
    code, out, err = cli("--format", "json", *argv)
    assert "Traceback" not in err
    return code, json.loads(out)


def findings(doc: dict, rule: str) -> list[dict]:
    return [f for f in doc["files"][0]["findings"] if f["rule"] == rule]


@pytest.fixture
def spec(tmp_path) -> Path:
    path = tmp_path / "train.yaml"
    path.write_text(TRAIN, encoding="utf-8")
    return path


def test_a_set_value_changes_a_verdict_and_the_file_stays_as_it_was():
    before = FOCUS.read_bytes()
    code, doc = as_json(str(FOCUS))
    assert code == 1 and [f["line"] for f in findings(doc, "target-not-met")] == [26]  # pulse_duration
    # the prechirp that cancels the net GDD of -499 fs² left at 'lens' (the example's own
    # dispersion-compensation note) brings the pulse back near its transform limit
    code, doc = as_json("--set", "prechirp.gdd=-300 fs^2", str(FOCUS))
    assert not findings(doc, "target-not-met")
    assert [f["line"] for f in findings(doc, "target-met")] == [25, 26]
    assert doc["files"][0]["set"] == ["prechirp.gdd=-300 fs^2"]
    assert code == 0
    assert FOCUS.read_bytes() == before


def test_at_a_fixed_rate_a_new_pulse_energy_moves_the_average_power(spec):
    code, doc = as_json("--set", "laser.pulse_energy=30 µJ", str(spec))
    laser = doc["files"][0]["sheet"]["laser"]
    assert laser["pulse_energy"]["status"] == "stated" and laser["pulse_energy"]["set"] is True
    assert laser["average_power"]["status"] == "derived"
    assert laser["average_power"]["value"] == pytest.approx(30e-6 * 100e3)  # E·f_rep, by hand
    assert not findings(doc, "relation-conflict")
    assert doc["files"][0]["set"] == ["laser.pulse_energy=30 µJ (laser.average_power follows)"]


def test_a_new_rate_keeps_the_energy_and_moves_the_power(spec):
    code, doc = as_json("--set", "laser.repetition_rate=200 kHz", str(spec))
    laser = doc["files"][0]["sheet"]["laser"]
    assert laser["pulse_energy"]["status"] == "stated"
    assert laser["average_power"]["value"] == pytest.approx(20e-6 * 200e3)


@pytest.mark.parametrize("setting", ["laser.m2=1.2", "laser.average_power=20 W", "laser.average_power=25 W",
                                     "laser.repetition_rate=1 MHz", "laser.pulse_duration=300 fs"])
def test_a_setting_never_hides_a_contradiction_the_file_already_has(setting):
    # the sheet's 20 nJ contradicts its 20 W at 1 MHz; a what-if of another input, of an input to the value it
    # has, or of the power to another value, must leave that error standing (before, the power "followed")
    sheet = str(ROOT / "example_specs" / "maker-sheet-one-wrong.yaml")
    code, out, _ = cli("--format", "json", "--set", setting, sheet)
    findings = json.loads(out)["files"][0]["findings"]
    assert code == 1 and any(f["rule"] == "relation-conflict" and f["suspect"] == "laser.pulse_energy"
                             for f in findings), setting
    # setting the wrong value right clears it, and nothing else moves
    code, out, err = cli("--set", "laser.pulse_energy=20 uJ", "--no-sheet", sheet)
    assert code == 0 and "follows)" not in out and " follow)" not in out


def test_a_finding_at_a_set_value_points_to_the_command_line(spec):
    code, doc = as_json("--set", "mirror.transmission=120%", str(spec))
    [f] = [f for f in doc["files"][0]["findings"] if f.get("origin")]
    assert f["rule"] == "stage-parameter" and f["line"] is None and f["column"] is None
    assert f["origin"] == "--set mirror.transmission=120%"
    out = io.StringIO()
    run(["check", "--no-config", "--format", "sarif", "--set", "mirror.transmission=120%", str(spec)], stdout=out)
    [result] = [r for r in json.loads(out.getvalue())["runs"][0]["results"] if r.get("properties", {}).get("origin")]
    assert "region" not in result["locations"][0]["physicalLocation"]
    code, text, _ = cli("--no-sheet", "--set", "mirror.transmission=120%", str(spec))
    assert f"{spec} (--set mirror.transmission=120%): error [stage-parameter]" in " ".join(text.split())


def test_set_values_are_marked_in_every_format(spec):
    for fmt, mark in (("human", "*set on the command line"), ("csv", "stated (set)"), ("html", "(--set)"),
                      ("review", "With --set laser.m2=1.3"), ("junit", "testsuite"), ("github", "")):
        code, out, err = cli("--format", fmt, "--set", "laser.m2=1.3", str(spec))
        assert code in (0, 1) and not err and mark in out, fmt


@pytest.mark.parametrize("setting, words", [
    ("lens.focal_lenght=100 mm", "did you mean 'lens.focal_length'"),
    ("nowhere.gdd=1 fs^2", "has no input 'nowhere.gdd'"),
    ("lens.focal_length=100 fs", "is a time, expected a length"),
    ("laser.pulse_energy=1e400 J", "not a finite number"),
    ("laser.pulse_energy={min: 1 mJ", "cannot read the value"),
    ("laser.pulse_shape=[1]", "cannot read the value"),
])
def test_an_unknown_input_or_a_value_the_grammar_refuses_is_a_usage_error(spec, setting, words):
    code, out, err = cli("--set", setting, str(spec))
    assert code == 2 and out == "" and words in err and "Traceback" not in err


@pytest.mark.parametrize("setting", ["laser.pulse_energy", "=1 mJ", "laser=1 mJ", "laser.pulse_energy="])
def test_a_setting_without_input_and_value_is_refused_by_the_parser(spec, setting, capsys):
    code, out, err = cli("--set", setting, str(spec))
    assert code == 2 and "expected INPUT=VALUE" in capsys.readouterr().err  # argparse's own stream


def test_an_unstated_laser_quantity_or_stage_parameter_can_be_set(spec):
    code, doc = as_json("--set", "laser.m2=1.5", "--set", "lens.focal_length=100 mm", str(spec))
    sheet = doc["files"][0]["sheet"]
    assert sheet["laser"]["m2"]["set"] is True
    # the waist behind the lens with M² 1.5 and f 100 mm, by hand (about 4M²λf/(πD))
    assert sheet["lens"]["beam_diameter"]["value"] == pytest.approx(2 * waist_radius(3e-3, 0.1, m2=1.5), rel=1e-6)


def test_a_later_setting_of_one_input_wins(spec):
    code, doc = as_json("--set", "lens.focal_length=100 mm", "--set", "lens.focal_length=50 mm", str(spec))
    spot = doc["files"][0]["sheet"]["lens"]["beam_diameter"]["value"]
    assert spot == pytest.approx(2 * waist_radius(3e-3, 0.05), rel=1e-6)


def test_operating_point_quantities_are_inputs(units):
    text = textwrap.dedent("""\
        spec_version: 1
        laser: {wavelength: 1030 nm, average_power: "<= 20 W"}
        operating_points:
          - {name: slow, repetition_rate: 50 kHz, pulse_energy: 100 µJ}
        """)
    result = Checker(units, Options(settings=(("slow.pulse_energy", "500 µJ"),))).check_text(text, "p.yaml")
    cell = result.sheet["slow"]["pulse_energy"]
    assert cell.overridden and cell.status == "conflict"
    # 500 µJ × 50 kHz = 25 W is more than the sheet's <= 20 W, which allows at most 20 W / 50 kHz = 400 µJ
    assert cell.implied_high == pytest.approx(20 / 50e3, rel=1e-3)
    [f] = [f for f in result.findings if f.rule == "relation-conflict"]
    assert f.origin == "--set slow.pulse_energy=500 µJ" and f.line is None


def test_a_bound_is_read_as_on_the_command_line(spec):
    code, doc = as_json("--set", "laser.average_power=>= 1 W", str(spec))
    assert doc["files"][0]["sheet"]["laser"]["average_power"]["stated"] == ">= 1 W"


def test_a_setting_takes_the_signs_its_parameter_allows(tmp_path):
    path = tmp_path / "neg.yaml"
    path.write_text(textwrap.dedent("""\
        spec_version: 1
        laser: {wavelength: 1030 nm, repetition_rate: 10 kHz, pulse_energy: 100 µJ, pulse_duration: 300 fs,
                beam_diameter: 5 mm, m2: 1}
        path:
          - {name: L1, kind: lens, focal_length: -100 mm}
          - {name: far, kind: sample, distance: 1 m}
        target:
          beam_diameter: "<= 40 mm"
        """), encoding="utf-8")
    # a diverging lens may be set to another negative focal length, a distance to 0 but not below
    assert as_json("--set", "L1.focal_length=-200 mm", str(path))[0] == 0
    assert as_json("--set", "far.distance=0 mm", str(path))[0] == 0
    code, out, err = cli("--set", "far.distance=-1 mm", str(path))
    assert code == 2 and "never negative" in err
    # geometric optics, by hand: D(L) = D0 (1 + L/|f|) ≤ 40 mm needs |f| ≥ 1 m / 7 (diffraction adds 1e-4 here)
    code, doc = as_json(str(path))
    [miss] = [f for f in doc["files"][0]["findings"] if f["rule"] == "target-not-met"]
    lens = next(r for r in miss["remedies"] if r["input"] == "L1.focal_length")
    assert lens["low"] is None and lens["high"] == pytest.approx(-1 / 7, rel=1e-3)
