"""The value grammar: numbers, units, tolerances, bounds and mappings."""

import math

import pytest

from speccheck.reading.values import ValueParser, ValueProblem, parse_tolerance


@pytest.fixture(scope="module")
def parse(units):
    parser = ValueParser(units)
    return lambda key, raw, tol=0.05: parser.parse(key, raw, tol)


def test_a_plain_value_gets_the_default_tolerance(parse):
    s = parse("pulse_energy", "25 nJ")
    assert s.quantity == "pulse_energy"
    assert s.typical == pytest.approx(25e-9)
    assert (s.low, s.high) == (pytest.approx(23.75e-9), pytest.approx(26.25e-9))
    assert s.unit == "nJ"


@pytest.mark.parametrize("text", ["25 µJ", "25 μJ", "25 uJ", "25µJ"])
def test_micro_sign_greek_mu_and_u_all_mean_micro(parse, text):
    # U+00B5 MICRO SIGN and U+03BC GREEK SMALL LETTER MU are both written for "micro".
    assert parse("pulse_energy", text).typical == pytest.approx(25e-6)


def test_an_absolute_tolerance(parse):
    s = parse("pulse_energy", "25 nJ ± 1 nJ")
    assert (s.low, s.high) == (pytest.approx(24e-9), pytest.approx(26e-9))


def test_a_relative_tolerance_with_plus_slash_minus(parse):
    s = parse("pulse_energy", "25 nJ +/- 4%")
    assert (s.low, s.high) == (pytest.approx(24e-9), pytest.approx(26e-9))


def test_a_tolerance_whose_unit_is_written_once(parse):
    s = parse("pulse_energy", "25 ± 1 nJ")
    assert (s.low, s.typical, s.high) == (pytest.approx(24e-9), pytest.approx(25e-9), pytest.approx(26e-9))


def test_bounds_are_one_sided_intervals(parse):
    low = parse("average_power", ">= 20 W")
    high = parse("pulse_duration", "<= 300 fs")
    assert (low.low, low.high) == (20.0, math.inf)
    assert (high.low, high.high) == (0.0, pytest.approx(300e-15))
    assert parse("average_power", "≥ 20 W").low == 20.0


def test_a_min_typical_max_mapping(parse):
    s = parse("average_power", {"min": "20 W", "typical": "22 W", "max": "25 W"})
    assert (s.low, s.typical, s.high) == (20.0, 22.0, 25.0)


def test_a_mapping_whose_min_exceeds_its_max_is_an_empty_interval(parse):
    with pytest.raises(ValueProblem) as e:
        parse("average_power", {"min": "25 W", "max": "20 W"})
    assert e.value.rule == "empty-interval"


def test_units_with_superscripts_and_powers(parse):
    assert parse("peak_intensity", "1e14 W/cm²").typical == pytest.approx(1e18)  # 1 W/cm² = 1e4 W/m²
    assert parse("peak_intensity", "1e14 W/cm^2").typical == pytest.approx(1e18)
    assert parse("peak_intensity", "1×10^14 W/cm^2").typical == pytest.approx(1e18)


@pytest.mark.parametrize("text, quantity, si", [
    ("8 nm", "spectral_bandwidth_wavelength", 8e-9),
    ("2.2 THz", "spectral_bandwidth", 2.2e12),
    ("74 cm^-1", "spectral_bandwidth_wavenumber", 7400.0),
])
def test_a_bandwidth_in_nm_thz_or_wavenumber_goes_to_its_own_domain(parse, text, quantity, si):
    s = parse("spectral_bandwidth", text)
    assert s.quantity == quantity and s.typical == pytest.approx(si)


def test_dimensionless_values_may_be_bare_numbers_or_percentages(parse):
    assert parse("m2", 1.1).typical == pytest.approx(1.1)
    assert parse("duty_cycle", "2%").typical == pytest.approx(0.02)


@pytest.mark.parametrize("key, raw, rule", [
    ("pulse_energy", 25, "missing-unit"),
    ("pulse_energy", "25", "missing-unit"),
    ("average_power", "2 J", "wrong-dimension"),
    ("m2", "1.1 W", "wrong-dimension"),
    ("pulse_energy", "25 nanojewels", "unknown-unit"),
    ("pulse_duration", "-150 fs", "non-positive-value"),
    ("pulse_duration", "0 fs", "non-positive-value"),
    ("pulse_energy", float("nan"), "non-finite-value"),
    ("pulse_energy", "nan nJ", "non-finite-value"),
    ("pulse_energy", "1e999999 J", "non-finite-value"),
    ("pulse_energy", "about twenty", "invalid-value"),
    ("pulse_energy", True, "invalid-value"),
    ("pulse_energy", "10**10**10 W", "unknown-unit"),
])
def test_bad_values_name_the_rule_they_break(parse, key, raw, rule):
    with pytest.raises(ValueProblem) as e:
        parse(key, raw)
    assert e.value.rule == rule


