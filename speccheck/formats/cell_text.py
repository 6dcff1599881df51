"""What a cell of the sheet shows to people, the same in every format for people (the terminal
grid, the HTML grid, the review's table of operating points).

A stated cell shows the value in the form it was stated — a bound ``≥ 380 µJ``, a range
``min 20 W, typ 22 W, max 25 W``, a value with its own ``±`` — and, for a bound or a range, the
interval the rest of the spec leaves of it after ``→`` (``≥ 380 µJ → 380 … 400 µJ`` where the
rate and the maximum power cap the energy).  A plain value shows its number, a derived cell its
value.  Marks are text, never colour alone: ``=`` derived, ``!`` conflict, ``*`` set on the
command line, ``←`` an operating point's value taken from the laser block.
"""

from __future__ import annotations

import math
import re

from speccheck.records.findings import Cell
from speccheck.reading.units import choose_unit, format_number, format_quantity, pretty_unit

STATUS_MARK = {"stated": "", "derived": "=", "conflict": "!"}
SET_MARK = "*"  # a value set on the command line (--set)
INHERITED_MARK = "←"  # an operating point's value that is the laser block's
NARROWED_MARK = "→"
# What each mark means, for the legends.
MEANING = {
    "derived": "derived from the others",
    "conflict": "in conflict",
    "set": "set on the command line",
    "inherited": "from the laser block",
    "narrowed": "what the rest leaves of a bound",
}

_BOUND = re.compile(r"^\s*(>=|<=|=>|=<|≥|≤|>|<)\s*(.*?)\s*$")
_SIGN = {">=": "≥", "=>": "≥", "≥": "≥", ">": ">", "<=": "≤", "=<": "≤", "≤": "≤", "<": "<"}
_RANGE_PART = re.compile(r"\b(min|typical|max):\s*")
_RANGE_WORD = {"min": "min ", "typical": "typ ", "max": "max "}
_PLUS_MINUS = re.compile(r"\s*(?:±|\+/-|\+-)\s*")


class Numbers:
    """SI numbers shown in a unit; a display unit the unit system cannot read falls back to the
    bare SI number (a report is never lost to a unit)."""

    def __init__(self, units) -> None:
        self.units = units

    def __call__(self, si: float | None, unit: str) -> str:
        if si is None:
            return "—"
        if si in (math.inf, -math.inf):  # a path cell: a flat wavefront
            return "∞" if si > 0 else "−∞"
        try:
            return format_quantity(self.units, si, unit)
        except Exception:
            return format_number(si)

    def bare(self, si: float, unit: str) -> str:
        try:
            return format_number(si / self.units.factor(unit)) if unit != "1" else format_number(si)
        except Exception:
            return format_number(si)

    def span(self, low, high, unit: str) -> str:
        if low is not None and high is not None:
            text = f"{self.bare(low, unit)} … {self.bare(high, unit)}"
        elif low is not None:
            text = f"≥ {self.bare(low, unit)}"
        elif high is not None:
            text = f"≤ {self.bare(high, unit)}"
        else:
            return "unbounded"
        return text if unit == "1" else f"{text} {pretty_unit(unit)}"

    def prefixed(self, si: float, unit: str) -> str:
        try:
            return choose_unit(self.units, si, unit)
        except Exception:
            return unit


def form(cell: Cell) -> str:
    """How a stated value was written: ``bound``, ``range`` (min/typical/max), ``tolerance`` (its
    own ±), ``plain``; ``""`` for a cell with no stated text (derived)."""
    text = cell.text.strip() if cell.text else ""
    if not text or cell.status == "derived":
        return ""
    if _BOUND.match(text):
        return "bound"
    if text.startswith("{") or _RANGE_PART.match(text):
        return "range"
    return "tolerance" if _PLUS_MINUS.search(text) else "plain"


def stated_form(cell: Cell, numbers: Numbers) -> str:
    """The stated value as written, in a short form: ``≥ 380 µJ``, ``min 20 W, max 25 W``,
    ``290 fs ± 30 fs``; a plain value as its number in the unit it was written in."""
    kind = form(cell)
    text = cell.text.strip()
    if kind == "bound":
        sign, rest = _BOUND.match(text).groups()
        return f"{_SIGN[sign]} {rest}"
    if kind == "range":
        return _RANGE_PART.sub(lambda m: _RANGE_WORD[m.group(1)], text.strip("{}").strip())
    if kind == "tolerance":
        return _PLUS_MINUS.sub(" ± ", text)
    if cell.value is not None:
        return numbers(cell.value, cell.display_unit or cell.unit)
    return text


def is_narrowed(cell: Cell) -> bool:
    """Whether the cell shows the interval the rest of the spec leaves of a bound or range."""
    return cell.status == "stated" and cell.low is not None and cell.high is not None and \
        form(cell) in ("bound", "range")


def narrowed(cell: Cell, numbers: Numbers) -> str:
    """The interval the rest of the spec leaves of a stated bound or range, in its unit ('' where
    an end stays open: the bound is then all there is to say)."""
    if not is_narrowed(cell):
        return ""
    return numbers.span(cell.low, cell.high, cell.display_unit or cell.unit)


def shown(cell: Cell, numbers: Numbers) -> str:
    """The text of a grid cell, without its marks."""
    if cell.status in ("stated", "conflict") and cell.text:
        text = stated_form(cell, numbers)
        rest = narrowed(cell, numbers)
        return f"{text} {NARROWED_MARK} {rest}" if rest else text
    unit = cell.display_unit or cell.unit
    if cell.value is not None:
        return numbers(cell.value, unit)
    return numbers.span(cell.low, cell.high, unit)


def marks(cell: Cell) -> str:
    """The cell's marks as text: its status (or ``*`` for a value set on the command line), then
    ``←`` for an operating point's value that is the laser block's."""
    mark = SET_MARK if cell.overridden else STATUS_MARK.get(cell.status, "=")
    return mark + (INHERITED_MARK if cell.inherited else "")


def legend(cells) -> list[tuple[str, str]]:
    """(mark, meaning) of each mark the cells use beyond the status marks, in a fixed order."""
    cells = list(cells)
    out = []
    if any(c.overridden for c in cells):
        out.append((SET_MARK, MEANING["set"]))
    if any(c.inherited for c in cells):
        out.append((INHERITED_MARK, MEANING["inherited"]))
    if any(is_narrowed(c) for c in cells):
        out.append((NARROWED_MARK, MEANING["narrowed"]))
    return out
