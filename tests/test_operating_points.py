"""Makers' sheets with operating points: each point is a column checked on its own."""

import pytest

from conftest import cell, rules_of

SHEET = """
laser:
  wavelength: 1030 nm
  average_power: <= 20 W
  pulse_duration: 300 fs
  pulse_shape: sech2
operating_points:
  - name: 100 kHz
    repetition_rate: 100 kHz
    pulse_energy: ">= 150 µJ"
  - name: 1 MHz
    repetition_rate: 1 MHz
    pulse_energy: 20 µJ
"""


def test_each_point_becomes_a_column_of_the_sheet(check):
    result = check(SHEET)
    assert list(result.sheet) == ["laser", "100 kHz", "1 MHz"]
    assert rules_of(result) == []
    # By hand: 20 µJ × 1 MHz = 20 W; 0.8814 × 20 µJ / 300 fs = 58.8 MW.
    assert cell(result, "average_power", "1 MHz").status == "stated"  # inherited bound
    assert cell(result, "peak_power", "1 MHz").value == pytest.approx(0.8814 * 20e-6 / 300e-15, rel=1e-3)
    # The bound works in a point: ≥ 150 µJ at 100 kHz is ≥ 15 W, inside the 20 W maximum.
    assert cell(result, "pulse_energy", "100 kHz").low == pytest.approx(150e-6)


def test_an_energy_the_rate_cannot_reach_is_reported_in_its_column(check):
    result = check(SHEET.replace('">= 150 µJ"', "300 µJ"))
    (finding,) = result.findings
    assert finding.rule == "relation-conflict" and finding.message.startswith("100 kHz:")
    assert finding.line == 9  # inside the point, not at the inherited laser line
    assert cell(result, "pulse_energy", "100 kHz").status == "conflict"


def test_a_point_above_the_sheets_own_maximum(check):
    result = check(SHEET + "  - name: 2 MHz\n    repetition_rate: 2 MHz\n    average_power: 25 W\n")
    assert ("operating-point-beyond-limit", 16) in rules_of(result)
    (finding,) = [f for f in result.findings if f.rule == "operating-point-beyond-limit"]
    assert "20 W" in finding.message and "2 MHz" in finding.message
    # and its cell is marked, as a conflict is, in every format's grid
    assert cell(result, "average_power", "2 MHz").status == "conflict"
    assert cell(result, "repetition_rate", "2 MHz").status == "stated"


def test_overriding_a_plain_nominal_value_is_not_a_limit(check):
    result = check("laser:\n  repetition_rate: 1 MHz\n  average_power: 20 W\n"
                   "operating_points:\n  - {name: low, repetition_rate: 100 kHz, average_power: 10 W}\n")
    assert rules_of(result) == []


def test_a_mistake_in_the_laser_block_is_reported_once_not_per_point(check):
    result = check(SHEET.replace("pulse_duration: 300 fs", "pulse_duration: 300"))
    assert rules_of(result) == [("missing-unit", 5)]


def test_duplicate_point_names(check):
    result = check(SHEET.replace("name: 1 MHz", "name: 100 kHz"))
    assert ("duplicate-name", 11) in rules_of(result)
    assert list(result.sheet) == ["laser", "100 kHz", "point 2"]


def test_an_unknown_key_in_a_point_is_suggested(check):
    result = check(SHEET.replace("    pulse_energy: 20 µJ", "    pulse_enegry: 20 µJ"))
    (finding,) = result.findings
    assert finding.rule == "unknown-key" and "pulse_energy" in finding.message and finding.line == 13


# --- a target is judged at every point --------------------------------------------------------

SECH2 = 0.8814  # P_pk·τ/E of a sech² pulse (FWHM τ): 2·arccosh(√2)/2 … published pulse-shape tables

TARGETED = SHEET.replace('">= 150 µJ"', "150 µJ") + """
target:
  peak_power: ">= 100 MW"
"""


def targets(result):
    return [(f.rule, f.message) for f in result.findings if f.rule.startswith("target-")]