def test_the_wrong_dimension_message_says_what_was_expected(parse):
    with pytest.raises(ValueProblem) as e:
        parse("average_power", "2 J")
    assert "energy" in e.value.message and "expected a power" in e.value.message


def test_tolerances_are_read_as_fractions():
    assert parse_tolerance("5%") == pytest.approx(0.05)
    assert parse_tolerance(0.02) == pytest.approx(0.02)
    with pytest.raises(ValueProblem):
        parse_tolerance("150%")


@pytest.mark.parametrize("text", ["74 cm⁻¹", "74 cm^-1", "74 1/cm"])
def test_superscript_minus_one_is_read(parse, text):
    assert parse("spectral_bandwidth", text).typical == pytest.approx(7400.0)


@pytest.mark.parametrize("text, si", [
    ("1 J/cm2", 1e4),  # J/cm² as people type it: 1 J/cm² = 1e4 J/m² (SI prefixes, by hand)
    ("2 W/mm2", 2e6),
    ("1719 cm-1", 1719 * 100.0),  # a wavenumber in cm⁻¹
])
def test_an_area_or_wavenumber_without_the_caret_is_read_as_a_power(parse, text, si):
    key = "peak_fluence" if "J" in text else "peak_intensity" if "W" in text else "spectral_bandwidth"
    s = parse(key, text)
    assert s.typical == pytest.approx(si, rel=1e-12)


def test_a_bound_written_without_quotes_gets_a_hint(check):
    r = check("laser:\n  wavelength: 800 nm\n  average_power: >= 20 W\n")
    (finding,) = [f for f in r.findings if f.rule == "yaml-syntax"]
    assert "must be quoted" in finding.message and "'>= 20 W'" in finding.message


@pytest.mark.parametrize("raw", [5, 3, 1])
def test_a_tolerance_written_as_a_plain_number_above_one_says_a_plain_number_is_a_fraction(raw):
    with pytest.raises(ValueProblem) as e:
        parse_tolerance(raw)
    assert f"write '{raw}%'" in e.value.message


@pytest.mark.parametrize("unit, keep, stride", [
    ("W", False, 3), ("fs", True, 1), ("nm", True, 3), ("mJ", True, 7), ("uJ", True, 7), ("MHz", False, 7),
    ("mm", True, 7), ("W/cm^2", False, 50), ("1", False, 50), ("J/m^2", False, 11), ("µm", False, 7),
])
def test_the_unit_table_gives_the_choice_made_afresh_at_every_step(units, unit, keep, stride):
    # choose_unit looks its answer up in a table of the steps (1/10000 of a decade) where it changes;
    # asked afresh at every step from 1e-22 to 1e22 (its value rebuilt as the choice sees it), the
    # choice must be the table's
    from speccheck.reading.units import _choose_unit, choose_unit

    for step in range(-220_000, 220_000, stride):
        value = 10.0 ** (step / 1e4)
        assert choose_unit(units, value, unit, keep) == _choose_unit(units, value, unit, keep), (step, unit)
        assert choose_unit(units, -value, unit, keep) == _choose_unit(units, value, unit, keep)


@pytest.mark.parametrize("text, named", [("80 mhz", ["'mHz'", "'MHz'"]), ("10 uj", ["'uJ'"]), ("2 w", ["'W'"]),
                                         ("1 khz", ["'kHz'"]), ("3 MJ", None)])
def test_a_unit_in_the_wrong_case_names_every_unit_it_may_mean(units, text, named):
    from speccheck.reading.values import ValueParser, ValueProblem

    quantity = {"hz": "repetition_rate", "j": "pulse_energy", "w": "average_power"}
    key = next(v for k, v in quantity.items() if text.lower().endswith(k))
    parser = ValueParser(units)
    if named is None:  # a unit that exists is read, not hinted at
        assert parser.parse(key, text, 0.05).typical == pytest.approx(3e6)
        return
    with pytest.raises(ValueProblem) as problem:
        parser.parse(key, text, 0.05)
    assert problem.value.rule == "unknown-unit" and all(n in problem.value.message for n in named)
    assert "case-sensitive" in problem.value.message
