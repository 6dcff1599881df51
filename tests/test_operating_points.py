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


# -- the review of a sheet with operating points: one short page
REVIEW_LINES = 25  # the budget: a table, the impossible claims, each implied number once


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
    assert rows["50 kHz"].rstrip().endswith("consistent") and "≥ 380 µJ → 380 … 400 µJ" in rows["50 kHz"]
    assert rows["100 kHz"].rstrip().endswith("contradiction (line 18)")
    assert rows["2 MHz"].rstrip().endswith("beyond the sheet's limits (line 27)")
    assert "=1.191 GW" in rows["50 kHz"] and "=37.99 MW" in rows["2 MHz"]
    # each implied number once: the peak powers in the table, never again in a sentence per point
    assert text.count("1.191 GW") == 1 and text.count("60.78 MW") == 1
    assert "this spec implies" not in text and "Implied: peak power" not in text
    assert text.index("Impossible or contradictory") > header


def test_each_implied_quantity_is_said_once_in_a_review_of_a_path():
    import re
    from pathlib import Path

    text = review_of(Path(__file__).resolve().parent.parent / "example_specs" / "amplifier-pump-probe-path.yaml")
    implied = [" ".join(line.split()) for line in " ".join(text.splitlines()).split("Implied: ")[1:]]
    phrases = [re.match(r"[^0-9]+", line).group().strip() for line in implied]  # the quantity's words
    assert len(implied) >= 4 and len(set(phrases)) == len(phrases), phrases
    assert "'pump_lens'" in implied[0] and "'probe_lens'" in implied[0] and "at the laser" in implied[0]
    assert "end: probe_lens" in text and "target not met (line 40)" in text


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
