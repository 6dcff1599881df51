"""``--review``: a short report for someone reviewing a maker's sheet or a proposal.

Per file, on about one page: the consistent claims of the laser block; where the
spec has operating points or a path, a table with a row per operating point (and
the laser, and the end of each branch) giving rate, energy, power, duration and
peak power with its verdict (``formats/points.py``); the impossible or
contradictory claims; then each headline number the spec implies without
stating it, once (one line per quantity, its value at each column).
"""

from __future__ import annotations

from rich.text import Text

from speccheck.formats import cell_text, points
from speccheck.formats.human import QuietConsole
from speccheck.formats.common import counts_text
from speccheck.records.findings import CAUTIONS, FileResult
from speccheck.reading.units import choose_unit, format_quantity

_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan"}
# The numbers a reviewer asks for; the rest of the sheet is in the other formats.
HEADLINE = ("pulse_energy", "average_power", "repetition_rate", "pulse_duration", "peak_power",
            "spectral_bandwidth", "spectral_bandwidth_wavelength", "time_bandwidth_product",
            "beam_diameter", "peak_intensity", "average_intensity", "peak_fluence", "peak_field")
MAX_NAME = 18  # a column's name in the table, shortened beyond this


_BANDWIDTHS = ("spectral_bandwidth", "spectral_bandwidth_wavelength")  # one number in two forms


def _phrase(quantity: str) -> str:
    if quantity in _BANDWIDTHS:
        return "spectral bandwidth"
    return quantity.replace("_", " ").replace("m2", "M²")


def _bandwidth_form(result: FileResult, columns: list) -> str:
    """The bandwidth's form for the implied line: in wavelength where the laser states it so, else in
    frequency (one line, not the same bandwidth twice)."""
    laser = result.sheet.get(columns[0][0], {}) if columns else {}
    cell = laser.get("spectral_bandwidth_wavelength")
    return "spectral_bandwidth_wavelength" if cell is not None and cell.status != "derived" else "spectral_bandwidth"


def _at(f) -> str:
    return f"({f.origin})" if f.origin else f"line {f.line}"


def _where(column: str, kind: str, columns: list) -> str:
    if kind == "laser":
        return " at the laser" if len(columns) > 1 else ""
    if kind == "point" or sum(k == "end" for _, k in columns) > 1:
        return f" at {column!r}"  # the table's rows say which is a point and which a branch end
    return f" at the end of the path ({column!r})"


def _implied(units, c) -> str:
    ref = c.value if c.value is not None else (c.low or c.high)
    unit = choose_unit(units, ref, c.display_unit)
    if c.low is not None and c.high is not None:
        return format_quantity(units, c.value, unit)
    if c.low is not None:
        return "at least " + format_quantity(units, c.low, unit)
    return "at most " + format_quantity(units, c.high, unit)


def _table(console, result: FileResult, numbers) -> None:
    rows = points.rows(result)
    body = [[r.label if len(r.label) <= MAX_NAME else r.label[:MAX_NAME - 1] + "…", *points.texts(r, numbers),
             r.verdict] for r in rows]
    head = ["", *points.HEADERS, "verdict"]
    widths = [max(len(line[k]) for line in [head, *body]) for k in range(len(head))]
    for k, line in enumerate([head, *body]):
        text = "  ".join(t.ljust(w) for t, w in zip(line, widths)).rstrip()
        style = "bold" if k == 0 else _STYLE.get(rows[k - 1].severity or "", "")
        console.print(Text("    " + text, style=style), no_wrap=True, overflow="ignore", crop=False)
    marks = [("=", "implied"), ("!", "in conflict")]  # then the marks in use
    marks += cell_text.legend(c for r in rows for c in r.cells if c is not None)
    console.print(Text("    " + "   ".join(f"{m} {w}" for m, w in marks), style="dim"))


