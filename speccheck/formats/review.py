"""``--review``: a short report for someone reviewing a maker's sheet or a proposal.

Per file: which claims are consistent, which are impossible or contradictory,
and which headline numbers the sheet implies without stating them.
"""

from __future__ import annotations

from rich.text import Text

from speccheck.formats.human import QuietConsole
from speccheck.records.findings import FileResult, SEVERITIES
from speccheck.physics.quantities import BY_NAME
from speccheck.reading.units import choose_unit, format_quantity

_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan"}
# The numbers a reviewer asks for; the rest of the sheet is in the other formats.
HEADLINE = ("pulse_energy", "average_power", "repetition_rate", "pulse_duration", "peak_power",
            "spectral_bandwidth", "spectral_bandwidth_wavelength", "time_bandwidth_product",
            "beam_diameter", "peak_intensity", "average_intensity", "peak_fluence", "peak_field")


def _phrase(quantity: str) -> str:
    return quantity.replace("_", " ").replace("m2", "M²")


def _at(f) -> str:
    return f"({f.origin})" if f.origin else f"line {f.line}"


def write(results: list[FileResult], out, options) -> None:
    color = bool(options and options.color)
    console = QuietConsole(file=out, color_system="auto" if color else None, force_terminal=color,
                      no_color=not color, highlight=False, emoji=False, width=None if color else 100)
    units = options.units
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
        for column, cells in result.sheet.items():
            if column == "laser":
                where = ""
            elif column in result.operating_points:
                where = f" at operating point {column!r}"
            elif column in result.branch_ends:
                where = f" at the end of the path ({column!r})"
            else:
                continue  # a stage inside the path: the full sheet is in the other formats
            good = [f"{q} {c.text}" for q, c in cells.items()
                    if c.status == "stated" and f"{column}.{q}" not in flagged]
            if good:
                console.print(Text(f"  Consistent{where}: ", style="green") + Text(", ".join(good)))
            implied = []
            for q, c in cells.items():
                if c.status != "derived" or q not in HEADLINE:
                    continue
                ref = c.value if c.value is not None else (c.low or c.high)
                unit = choose_unit(units, ref, c.display_unit or BY_NAME[q].display_unit)
                if c.low is not None and c.high is not None:
                    text = format_quantity(units, c.value, unit)
                elif c.low is not None:
                    text = "at least " + format_quantity(units, c.low, unit)
                else:
                    text = "at most " + format_quantity(units, c.high, unit)
                implied.append(f"the {_phrase(q)} this spec implies{where} is {text}")
            for line in implied:
                console.print(Text("  Implied: ", style="bold") + Text(line))
        errors = [f for f in result.findings if f.severity == "error"]
        if errors:
            console.print(Text("  Impossible or contradictory:", style=_STYLE["error"]))
            for f in errors:
                console.print(Text(f"    {_at(f)}: " if f.line or f.origin else "    ") + Text(f.message))
        others = [f for f in result.findings if f.severity != "error"]
        for f in others:
            console.print(Text(f"  {f.severity.capitalize()}: ", style=_STYLE[f.severity])
                          + Text(f"{_at(f)}: {f.message}" if f.line or f.origin else f.message))
        if not errors:
            console.print(Text("  No claim contradicts another.", style="green"))
        console.print()
    counts = {s: sum(r.count(s) for r in results) for s in SEVERITIES}
    console.print(", ".join(f"{counts[s]} {s}{'' if counts[s] == 1 else 's'}" for s in SEVERITIES)
                  + f" in {len(results)} file{'' if len(results) == 1 else 's'}")