def test_a_target_met_at_one_point_and_not_at_another_says_so_at_each(check):
    result = check(TARGETED.replace("<= 20 W", "<= 200 W"))
    said = targets(result)
    # by hand: 150 µJ → 0.8814 × 150 µJ / 300 fs = 441 MW (met); 20 µJ → 58.8 MW (not met)
    assert any(r == "target-met" and m.startswith("at operating point '100 kHz'") and "440.7 MW" in m for r, m in said)
    [miss] = [f for f in result.findings if f.rule == "target-not-met"]
    assert miss.message.startswith("at operating point '1 MHz': target peak_power >= 100 MW is not met at this point")
    assert miss.line == 16  # the target's line
    # the point's own energy is offered: E ≥ P·τ/0.8814 = 34 µJ (34 W at 1 MHz), by hand, up to the
    # 200 µJ that the sheet's 200 W allows at 1 MHz (the end of what it can be, not of the target);
    # the laser block has no rate or energy of its own, so its own verdict (not determined) is not said
    remedy = {r.input: r for r in miss.remedies}["1 MHz.pulse_energy"]
    assert remedy.low == pytest.approx(100e6 * 300e-15 / SECH2, rel=2e-3)
    assert remedy.high == pytest.approx(200e-6, rel=1e-3) and remedy.binding == (True, False)
    assert not any(r == "target-unknown" for r, _ in said)


def test_a_point_whose_values_contradict_each_other_is_not_judged(check):
    result = check(TARGETED.replace("pulse_energy: 150 µJ", "pulse_energy: 300 µJ"))
    [unknown] = [m for r, m in targets(result) if r == "target-unknown"]
    assert unknown.startswith("at operating point '100 kHz'") and "contradict each other (line 9)" in unknown


def test_a_remedy_beyond_the_sheets_own_limit_is_not_offered(check):
    # at 1 MHz, 34 µJ would be 34 W: beyond the sheet's 20 W maximum, so no energy of the point
    # meets the target; a shorter pulse does: P = 0.8814 E/τ, so τ ≤ 0.8814 × 20 µJ / 100 MW (by hand)
    [miss] = [f for f in check(TARGETED).findings if f.rule == "target-not-met"]
    remedies = {r.input: r for r in miss.remedies}
    assert not remedies["1 MHz.pulse_energy"].reachable
    assert remedies["laser.pulse_duration"].high == pytest.approx(SECH2 * 20e-6 / 100e6, rel=2e-3)


def test_a_target_met_exactly_is_met(check):
    # 100 µJ × 100 kHz = 10 W exactly (by hand); the derived value may differ in its last digits
    r = check("""
        defaults: {tolerance: 0%}
        laser: {wavelength: 1030 nm, pulse_duration: 300 fs, average_power: "<= 20 W"}
        operating_points:
          - {name: 100 kHz, repetition_rate: 100 kHz, pulse_energy: 100 µJ}
        target:
          average_power: ">= 10 W"
        """.replace("        ", ""))
    [f] = [f for f in r.findings if f.rule.startswith("target-")]
    assert f.rule == "target-met"


def test_a_point_under_the_sheets_bound_shows_what_its_own_values_give(check):
    # the sheet's "<= 20 W" narrowed by 100 µJ × 100 kHz (± tolerances) shows 10 W, not the middle of
    # 9.5 … 10.5 W; a bound-only energy (>= 380 µJ, at most 400 µJ by 20 W at 50 kHz) shows the middle of
    # its range, and the peak power beside it is 0.8814 E/τ of that energy (by hand), not its own middle
    r = check(SHEET.replace('">= 150 µJ"', "100 µJ") + """
  - name: 50 kHz
    repetition_rate: 50 kHz
    pulse_energy: ">= 380 µJ"
""")
    assert cell(r, "average_power", "100 kHz").value == pytest.approx(10.0, rel=1e-9)
    energy = cell(r, "pulse_energy", "50 kHz").value
    assert 380e-6 < energy < 400e-6
    assert cell(r, "peak_power", "50 kHz").value == pytest.approx(0.8814 * energy / 300e-15, rel=1e-3)

# -- the review of a sheet with operating points: one short page
REVIEW_LINES = 30  # the budget: a table, the impossible claims (with a target missed at one point), each implied number once


def review_of(path) -> str:
    import io

    from speccheck.cli import run

    out = io.StringIO()
    run(["check", "--no-config", "--review", str(path)], out, io.StringIO())
    return out.getvalue()