def write(results: list[FileResult], out, options) -> None:
    color = bool(options and options.color)
    # on a terminal, wrapped at its width; in a pipe each line whole, as the human format writes them
    width = options.width if options and options.width else (None if color else 100_000)
    console = QuietConsole(file=out, color_system="auto" if color else None, force_terminal=color,
                           no_color=not color, highlight=False, emoji=False, width=width)
    units = options.units
    numbers = cell_text.Numbers(units)
    for result in results:
        console.print(Text(f"{result.title or result.path}", style="bold")
                      + Text(f"  ({result.path})" if result.title else ""))
        for setting in result.settings:
            console.print(Text(f"  With --set {setting} (the file is unchanged).", style="bold"))
        # Values an error is about: suspects and candidates of conflicts, every value of other errors.
        flagged = {q for f in result.findings if f.severity == "error"
                   for q in ((f.suspect,) if f.suspect else f.candidates) if q} | {
            q for f in result.findings if f.severity == "error" and f.rule != "relation-conflict"
            for q in f.quantities}
        table = points.has_table(result)
        columns = points.columns(result)
        for column, kind in columns:
            if kind == "end":
                continue  # the path's end is derived: its numbers are in the table
            good = [f"{q} {c.text}" for q, c in result.sheet[column].items()
                    if c.status == "stated" and f"{column}.{q}" not in flagged and not c.inherited
                    and not (table and kind == "point" and q in points.QUANTITIES)]
            if good:
                where = "" if kind == "laser" else f" at operating point {column!r}"
                console.print(Text(f"  Consistent{where}: ", style="green") + Text(", ".join(good)))
        if table:
            _table(console, result, numbers)
        errors = [f for f in result.findings if f.severity == "error"]
        claims = [f for f in errors if f.rule != "target-not-met"]
        unmet = [f for f in errors if f.rule == "target-not-met"]
        for heading, group in (("Impossible or contradictory:", claims), ("Targets not met:", unmet)):
            if group:  # what the sheet claims that cannot be, then what the setup does not reach
                console.print(Text(f"  {heading}", style=_STYLE["error"]))
                for f in group:
                    console.print(Text(f"    {_at(f)}: " if f.line or f.origin else "    ") + Text(f.message))
        implied = []
        bandwidth = _bandwidth_form(result, columns)
        for q in HEADLINE:
            if table and q in points.QUANTITIES:
                continue  # in the table
            if q in _BANDWIDTHS and q != bandwidth:
                continue  # the bandwidth once, in the form the sheet states it
            values = [(column, kind, result.sheet[column][q]) for column, kind in columns
                      if q in result.sheet[column] and result.sheet[column][q].status == "derived"]
            values = [(column, kind, c) for column, kind, c in values if c.value is not None or c.low or c.high]
            stated = result.sheet[columns[0][0]].get(q) if columns else None
            if stated is not None and stated.status == "stated" and stated.value:
                # what the laser states, carried unchanged to a later column, is not news
                values = [(column, kind, c) for column, kind, c in values
                          if c.value is None or abs(c.value - stated.value) > 1e-9 * abs(stated.value)]
            if values:
                implied.append(f"{_phrase(q)} " + ", ".join(_implied(units, c) + _where(column, kind, columns)
                                                           for column, kind, c in values))
        if implied and len(columns) > 1:
            for line in implied:
                console.print(Text("  Implied: ", style="bold") + Text(line))
        elif implied:
            console.print(Text("  Implied: ", style="bold") + Text("; ".join(implied)))
        # a target met at an operating point is said in the table's verdict, not again below it
        shown = points.has_table(result)
        others = [f for f in result.findings if f.severity != "error"
                  and not (shown and f.rule == "target-met" and f.message.startswith("at operating point"))]
        for f in others:
            label = "Caution" if f.rule in CAUTIONS else f.severity.capitalize()
            console.print(Text(f"  {label}: ", style=_STYLE[f.severity])
                          + Text(f"{_at(f)}: {f.message}" if f.line or f.origin else f.message))
        if not claims:
            console.print(Text("  No claim contradicts another.", style="green"))
        console.print()
    console.print(counts_text(results) + f" in {len(results)} file{'' if len(results) == 1 else 's'}")
