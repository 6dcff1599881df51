"""Every rule of the core, each stated as a small spec and the (rule, line) it gives."""

import math

import pytest

from speccheck.records.rules import RULES

from conftest import cell, rules_of


def errors(result):
    return [(f.rule, f.line) for f in result.findings if f.severity == "error"]


# ----------------------------------------------------------------- reading

def test_a_yaml_syntax_error_has_its_line_and_column_and_no_traceback(check):
    result = check("laser:\n  wavelength: [800 nm\n  pulse_energy: 1 nJ\n")
    assert result.findings[0].rule == "yaml-syntax"
    assert result.findings[0].line == 4 and result.findings[0].column >= 1


def test_both_lines_of_a_duplicate_key_are_reported(check):
    result = check("""
        laser:
          pulse_energy: 25 nJ
          pulse_energy: 2.5 nJ
        """)
    (finding,) = [f for f in result.findings if f.rule == "duplicate-key"]
    assert finding.line == 4 and "lines 3 and 4" in finding.message
    assert cell(result, "pulse_energy").value == pytest.approx(25e-9)  # the first is kept


def test_an_unknown_key_suggests_the_closest_known_one(check):
    result = check("laser:\n  pulse_enrgy: 25 nJ\n")
    (finding,) = result.findings
    assert (finding.rule, finding.line, finding.column) == ("unknown-key", 3, 3)
    assert "did you mean 'pulse_energy'" in finding.message


def test_an_unknown_top_level_key(check):
    assert rules_of(check("lazer:\n  wavelength: 800 nm\nlaser: {}\n"))[0] == ("unknown-key", 2)


@pytest.mark.parametrize("text, line", [
    ("spec_version: 2\nlaser: {}\n", 1),
    ("laser:\n  pulse_shape: triangle\n", 3),
    ("laser:\n  pulse_energy: [1, 2]\n", 3),
    ("title: [a list]\nlaser: {}\n", 2),
])
def test_schema_violations_point_at_the_offending_line(check, text, line):
    result = check(text)
    assert ("schema-violation", line) in rules_of(result)


def test_a_missing_laser_block_is_a_schema_violation(check):
    result = check("title: nothing else\n")
    assert [f.rule for f in result.findings] == ["schema-violation"]
    assert "laser" in result.findings[0].message


def test_a_python_tag_is_refused(check):
    result = check("laser: !!python/object/apply:os.system [echo hi]\n")
    assert "unsupported-yaml-tag" in [f.rule for f in result.findings]


def test_an_empty_file_is_a_schema_violation_not_a_crash(checker):
    result = checker.check_text(b"", "empty.yaml")
    assert [f.rule for f in result.findings] == ["schema-violation"]


# ------------------------------------------------------------ single values

@pytest.mark.parametrize("value, rule", [
    ("2 J", "wrong-dimension"),
    ("2", "missing-unit"),
    ("-2 W", "non-positive-value"),
    ("0 W", "non-positive-value"),
    (".nan", "non-finite-value"),
    (".inf", "non-finite-value"),
    ("2 wats", "unknown-unit"),
])
def test_bad_single_values_are_located(check, value, rule):
    result = check(f"laser:\n  wavelength: 800 nm\n  average_power: {value}\n")
    assert rules_of(result) == [(rule, 4)]
    assert result.findings[0].column == 18
    assert result.findings[0].quantities == ("laser.average_power",)


def test_a_bad_default_tolerance_is_reported_and_5_percent_used(check):
    result = check("defaults:\n  tolerance: lots\nlaser:\n  pulse_energy: 25 nJ\n")
    assert rules_of(result) == [("invalid-value", 3)]
    assert cell(result, "pulse_energy").high == pytest.approx(25e-9 * 1.05)


def test_the_same_quantity_under_two_keys(check):
    result = check("laser:\n  spectral_bandwidth: 8 nm\n  spectral_bandwidth_wavelength: 8 nm\n")
    assert rules_of(result) == [("duplicate-quantity", 4)]


# ---------------------------------------------------------------- relations

def test_an_energy_with_a_prefix_slip_is_the_suspect(check):
    result = check("""
        laser:
          repetition_rate: 80 MHz
          average_power: 2 W
          pulse_energy: 25 µJ
          pulse_duration: 100 fs
          peak_power: 235 kW
          pulse_shape: gaussian
        """)
    (finding,) = result.findings
    assert (finding.rule, finding.line, finding.column) == ("relation-conflict", 5, 17)
    assert finding.suspect == "laser.pulse_energy"
    assert "25 nJ" in finding.message and "1000×" in finding.message
    assert set(finding.quantities) >= {"laser.pulse_energy", "laser.average_power", "laser.repetition_rate"}
    assert cell(result, "pulse_energy").status == "conflict"
    # the built-in tolerances: an average power to 3%, a repetition rate to 0.01% (quantity table)
    assert cell(result, "pulse_energy").implied_low == pytest.approx(2.0 * 0.97 / (80e6 * 1.0001), rel=1e-9)


