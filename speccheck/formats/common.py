"""What several formats say alike: where a finding is, a remedy as JSON, the run's cautions."""

from __future__ import annotations

import math

from speccheck.checking.safety import CAUTION
from speccheck.records.findings import CAUTIONS


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


CAUTION_TEXT = CAUTION + "."  # the caution every hazardous spec carries, said once per run where a format can


def caution_part(f) -> str:
    """What a caution finding says beyond the shared caution (the indicative optical density an MPE
    gives), or '' where it says only the caution."""
    if not f.message.startswith(CAUTION):
        return f.message
    rest = f.message[len(CAUTION):]
    return rest.lstrip(". ") if rest.strip(". ") else ""


def cautioned(results) -> list:
    """The run's caution findings, one ``(path, finding)`` per file that has one, in the files' order."""
    out = []
    for r in results:
        found = next((f for f in r.findings if f.rule in CAUTIONS), None)
        if found is not None:
            out.append((r.path, found))
    return out


def counts_text(results) -> str:
    """The counts of a run, as every format's summary says them: each severity without the caution,
    which counts once however many files it applies to ('3 errors, 1 warning, 2 notes, 1 caution')."""
    from speccheck.records.findings import SEVERITIES

    counts = {s: sum(1 for r in results for f in r.findings if f.severity == s and f.rule not in CAUTIONS)
              for s in SEVERITIES}
    text = ", ".join(f"{counts[s]} {s}{'' if counts[s] == 1 else 's'}" for s in SEVERITIES)
    return text + (", 1 caution" if cautioned(results) else "")
