"""What several formats say alike: where a finding is, and a remedy as JSON."""

from __future__ import annotations

import math


def place(f) -> str:
    """Where a finding is: ``file:line:col``, or the file and the ``--set`` it is about."""
    if f.origin:
        return f"{f.path} ({f.origin})"
    if f.line and f.column:
        return f"{f.path}:{f.line}:{f.column}"
    return f"{f.path}:{f.line}" if f.line else f.path


def remedy_dict(x) -> dict:
    """A remedy as the JSON and SARIF formats give it (numbers in SI, None for an open side)."""
    return {"input": x.input, "column": x.column, "parameter": x.parameter, "low": _si(x.low),
            "high": _si(x.high), "unit": x.unit, "reachable": x.reachable, "stated": x.stated}


def _si(x):
    return None if x is None or not math.isfinite(x) else float("%.15g" % x)
