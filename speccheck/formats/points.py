"""The operating points at a glance, for the review and the HTML report.

A row per column a reader of a maker's sheet or a proposal looks at — the laser
block, each operating point, the end of each branch of the path — with its
repetition rate, pulse energy, average power, pulse duration and peak power
(the sheet's cells, shown by ``formats.cell_text``) and its verdict: what the
errors and warnings about that column say, by rule and line, or "consistent".
``limits`` gives the sheet's own bounds on rate, energy and power (the laser
block's bounds and ranges), which the HTML report draws beside the points.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from speccheck.formats import cell_text
from speccheck.records.findings import Cell, FileResult, Finding

QUANTITIES = ("repetition_rate", "pulse_energy", "average_power", "pulse_duration", "peak_power")
HEADERS = ("rate", "energy", "power", "duration", "peak power")
# A verdict's words for the rules a column's numbers break most often; any other rule by its id.
_WORDS = {"relation-conflict": "contradiction", "operating-point-beyond-limit": "beyond the sheet's limits",
          "target-not-met": "target not met", "typical-values-disagree": "typical values disagree"}


@dataclass(frozen=True)
class Row:
    column: str
    kind: str  # "laser" | "point" | "end"
    cells: tuple[Cell | None, ...]  # one per QUANTITIES
    verdict: str
    severity: str | None  # the worst severity among the findings the verdict names (None: consistent)

    @property
    def label(self) -> str:
        return {"laser": "laser", "point": self.column}.get(self.kind, f"end: {self.column}")


def columns(result: FileResult) -> list[tuple[str, str]]:
    """(column, kind) of the laser, each operating point and each branch end, in that order."""
    out = [("laser", "laser")] if "laser" in result.sheet else []
    out += [(c, "point") for c in dict.fromkeys(result.operating_points) if c in result.sheet and c != "laser"]
    seen = {c for c, _ in out}
    out += [(c, "end") for c in dict.fromkeys(result.branch_ends) if c in result.sheet and c not in seen]
    return out


def about(result: FileResult) -> dict[str, list[Finding]]:
    """The findings about each column of the sheet: those naming one of its quantities; a finding
    about a point and the laser block's bound it breaks belongs to the point."""
    out: dict[str, list[Finding]] = {}
    for f in result.findings:
        named = {q.rsplit(".", 1)[0] for q in f.quantities if "." in q}
        if len(named) > 1:
            named.discard("laser")
        for column in named:
            out.setdefault(column, []).append(f)
    return out


def verdict(findings: list[Finding]) -> tuple[str, str | None]:
    """The words for a column's errors and warnings (each rule once, with its lines), or
    "consistent"; and the worst severity among them."""
    serious = [f for f in findings if f.severity in ("error", "warning")]
    met = sorted({f.line for f in findings if f.rule == "target-met" and f.line})
    if not serious:
        return "consistent" + (f"; target met (line {', '.join(map(str, met))})" if met else ""), None
    lines: dict[str, list[str]] = {}
    for f in sorted(serious, key=lambda f: (f.severity != "error", f.line or 0)):
        where = f"line {f.line}" if f.line else (f.origin or "")
        lines.setdefault(_WORDS.get(f.rule, f.rule), [])
        if where and where not in lines[_WORDS.get(f.rule, f.rule)]:
            lines[_WORDS.get(f.rule, f.rule)].append(where)
    words = "; ".join(word + (f" ({', '.join(w)})" if w else "") for word, w in lines.items())
    return words, "error" if any(f.severity == "error" for f in serious) else "warning"


def rows(result: FileResult) -> list[Row]:
    findings = about(result)
    out = []
    for column, kind in columns(result):
        cells = result.sheet[column]
        words, severity = verdict(findings.get(column, []))
        out.append(Row(column, kind, tuple(cells.get(q) for q in QUANTITIES), words, severity))
    return out


def texts(row: Row, numbers: cell_text.Numbers) -> list[str]:
    """The row's cells as the grids show them (marks first), "—" where the sheet has none."""
    return [cell_text.marks(c) + cell_text.shown(c, numbers) if c is not None else "—" for c in row.cells]


def limits(result: FileResult) -> dict[str, tuple[float | None, float | None]]:
    """The sheet's own bounds on rate, energy and power: the laser block's stated bounds and
    ranges (a plain value there is what a point overrides, not a limit)."""
    out = {}
    for q in QUANTITIES[:3]:
        c = result.sheet.get("laser", {}).get(q)
        if c is None or c.status == "derived" or cell_text.form(c) not in ("bound", "range"):
            continue
        low = c.low if c.low is not None and math.isfinite(c.low) and c.low > 0 else None
        high = c.high if c.high is not None and math.isfinite(c.high) else None
        if low is not None or high is not None:
            out[q] = (low, high)
    return out


def has_table(result: FileResult) -> bool:
    """Whether the table says more than the sheet's first column: operating points or a path."""
    return len(columns(result)) > 1
