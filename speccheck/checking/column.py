"""Checking one column of the sheet: the laser block, an operating point, or a stage.

``BlockCheck`` parses the column's values (and measured data files), runs the
engine over the relation table, turns a contradiction into findings that name
the suspect and the likely mistake, builds the sheet's cells, and checks the
limits of single quantities.  It reports through the document's ``report.Report``
(which stamps locations); it does no I/O (data files come through the
checker's injected reader).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from speccheck.checking import cells, column_limits, conflicts, measured_data, nominal
from speccheck.checking.engine import Network, diagnose, evaluate, network_for
from speccheck.checking.logspace import ln
from speccheck.checking.wording import format_ratio, join
from speccheck.records.findings import Cell
from speccheck.physics.quantities import ALIASES, BY_NAME, CATEGORICAL, MEASURED, QUANTITIES, defaults_for
from speccheck.physics.shapes import BEAM_PROFILES, DEFAULT_PROFILE, DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.reading.units import choose_unit, format_quantity
from speccheck.reading.values import Stated, ValueProblem

if TYPE_CHECKING:
    from speccheck.checking.report import Report, Services

NAMES = tuple(q.name for q in QUANTITIES)
KEYS = set(NAMES) | set(ALIASES)  # spec keys of a block that hold quantities


class Carried:
    """A value carried along the path into a stage's column: a ``Stated`` whose text (for messages) is
    written only when a message asks for it (most columns say nothing about most of their values)."""

    __slots__ = ("quantity", "low", "high", "typical", "unit", "_units", "_text")

    def __init__(self, quantity: str, low: float, high: float, typical: float | None, unit: str, units) -> None:
        self.quantity, self.low, self.high, self.typical, self.unit = quantity, low, high, typical, unit
        self._units, self._text = units, None

    @property
    def text(self) -> str:
        if self._text is None:
            ref = self.typical or (self.low if self.low > 0 else self.high)
            shown = format_quantity(self._units, ref, choose_unit(self._units, ref, self.unit)) if ref and \
                math.isfinite(ref) else ""
            self._text = f"{shown} (from the path)"
        return self._text


class BlockCheck:
    """Checks one block of quantities (the laser, later each stage)."""

    def __init__(self, checker: Services, name: str, block: dict, tolerance: float, report: Report,
                 paths: dict | None = None, inherited: dict | None = None, notes: bool = True) -> None:
        self.c = checker
        self.name = name  # the column: "laser", or an operating point's name
        self.block = block
        self.paths = paths or {key: (name, key) for key in block}  # spec key -> document path
        self.tolerances = tolerance  # Tolerances (per quantity) or one number
        self.tolerance = getattr(tolerance, "fallback", tolerance)  # one number, for measured widths
        self.report = report
        self.stated: dict[str, Stated] = {}
        self.keys: dict[str, str] = {}  # quantity -> spec key it was stated under
        self.measured: set[str] = set()  # quantities taken from measured data files (never suspected)
        # values carried from the column before (a beam path): never suspected, replaced by a measurement
        self.inherited: dict[str, Stated] = dict(inherited or {})
        self.notes = notes
        self.before: dict = {}  # the cells of the column before, on a beam path
        self._nominal: dict = {}  # nominal() by the values left out

    # ------------------------------------------------------------- helpers
    def tolerance_of(self, quantity: str) -> float:
        t = self.tolerances
        return t.quantity(quantity) if hasattr(t, "quantity") else t

    def dotted(self, quantity: str) -> str:
        return f"{self.name}.{quantity}"

    def at(self, quantity: str) -> tuple:
        """Where a quantity of this column was written; a derived or carried one is placed at the
        column itself (a stage's line), never at a path the document does not have."""
        key = self.keys.get(quantity, quantity)
        return self.paths.get(key) or self.paths.get("", (self.name, key))

    def overridden(self, quantity: str) -> bool:
        """Whether the value was set on the command line (``--set``; ``Document.mark_setting``)."""
        return self.report.doc.values.get(tuple(self.at(quantity)), (1,))[0] == 0

    def from_laser(self, quantity: str) -> bool:
        """Whether a value of an operating point is the laser block's, not restated at the point."""
        return self.name != "laser" and quantity not in self.carried and self.at(quantity)[0] == "laser"

    def show(self, quantity: str, si: float, unit: str | None = None) -> str:
        return format_quantity(self.c.units, si, unit or self.unit_for(quantity, si))

    def unit_for(self, quantity: str, si: float) -> str:
        """The user's unit where stated, else the display unit; a prefix that fits the number."""
        if quantity in self.stated and quantity not in self.carried:
            return choose_unit(self.c.units, si, self.stated[quantity].unit, keep=True)
        return choose_unit(self.c.units, si, BY_NAME[quantity].display_unit)

    def show_interval(self, quantity: str, low: float | None, high: float | None,
                      value: float | None = None) -> str:
        if low is not None and high is not None:
            value = value if value is not None else math.sqrt(low * high)
            unit = self.unit_for(quantity, value)
            if high <= low * (1.0 + 1e-9):
                return self.show(quantity, value, unit)
            return (f"{self.show(quantity, value, unit)} "
                    f"({self.show(quantity, low, unit)} … {self.show(quantity, high, unit)})")
        if low is not None:
            return f"at least {self.show(quantity, low)}"
        if high is not None:
            return f"at most {self.show(quantity, high)}"
        return "anything"

    def nearest(self, quantities, to: str) -> str:
        """The quantity closest to ``to`` in the relation graph (then first in the file)."""
        distance = {to: 0}
        frontier = [to]
        while frontier:
            nxt = []
            for q in frontier:
                for r in self.net.touching[self.net.index[q]]:
                    for k, _ in self.net.relations[r][1]:
                        name = self.net.names[k]
                        if name not in distance:
                            distance[name] = distance[q] + 1
                            nxt.append(name)
            frontier = nxt
        return min(quantities, key=lambda q: (distance.get(q, 99), self.report.doc.where(self.at(q))))

    def first_in_file(self, quantities) -> str:
        """The first in the file, preferring values stated in this column over inherited ones."""
        return min(quantities, key=lambda q: (self.at(q)[0] != self.paths.get("", (self.name,))[0],
                                              self.report.doc.where(self.at(q))))

    # ----------------------------------------------------------------- run
    def run(self) -> dict[str, Cell]:
        self.parse_values()
        shape = self.categorical("pulse_shape", PULSE_SHAPES, DEFAULT_SHAPE)
        profile = self.categorical("beam_profile", BEAM_PROFILES, DEFAULT_PROFILE)
        self.context = self.c.context(shape, profile)
        self.net: Network = network_for(NAMES, self.context)
        idx = self.net.index
        self.log_stated = {idx[q]: (ln(s.low), ln(s.high)) for q, s in self.stated.items()}
        fixed = set()
        self.defaults = defaults_for(self.stated)
        for q, value in self.defaults.items():
            self.log_stated[idx[q]] = (math.log(value), math.log(value))
            fixed.add(idx[q])
        self.fixed = frozenset(fixed | {idx[q] for q in self.measured})
        self.diagnosis = diagnose(self.net, self.log_stated, self.fixed)
        conflicts.report(self)
        nominal.report(self, getattr(self.tolerances, "margin", nominal.DEFAULT_MARGIN))
        column = cells.build(self)
        column_limits.report_limits(self, column)
        column_limits.report_bandwidth(self, column)
        if self.notes:
            column_limits.report_assumptions(self, column)
        return column

    def parse_values(self) -> None:
        for q, stated in self.inherited.items():
            self.stated[q] = stated
            self.keys[q] = q
            self.measured.add(q)
        self.carried = set(self.inherited)  # inherited and not replaced by a measurement
        measured = []
        for key, raw in self.block.items():
            if key in MEASURED and isinstance(raw, dict):
                measured.append((key, raw))
            if key in CATEGORICAL or key not in KEYS:
                continue
            try:
                stated = self.c.values.parse(key, raw, self.tolerances)
            except ValueProblem as p:
                self.report.add(p.rule, f"{self.name}.{p.message}", self.paths[key],
                                quantities=(self.dotted(key),))
                continue
            if stated.quantity in self.carried:
                self.compare_with_inherited(key, stated)
                continue
            if stated.quantity in self.stated:
                first = self.keys[stated.quantity]
                self.report.add("duplicate-quantity", f"{self.name}.{key} states {stated.quantity} again "
                                f"(already stated as {first}); the second is ignored", self.paths[key],
                                quantities=(self.dotted(stated.quantity),))
                continue
            self.stated[stated.quantity] = stated
            self.keys[stated.quantity] = key
        for key, raw in measured:
            measured_data.measure(self, key, raw)

    def compare_with_inherited(self, key: str, stated: Stated) -> None:
        """A value measured at a stage that agrees with the path replaces (narrows) it; one that
        disagrees is reported and the path's value kept, so the columns after it stay consistent."""
        model = self.inherited[stated.quantity]
        if stated.low > model.high or stated.high < model.low:
            ratio = (stated.typical / model.typical) if stated.typical and model.typical else None
            self.report.add(
                "measured-mismatch",
                f"{self.name}: measured {key} {stated.text}, but the laser and the stages before it give "
                f"{self.show_interval(stated.quantity, model.low or None, model.high if math.isfinite(model.high) else None, model.typical)}"
                + (f"; the measurement is {format_ratio(ratio)} that." if ratio else ".")
                + " The column goes on with the path's value.",
                self.paths[key], quantities=(self.dotted(stated.quantity),))
            return
        self.stated[stated.quantity] = stated
        self.keys[stated.quantity] = key
        self.measured.discard(stated.quantity)
        self.carried.discard(stated.quantity)

    # ------------------------------------------------------- measured data
    def categorical(self, key: str, table: dict, default: str) -> str:
        value = self.block.get(key)
        return value if isinstance(value, str) and value in table else default

    # ----------------------------------------------------------- conflicts
    def describe_support(self, support, leave_out=()) -> str:
        names = [self.net.names[i] for i in sorted(support, key=lambda i: self.net.names[i])]
        parts = [f"{q if self.keys[q] in MEASURED else self.keys[q]} {self.stated[q].text}"
                 for q in names if q in self.stated and q not in leave_out]
        parts += [f"{q} {self.defaults[q]:g} (default)" for q in names if q in self.defaults]
        return join(parts)

    def nominal(self, exclude=()) -> dict:
        """Point values of every quantity computable from the stated typical values (computed once
        per set of left-out values: the cells, the conflicts and the typical-value check share them)."""
        key = frozenset(exclude)
        cached = self._nominal.get(key)
        if cached is None:
            cached = self._nominal[key] = self._evaluate_nominal(key)
        return cached

    def _evaluate_nominal(self, exclude: frozenset, extra: dict | None = None) -> dict:
        idx = self.net.index
        known = {idx[q]: math.log(s.typical) for q, s in self.stated.items()
                 if s.typical is not None and s.typical > 0.0 and idx[q] not in exclude}
        known |= {idx[q]: math.log(v) for q, v in self.defaults.items()}
        return evaluate(self.net, known | (extra or {}))

    def nominal_with(self, exclude, extra: dict) -> dict:
        """As ``nominal``, with values stated only by bounds taken at ``extra`` (index → ln value)."""
        return self._evaluate_nominal(frozenset(exclude), extra)

    # ---------------------------------------------------------------- sheet
    # --------------------------------------------------------------- limits
    # ---------------------------------------------------------- assumptions
