"""Checking the beam path: one column of the sheet per stage, from the laser to the target.

Each stage turns the beam of the column before into its own (``path.py``
holds the physics of every stage kind); the column is then checked like the
laser block by ``_BlockCheck``, with the carried values as given and the
stage's ``measured:`` values as stated (so a measurement that disagrees with
the path is found).  A splitter ends a path and starts two named branches,
each with its own path and target.  Targets are checked at the last column of
their branch, and a missed target names the stage that costs the most.
"""

from __future__ import annotations

import difflib
import math

from .findings import Cell
from .path import CARRIED, STAGE_KINDS, Beam, StageContext, intrinsic_gdd, point, scaled, typical
from .quantities import BY_NAME
from .values import Stated, ValueProblem

_DISPERSIVE = {"dispersion", "material", "compressor"}
_STAGE_KEYS = {"name", "kind", "measured", "branches"} | {p.name for k in STAGE_KINDS.values() for p in k.params}


def _value(cell: Cell) -> tuple:
    low = cell.low if cell.low is not None else 0.0
    high = cell.high if cell.high is not None else math.inf
    return (low, cell.value, high)


def beam_from(cells: dict, old: Beam | None, shape_limit: float) -> Beam:
    values = {q: _value(cells[q]) for q in CARRIED if q in cells}
    if old is not None:
        return Beam(values, old.net_gdd, old.tl_duration)
    if "transform_limited_duration" in cells:
        tl = _value(cells["transform_limited_duration"])
    elif "spectral_bandwidth" in cells and typical(values["spectral_bandwidth"]):
        bw = values["spectral_bandwidth"]
        tl = (shape_limit / bw[2], shape_limit / typical(bw), shape_limit / bw[0] if bw[0] else math.inf)
    elif "pulse_duration" in values:
        tl = values["pulse_duration"]
    else:
        tl = None
    net = intrinsic_gdd(values["pulse_duration"], tl) if tl and "pulse_duration" in values else (0.0, 0.0, 0.0)
    return Beam(values, net, tl)


