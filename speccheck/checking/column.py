"""Checking one column of the sheet: the laser block, an operating point, or a stage.

``BlockCheck`` parses the column's values (and measured data files), runs the
engine over the relation table, turns a contradiction into findings that name
the suspect and the likely mistake, builds the sheet's cells, and checks the
limits of single quantities.  It reports through the document's ``_Report``
(which stamps locations); it does no I/O (data files come through the
checker's injected reader).
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from speccheck.checking.engine import Diagnosis, Network, State, diagnose, evaluate, implied, network_for
from speccheck.records.findings import Cell
from speccheck.physics.limits import LIMITS
from speccheck.physics.mistakes import likely_causes
from speccheck.physics.quantities import ALIASES, BY_NAME, CATEGORICAL, DEFAULTS, MEASURED, QUANTITIES
from speccheck.physics.relations import BY_ID
from speccheck.physics.shapes import BEAM_PROFILES, DEFAULT_PROFILE, DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.reading.units import UnitError, choose_unit, format_number, format_quantity
from speccheck.reading.values import Stated, ValueProblem

if TYPE_CHECKING:  # only for annotations: check.py imports this module
    from speccheck.checking.document import Checker, _Report

NAMES = tuple(q.name for q in QUANTITIES)
KEYS = set(NAMES) | set(ALIASES)  # spec keys of a block that hold quantities


def _ln(x: float) -> float:
    if x <= 0.0:
        return -math.inf
    return math.log(x) if math.isfinite(x) else math.inf


_LN_MAX = math.log(1.7e308)  # beyond this a float overflows


def _exp(y: float) -> float | None:
    """Back from log space; None for an unbounded side (or one beyond what a float holds)."""
    if not math.isfinite(y) or abs(y) > _LN_MAX:
        return None  # a float cannot hold it (inf, or an underflow to 0 that would divide by zero)
    return math.exp(y)


def _centre(low: float | None, high: float | None) -> float | None:
    if low is not None and high is not None:
        return math.sqrt(low * high)
    return low if low is not None else high


class BlockCheck:
    """Checks one block of quantities (the laser, later each stage)."""

    def __init__(self, checker: Checker, name: str, block: dict, tolerance: float, report: _Report,
                 paths: dict | None = None, inherited: dict | None = None, notes: bool = True) -> None:
        self.c = checker
        self.name = name  # the column: "laser", or an operating point's name
        self.block = block
        self.paths = paths or {key: (name, key) for key in block}  # spec key -> document path
        self.tolerance = tolerance
        self.report = report
        self.stated: dict[str, Stated] = {}
        self.keys: dict[str, str] = {}  # quantity -> spec key it was stated under
        self.measured: set[str] = set()  # quantities taken from measured data files (never suspected)
        # values carried from the column before (a beam path): never suspected, replaced by a measurement
        self.inherited: dict[str, Stated] = dict(inherited or {})
        self.notes = notes

    # ------------------------------------------------------------- helpers
    def dotted(self, quantity: str) -> str:
        return f"{self.name}.{quantity}"

    def at(self, quantity: str) -> tuple:
        key = self.keys.get(quantity, quantity)
        return self.paths.get(key, (self.name, key))

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
        self.log_stated = {idx[q]: (_ln(s.low), _ln(s.high)) for q, s in self.stated.items()}
        fixed = set()
        for q, value in DEFAULTS.items():
            if q not in self.stated:
                self.log_stated[idx[q]] = (math.log(value), math.log(value))
                fixed.add(idx[q])
        self.fixed = frozenset(fixed | {idx[q] for q in self.measured})
        self.diagnosis = diagnose(self.net, self.log_stated, self.fixed)
        self.report_conflicts()
        cells = self.cells()
        self.report_limits(cells)
        if self.notes:
            self.report_assumptions(cells)
        return cells

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
                stated = self.c.values.parse(key, raw, self.tolerance)
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
            self.measure(key, raw)

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
                + (f"; the measurement is {_format_ratio(ratio)} that." if ratio else ".")
                + " The column goes on with the path's value.",
                self.paths[key], quantities=(self.dotted(stated.quantity),))
            return
        self.stated[stated.quantity] = stated
        self.keys[stated.quantity] = key
        self.measured.discard(stated.quantity)
        self.carried.discard(stated.quantity)

    # ------------------------------------------------------- measured data
    def measure(self, key: str, raw: dict) -> None:
        """Read a measured file; its widths become stated values or are compared with them."""
        from speccheck.reading import measured

        at = self.paths[key]
        name = raw.get("file")
        unit_key, dimension = MEASURED[key]
        unit_text = raw.get(unit_key, "nm" if dimension == "m" else "fs")
        if not isinstance(name, str):
            return  # the schema reports it
        try:
            unit = self.c.units.parse(str(unit_text))
            if unit.dimension != dimension:
                raise measured.DataProblem(f"{unit_key} {unit_text!r} is not a unit of "
                                           f"{'length' if dimension == 'm' else 'time'}")
            if self.c.read is None:
                raise measured.DataProblem("data files are not read in this mode")
            try:
                data = self.c.read(name, self.report.path)
            except (OSError, ValueError) as exc:
                raise measured.DataProblem(f"cannot read it: {getattr(exc, 'strerror', None) or exc}") from None
            x, y = measured.read_table(data.decode("utf-8", errors="replace"))
            x = x * unit.factor
            if key == "spectrum":
                result = measured.analyse_spectrum(x, y, self.c.units.constants.c)
                self.use_measured("spectral_bandwidth", "spectral_bandwidth_wavelength",
                                  result.fwhm_wavelength, unit.text, name, key, at)
                self.use_measured("spectral_bandwidth", "spectral_bandwidth",
                                  result.fwhm_frequency, "THz", name, key, at, compare_only=True)
                self.use_measured("wavelength", "wavelength", result.centre_wavelength, unit.text, name, key,
                                  at, compare=False)
                self.use_measured("transform_limited_duration", "transform_limited_duration",
                                  result.transform_limited_duration, "fs", name, key, at)
            else:
                width = measured.analyse_autocorrelation(x, y)
                self.use_measured("autocorrelation_width", "autocorrelation_width", width, unit.text, name,
                                  key, at)
        except (measured.DataProblem, UnitError) as exc:
            self.report.add("measured-data", f"{self.name}.{key}: {name}: {exc}", at,
                            quantities=(self.dotted(key),))

    def use_measured(self, key: str, quantity: str, si: float, unit: str, name: str, source_key: str,
                     at, compare: bool = True, compare_only: bool = False) -> None:
        tol = self.tolerance
        text = f"{format_quantity(self.c.units, si, choose_unit(self.c.units, si, unit))} (from {name})"
        stated = self.stated.get(quantity)
        if stated is None:
            if compare_only or any(q in self.stated for q in ALIASES.get(key, {}).values()):
                return
            self.stated[quantity] = Stated(quantity, si * (1 - tol), si * (1 + tol), si, unit, text)
            self.keys[quantity] = source_key
            self.measured.add(quantity)
            return
        if compare and (si * (1 + tol) < stated.low or si * (1 - tol) > stated.high):
            self.report.add(
                "measured-mismatch",
                f"{self.name}.{self.keys[quantity]} is stated as {stated.text}, but {name} measures "
                f"{format_quantity(self.c.units, si, choose_unit(self.c.units, si, stated.unit))} "
                f"(FWHM); the stated value is {_format_ratio(stated.typical / si) if stated.typical else 'outside'} "
                "the measured one.",
                self.at(quantity), quantities=(self.dotted(quantity), self.dotted(source_key)))

    def categorical(self, key: str, table: dict, default: str) -> str:
        value = self.block.get(key)
        return value if isinstance(value, str) and value in table else default

    # ----------------------------------------------------------- conflicts
    def describe_support(self, support, leave_out=()) -> str:
        names = [self.net.names[i] for i in sorted(support, key=lambda i: self.net.names[i])]
        parts = [f"{q if self.keys[q] in MEASURED else self.keys[q]} {self.stated[q].text}"
                 for q in names if q in self.stated and q not in leave_out]
        parts += [f"{q} {DEFAULTS[q]:g} (default)" for q in names if q not in self.stated and q in DEFAULTS]
        return _join(parts)

    def describe_via(self, via) -> str:
        text = "; ".join(BY_ID[r].formula.split("  (")[0] for r in sorted(via))
        assumed = sorted({k for r in via for k in BY_ID[r].uses if k not in self.block})
        if assumed:
            text += ", assuming a " + " and a ".join(
                f"{self.context.shape.name if k == 'pulse_shape' else self.context.profile.name} "
                f"{k.replace('_', ' ')}" for k in assumed)
        return text

    def nominal(self, exclude=()) -> dict:
        """Point values of every quantity computable from the stated typical values."""
        idx = self.net.index
        known = {idx[q]: math.log(s.typical) for q, s in self.stated.items()
                 if s.typical is not None and idx[q] not in exclude}
        known |= {idx[q]: math.log(v) for q, v in DEFAULTS.items() if q not in self.stated}
        return evaluate(self.net, known)

    def implied_text(self, var: int, state: State, exclude=()) -> tuple[str, float | None]:
        q = self.net.names[var]
        low, high = _exp(state.lo[var]), _exp(state.hi[var])
        point = self.nominal(exclude or (var,)).get(var)
        value = None
        if point is not None and low is not None and high is not None:
            value = min(max(_exp(point) or high, low), high)
        return self.show_interval(q, low, high, value), value if value is not None else _centre(low, high)

    def ratio_text(self, quantity: str, implied_centre: float | None) -> str:
        s = self.stated[quantity]
        mine = s.typical if s.typical is not None else _centre(_exp(_ln(s.low)), _exp(_ln(s.high)))
        if not mine or not implied_centre:
            return ""
        r = mine / implied_centre
        if not (r > 0 and math.isfinite(r) and math.isfinite(1 / r)):
            return ""
        return f" The stated value is {_format_ratio(r)} the implied one."

    def causes(self, var: int, state: State) -> list:
        """Catalogue mistakes that explain the ratio of stated to implied (best first)."""
        q = self.net.names[var]
        s = self.stated[q]
        value = s.typical if s.typical is not None else (s.low if s.low > 0 else s.high)
        i_lo, i_hi = _exp(state.lo[var]), _exp(state.hi[var])
        if not value or not math.isfinite(value) or i_lo is None or i_hi is None:
            return []
        s_lo = s.low if s.low > 0 else value
        s_hi = s.high if math.isfinite(s.high) else value
        return likely_causes(q, s_lo / i_hi, s_hi / i_lo, self.context)

    @staticmethod
    def cause_text(causes) -> str:
        if not causes:
            return ""
        text = f" Likely cause: {causes[0][1]}"
        if len(causes) > 1:
            text += f" (or {causes[1][1]})"
        return text + "."

    def report_conflicts(self) -> None:
        d: Diagnosis = self.diagnosis
        if d.consistent:
            return
        names = self.net.names
        involved = sorted({names[i] for i in d.conflict} | {names[i] for i in d.removed})
        dotted = [self.dotted(q) for q in involved if q in self.stated]
        if d.suspects:
            for s in d.suspects:
                q = names[s]
                text, centre = self.implied_text(s, d.state, d.removed)
                support = d.state.support(s)
                via = d.state.via(s)
                causes = self.causes(s, d.state)
                self.report.add(
                    "relation-conflict",
                    f"{self.name}.{q} is stated as {self.stated[q].text}, but the rest of the spec "
                    f"({self.describe_support(support)}) implies {text}, via {self.describe_via(via)}."
                    + self.ratio_text(q, centre) + self.cause_text(causes),
                    self.at(q), quantities=[self.dotted(q)] + [self.dotted(names[i]) for i in sorted(support)
                                                              if names[i] in self.stated],
                    suspect=self.dotted(q), cause=causes[0][0].id if causes else None)
            return
        if not d.candidates:  # only defaults conflict: nothing the user stated can be blamed
            return
        first = self.first_in_file([names[i] for i in d.candidates])
        lines = []
        for c in sorted(d.candidates, key=lambda c: self.report.doc.where(self.at(names[c]))):
            rest = implied(self.net, self.log_stated, c)
            if rest.ok:
                text, _ = self.implied_text(c, rest)
                causes = self.causes(c, rest)
                why = f"; perhaps {causes[0][1]}" if causes else ""
                lines.append(f"{names[c]} (the rest implies {text}{why})")
            else:
                lines.append(names[c])
        full = self.c_state_via(d)
        self.report.add(
            "relation-conflict",
            f"{self.name}: these stated values cannot all be true: {self.describe_support(d.conflict)}"
            f"{' (via ' + self.describe_via(full) + ')' if full else ''}. "
            f"Any one of them could be the wrong one: {_join(lines)}; state more numbers to tell them apart.",
            self.at(first), quantities=dotted, candidates=[self.dotted(names[c]) for c in d.candidates])

    def c_state_via(self, d: Diagnosis) -> frozenset:
        via = frozenset()
        for c in d.candidates:
            rest = implied(self.net, self.log_stated, c)
            if rest.ok:
                via |= rest.via(c)
        return via

    # ---------------------------------------------------------------- sheet
    def cells(self) -> dict[str, Cell]:
        d = self.diagnosis
        names = self.net.names
        removed = set(d.removed)
        nominal = self.nominal(removed)
        out: dict[str, Cell] = {}
        for i, q in enumerate(names):
            quantity = BY_NAME[q]
            if q in self.stated:
                s = self.stated[q]
                low = s.low if s.low > 0.0 else None
                high = s.high if math.isfinite(s.high) else None
                value = s.typical if s.typical is not None else _centre(low, high)
                if i in removed:
                    state = d.state if d.suspects else implied(self.net, self.log_stated, i)
                    ilo, ihi = (_exp(state.lo[i]), _exp(state.hi[i])) if state.ok else (None, None)
                    out[q] = Cell("conflict", low, high, value, quantity.si_unit, s.unit, ilo, ihi,
                                  text=s.text)
                elif q in self.carried:
                    unit = self.unit_for(q, value) if value else s.unit
                    out[q] = Cell("derived", low, high, value, quantity.si_unit, unit)
                else:
                    out[q] = Cell("stated", low, high, value, quantity.si_unit, s.unit, text=s.text)
            elif d.state.known(i) and i not in self.fixed:
                low, high = _exp(d.state.lo[i]), _exp(d.state.hi[i])
                value = _centre(low, high)
                if i in nominal:
                    value = min(max(_exp(nominal[i]) or math.inf, low or 0.0), high or math.inf)
                    value = value if math.isfinite(value) else None
                if value is None and low is None and high is None:
                    continue  # beyond what a float holds: nothing to show
                ref = value if value is not None else (low if low is not None else high)
                unit = choose_unit(self.c.units, ref, quantity.display_unit)
                out[q] = Cell("derived", low, high, value, quantity.si_unit, unit)
        derived_from = [self.net.index[c] for c in out]
        for q, value in DEFAULTS.items():
            if q not in out and d.state.uses_quantity(derived_from, self.net.index[q]):
                out[q] = Cell("derived", value, value, value, BY_NAME[q].si_unit, "1", assumed=True)
        return {q: out[q] for q in names if q in out}

    # --------------------------------------------------------------- limits
    def report_limits(self, cells: dict[str, Cell]) -> None:
        for limit in LIMITS:
            cell = cells.get(limit.quantity)
            if cell is None or cell.status == "conflict":
                continue
            low = cell.low if cell.low is not None else 0.0
            high = cell.high if cell.high is not None else math.inf
            if not limit.violated(low, high, self.context):
                continue
            q = limit.quantity
            i = self.net.index[q]
            support = self.diagnosis.state.support(i) - {self.net.index[d] for d in DEFAULTS}
            where = q if q in self.stated else self.nearest([self.net.names[k] for k in support] or [q], q)
            origin = "" if q in self.stated else f" (from {self.describe_support(support)})"
            bound = limit.bound(self.context)
            what = limit.what.format(shape=self.context.shape.name)
            bound_text = f"{what}" if what.replace(" ", "").replace(".", "").isdigit() else \
                f"{what} ({format_quantity(self.c.units, bound, self.unit_for(q, bound))})"
            relation = "below" if limit.side == "min" else "at or above" if bound == 1.0 else "above"
            self.report.add(
                limit.rule,
                f"{self.name}.{q} is {self.show_interval(q, cell.low, cell.high, cell.value)}{origin}, {relation} "
                f"{bound_text}: {limit.consequence}.",
                self.at(where), quantities=[self.dotted(q)] + sorted(
                    self.dotted(self.net.names[k]) for k in support if self.net.names[k] != q))

    # ---------------------------------------------------------- assumptions
    def report_assumptions(self, cells: dict[str, Cell]) -> None:
        state = self.diagnosis.state
        for key, default in (("pulse_shape", DEFAULT_SHAPE), ("beam_profile", DEFAULT_PROFILE)):
            if key in self.block:
                continue
            relying = sorted(
                q for q, cell in cells.items() if cell.status == "derived" and not BY_NAME[q].secondary
                and any(key in BY_ID[r].uses for r in state.via(self.net.index[q])))
            if relying:
                self.report.add(
                    "assumed-shape",
                    f"{self.name}.{key} is not stated, so a {default} {key.replace('_', ' ')} is assumed "
                    f"for the derived {_join(relying)}; state {key} to make them exact.",
                    self.paths.get("", (self.name,)), key=True, quantities=[self.dotted(q) for q in relying])


def _join(parts) -> str:
    parts = list(parts)
    if len(parts) <= 1:
        return "".join(parts)
    return ", ".join(parts[:-1]) + " and " + parts[-1]


def _format_ratio(r: float) -> str:
    if r >= 1:
        return f"{format_number(r, 3)}×"
    return f"{format_number(r, 3)}× (1/{format_number(1 / r, 3)} of)"
