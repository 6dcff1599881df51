"""The HTML report's operating points (their table and their plot against the sheet's limits),
the layout rules that keep the page from scrolling sideways, and the caution said once."""

from __future__ import annotations

import re
import sys
from html.parser import HTMLParser

import pytest

from speccheck.formats import html_points
from speccheck.formats.html_style import CSS
from test_html import EXAMPLES, Page, needs_matplotlib, report

POINTS = EXAMPLES / "maker-sheet-operating-points.yaml"


def css_rule(selector: str) -> str:
    """The declarations of the rule with exactly this selector in the report's stylesheet."""
    match = re.search(r"(?:^|})\s*" + re.escape(selector) + r"\{([^}]*)\}", CSS)
    assert match, selector
    return match.group(1).replace("\n", "")


class Nesting(HTMLParser):
    """For each element with one of the classes asked for, the classes of the elements around it."""

    VOID = {"meta", "br", "img", "input", "link", "hr", "col", "source", "wbr"}

    def __init__(self, text: str, wanted: str) -> None:
        super().__init__(convert_charrefs=True)
        self.stack: list[tuple[str, set]] = []
        self.wanted = wanted
        self.found: list[list[set]] = []
        self.feed(text)

    def handle_starttag(self, tag, attrs):
        classes = set((dict(attrs).get("class") or "").split())
        if self.wanted in classes:
            self.found.append([c for _, c in self.stack])
        if tag not in self.VOID:
            self.stack.append((tag, classes))

    def handle_endtag(self, tag):
        while self.stack:
            if self.stack.pop()[0] == tag:
                break


def test_the_operating_points_table_has_a_row_per_point_with_its_verdict(tmp_path):
    _, text = report(tmp_path, POINTS)
    page = Page(text)
    (table,) = page.all("table", class_="points")
    rows = {a["data-column"]: a for a in page.all("tr") if "data-column" in a}
    assert list(rows) == ["laser", "50 kHz", "100 kHz", "1 MHz", "2 MHz"] and table["data-rows"] == "5"
    verdicts = [a["data-verdict"] for a in page.all("td", class_="verdict")]
    assert verdicts == ["ok", "ok", "error", "ok", "error"]
    assert "contradiction (line 19)" in page.plain and "beyond the sheet's limits (line 28)" in page.plain
    assert text.index('class="sheet points"') > text.index('<table class="sheet"')  # after the grid


def test_a_spec_without_operating_points_has_no_such_table(tmp_path):
    _, text = report(tmp_path, EXAMPLES / "maker-sheet-one-wrong.yaml")
    assert "points" not in " ".join(a.get("class", "") for a in Page(text).all("table"))


def test_the_plot_takes_each_point_and_the_sheets_own_limits(checker):
    result = checker.check_text(POINTS.read_bytes(), str(POINTS))
    data, limits = html_points.plot_data(result)
    assert [(name, rate, bad) for name, rate, _, _, bad in data] == [
        ("50 kHz", 50e3, False), ("100 kHz", 100e3, True), ("1 MHz", 1e6, False), ("2 MHz", 2e6, True)]
    # >= 380 µJ with <= 20 W at 50 kHz: 380 … 400 µJ (by hand: 20 W / 50 kHz; the rate's 0.01 %
    # tolerance moves the top by 1e-4)
    energy = data[0][2]
    assert energy[1] == pytest.approx(380e-6) and energy[2] == pytest.approx(400e-6, rel=2e-4)
    assert limits == {"average_power": (None, pytest.approx(20.0))}  # the laser block's bound, nothing else
    plain = checker.check_text(b"spec_version: 1\nlaser: {wavelength: 1030 nm, average_power: 20 W}\n"
                               b"operating_points:\n  - {name: a, repetition_rate: 1 MHz}\n", "p.yaml")
    assert html_points.plot_data(plain)[1] == {}  # a plain value is what a point overrides, not a limit


@needs_matplotlib
def test_the_plot_of_energy_and_power_against_rate_is_drawn_with_its_limits(tmp_path, units):
    _, text = report(tmp_path, POINTS)
    page = Page(text)
    assert len([a for a in page.all("figure") if a.get("data-plot") == "points"]) == 1
    caption = text[text.index('data-plot="points"'):]
    caption = caption[caption.index("<figcaption>"):caption.index("</figcaption>")]
    assert "average power ≤ 20 W" in caption and "E = P/f" in caption
    from speccheck.formats import plots

    with_limit = plots.operating_points(units, [("a", 1e5, (2e-4, 1.9e-4, 2.1e-4), (20.0, 19.0, 21.0), False)],
                                        {"average_power": (None, 20.0)})
    without = plots.operating_points(units, [("a", 1e5, (2e-4, 1.9e-4, 2.1e-4), (20.0, 19.0, 21.0), False)], {})
    assert with_limit.count("stroke-dasharray") > without.count("stroke-dasharray")  # the limits are drawn


def test_without_matplotlib_the_points_table_stays_and_the_plot_is_named(tmp_path, monkeypatch):
    monkeypatch.setitem(sys.modules, "matplotlib", None)
    monkeypatch.delitem(sys.modules, "speccheck.formats.plots", raising=False)
    _, text = report(tmp_path, POINTS)
    assert 'class="sheet points"' in text and "plot of the operating points is not drawn" in text
    assert "<svg" not in text


def test_screen_reader_words_cannot_widen_the_page(tmp_path):
    vh = css_rule(".vh")
    assert "clip-path:inset(50%)" in vh and "position:absolute" in vh and "overflow:hidden" in vh
    # an absolutely placed span is contained by the nearest positioned box: the grid's scroll box,
    # whose overflow clips it, and never the page
    assert "position:relative" in css_rule(".scroll") and "overflow-x:auto" in css_rule(".scroll")
    _, text = report(tmp_path, POINTS, EXAMPLES / "amplifier-pump-probe-path.yaml")
    around = Nesting(text, "vh").found
    assert around and all(any("scroll" in classes for classes in stack) for stack in around)
    tables = Nesting(text, "sheet").found
    assert tables and all(stack and "scroll" in stack[-1] for stack in tables)  # every grid in a scroll box


def test_the_first_column_of_each_grid_stays_in_view(tmp_path):
    row_head = css_rule("table.sheet th[scope=row]")
    assert "position:sticky" in row_head and "left:0" in row_head and "background" in row_head
    assert "left:0" in css_rule("table.sheet thead th:first-child")
    _, text = report(tmp_path, POINTS)
    for body in re.findall(r"<tbody>(.*?)</tbody>", text):
        assert all(row.startswith('<th scope="row"') for row in re.split(r"<tr[^>]*>", body)[1:])


def test_the_laser_safety_caution_is_said_once_on_the_page(tmp_path):
    _, text = report(tmp_path, POINTS, EXAMPLES / "hhg-argon.yaml")
    assert text.count("Wear eyewear rated for the wavelength") == 1
    assert text.count('class="caution"') == 1
    finding = text[text.index('data-rule="laser-safety"'):]
    assert '<a href="#laser-safety">' in finding[:finding.index("</li>")]  # the finding points to it
