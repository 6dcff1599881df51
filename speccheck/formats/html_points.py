"""The HTML report's cells and its operating points.

``cell`` writes one ``<td>`` of a grid: its status as a class and as text (a mark
hidden from screen readers, and words only they read), the text of
``formats.cell_text``, a default, ``--set`` or laser-block value said in words.
``section`` writes, for a spec with operating points, the table of
``formats.points`` (a row per operating point with its verdict) and a plot of
pulse energy and average power against repetition rate with the sheet's own
limits drawn (``plots.operating_points``; without matplotlib, a word instead).
"""

from __future__ import annotations

import math
from html import escape

from speccheck.formats import cell_text, points
from speccheck.records.findings import Cell, FileResult


def title(cell: Cell, show: cell_text.Numbers) -> str:
    unit = cell.display_unit or cell.unit
    parts = [cell.status + (" (default value)" if cell.assumed else "")
             + (", " + cell_text.MEANING["inherited"] if cell.inherited else "")]
    if (cell.low is not None or cell.high is not None) and not (
            cell.low is not None and cell.high is not None and cell.low > 0 and cell.high / cell.low <= 1 + 1e-9):
        ref = cell.value or cell.low or cell.high
        parts.append("interval " + show.span(cell.low, cell.high, show.prefixed(ref, unit) if ref else unit))
    return "; ".join(parts)


def implied(cell: Cell, show: cell_text.Numbers) -> str:
    ref = cell.implied_low if cell.implied_low is not None else cell.implied_high
    if ref is None:
        return ""
    unit = show.prefixed(ref, cell.display_unit or cell.unit)
    return "≠ implied " + show.span(cell.implied_low, cell.implied_high, unit)


def cell(c: Cell, show: cell_text.Numbers) -> str:
    """One ``<td>`` of a grid."""
    e = escape
    status = c.status if c.status in cell_text.STATUS_MARK else "derived"
    mark = cell_text.STATUS_MARK[status]
    text = [f'<td class="c-{status}{" c-inherited" if c.inherited else ""}" data-status="{status}"'
            f'{" data-inherited" if c.inherited else ""} title="{e(title(c, show))}">']
    if mark:
        text.append(f'<span class="mark" aria-hidden="true">{mark}</span>')
    if c.inherited:
        text.append(f'<span class="mark" aria-hidden="true">{cell_text.INHERITED_MARK}</span>'
                    '<span class="vh">from the laser block, </span>')
    text.append(f'<span class="vh">{status}: </span>{e(cell_text.shown(c, show))}')
    if c.assumed:
        text.append(' <span class="assumed">(default)</span>')
    if c.overridden:
        text.append(' <span class="assumed">(--set)</span>')
    if status == "conflict":
        words = implied(c, show)
        if words:
            text.append(f'<span class="implied">{e(words)}</span>')
    text.append("</td>")
    return "".join(text)


def _table(rows: list[points.Row], show: cell_text.Numbers, n: int) -> str:
    e = escape
    out = [f'<div class="scroll" role="region" aria-labelledby="points-{n}" tabindex="0">'
           f'<table class="sheet points" data-rows="{len(rows)}">'
           f'<caption id="points-{n}">Operating points: {len(rows) - 1} point'
           f'{"" if len(rows) == 2 else "s"} and the laser block, each with its verdict</caption>'
           '<thead><tr><th scope="col">column</th>'
           + "".join(f'<th scope="col">{e(h)}</th>' for h in points.HEADERS)
           + '<th scope="col">verdict</th></tr></thead><tbody>']
    for row in rows:
        verdict = row.severity or "ok"
        out.append(f'<tr data-column="{e(row.column)}"><th scope="row">{e(row.label)}</th>'
                   + "".join(cell(c, show) if c is not None else '<td class="c-none">—</td>' for c in row.cells)
                   + f'<td class="verdict v-{verdict}" data-verdict="{verdict}">{e(row.verdict)}</td></tr>')
    out.append("</tbody></table></div>")
    return "".join(out)


def _numbers(c: Cell | None) -> tuple[float, float | None, float | None] | None:
    """(value, low, high) of a cell for the plot, None where it has no finite positive value."""
    if c is None:
        return None
    value = c.value if c.value is not None else (
        math.sqrt(c.low * c.high) if c.low and c.high else None)
    if value is None or not math.isfinite(value) or value <= 0:
        return None
    # a typical value the rest of the spec leaves outside the interval is drawn at its edge
    value = min(max(value, c.low if c.low is not None else value), c.high if c.high is not None else value)
    return value, c.low, c.high


def plot_data(result: FileResult) -> tuple[list, dict]:
    """The points to draw, (name, rate, energy, power, has an error) with each number as
    (value, low, high) or None, and the sheet's limits (``points.limits``)."""
    data = []
    for row in points.rows(result):
        if row.kind != "point":
            continue
        rate = _numbers(row.cells[0])
        energy, power = _numbers(row.cells[1]), _numbers(row.cells[2])
        if rate is not None and (energy is not None or power is not None):
            data.append((row.column, rate[0], energy, power, row.severity == "error"))
    return data, points.limits(result)


def _caption(data: list, limits: dict, show: cell_text.Numbers) -> str:
    words = {"repetition_rate": ("repetition rate", "kHz"), "pulse_energy": ("pulse energy", "µJ"),
             "average_power": ("average power", "W")}
    said = []
    for q, (low, high) in limits.items():
        name, unit = words[q]
        ref = low if low is not None else high
        said.append(f"{name} {show.span(low, high, show.prefixed(ref, unit))}")
    return ("Pulse energy and average power against repetition rate at each operating point (bars: the "
            "interval the sheet leaves; a cross: a point with an error)"
            + (", with the sheet's own limits dashed: " + "; ".join(said)
               + " (a power limit is E = P/f on the energy panel, an energy limit P = E·f on the power panel)"
               if said else "; the laser block states no bound on rate, energy or power to draw")
            + ". Points: " + ", ".join(name for name, *_ in data) + ".")


def section(result: FileResult, units, show: cell_text.Numbers, plotter, n: int) -> str:
    """The operating points of a spec that has them: the table, and the plot where it can be drawn."""
    if not result.operating_points or "laser" not in result.sheet:
        return ""
    out = ["<h3>Operating points</h3>", _table(points.rows(result), show, n)]
    data, limits = plot_data(result)
    if not data:
        out.append('<p class="notice">No plot of the operating points: none has a rate with an energy or a '
                   "power.</p>")
    elif plotter is None:
        out.append('<p class="notice">The plot of the operating points is not drawn: it needs matplotlib.</p>')
    else:
        name = "Operating points: energy and power against rate"
        try:
            svg = plotter.inline(plotter.operating_points(units, data, limits), f"f{n}op-", name)
        except Exception as exc:  # a figure that cannot be drawn is left out, never a failed report
            out.append(f'<p class="notice">{escape(name)}: not drawn ({escape(type(exc).__name__)}).</p>')
        else:
            out.append(f'<figure class="plot" data-plot="points">{svg}'
                       f"<figcaption>{escape(_caption(data, limits, show))}</figcaption></figure>")
    return "".join(out)