def test_the_review_of_operating_points_is_a_table_on_one_short_page():
    from pathlib import Path

    text = review_of(Path(__file__).resolve().parent.parent / "example_specs" / "maker-sheet-operating-points.yaml")
    lines = text.splitlines()
    assert len(lines) <= REVIEW_LINES, text
    header = next(i for i, line in enumerate(lines) if line.split() == ["rate", "energy", "power", "duration",
                                                                         "peak", "power", "verdict"])
    rows = {line.split()[0] + " " + line.split()[1]: line for line in lines[header + 2:header + 6]}
    assert set(rows) == {"50 kHz", "100 kHz", "1 MHz", "2 MHz"}
    # (the example's 50 MW target, judged at each point, is met at 50 kHz and 1 MHz, not at 2 MHz)
    assert rows["50 kHz"].rstrip().endswith("consistent; target met (line 31)")
    assert "≥ 380 µJ → 380 … 400 µJ" in rows["50 kHz"]
    assert rows["100 kHz"].rstrip().endswith("contradiction (line 19)")
    assert rows["2 MHz"].rstrip().endswith("beyond the sheet's limits (line 28); target not met (line 31)")
    # 0.8814 × 389.9 µJ / 290 fs (the energy's range 380 … 400 µJ at its middle, by hand) and 12.5 µJ's
    assert "=1.185 GW" in rows["50 kHz"] and "=37.99 MW" in rows["2 MHz"]
    # each implied number once: the peak powers in the table, never again in a sentence per point
    assert text.count("1.185 GW") == 1 and text.count("60.78 MW") == 1
    assert "this spec implies" not in text and "Implied: peak power" not in text
    assert text.index("Impossible or contradictory") > header


def test_each_implied_quantity_is_said_once_in_a_review_of_a_path():
    import re
    from pathlib import Path

    text = review_of(Path(__file__).resolve().parent.parent / "example_specs" / "amplifier-pump-probe-path.yaml")
    implied = [" ".join(line.split()) for line in " ".join(text.splitlines()).split("Implied: ")[1:]]
    phrases = [re.match(r"[^0-9]+", line).group().strip() for line in implied]  # the quantity's words
    assert len(implied) >= 4 and len(set(phrases)) == len(phrases), phrases
    product = next(line for line in implied if line.startswith("time bandwidth product"))
    assert "'pump_lens'" in product and "'probe_lens'" in product and "at the laser" in product
    assert "end: probe_lens" in text and "target not met (line 41)" in text


# -- awkward operating points through every format
AWKWARD = """spec_version: 1
title: awkward points
laser:
  wavelength: 1030 nm
  repetition_rate: {min: 10 kHz, max: 4 MHz}
  pulse_energy: "<= 1e90 J"
  average_power: {min: 1 W, typical: 20 W, max: 40 W}
  pulse_duration: 290 fs
operating_points:
  - {name: only a rate, repetition_rate: 100 kHz}
  - {name: "1.5 MHz <b>&amp;</b>", repetition_rate: 1.5 MHz, pulse_energy: {min: 5 µJ, typical: 10 µJ}}
  - {name: no rate, pulse_energy: "<= 3 µJ"}
  - {name: "%s", repetition_rate: 2 MHz, average_power: ">= 39 W", pulse_energy: 30 µJ}
  - {repetition_rate: 20 kHz, pulse_energy: 1 J}
  - not a point
""" % ("a long name " * 12)


def test_awkward_operating_points_give_a_well_formed_report_in_every_format(tmp_path):
    import io

    from report_checks import FORMATS, output_problem
    from speccheck.cli import run

    spec = tmp_path / "awkward.yaml"
    spec.write_text(AWKWARD, encoding="utf-8")
    codes = set()
    for fmt in FORMATS:
        out, err = io.StringIO(), io.StringIO()
        codes.add(run(["check", "--no-config", "--format", fmt, str(spec)], out, err))
        assert output_problem(fmt, out.getvalue()) is None, (fmt, out.getvalue()[:2000])
        assert "Traceback" not in err.getvalue() + out.getvalue(), fmt
        if fmt == "review":
            review = out.getvalue()
        if fmt == "html":
            page = out.getvalue()
    assert codes == {1}  # 1 J at 20 kHz is 20 kW, beyond the sheet's 40 W; a point that is not a mapping
    assert "only a rate" in review and "—" in review and "point 5" in review
    assert "<b>" not in page and "&lt;b&gt;" in page and 'class="sheet points"' in page
    assert "min 5 µJ, typ 10 µJ" in page  # the range as stated, in the points' table and the grid
    # a typical value the rest leaves outside its interval (20 W where at most 12 W is left) is drawn
    assert "not drawn" not in page or "matplotlib" in page


def test_a_target_judged_at_every_point_is_listed_in_the_sheets_order_of_points(checker):
    from pathlib import Path

    path = Path(__file__).resolve().parent.parent / "example_specs" / "maker-sheet-operating-points.yaml"
    result = checker.check_text(path.read_bytes(), str(path))
    at_target = [f.message.split("'")[1] for f in result.findings if f.line == 31]
    assert at_target == ["50 kHz", "100 kHz", "1 MHz", "2 MHz"]  # the columns' order, not the texts'
