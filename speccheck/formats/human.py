"""The default terminal format: the sheet, then findings, then a summary (rich)."""

from __future__ import annotations

import math

from rich.console import Console
from rich.table import Table
from rich.text import Text

from speccheck.formats import cell_text
from speccheck.formats.common import place
from speccheck.records.findings import Cell, FileResult, SEVERITIES
from speccheck.reading.units import choose_unit, format_number, format_quantity, pretty_unit

_SEVERITY_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan"}
_STATUS_STYLE = {"stated": "", "derived": "green", "conflict": "bold red"}


class QuietConsole(Console):
    """rich's console, but a reader that stops early (``| head``) raises ``BrokenPipeError`` to the
    caller, which decides the exit code, instead of rich's own exit with code 1."""

    def on_broken_pipe(self) -> None:
        raise BrokenPipeError


class _Shower:
    """Formats SI numbers in a unit, or bare (the unit said once per cell)."""

    def __init__(self, units) -> None:
        self._units = units

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


def _span(show, low, high, unit) -> str:
    if low is not None and high is not None:
        return f"{show(low, unit, True)} … {show(high, unit, True)}"
    return f"≥ {show(low, unit, True)}" if low is not None else f"≤ {show(high, unit, True)}"


def _cell_text(cell: Cell, show) -> str:
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


MAX_CELL_WIDTH = 32


def _grid(console: Console, sheet: dict, numbers) -> None:
    """Rows are quantities, columns the laser and each stage; wide sheets are split into
    chunks of columns that fit the console.  Each cell's text and marks are
    ``formats.cell_text``'s, the same as the HTML grid's."""
    rows: list[str] = []
    for cells in sheet.values():
        rows += [q for q in cells if q not in rows]
    names = list(sheet)
    label_width = max(len(q) for q in rows) + 1 if rows else 10
    texts = {name: {q: (cell_text.marks(c) or " ") + cell_text.shown(c, numbers) for q, c in cells.items()}
             for name, cells in sheet.items()}
    widths = {name: min(MAX_CELL_WIDTH, max([len(name), *map(len, texts[name].values())]) + 1) for name in names}
    legend = "  stated   =derived   !conflict" + "".join(
        f"   {mark}{words}" for mark, words in cell_text.legend(c for cells in sheet.values() for c in cells.values()))
    console.print(Text(legend, style="dim"))
    chunks: list[list[str]] = [[]]
    room = console.width - label_width - 2
    for name in names:
        if chunks[-1] and sum(widths[n] + 2 for n in chunks[-1]) + widths[name] + 2 > room:
            chunks.append([])
        chunks[-1].append(name)
    for chunk in chunks:
        table = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
        table.add_column("", no_wrap=True, min_width=label_width)
        for name in chunk:
            table.add_column(name, no_wrap=True, overflow="ellipsis", max_width=widths[name])
        for q in rows:
            values = [Text(texts[name][q], style=_STATUS_STYLE[sheet[name][q].status]) if q in texts[name]
                      else Text("") for name in chunk]
            if any(v.plain for v in values):
                table.add_row(q, *values)
        console.print(table)


def write(results: list[FileResult], out, options) -> None:
    color = bool(options and options.color)
    console = QuietConsole(file=out, color_system="auto" if color else None, force_terminal=color,
                      no_color=not color, highlight=False, emoji=False,
                      width=(options.width if options and options.width else None) or (None if color else 100))
    show = _Shower(options.units)
    for result in results:
        header = Text(result.path, style="bold")
        if result.title:
            header.append(f" — {result.title}")
        console.print(header)
        for setting in result.settings:
            console.print(Text(f"  with --set {setting} (the file is unchanged)", style="bold"))
        if (options is None or options.show_sheet) and len(result.sheet) > 1:
            _grid(console, result.sheet, cell_text.Numbers(options.units))
        elif options is None or options.show_sheet:
            for block, cells in result.sheet.items():
                if not cells:
                    continue
                table = Table(show_header=True, header_style="bold", box=None, pad_edge=False)
                table.add_column(block, no_wrap=True)
                table.add_column("value")
                table.add_column("status", no_wrap=True)
                for name, cell in cells.items():
                    status = cell.status + (" (default)" if cell.assumed else "") + (
                        " (--set)" if cell.overridden else "")
                    table.add_row(name, _cell_text(cell, show), Text(status, style=_STATUS_STYLE[cell.status]))
                console.print(table)
        for f in result.findings:
            line = Text()
            line.append(place(f) + ": ", style="bold")
            line.append(f.severity, style=_SEVERITY_STYLE[f.severity])
            line.append(f" [{f.rule}] ", style="dim")
            line.append(f.message)
            console.print(line)
        console.print()
    counts = {s: sum(r.count(s) for r in results) for s in SEVERITIES}
    summary = Text()
    parts = [(f"{counts[s]} {s}{'' if counts[s] == 1 else 's'}", _SEVERITY_STYLE[s] if counts[s] else "")
             for s in SEVERITIES]
    for i, (text, style) in enumerate(parts):
        summary.append(text, style=style)
        summary.append(", " if i < len(parts) - 1 else "")
    n = len(results)
    summary.append(f" in {n} file{'' if n == 1 else 's'}")
    console.print(summary)
