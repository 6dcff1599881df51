"""What a cell of the sheet shows: the stated form (bound, min/typical/max, ±) beside the interval
the rest of the spec leaves, and the mark of an operating point's value that is the laser block's,
the same in the terminal grid, the HTML grid, the JSON and the CSV."""

from __future__ import annotations

import csv
import io
import json
from pathlib import Path

import pytest

from speccheck.formats import OutputOptions, cell_text, writer
from speccheck.records.findings import Cell

EXAMPLES = Path(__file__).resolve().parent.parent / "example_specs"
POINTS = EXAMPLES / "maker-sheet-operating-points.yaml"


@pytest.fixture(scope="module")
def points(checker):
    return checker.check_text(POINTS.read_bytes(), "example_specs/maker-sheet-operating-points.yaml")


def render(name: str, results, units) -> str:
    out = io.StringIO()
    writer(name)(results, out, OutputOptions(units=units, width=200))
    return out.getvalue()


def test_a_points_value_from_the_laser_block_is_marked_inherited_and_its_own_values_are_not(points):
    sheet = points.sheet
    assert sheet["50 kHz"]["wavelength"].inherited and sheet["50 kHz"]["average_power"].inherited
    assert not sheet["50 kHz"]["repetition_rate"].inherited and not sheet["50 kHz"]["pulse_energy"].inherited
    assert not sheet["1 MHz"]["average_power"].inherited  # the point states its own
    assert not any(c.inherited for c in sheet["laser"].values())
    assert not any(c.inherited for c in sheet["50 kHz"].values() if c.status == "derived")
    # a conflict in a value the point inherits keeps the mark
    assert sheet["100 kHz"]["average_power"].status == "conflict" and sheet["100 kHz"]["average_power"].inherited


def test_a_bound_shows_as_stated_beside_what_the_rest_leaves_of_it(points, units):
    numbers = cell_text.Numbers(units)
    energy = points.sheet["50 kHz"]["pulse_energy"]  # >= 380 µJ, with <= 20 W at 50 kHz: at most 400 µJ
    assert cell_text.shown(energy, numbers) == "≥ 380 µJ → 380 … 400 µJ"
    power = points.sheet["50 kHz"]["average_power"]  # <= 20 W, with >= 380 µJ at 50 kHz: at least 19 W
    assert cell_text.shown(power, numbers) == "≤ 20 W → 19 … 20 W"
    assert cell_text.shown(points.sheet["laser"]["average_power"], numbers) == "≤ 20 W"  # nothing narrows it
    assert cell_text.marks(power) == "←" and cell_text.marks(points.sheet["100 kHz"]["average_power"]) == "!←"


def test_min_typical_max_and_a_tolerance_show_as_stated(check, units):
    result = check("""
        laser:
          wavelength: 1030 nm
          repetition_rate: 1 MHz
          average_power: {min: 20 W, typical: 22 W, max: 25 W}
          pulse_duration: 290 fs +/- 30 fs
    """)
    numbers = cell_text.Numbers(units)
    power = result.sheet["laser"]["average_power"]
    assert cell_text.shown(power, numbers) == "min 20 W, typ 22 W, max 25 W → 20 … 25 W"
    assert cell_text.shown(result.sheet["laser"]["pulse_duration"], numbers) == "290 fs ± 30 fs"
    assert cell_text.shown(result.sheet["laser"]["wavelength"], numbers) == "1030 nm"
    assert cell_text.shown(result.sheet["laser"]["pulse_energy"], numbers) == "22 µJ"  # derived: its value


def test_the_terminal_grid_shows_the_stated_forms_and_a_legend_for_every_mark(points, units):
    text = render("human", [points], units)
    assert "≥ 380 µJ → 380 … 400 µJ" in text and "←≤ 20 W → 19 … 20 W" in text
    assert "389.9 µJ" not in text  # the centre of the interval, never shown as if stated
    assert "←1030 nm" in text
    legend = next(line for line in text.splitlines() if "=derived" in line)
    assert "←from the laser block" in legend and "→what the rest leaves of a bound" in legend
    assert len(legend) <= 100  # one line of the terminal


def test_a_grid_without_inherited_values_has_no_such_legend(check, units):
    result = check("""
        laser: {wavelength: 800 nm, repetition_rate: 1 kHz, average_power: 4 W}
        path:
          - {name: periscope, kind: optic, transmission: 90%}
    """)
    text = render("human", [result], units)
    assert "=derived" in text and "←" not in text


def test_json_keeps_the_stated_text_and_says_which_values_are_inherited(points, units):
    doc = json.loads(render("json", [points], units))
    sheet = doc["files"][0]["sheet"]
    assert sheet["50 kHz"]["pulse_energy"]["stated"] == ">= 380 µJ"
    assert sheet["50 kHz"]["wavelength"]["inherited"] is True
    assert "inherited" not in sheet["50 kHz"]["pulse_energy"] and "inherited" not in sheet["laser"]["wavelength"]
    # the fast writer and the document agree
    from speccheck.formats.json_format import document

    assert document([points])["files"][0]["sheet"] == sheet


def test_csv_has_the_stated_text_and_marks_inherited_values_in_the_status(points, units):
    rows = list(csv.DictReader(io.StringIO(render("csv", [points], units), newline="")))
    energy = next(r for r in rows if r["quantity"] == "pulse_energy")
    assert energy["50 kHz stated"] == ">= 380 µJ" and energy["50 kHz status"] == "stated"
    wavelength = next(r for r in rows if r["quantity"] == "wavelength")
    assert wavelength["50 kHz status"] == "stated (from laser)" and wavelength["laser status"] == "stated"
    assert next(r for r in rows if r["quantity"] == "peak_power")["50 kHz stated"] == ""  # derived


def test_the_html_grid_shows_the_stated_form_and_the_inherited_mark_in_text(points, units):
    page = render("html", [points], units)
    assert "≥ 380 µJ → 380 … 400 µJ" in page
    grid = page[:page.index('class="sheet points"')]  # the sheet's grid (the points' table follows it)
    assert grid.count("data-inherited") == sum(c.inherited for cells in points.sheet.values() for c in cells.values())
    cell = page[page.index("data-inherited"):]
    cell = cell[:cell.index("</td>")]
    assert '<span class="mark" aria-hidden="true">←</span>' in cell and "from the laser block" in cell
    legend = page[page.index('class="legend"'):]
    assert "from the laser block" in legend[:legend.index("</p>")]


def test_a_cell_without_stated_text_or_numbers_never_fails(units):
    numbers = cell_text.Numbers(units)
    assert cell_text.shown(Cell("derived", None, None, None, "W", "W"), numbers) == "unbounded"
    assert cell_text.shown(Cell("stated", None, 3.0, None, "W", "W", text="< 3 W"), numbers) == "< 3 W"
    assert cell_text.shown(Cell("stated", 1.0, 2.0, 1.5, "W", "no-such-unit", text="1.5"), numbers) == "1.5"
