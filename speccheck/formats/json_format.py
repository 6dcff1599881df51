"""``--format json``: the machine-readable contract (version 1).

Values are in SI units; unbounded interval sides are ``null``.  Output is
deterministic: keys in a fixed order, floats rounded to 15 significant
digits, findings sorted; compact (one line).
"""

from __future__ import annotations

import json
import math

from ..findings import Cell, FileResult, Finding, SEVERITIES

VERSION = 1


def _num(x: float | None) -> float | None:
    if x is None or x == 0.0:
        return None if x is None else 0.0
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
    return out


def cell_dict(c: Cell) -> dict:
    out = {"status": c.status, "value": _num(c.value), "low": _num(c.low), "high": _num(c.high),
           "unit": c.unit, "display_unit": c.display_unit}
    if c.status == "conflict":
        out["implied_low"] = _num(c.implied_low)
        out["implied_high"] = _num(c.implied_high)
    if c.assumed:
        out["assumed"] = True
    return out


def document(results: list[FileResult]) -> dict:
    return {
        "version": VERSION,
        "files": [
            {"path": r.path, "title": r.title,
             "findings": [finding_dict(f) for f in r.findings],
             "sheet": {block: {q: cell_dict(c) for q, c in cells.items()} for block, cells in r.sheet.items()}}
            for r in results
        ],
        "counts": {s: sum(r.count(s) for r in results) for s in SEVERITIES},
    }


def write(results: list[FileResult], out, options=None) -> None:
    # Compact, so that the C encoder writes it (several times faster than indenting);
    # pipe through `python -m json.tool` to read it.
    out.write(json.dumps(document(results), ensure_ascii=False, allow_nan=False))
    out.write("\n")
