"""``--format json``: the machine-readable contract (version 1).

Values are in SI units; unbounded interval sides are ``null``.  Output is
deterministic: keys in a fixed order, floats rounded to 15 significant
digits, findings sorted; compact (one line).
"""

from __future__ import annotations

import json
import math

from speccheck.formats.common import remedy_dict
from speccheck.records.findings import Cell, FileResult, Finding, SEVERITIES

VERSION = 1


def _num(x: float | None) -> float | None:
    if x is None or x == 0.0:
        return None if x is None else 0.0
    if not math.isfinite(x):
        return None  # JSON has no infinity or NaN: an unbounded or unknown number is null
    rounded = float("%.15g" % x)
    return rounded if rounded not in (math.inf, -math.inf) else x  # 1.7976931348623157e308 rounds up


def finding_dict(f: Finding) -> dict:
    out = {"rule": f.rule, "severity": f.severity, "message": f.message,
           "line": f.line, "column": f.column, "quantities": list(f.quantities),
           "suspect": f.suspect}
    if f.candidates:
        out["candidates"] = list(f.candidates)
    if f.cause:
        out["cause"] = f.cause
    if f.likely:
        out["likely"] = True
    if f.origin:
        out["origin"] = f.origin
    if f.remedies is not None:
        out["remedies"] = [remedy_dict(x) for x in f.remedies]
    return out


def cell_dict(c: Cell) -> dict:
    out = {"status": c.status, "value": _num(c.value), "low": _num(c.low), "high": _num(c.high),
           "unit": c.unit, "display_unit": c.display_unit}
    if c.status == "conflict":
        out["implied_low"] = _num(c.implied_low)
        out["implied_high"] = _num(c.implied_high)
    if c.text and c.status != "derived":
        out["stated"] = c.text
    if c.assumed:
        out["assumed"] = True
    if c.overridden:
        out["set"] = True
    if c.inherited:
        out["inherited"] = True
    return out


def document(results: list[FileResult]) -> dict:
    return {
        "version": VERSION,
        "files": [
            {"path": r.path, "title": r.title, **({"set": list(r.settings)} if r.settings else {}),
             "findings": [finding_dict(f) for f in r.findings],
             "sheet": {block: {q: cell_dict(c) for q, c in cells.items()} for block, cells in r.sheet.items()}}
            for r in results
        ],
        "counts": {s: sum(r.count(s) for r in results) for s in SEVERITIES},
    }


def _dumps(value) -> str:
    return json.dumps(value, ensure_ascii=False, allow_nan=False)


def _number_text(x: float | None) -> str:
    """The JSON text of ``_num(x)``, written directly (the sheet holds most of the numbers)."""
    if x is None or not math.isfinite(x):
        return "null"
    if x == 0.0:
        return "0.0"
    text = "%.15g" % x
    return text if text not in ("inf", "-inf") else repr(x)


class _SheetWriter:
    """The sheet as JSON text: the same document as ``document()`` gives, without building
    a dict per cell first (a sheet has thousands of cells; this is the writer's hot loop)."""

    def __init__(self) -> None:
        self.strings: dict[str, str] = {}

    def string(self, text: str) -> str:
        out = self.strings.get(text)
        if out is None:
            out = self.strings[text] = _dumps(text)
        return out

    def cell(self, c: Cell) -> str:
        n = _number_text
        text = (f'{{"status":"{c.status}","value":{n(c.value)},"low":{n(c.low)},"high":{n(c.high)},'
                f'"unit":{self.string(c.unit)},"display_unit":{self.string(c.display_unit)}')
        if c.status == "conflict":
            text += f',"implied_low":{n(c.implied_low)},"implied_high":{n(c.implied_high)}'
        if c.text and c.status != "derived":
            text += f',"stated":{self.string(c.text)}'
        if c.assumed:
            text += ',"assumed":true'
        if c.overridden:
            text += ',"set":true'
        if c.inherited:
            text += ',"inherited":true'
        return text + "}"

    def sheet(self, sheet: dict) -> str:
        # a value carried unchanged along a path is the same cell in every column: written once per file
        written: dict = {}

        def cell(c: Cell) -> str:
            text = written.get(c)
            if text is None:
                text = written[c] = self.cell(c)
            return text

        return "{" + ",".join(
            f"{self.string(block)}:{{" + ",".join(f"{self.string(q)}:{cell(c)}" for q, c in cells.items()) + "}"
            for block, cells in sheet.items()) + "}"


def write(results: list[FileResult], out, options=None) -> None:
    # Compact, so that it is fast; pipe through `python -m json.tool` to read it.
    sheets = _SheetWriter()
    out.write(f'{{"version":{VERSION},"files":[')
    for i, r in enumerate(results):
        head = {"path": r.path, "title": r.title, **({"set": list(r.settings)} if r.settings else {}),
                "findings": [finding_dict(f) for f in r.findings]}
        out.write(("," if i else "") + _dumps(head)[:-1] + ',"sheet":' + sheets.sheet(r.sheet) + "}")
    counts = {s: sum(r.count(s) for r in results) for s in SEVERITIES}
    out.write('],"counts":' + _dumps(counts) + "}\n")
