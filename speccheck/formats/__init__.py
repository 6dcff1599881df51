"""Output formats, one module each, at the edge of the program.

Each format module has ``write(results, out, options) -> None``.  They are
imported only when chosen, so the JSON path never imports rich.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass

FORMATS: dict[str, str] = {
    "human": "speccheck.formats.human",
    "json": "speccheck.formats.json_format",
    "review": "speccheck.formats.review",
    "sarif": "speccheck.formats.sarif",
    "junit": "speccheck.formats.junit",
    "github": "speccheck.formats.github",
    "csv": "speccheck.formats.csv_format",
    "html": "speccheck.formats.html",
}


@dataclass(frozen=True)
class OutputOptions:
    units: object = None  # the process's UnitSystem, to show SI numbers in people's units
    color: bool = False
    show_sheet: bool = True
    width: int | None = None
    fail_on: str = "error"  # the lowest severity that fails the run (junit marks those as failures)


def writer(name: str):
    try:
        return importlib.import_module(FORMATS[name]).write
    except KeyError:
        raise KeyError(f"unknown format {name!r}; choose one of {', '.join(FORMATS)}") from None
