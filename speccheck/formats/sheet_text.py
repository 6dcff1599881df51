"""The sheet as lines of text for the human format: the grid of columns, or one block's table.

A line is a list of ``(text, style)`` segments; the plain writer joins the texts, the terminal
writer (``terminal.py``) gives each its style, so both show the same characters.  Columns are
laid out here, in character cells (a wide character counts two), without rich.
"""

from __future__ import annotations

import math
import unicodedata

from speccheck.formats import cell_text as shown_text
from speccheck.records.findings import Cell
from speccheck.reading.units import choose_unit, format_number, format_quantity, pretty_unit

STATUS_STYLE = {"stated": "", "derived": "green", "conflict": "bold red"}
CELL_WIDTH = 32  # the widest cell of the grid; longer values end in "…"
GAP = "  "  # between columns


class Shower:
    """Formats SI numbers in a unit, or bare (the unit said once per cell)."""

    def __init__(self, units) -> None:
        self._units = self.units = units

    def __call__(self, si: float | None, unit: str, bare: bool = False) -> str:
        if si is None:
            return "—"
        if si in (math.inf, -math.inf):  # a path cell: a flat wavefront
            return "∞" if si > 0 else "−∞"
        if bare:
            return format_number(si / self._units.factor(unit)) if unit != "1" else format_number(si)
        return format_quantity(self._units, si, unit)

    def prefixed(self, si: float, unit: str) -> str:
        return choose_unit(self._units, si, unit)


def cells(text: str) -> int:
    """How many character cells a text takes on a terminal (East Asian wide characters two)."""
    if text.isascii():
        return len(text)
    return sum(0 if unicodedata.combining(c) else 2 if unicodedata.east_asian_width(c) in "WF" else 1
               for c in text)


def _fit(text: str, width: int) -> str:
    """The text cut to ``width`` cells, ending in "…" where it was cut."""
    if cells(text) <= width:
        return text
    while text and cells(text) > width - 1:
        text = text[:-1]
    return text + "…"


def _pad(text: str, width: int) -> str:
    return text + " " * (width - cells(text))


def _span(show, low, high, unit) -> str:
    if low is not None and high is not None:
        return f"{show(low, unit, True)} … {show(high, unit, True)}"
    return f"≥ {show(low, unit, True)}" if low is not None else f"≤ {show(high, unit, True)}"


def cell_text(cell: Cell, show) -> str:
    """A cell in full: the value as written or derived, its interval, what a conflict implies."""
    unit = cell.display_unit or cell.unit
    if cell.status in ("stated", "conflict"):
        text = cell.text or show(cell.value, unit)
        if cell.status == "stated" and cell.text[:1] in "<>≤≥={" and cell.low is not None and cell.high is not None:
            # a bound the rest of the spec narrows: what it leaves, beside what was written
            text += f"  → [{_span(show, cell.low, cell.high, unit)}]" + ("" if unit == "1" else f" {pretty_unit(unit)}")
    elif cell.low is not None and cell.high is not None and \
            cell.high - cell.low <= 1e-9 * max(abs(cell.low), abs(cell.high)):  # a point (signed cells too)
        text = show(cell.value, unit)
    elif cell.value is None or cell.low is None or cell.high is None:
        text = _span(show, cell.low, cell.high, unit) + ("" if unit == "1" else f" {pretty_unit(unit)}")
    else:
        text = f"{show(cell.value, unit)}  [{_span(show, cell.low, cell.high, unit)}]"
    if cell.status == "conflict" and (cell.implied_low is not None or cell.implied_high is not None):
        ref = cell.implied_low if cell.implied_low is not None else cell.implied_high
        unit = show.prefixed(ref, unit)
        text += f"  ≠ implied [{_span(show, cell.implied_low, cell.implied_high, unit)}]" + (
            "" if unit == "1" else f" {pretty_unit(unit)}")
    return text


def _table(header: list[tuple[str, str]], rows: list[list[tuple[str, str]]]) -> list[list[tuple[str, str]]]:
    """Left-aligned columns as wide as their widest cell, ``GAP`` apart, no space at the line's end."""
    widths = [max(cells(row[i][0]) for row in [header, *rows]) for i in range(len(header))]
    lines = []
    for row in [header, *rows]:
        line: list[tuple[str, str]] = []
        for i, (text, style) in enumerate(row):
            if i:
                line.append((GAP, ""))
            line.append((text if i == len(row) - 1 else _pad(text, widths[i]), style))
        while line and not line[-1][0].strip():  # an empty last cell leaves no trailing spaces
            line.pop()
        if line:
            line[-1] = (line[-1][0].rstrip(), line[-1][1])
        lines.append(line)
    return lines


def grid(sheet: dict, show, width: int) -> list[list[tuple[str, str]]]:
    """Rows are quantities, columns the laser and each stage; a wide sheet is split into chunks of
    columns that fit ``width`` cells.  Each cell's text and marks are ``formats.cell_text``'s, the
    same as the HTML grid's and the review's."""
    rows: list[str] = []
    for column in sheet.values():
        rows += [q for q in column if q not in rows]
    names = list(sheet)
    label_width = max(len(q) for q in rows) + 1 if rows else 10
    numbers = shown_text.Numbers(show.units)
    texts = {name: {q: (shown_text.marks(c) or " ") + shown_text.shown(c, numbers) for q, c in column.items()}
             for name, column in sheet.items()}
    widths = {name: min(CELL_WIDTH, max([cells(name), *map(cells, texts[name].values())])) for name in names}
    legend = "  stated   =derived   !conflict" + "".join(
        f"   {mark}{words}" for mark, words in shown_text.legend(c for column in sheet.values() for c in column.values()))
    lines = [[(legend, "dim")]]
    chunks: list[list[str]] = [[]]
    room = width - label_width - 2
    for name in names:
        if chunks[-1] and sum(widths[n] + 2 for n in chunks[-1]) + widths[name] + 2 > room:
            chunks.append([])
        chunks[-1].append(name)
    for chunk in chunks:
        body = []
        for q in rows:
            values = [(_fit(texts[name][q], widths[name]), STATUS_STYLE[sheet[name][q].status])
                      if q in texts[name] else ("", "") for name in chunk]
            if any(text for text, _ in values):
                body.append([(_pad(q, label_width), ""), *values])
        lines += _table([(" " * label_width, ""), *((_fit(n, widths[n]), "bold") for n in chunk)], body)
    return lines


def block(name: str, column: dict, show) -> list[list[tuple[str, str]]]:
    """One block's table: each quantity with its value in full and its status."""
    rows = []
    for q, cell in column.items():
        status = cell.status + (" (default)" if cell.assumed else "") + (" (--set)" if cell.overridden else "")
        rows.append([(q, ""), (cell_text(cell, show), ""), (status, STATUS_STYLE[cell.status])])
    return _table([(name, "bold"), ("value", "bold"), ("status", "bold")], rows)


def sheet_lines(sheet: dict, show, width: int) -> list[list[tuple[str, str]]]:
    """The sheet: a grid when it has several columns, the block's table when it has one."""
    if len(sheet) > 1:
        return grid(sheet, show, width)
    return [line for name, column in sheet.items() if column for line in block(name, column, show)]