class _Chain:
    def __init__(self, checker, data: dict, tolerance: float, report, sheet: dict) -> None:
        self.c = checker
        self.data = data
        self.tolerance = tolerance
        self.report = report
        self.sheet = sheet
        laser = data.get("laser") if isinstance(data.get("laser"), dict) else {}
        self.categorical = {k: laser[k] for k in ("pulse_shape", "beam_profile") if k in laser}
        self.context = None

    # ------------------------------------------------------------ helpers
    def stage_context(self, notes: list) -> StageContext:
        from . import materials

        shape = self.c.context(self.categorical.get("pulse_shape", "gaussian")
                               if self.categorical.get("pulse_shape") in _SHAPES else "gaussian", "gaussian").shape
        return StageContext(self.c.units.constants.c, shape.transform_limit,
                            lambda m, lam: float(materials.gvd(m, lam, self.c.units.constants.c)),
                            notes.append)

    def params(self, stage: dict, kind, at: tuple, name: str) -> dict | None:
        out: dict = {}
        ok = True
        allowed = {p.name for p in kind.params} | {"name", "kind", "measured"} | (
            {"branches"} if kind.name == "splitter" else set())
        for key in stage:
            if key in _STAGE_KEYS and key not in allowed:
                takes = ", ".join(p.name for p in kind.params)
                self.report.add("stage-parameter", f"{name}: {key!r} is not a parameter of a {kind.name} stage "
                                f"(it takes: {takes})", at + (key,), key=True)
        for p in kind.params:
            raw = stage.get(p.name)
            label = f"{name}.{p.name}"
            if raw is None:
                if p.required:
                    self.report.add("stage-parameter", f"{name}: a {kind.name} stage needs {p.name!r}", at,
                                    key=True)
                    ok = False
                elif p.default is not None:
                    out[p.name] = point(p.default)
                continue
            if p.dimension == "text":
                if not isinstance(raw, str) or (p.choices and raw not in p.choices):
                    self.report.add("stage-parameter", f"{label}: expected one of {', '.join(p.choices)}"
                                    if p.choices else f"{label}: expected a name", at + (p.name,))
                    ok = False
                    continue
                out[p.name] = raw
                continue
            try:
                s = self.c.values.parse_as(label, raw, p.dimension, self.tolerance,
                                           signed=p.dimension in ("s^2", "s^3"))
            except ValueProblem as e:
                self.report.add(e.rule, e.message, at + (p.name,), quantities=(label,))
                ok = False
                continue
            if p.choices and s.typical not in p.choices:
                self.report.add("stage-parameter", f"{label}: must be one of "
                                f"{', '.join(f'{c:g}' for c in p.choices)}", at + (p.name,))
                ok = False
                continue
            if p.dimension == "1" and p.name in ("transmission", "efficiency", "ratio") and s.low > 1.0:
                self.report.add("stage-parameter", f"{label}: {s.text} is more than 100%", at + (p.name,),
                                quantities=(label,))
                ok = False
                continue
            out[p.name] = (s.low, s.typical, s.high)
        if kind.one_of and not any(k in out for k in kind.one_of):
            self.report.add("stage-parameter", f"{name}: a {kind.name} stage needs one of "
                            f"{', '.join(kind.one_of)}", at, key=True)
            ok = False
        if kind.name == "material" and ok:
            from . import materials

            try:
                materials.lookup(out["material"])
            except KeyError as e:
                self.report.add("unknown-material", f"{name}: {e.args[0]}", at + ("material",))
                ok = False
        return out if ok else None

    def column(self, name: str, beam: Beam, measured, at: tuple) -> dict:
        from .units import choose_unit, format_quantity

        inherited = {}
        for q, (low, typ, high) in beam.values.items():
            unit = BY_NAME[q].display_unit
            ref = typ or (low if low > 0 else high)
            text = format_quantity(self.c.units, ref, choose_unit(self.c.units, ref, unit)) if ref and \
                math.isfinite(ref) else ""
            inherited[q] = Stated(q, low, high, typ, unit, f"{text} (from the path)")
        block = dict(self.categorical)
        paths = {k: ("laser", k) for k in self.categorical}
        if isinstance(measured, dict):
            for key, value in measured.items():
                block[key] = value
                paths[key] = at + ("measured", key)
        paths[""] = at
        from .check import _BlockCheck

        check = _BlockCheck(self.c, name, block, self.tolerance, self.report, paths, inherited, notes=False)
        cells = check.run()
        if beam.net_gdd != (0.0, 0.0, 0.0) or beam.stage_gdd is not None:
            if beam.stage_gdd is not None:
                cells["stage_gdd"] = _gdd_cell(beam.stage_gdd)
            cells["net_gdd"] = _gdd_cell(beam.net_gdd)
        return cells

    # ---------------------------------------------------------------- run
    def run(self) -> None:
        self.report.dedupe = True
        laser_cells = self.sheet.get("laser", {})
        notes: list = []
        ctx = self.stage_context(notes)
        beam = beam_from(laser_cells, None, ctx.transform_limit)
        self.walk(self.data.get("path"), ("path",), beam, ["laser"], self.data.get("target"), ("target",))
        self.report.dedupe = False

    def walk(self, stages, at: tuple, beam: Beam, columns: list, target, target_at: tuple) -> None:
        if not isinstance(stages, list):
            stages = []
        for i, stage in enumerate(stages):
            here = at + (i,)
            if not isinstance(stage, dict):
                continue
            kind = STAGE_KINDS.get(stage.get("kind"))
            name = stage.get("name") if isinstance(stage.get("name"), str) else f"stage {len(self.sheet)}"
            if kind is None:
                continue  # the schema names the known kinds
            if name in self.sheet:
                self.report.add("duplicate-name", f"{name!r} names two columns of the sheet; this stage is "
                                f"shown as 'stage {len(self.sheet)}'", here + ("name",))
                name = f"stage {len(self.sheet)}"
            params = self.params(stage, kind, here, name)
            if params is None:
                continue
            notes: list = []
            ctx = self.stage_context(notes)
            beam = kind.apply(beam, params, ctx)
            for text in notes:
                self.report.add("stage-model", f"{name}: {text}", here, key=True)
            if kind.name == "parametric":
                self.check_photon_energy(name, stage, beam, params, here)
            cells = self.column(name, beam, stage.get("measured"), here)
            self.sheet[name] = cells
            columns = columns + [name]
            beam = beam_from(cells, beam, ctx.transform_limit)
            if kind.name == "focus":
                self.focus_cells(cells)
            if kind.name == "splitter":
                self.split(name, stage, params, beam, here, columns)
                return
        self.finish(columns, beam, target, target_at)

    def split(self, name: str, stage: dict, params: dict, beam: Beam, at: tuple, columns: list) -> None:
        branches = stage.get("branches")
        if not isinstance(branches, dict) or len(branches) != 2:
            self.report.add("stage-parameter", f"{name}: a splitter needs exactly two named branches",
                            at, key=True)
            return
        ratio = params["ratio"]
        shares = [ratio, (1.0 - ratio[2], 1.0 - ratio[1], 1.0 - ratio[0])]
        stated = []
        for k, (branch, spec) in enumerate(branches.items()):
            spec = spec if isinstance(spec, dict) else {}
            if "fraction" in spec:
                try:
                    s = self.c.values.parse_as(f"{name}.{branch}.fraction", spec["fraction"], "1", self.tolerance)
                    shares[k] = (s.low, s.typical, s.high)
                    stated.append(s)
                except ValueProblem as e:
                    self.report.add(e.rule, e.message, at + ("branches", branch, "fraction"))
        total = shares[0][0] + shares[1][0]
        if total > 1.0 + 1e-9:
            self.report.add("splitter-exceeds-input",
                            f"{name}: the branches take {100 * total:.4g}% of the input between them, more "
                            "than the beam that enters the splitter", at + ("branches",), key=True)
        for k, (branch, spec) in enumerate(branches.items()):
            spec = spec if isinstance(spec, dict) else {}
            share = shares[k]
            values = {q: scaled(beam.get(q), share) if q in ("pulse_energy", "average_power") else v
                      for q, v in beam.values.items()}
            branch_beam = Beam(values, beam.net_gdd, beam.tl_duration)
            label = str(branch)
            if label in self.sheet:
                self.report.add("duplicate-name", f"branch {label!r} has the name of another column",
                                at + ("branches", branch), key=True)
                label = f"{name}.{branch}"
            cells = self.column(label, branch_beam, spec.get("measured"), at + ("branches", branch))
            self.sheet[label] = cells
            self.walk(spec.get("path"), at + ("branches", branch, "path"), beam_from(cells, branch_beam, 0),
                      columns + [label], spec.get("target"), at + ("branches", branch, "target"))

    def check_photon_energy(self, name, stage, beam, params, at) -> None:
        pump = self.sheet_value_before(beam)
        s, i = params.get("signal_wavelength"), params.get("idler_wavelength")
        if not (pump and s and i):
            return
        # 1/λp = 1/λs + 1/λi (photon-energy conservation); compare with the intervals
        lo = 1 / s[2] + 1 / i[2]
        hi = 1 / s[0] + 1 / i[0]
        p_lo, p_hi = 1 / pump[2], 1 / pump[0]
        if hi < p_lo or lo > p_hi:
            implied = 1 / (1 / s[1] + 1 / i[1])
            self.report.add("photon-energy-not-conserved",
                            f"{name}: signal {s[1] * 1e9:.5g} nm and idler {i[1] * 1e9:.5g} nm need a pump at "
                            f"{implied * 1e9:.5g} nm (1/λp = 1/λs + 1/λi), but the pump is at "
                            f"{pump[1] * 1e9:.5g} nm", at + ("signal_wavelength",))

    def sheet_value_before(self, beam):
        last = list(self.sheet.values())[-1] if self.sheet else {}
        cell = last.get("wavelength")
        return _value(cell) if cell else None

    def focus_cells(self, cells: dict) -> None:
        """Rayleigh range z_R = π w0² / (M² λ) of the focus (Gaussian-beam optics)."""
        w, lam = cells.get("beam_radius"), cells.get("wavelength")
        m2 = cells.get("m2")
        if not (w and lam and w.value and lam.value):
            return
        m = m2.value if m2 and m2.value else 1.0
        z = math.pi * w.value**2 / (m * lam.value)
        lo = math.pi * (w.low or w.value) ** 2 / (((m2.high if m2 and m2.high else m)) * (lam.high or lam.value))
        hi = math.pi * (w.high or w.value) ** 2 / (((m2.low if m2 and m2.low else m)) * (lam.low or lam.value))
        cells["rayleigh_range"] = Cell("derived", lo, hi, z, "m", "mm")

    # ------------------------------------------------------------ targets
    def finish(self, columns: list, beam: Beam, target, target_at: tuple) -> None:
        last = columns[-1]
        cells = self.sheet.get(last, {})
        self.compensation(last, beam, target_at)
        if not isinstance(target, dict):
            return
        for key, raw in target.items():
            if key not in BY_NAME and key != "spectral_bandwidth":
                continue  # the schema reports unknown keys
            try:
                need = self.c.values.parse(key, raw, self.tolerance)
            except ValueProblem as e:
                self.report.add(e.rule, f"target.{e.message}", target_at + (key,))
                continue
            cell = cells.get(need.quantity)
            where = target_at + (key,)
            if cell is None or cell.value is None and cell.low is None:
                self.report.add("target-unknown", f"target {key} {need.text}: the path does not determine "
                                f"{need.quantity} at {last!r}; state the numbers it needs", where)
                continue
            low = cell.low if cell.low is not None else 0.0
            high = cell.high if cell.high is not None else math.inf
            value = cell.value if cell.value is not None else (low if low > 0 else high)
            shown = self._show(need.quantity, value, need.unit)
            if low >= need.low and high <= need.high:
                margin = self._margin(value, need)
                self.report.add("target-met", f"target {key} {need.text} is met at {last!r}: {shown}{margin}.",
                                where, quantities=(f"{last}.{need.quantity}",))
            elif high < need.low or low > need.high:
                cost = self.costliest(columns, need)
                self.report.add("target-not-met",
                                f"target {key} {need.text} is not met at {last!r}: the path gives {shown}"
                                f"{self._margin(value, need)}.{cost}", where,
                                quantities=(f"{last}.{need.quantity}",))
            else:
                self.report.add("target-uncertain",
                                f"target {key} {need.text} may not be met at {last!r}: the path gives {shown} "
                                f"({self._show(need.quantity, low, need.unit)} … "
                                f"{self._show(need.quantity, high, need.unit)}), within the tolerances", where,
                                quantities=(f"{last}.{need.quantity}",))

    def _show(self, q: str, si: float, unit: str) -> str:
        from .units import choose_unit, format_quantity

        return format_quantity(self.c.units, si, choose_unit(self.c.units, si, unit))

    @staticmethod
    def _margin(value: float, need: Stated) -> str:
        bound = need.low if need.low > 0 and not math.isfinite(need.high) else need.high \
            if math.isfinite(need.high) and need.low == 0 else need.typical
        if not bound or not value:
            return ""
        from .units import format_number

        return f", {format_number(value / bound, 3)}× the required {need.text.lstrip('<>=≤≥ ')}"

    def costliest(self, columns: list, need: Stated) -> str:
        q = need.quantity
        wants_more = need.low > 0 and not math.isfinite(need.high) or (
            need.typical is not None and need.low > 0)
        worst, factor = None, None
        for before, after in zip(columns, columns[1:]):
            a, b = self.sheet.get(before, {}).get(q), self.sheet.get(after, {}).get(q)
            if not (a and b and a.value and b.value):
                continue
            f = b.value / a.value
            if factor is None or (f < factor if wants_more else f > factor):
                worst, factor = after, f
        if worst is None or (wants_more and factor >= 1) or (not wants_more and factor <= 1):
            return ""
        change = f"loses a factor {1 / factor:.3g}" if wants_more else f"grows it by a factor {factor:.3g}"
        return f" The stage that costs the most is {worst!r}: it {change} in {q.replace('_', ' ')}."

    def compensation(self, last: str, beam: Beam, at: tuple) -> None:
        """The GDD that would give the shortest pulse at the end of this branch."""
        net, tl = beam.net_gdd, beam.tl_duration
        tau = beam.get("pulse_duration")
        if not tl or not tau or not typical(tl) or not typical(tau) or typical(tau) < 1.05 * typical(tl):
            return
        if not any(k for k in self.sheet.get(last, {}) if k == "net_gdd"):
            return
        self.report.add("dispersion-compensation",
                        f"at {last!r} the pulse is {self._show('pulse_duration', typical(tau), 'fs')} against "
                        f"{self._show('pulse_duration', typical(tl), 'fs')} transform-limited: the net GDD "
                        f"there is {net[1] * 1e30:.4g} fs²; adding {-net[1] * 1e30:.4g} fs² (a compressor or "
                        "prechirp) would give the shortest pulse", at, key=True)


def _gdd_cell(v: tuple) -> Cell:
    return Cell("derived", v[0], v[2], v[1], "s^2", "fs^2")


from .shapes import PULSE_SHAPES as _SHAPES  # noqa: E402


def check_path(checker, data: dict, tolerance: float, report, sheet: dict) -> None:
    _Chain(checker, data, tolerance, report, sheet).run()


def suggest_kind(kind: str) -> str:
    guess = difflib.get_close_matches(kind, list(STAGE_KINDS), n=1)
    return f"; did you mean {guess[0]!r}?" if guess else ""