def test_three_values_in_one_relation_are_ambiguous_candidates(check):
    result = check("laser:\n  repetition_rate: 80 MHz\n  average_power: 2 W\n  pulse_energy: 25 µJ\n")
    (finding,) = result.findings
    assert finding.rule == "relation-conflict" and finding.suspect is None
    assert set(finding.candidates) == {"laser.repetition_rate", "laser.average_power", "laser.pulse_energy"}
    assert "state more numbers" in finding.message
    assert finding.line == 3  # the first candidate in the file


def test_values_within_tolerance_do_not_conflict(check):
    # 2 W / 80 MHz = 25 nJ; 26 nJ is 4% off, inside the default 5%.
    result = check("laser:\n  repetition_rate: 80 MHz\n  average_power: 2 W\n  pulse_energy: 26 nJ\n")
    assert errors(result) == []


def test_a_tight_own_tolerance_turns_the_same_numbers_into_a_conflict(check):
    result = check("laser:\n  repetition_rate: 80 MHz ± 0.1%\n  average_power: 2 W ± 0.1%\n"
                   "  pulse_energy: 26 nJ ± 0.1%\n")
    assert [f.rule for f in result.findings] == ["relation-conflict"]


def test_a_conflict_through_a_chain_of_relations(check):
    # Intensity claim against energy, duration and diameter: three relations deep.
    result = check("""
        laser:
          pulse_energy: 2 mJ
          repetition_rate: 1 kHz
          average_power: 2 W
          pulse_duration: 40 fs
          autocorrelation_width: 57 fs
          beam_diameter: 20 µm
          peak_fluence: 1270 J/cm^2
          peak_intensity: 1.2e17 W/cm^2
          pulse_shape: gaussian
          beam_profile: gaussian
        """)
    (finding,) = result.findings
    assert finding.suspect == "laser.peak_intensity"
    assert "4.01×" in finding.message  # 1.2e17 / 2.99e16, by hand: 2·0.9394·2e-3/40e-15/(π·1e-6 cm²)


def test_bounds_take_part_in_relations(check):
    # >= 20 W at 80 MHz means at least 250 nJ: 100 nJ is impossible.
    result = check("laser:\n  average_power: '>= 20 W'\n  repetition_rate: 80 MHz\n  pulse_energy: 100 nJ\n")
    assert [f.rule for f in result.findings] == ["relation-conflict"]
    ok = check("laser:\n  average_power: '>= 20 W'\n  repetition_rate: 80 MHz\n")
    energy = cell(ok, "pulse_energy")
    assert energy.status == "derived" and energy.low == pytest.approx(20 / (80e6 * 1.0001)) and energy.high is None  # rate to 0.01%


# ------------------------------------------------------------------- limits

def test_a_bandwidth_too_narrow_for_the_duration_is_impossible(check):
    # By hand: Δν = c·2 nm/(800 nm)² = 0.937 THz; × 50 fs = 0.047 < 0.441.
    result = check("laser:\n  wavelength: 800 nm\n  spectral_bandwidth: 2 nm\n"
                   "  pulse_duration: 50 fs\n  pulse_shape: gaussian\n")
    assert rules_of(result) == [("below-transform-limit", 5)]  # at the duration, next to the product
    assert "0.4413" in result.findings[0].message


def test_a_sech2_pulse_may_be_shorter_than_a_gaussian_with_the_same_bandwidth(check):
    # TBP 0.35: above the sech² limit 0.315, below the Gaussian 0.441.
    spec = "laser:\n  carrier_frequency: 375 THz\n  spectral_bandwidth: 3.5 THz\n  pulse_duration: 100 fs\n"
    assert errors(check(spec + "  pulse_shape: sech2\n")) == []
    assert errors(check(spec + "  pulse_shape: gaussian\n")) == [("below-transform-limit", 4)]


def test_a_strongly_chirped_pulse_is_a_note(check):
    result = check("laser:\n  spectral_bandwidth: 10 THz\n  pulse_duration: 500 fs\n  pulse_shape: gaussian\n")
    assert [(f.rule, f.severity) for f in result.findings] == [("strongly-chirped", "note")]


def test_a_pulse_longer_than_its_period(check):
    result = check("laser:\n  repetition_rate: 80 GHz\n  pulse_duration: 20 ps\n")
    assert ("pulse-longer-than-period", 3) in rules_of(result)


def test_fewer_than_one_cycle_is_a_warning(check):
    result = check("laser:\n  wavelength: 800 nm\n  pulse_duration: 1.5 fs\n")
    (finding,) = result.findings
    assert (finding.rule, finding.severity) == ("sub-cycle-pulse", "warning")


