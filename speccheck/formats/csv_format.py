"""``--format csv``: the sheet as a grid, one CSV for the whole run (RFC 4180).

Layout::

    file,quantity,unit,laser,50 kHz,…,laser status,50 kHz status,…,laser stated,50 kHz stated,…
    specs/a.yaml,pulse_energy,J,2.5e-08,,…,stated,,…,25 nJ,,…

One row per file and quantity; one value column per column of the sheet (the
laser block, then each operating point, in the order they first appear in
the run), then one status column for each (stated / derived / conflict;
``(set)`` added for a value set on the command line, ``(from laser)`` for an
operating point's value that is the laser block's), then one column for each
with the value as stated (``>= 380 µJ``; empty for a derived one).
Values are numbers in the SI unit of the ``unit`` column, rounded to 15
significant digits; a cell is empty where a file's sheet has no such column
or quantity.  Files without a sheet (not readable as a spec) have no rows;
the findings are in the other formats.  Text that a spreadsheet would run as
a formula (starting with = + - @) is prefixed with an apostrophe.
"""

from __future__ import annotations

import csv

from speccheck.records.findings import Cell, FileResult

FIXED = ("file", "quantity", "unit")


def _text(s: str) -> str:
    return "'" + s if s[:1] in ("=", "+", "-", "@", "\t", "\r") else s


def _num(x: float | None) -> str:
    return "" if x is None else f"{x:.15g}"


def rows(results: list[FileResult]) -> list[list[str]]:
    columns: list[str] = []
    for r in results:
        for name in r.sheet:
            if name not in columns:
                columns.append(name)
    out = [list(FIXED) + [_text(c) for c in columns] + [_text(f"{c} status") for c in columns]
           + [_text(f"{c} stated") for c in columns]]
    for r in results:
        quantities: dict[str, str] = {}
        for cells in r.sheet.values():
            for q, cell in cells.items():
                quantities.setdefault(q, cell.unit)
        for q, unit in quantities.items():
            cells: list[Cell | None] = [r.sheet.get(c, {}).get(q) for c in columns]
            out.append([_text(r.path), q, unit]
                       + [_num(c.value) if c else "" for c in cells]
                       + [(c.status + (" (set)" if c.overridden else "") + (" (from laser)" if c.inherited else ""))
                          if c else "" for c in cells]
                       + [_text(c.text) if c and c.text and c.status != "derived" else "" for c in cells])
    return out


def write(results: list[FileResult], out, options=None) -> None:
    csv.writer(out).writerows(rows(results))
