"""Output formats, one module each, at the edge of the program.

Each format module has ``write(results, out, options) -> None``.  They are
imported only when chosen; rich only for coloured output (``terminal.py``), so
neither the JSON path nor plain human output imports it.
"""

from __future__ import annotations

import importlib
import re
from dataclasses import dataclass, replace

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


# Formats a program reads: always UTF-8 (the formats for people follow the terminal's encoding).
MACHINE_FORMATS = frozenset({"json", "sarif", "junit", "csv", "html"})

# Characters that must never reach a terminal or a page raw: C0 and C1 controls (ESC starts
# terminal sequences, CR rewrites a line), the line and paragraph separators, the
# bidirectional overrides that reorder what is shown, and lone surrogates (bytes of a file
# name that are not UTF-8).  Tab stays.
_UNSAFE = re.compile("[\x00-\x08\x0a-\x1f\x7f-\x9f\u2028\u2029\u202a-\u202e\u2066-\u2069\ud800-\udfff]")


def _escape(m: re.Match) -> str:
    code = ord(m.group())
    if 0xDC80 <= code <= 0xDCFF:  # a byte the file system's decoding could not read as UTF-8
        return f"\\x{code - 0xDC00:02x}"
    if code == 0x0A:
        return "\\n"
    return f"\\x{code:02x}" if code < 0x100 else f"\\u{code:04x}"


def inert(text: str) -> str:
    """Text from a spec made safe to show: unsafe characters as visible escapes (``\\x1b``)."""
    return _UNSAFE.sub(_escape, text) if _UNSAFE.search(text) else text


def inert_results(results: list) -> list:
    """The results with every text that can come from a spec made inert (``inert``)."""
    return [_inert_result(r) for r in results]


def _inert_result(r):
    texts = [r.path, r.title or "", *r.sheet, *r.branch_ends, *r.operating_points, *r.settings]
    texts += [t for f in r.findings for t in (f.message, f.path, f.suspect or "", *f.quantities, *f.candidates,
                                              f.origin or "", *(x.input for x in f.remedies or ()))]
    texts += [c.text for cells in r.sheet.values() for c in cells.values()]
    if not _UNSAFE.search("".join(texts)):
        return r
    findings = tuple(replace(f, message=inert(f.message), path=inert(f.path),
                             suspect=inert(f.suspect) if f.suspect else f.suspect,
                             quantities=tuple(map(inert, f.quantities)),
                             candidates=tuple(map(inert, f.candidates)),
                             origin=inert(f.origin) if f.origin else f.origin,
                             remedies=None if f.remedies is None else tuple(
                                 replace(x, input=inert(x.input), column=inert(x.column)) for x in f.remedies))
                     for f in r.findings)
    sheet = {inert(col): {q: c._replace(text=inert(c.text)) if c.text else c for q, c in cells.items()}
             for col, cells in r.sheet.items()}
    return replace(r, path=inert(r.path), title=inert(r.title) if r.title else r.title, findings=findings,
                   sheet=sheet, settings=tuple(map(inert, r.settings)), branch_ends=tuple(map(inert, r.branch_ends)),
                   operating_points=tuple(map(inert, r.operating_points)))


@dataclass(frozen=True)
class OutputOptions:
    units: object = None  # the process's UnitSystem, to show SI numbers in people's units
    color: bool = False
    show_sheet: bool | None = None  # the human format's sheet; None: only when one file is checked
    width: int | None = None  # the terminal's width, where findings wrap (None: no wrapping)
    fail_on: str = "error"  # the lowest severity that fails the run (junit marks those as failures)


def writer(name: str):
    """The chosen format's ``write``, given results whose spec text is inert in every format."""
    try:
        write = importlib.import_module(FORMATS[name]).write
    except KeyError:
        raise KeyError(f"unknown format {name!r}; choose one of {', '.join(FORMATS)}") from None

    def safe_write(results, out, options=None) -> None:
        write(inert_results(results), out, options)

    return safe_write