@pytest.mark.parametrize("duration", ["150 ns", "0.5 fs"])
def test_durations_outside_the_ultrafast_range_are_a_note(check, duration):
    result = check(f"laser:\n  pulse_duration: {duration}\n")
    assert [(f.rule, f.severity) for f in result.findings] == [("outside-ultrafast-range", "note")]


def test_a_derived_number_beyond_a_float_is_said_not_left_out_silently(check):
    # E/τ/(πw²/2) here is about 1e376 W/m², beyond a double (1.8e308); the sheet cannot show it and says so
    result = check("laser:\n  pulse_energy: 1e99 J\n  pulse_duration: 1e-85 fs\n  beam_diameter: 1e-95 mm\n"
                   "  wavelength: 800 nm\n")
    (beyond,) = [f for f in result.findings if f.rule == "derived-out-of-range"]  # one finding for the column
    assert "peak_intensity above about 1e308 W/m^2 (beyond what a float holds" in beyond.message
    assert "laser.peak_intensity" in beyond.quantities
    assert "peak_intensity" not in result.sheet["laser"]


def test_a_derived_number_outside_the_stated_range_is_a_warning(check):
    # 1e99 W at 1e-90 Hz is 1e189 J a pulse: each stated value is in range, what follows is not
    rule = RULES["derived-out-of-range"]
    result = check("laser:\n  " + rule.failing.replace("\n", "\n  ") + "\n")
    said = [f for f in result.findings if f.rule == "derived-out-of-range"]
    assert len(said) == 1 and {"laser.pulse_energy", "laser.peak_power"} <= set(said[0].quantities)
    assert result.sheet["laser"]["pulse_energy"].value == pytest.approx(1e99 / 1e-90, rel=1e-9)  # still shown
    calm = check("laser:\n  " + rule.passing.replace("\n", "\n  ") + "\n")
    assert "derived-out-of-range" not in [f.rule for f in calm.findings]
    assert calm.sheet["laser"]["pulse_energy"].value == pytest.approx(1e-3)  # 1 W / 1 kHz, by hand


def test_m2_below_one_is_impossible(check):
    assert rules_of(check("laser:\n  m2: 0.8\n")) == [("m2-below-one", 3)]


def test_an_unstated_pulse_shape_is_noted_when_it_matters(check):
    result = check("laser:\n  pulse_energy: 1 mJ\n  pulse_duration: 30 fs\n")
    (finding,) = result.findings
    assert finding.rule == "assumed-shape" and "peak_power" in finding.message
    assert errors(check("laser:\n  pulse_energy: 1 mJ\n")) == [] and not check("laser:\n  pulse_energy: 1 mJ\n").findings


# -------------------------------------------------------------------- sheet

def test_the_sheet_marks_stated_and_derived_cells_in_si(check):
    result = check("laser:\n  average_power: 2 W\n  repetition_rate: 80 MHz\n")
    energy = cell(result, "pulse_energy")
    assert (energy.status, energy.unit) == ("derived", "J")
    assert energy.value == pytest.approx(25e-9)
    assert cell(result, "average_power").status == "stated"
    assert "peak_power" not in result.sheet["laser"]  # nothing determines it


def test_every_rule_that_findings_use_is_in_the_catalogue(check):
    for text in ("laser:\n  m2: 0.8\n", "laser: [1\n", "laser:\n  x: 1\n"):
        for f in check(text).findings:
            assert f.rule in RULES and f.severity == RULES[f.rule].severity


@pytest.mark.parametrize("bandwidth, noted", [("200 nm", True), ("100 nm", False)])
def test_a_very_wide_bandwidth_says_its_conversion_is_linearised(check, bandwidth, noted):
    result = check(f"laser:\n  wavelength: 800 nm\n  spectral_bandwidth: {bandwidth}\n")
    found = [f for f in result.findings if f.rule == "bandwidth-linearised"]
    assert bool(found) is noted
    if found:
        # exact: c (1/700 nm − 1/900 nm) against the linear c · 200 nm / (800 nm)², computed here
        lam, d = 800e-9, 200e-9
        exact, linear = 1 / (lam - d / 2) - 1 / (lam + d / 2), d / lam**2
        assert f"{(exact / linear - 1) * 100:.2g}%" in found[0].message  # (Δλ/λ)²/4 = 1.6%


def test_a_spec_that_states_nothing_is_said_not_passed_silently(check):
    rule = RULES["nothing-checked"]
    result = check(rule.failing + "\n")
    assert [(f.rule, f.severity) for f in result.findings] == [("nothing-checked", "warning")]
    assert "nothing-checked" not in [f.rule for f in check(rule.passing + "\n").findings]
    # a spec whose values could not be read says so already (an error): no second word
    assert [f.rule for f in check("laser:\n  pulse_enrgy: 25 nJ\n").findings] == ["unknown-key"]
    # a path or operating points are something to check, even with a bare laser block
    assert "nothing-checked" not in [f.rule for f in check(
        "laser: {}\npath:\n  - {name: m, kind: optic, transmission: 90%}\n").findings]
