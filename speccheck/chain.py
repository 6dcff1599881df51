"""Checking the beam path: one column of the sheet per stage, from the laser to the target.

Each stage turns the beam of the column before into its own (``path.py``
holds the physics of every stage kind); the column is then checked like the
laser block by ``block.BlockCheck``, with the carried values as given and the
stage's ``measured:`` values as stated (so a measurement that disagrees with
the path is found).  A splitter ends a path and starts two named branches,
each with its own path and target.  Targets are checked at the last column of
their branch, and a missed target names the stage that costs the most.
"""

from __future__ import annotations

import math
from dataclasses import replace

from . import hazards
from .findings import Cell
from .path import CARRIED, STAGE_KINDS, Beam, StageContext, intrinsic_gdd, point, scaled, typical
from .quantities import BY_NAME
from .shapes import DEFAULT_SHAPE, PULSE_SHAPES
from .values import Stated, ValueProblem

_STAGE_KEYS = {"name", "kind", "measured", "branches", "damage_threshold"} | {
    p.name for k in STAGE_KINDS.values() for p in k.params}


def _value(cell: Cell) -> tuple:
    low = cell.low if cell.low is not None else 0.0
    high = cell.high if cell.high is not None else math.inf
    return (low, cell.value, high)


def beam_from(cells: dict, old: Beam | None, shape_limit: float | None) -> Beam:
    values = {q: _value(cells[q]) for q in CARRIED if q in cells}
    if old is not None:
        return replace(old, values=values, stage_gdd=None)
    if "transform_limited_duration" in cells:
        tl = _value(cells["transform_limited_duration"])
    elif shape_limit is not None and "spectral_bandwidth" in cells and typical(values["spectral_bandwidth"]):
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
        self.ends: list[str] = []  # the last column of each branch, in the order walked
        defaults = data.get("defaults") if isinstance(data.get("defaults"), dict) else {}
        self.b_limit = self.setting(defaults, "b_integral_limit", hazards.B_INTEGRAL_LIMIT)
        self.safety_factor = self.setting(defaults, "damage_safety_factor", hazards.DAMAGE_SAFETY_FACTOR)

    def setting(self, defaults: dict, key: str, default: float) -> float:
        raw = defaults.get(key)
        if raw is None:
            return default
        if isinstance(raw, (int, float)) and not isinstance(raw, bool) and raw > 0 and math.isfinite(raw):
            return float(raw)
        self.report.add("invalid-value", f"defaults.{key}: expected a positive number, got {raw!r}",
                        ("defaults", key))
        return default

    # ------------------------------------------------------------ helpers
    def stage_context(self, notes: list) -> StageContext:
        from . import materials

        shape = PULSE_SHAPES.get(self.categorical.get("pulse_shape"), PULSE_SHAPES[DEFAULT_SHAPE])
        c = self.c.units.constants.c
        return StageContext(c, shape.transform_limit, gvd=lambda m, lam: float(materials.gvd(m, lam, c)),
                            tod=lambda m, lam, length: float(materials.tod(m, lam, length, c)), note=notes.append)

    def params(self, stage: dict, kind, at: tuple, name: str) -> dict | None:
        out: dict = {}
        ok = True
        allowed = {p.name for p in kind.params} | {"name", "kind", "measured", "damage_threshold"} | (
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
        from .block import BlockCheck

        check = BlockCheck(self.c, name, block, self.tolerance, self.report, paths, inherited, notes=False)
        cells = check.run()
        if beam.net_gdd != (0.0, 0.0, 0.0) or beam.stage_gdd is not None:
            if beam.stage_gdd is not None:
                cells["stage_gdd"] = _gdd_cell(beam.stage_gdd)
            cells["net_gdd"] = _gdd_cell(beam.net_gdd)
        if beam.net_tod != (0.0, 0.0, 0.0):
            cells["net_tod"] = Cell("derived", beam.net_tod[0], beam.net_tod[2], beam.net_tod[1], "s^3", "fs^3")
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
            incident = self.sheet.get(columns[-1], {})
            beam = kind.apply(beam, params, ctx)
            for text in notes:
                self.report.add("stage-model", f"{name}: {text}", here, key=True)
            if kind.name == "parametric":
                self.check_photon_energy(name, incident, params, here)
            measured = stage.get("measured")
            if kind.name == "focus" and isinstance(measured, dict):
                beam, measured = self.measured_spot(name, beam, measured, here, params)
            cells = self.column(name, beam, measured, here)
            self.sheet[name] = cells
            columns = columns + [name]
            beam = beam_from(cells, beam, ctx.transform_limit)
            if kind.name == "focus":
                self.focus_cells(name, cells, here)
            if kind.name == "material":
                self.nonlinear(name, params, cells, incident, here, columns)
            else:
                self.carry_b(columns)
            if isinstance(stage.get("damage_threshold"), dict):
                self.damage(name, stage["damage_threshold"], incident, here)
            if kind.name == "splitter":
                self.split(name, stage, params, beam, here, columns)
                if isinstance(target, dict) and target:
                    self.report.add("target-unknown",
                                    f"the path splits at {name!r}, so this target has no single end; give each "
                                    "branch its own target under branches: {…: {target: …}}", target_at,
                                    key=True)
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
            branch_beam = replace(beam, values=values, stage_gdd=None)
            label = str(branch)
            if label in self.sheet:
                self.report.add("duplicate-name", f"branch {label!r} has the name of another column",
                                at + ("branches", branch), key=True)
                label = f"{name}.{branch}"
            cells = self.column(label, branch_beam, spec.get("measured"), at + ("branches", branch))
            self.sheet[label] = cells
            self.walk(spec.get("path"), at + ("branches", branch, "path"), beam_from(cells, branch_beam, 0),
                      columns + [label], spec.get("target"), at + ("branches", branch, "target"))

    def check_photon_energy(self, name: str, incident: dict, params: dict, at: tuple) -> None:
        pump = _value(incident["wavelength"]) if incident.get("wavelength") else None
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

    def measured_spot(self, name, beam, measured: dict, at, params):
        """A measured focus spot may be larger than the diffraction limit, never smaller."""
        rest = {k: v for k, v in measured.items() if k not in ("beam_diameter", "beam_radius")}
        key = "beam_diameter" if "beam_diameter" in measured else "beam_radius" if "beam_radius" in measured else None
        limit = beam.get("beam_diameter")
        if key is None or limit is None:
            return beam, measured
        try:
            s = self.c.values.parse(key, measured[key], self.tolerance)
        except ValueProblem:
            return beam, measured  # reported by the column
        k = 2.0 if key == "beam_radius" else 1.0
        spot = (s.low * k, (s.typical or 0) * k or None, s.high * k)
        if spot[2] < limit[0]:
            self.report.add(
                "spot-below-diffraction-limit",
                f"{name}: the measured focus {key} {s.text} is smaller than the diffraction limit "
                f"{self._show('beam_diameter', typical(limit) / k, 'µm')} for this beam "
                f"(1/e² diameter 4 M² λ f / (π D) with f = {params['focal_length'][1] * 1e3:.4g} mm)",
                at + ("measured", key), quantities=(f"{name}.{key}",))
            return beam, rest
        return beam.with_values(beam_diameter=spot), rest

    def focus_cells(self, name: str, cells: dict, at: tuple) -> None:
        """Rayleigh range z_R = π w0² / (M² λ) of the focus (Gaussian-beam optics)."""
        w, lam = cells.get("beam_radius"), cells.get("wavelength")
        if w and lam and w.value and lam.value and w.value < lam.value / math.pi:
            self.report.add("non-paraxial-focus",
                            f"{name}: the 1/e² spot radius {self._show('beam_radius', w.value, 'µm')} is below "
                            f"λ/π = {self._show('beam_radius', lam.value / math.pi, 'µm')}: outside the "
                            "paraxial Gaussian-beam model, so the spot and intensity are estimates", at, key=True)
        m2 = cells.get("m2")
        if not (w and lam and w.value and lam.value):
            return
        m = m2.value if m2 and m2.value else 1.0
        z = math.pi * w.value**2 / (m * lam.value)
        lo = math.pi * (w.low or w.value) ** 2 / (((m2.high if m2 and m2.high else m)) * (lam.high or lam.value))
        hi = math.pi * (w.high or w.value) ** 2 / (((m2.low if m2 and m2.low else m)) * (lam.low or lam.value))
        cells["rayleigh_range"] = Cell("derived", lo, hi, z, "m", "mm")

    # ------------------------------------------------------ physical limits
    def nonlinear(self, name: str, params: dict, cells: dict, incident: dict, at: tuple, columns: list) -> None:
        """Self-focusing and B-integral of a material stage, for the beam entering it (the pulse
        only gets longer inside, so the entrance is the worst case)."""
        from . import materials

        material = materials.lookup(params["material"])
        lam = cells.get("wavelength")
        peak = incident.get("peak_power") or cells.get("peak_power")
        intensity = incident.get("peak_intensity") or cells.get("peak_intensity")
        if material.n2 is None or not lam or not lam.value:
            self.carry_b(columns)
            return
        n0 = float(materials.refractive_index(material, lam.value))
        p_low = hazards.critical_power(lam.value, n0, material.n2[1])
        p_high = hazards.critical_power(lam.value, n0, material.n2[0])
        cells["critical_power"] = Cell("derived", p_low, p_high, math.sqrt(p_low * p_high), "W", "MW")
        solid = material.name != "air"
        if peak and peak.value:
            shown = self._show("peak_power", peak.value, "MW")
            crit = self._show('peak_power', p_low, 'MW') + (
                "" if p_high / p_low < 1.001 else f" … {self._show('peak_power', p_high, 'MW')}")
            n2 = f"{material.n2[0]:.3g}" + ("" if material.n2[1] == material.n2[0] else f"–{material.n2[1]:.3g}")
            where = f"P_cr = 3.77 λ²/(8π n0 n2) = {crit} for {material.label} (n2 {n2} m²/W, " \
                    f"{material.n2_source})"
            radius = incident.get("beam_radius") or cells.get("beam_radius")
            length = params["thickness"][1]
            z_f = hazards.collapse_distance(peak.value, p_low, lam.value, n0, radius.value) \
                if radius and radius.value else 0.0
            if (peak.high or peak.value) > p_low and z_f < length:
                self.report.add("self-focusing" if solid else "self-focusing-air",
                                f"{name}: the peak power {shown} is above the critical power for self-focusing "
                                f"and the beam collapses within the stage (Marburger's distance "
                                f"{self._show('beam_radius', z_f, 'mm')} < {self._show('beam_radius', length, 'mm')}"
                                f"), {where}", at, key=True, quantities=(f"{name}.peak_power",))
            elif (peak.high or peak.value) > p_low:
                self.report.add("self-focusing-risk",
                                f"{name}: the peak power {shown} is above the critical power for self-focusing, "
                                f"{where}; the collapse distance {self._show('beam_radius', z_f, 'mm')} is longer "
                                "than the stage, so the B-integral decides", at, key=True,
                                quantities=(f"{name}.peak_power",))
        before = self.b_total(columns[:-1])
        if intensity and intensity.value:
            n2 = math.sqrt(material.n2[0] * material.n2[1])
            b = hazards.b_integral(lam.value, n2, intensity.value, params["thickness"][1])
            cells["b_integral"] = Cell("derived", hazards.b_integral(lam.value, material.n2[0], intensity.value,
                                                                     params["thickness"][1]),
                                       hazards.b_integral(lam.value, material.n2[1], intensity.value,
                                                          params["thickness"][1]), b, "1", "1")
            total = before + b
            cells["b_integral_total"] = Cell("derived", total, total, total, "1", "1")
            if total > self.b_limit >= before:
                self.report.add("b-integral",
                                f"{name}: the accumulated B-integral reaches {total:.3g} rad here ({b:.3g} rad in "
                                f"this stage; B = (2π/λ) Σ n2 I L), above the limit of {self.b_limit:g} rad",
                                at, key=True, quantities=(f"{name}.b_integral",))
        elif before:
            cells["b_integral_total"] = Cell("derived", before, before, before, "1", "1")

    def b_total(self, columns: list) -> float:
        for name in reversed(columns):
            c = self.sheet.get(name, {}).get("b_integral_total")
            if c is not None:
                return c.value
        return 0.0

    def carry_b(self, columns: list) -> None:
        total = self.b_total(columns[:-1])
        if total:
            self.sheet[columns[-1]]["b_integral_total"] = Cell("derived", total, total, total, "1", "1")

    def damage(self, name: str, raw: dict, incident: dict, at: tuple) -> None:
        """The incident peak fluence against the optic's rated damage threshold."""
        where = at + ("damage_threshold",)
        try:
            rated = self.c.values.parse_as(f"{name}.damage_threshold.fluence", raw.get("fluence"), "J/m^2", 0.0)
            tau_ref = (self.c.values.parse_as(f"{name}.damage_threshold.pulse_duration", raw["pulse_duration"],
                                              "s", 0.0).typical if "pulse_duration" in raw else None)
            lam_ref = (self.c.values.parse_as(f"{name}.damage_threshold.wavelength", raw["wavelength"], "m",
                                              0.0).typical if "wavelength" in raw else None)
        except ValueProblem as e:
            self.report.add(e.rule, e.message, where)
            return
        fluence, tau, lam = (incident.get(q) for q in ("peak_fluence", "pulse_duration", "wavelength"))
        if not fluence or not fluence.value or not rated.typical:
            self.report.add("target-unknown", f"{name}: the peak fluence on this optic is not determined, so its "
                            "damage threshold cannot be checked", where, key=True)
            return
        threshold, how = hazards.scaled_threshold(rated.typical, tau_ref, tau.value if tau else None)
        notes = []
        if how == "does not transfer":
            notes.append(f"the rating is for {self._show('pulse_duration', tau_ref, 'fs')} and the pulse here is "
                         f"{self._show('pulse_duration', tau.value, 'fs')}: below about 10 ps a damage rating does "
                         "not transfer between durations (common practice), so this comparison is only indicative")
        elif how != "as rated":
            notes.append(f"threshold {how} to {self._show('peak_fluence', threshold, 'J/cm^2')}")
        if lam_ref and lam and lam.value and abs(lam.value / lam_ref - 1) > 0.05:
            notes.append(f"rated at {self._show('wavelength', lam_ref, 'nm')}, used at "
                         f"{self._show('wavelength', lam.value, 'nm')}")
        margin = threshold / fluence.value
        text = (f"{name}: peak fluence {self._show('peak_fluence', fluence.value, 'J/cm^2')} on an optic rated "
                f"{rated.text}; margin {margin:.3g}×" + ("; " + "; ".join(notes) if notes else ""))
        if margin < 1:
            self.report.add("optic-damage", text + ". Expect damage to this optic.", where, key=True)
        elif margin < self.safety_factor:
            self.report.add("optic-damage-margin", text + f", less than the safety factor {self.safety_factor:g}.",
                            where, key=True)
        elif how == "does not transfer":
            self.report.add("damage-rating-not-transferable", text + ".", where, key=True)

    def strong_field(self, last: str, target, target_at: tuple) -> None:
        """Ponderomotive energy, a0 and, for a named gas, Keldysh parameter and HHG cutoff."""
        cells = self.sheet.get(last, {})
        intensity, lam = cells.get("peak_intensity"), cells.get("wavelength")
        if not (intensity and intensity.value and lam and lam.value) or intensity.value < hazards.STRONG_FIELD_FROM:
            return
        k = self.c.units.constants
        up = hazards.ponderomotive_energy(intensity.value, lam.value, k)
        a0 = hazards.vector_potential(intensity.value, lam.value, k)
        cells["ponderomotive_energy"] = Cell("derived", None, None, up, "J", "eV")
        cells["normalized_vector_potential"] = Cell("derived", None, None, a0, "1", "1")
        if a0 >= hazards.A0_NOTE_FROM:
            self.report.add("relativistic-intensity",
                            f"at {last!r} the normalized vector potential a0 = {a0:.3g} approaches 1: electrons "
                            "become relativistic and the non-relativistic strong-field figures lose validity",
                            target_at, key=True)
        gas = target.get("gas") if isinstance(target, dict) else None
        if not isinstance(gas, str):
            return
        gas = hazards.GAS_ALIASES.get(gas.lower(), gas.lower())
        if gas not in hazards.IONIZATION_ENERGY_EV:
            return  # the schema lists the gases
        ev = self.c.units.constants.e
        ip = hazards.IONIZATION_ENERGY_EV[gas] * ev
        gamma = hazards.keldysh(ip, up)
        cutoff = hazards.hhg_cutoff(ip, up)
        photon = cells.get("photon_energy")
        cells["ionization_potential"] = Cell("derived", ip, ip, ip, "J", "eV")
        cells["keldysh_parameter"] = Cell("derived", None, None, gamma, "1", "1")
        cells["hhg_cutoff_energy"] = Cell("derived", None, None, cutoff, "J", "eV")
        order = f" (harmonic order {cutoff / photon.value:.0f})" if photon and photon.value else ""
        regime = "tunnel" if gamma < 1 else "multiphoton"
        self.report.add("strong-field-figures",
                        f"at {last!r} in {gas}: U_p = {up / ev:.3g} eV, Keldysh γ = {gamma:.3g} ({regime} regime), "
                        f"high-harmonic cutoff I_p + 3.17 U_p = {cutoff / ev:.4g} eV{order}, a0 = {a0:.3g}",
                        target_at + ("gas",), quantities=(f"{last}.peak_intensity",))

    # ------------------------------------------------------------ targets
    def finish(self, columns: list, beam: Beam, target, target_at: tuple) -> None:
        last = columns[-1]
        if last != "laser":
            self.ends.append(last)
        cells = self.sheet.get(last, {})
        self.compensation(last, beam, target_at)
        self.strong_field(last, target, target_at)
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



def check_path(checker, data: dict, tolerance: float, report, sheet: dict) -> list[str]:
    """Check the beam path into ``sheet``; return the column that ends each branch."""
    chain = _Chain(checker, data, tolerance, report, sheet)
    chain.run()
    return chain.ends

