"""Walking the beam path: one column of the sheet per stage, from the laser to the target.

The walk is the same for every stage kind.  The kind's row
(``physics.stages.STAGE_KINDS``) declares its parameters, its effect on the beam
(``apply``) and its own checks (``checks``, run from ``stage_checks``); the walk
parses the parameters from their declarations, applies the kind, builds the
stage's column with ``column.BlockCheck`` (the carried values as given, the
stage's ``measured:`` values as stated, so a measurement that disagrees with the
path is found) and calls the checks.  A kind that ``splits`` ends its path and
starts two named branches, each with its own path and target; the end of each
branch is checked by ``targets``.
"""

from __future__ import annotations

import math
from dataclasses import replace

from speccheck.checking import beam_checks, beam_space, targets, wording
from speccheck.checking.column import BlockCheck, Carried
from speccheck.checking.failures import NUMERIC_FAILURES, failure as _failure, in_range as _in_range
from speccheck.checking.laser_pulse import beam_from, chirp_duration, laser_chirp, measured_spectrum
from speccheck.checking.stage_checks import CHECKS, Visit, checks_of
from speccheck.physics import hazards, materials
from speccheck.physics.quantities import BY_NAME
from speccheck.physics.shapes import DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.physics.beam import Beam, StageContext, point, transmit
from speccheck.physics.model_range import OutOfModelRange
from speccheck.physics.pulse_stages import StageProblem
from speccheck.physics.stages import PARAM_TOLERANCES, STAGE_KINDS
from speccheck.reading.angles import parse_angle
from speccheck.reading.values import ValueProblem
from speccheck.records.findings import Cell, FieldProfile

_FIXED_KEYS = {"name", "kind", "measured", "target"}  # keys every stage may have
_STAGE_KEYS = _FIXED_KEYS | {"branches"} | {p.name for k in STAGE_KINDS.values() for p in k.params} | {
    key for c in CHECKS.values() for key in c.keys}
_SIGNED = ("s^2", "s^3", "s^4")

class PathWalk:
    """The walk along one spec's path; the sheet and the report are filled in as it goes."""

    def __init__(self, checker, data: dict, tolerance: float, report, sheet: dict, lean: bool = False) -> None:
        self.c = checker
        self.lean = lean  # a re-check for the remedies: what only a note says is not computed
        self.data = data
        self.tolerance = tolerance  # Tolerances: per quantity and stage parameter
        self.report = report
        self.sheet = sheet
        laser = data.get("laser") if isinstance(data.get("laser"), dict) else {}
        self.categorical = {k: laser[k] for k in ("pulse_shape", "beam_profile") if isinstance(laser.get(k), str)}
        self.context = None
        self.ends: list[str] = []  # the last column of each branch, in the order walked
        self.named: set[str] = set()  # the stages' names so far, computed or not
        self.profiles: list[FieldProfile] = []  # the field at each branch end, for the report's plots
        self.outcomes: list = []  # each target's verdict (targets.Outcome), for the remedies
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
        shape = PULSE_SHAPES.get(self.categorical.get("pulse_shape"), PULSE_SHAPES[DEFAULT_SHAPE])
        c = self.c.units.constants.c
        return StageContext(c, shape.transform_limit, gvd=lambda m, lam: float(materials.gvd(m, lam, c)),
                            tod=lambda m, lam, length: float(materials.tod(m, lam, length, c)),
                            index=lambda m, lam: float(materials.refractive_index(m, lam)), note=notes.append)

    def params(self, stage: dict, kind, at: tuple, name: str) -> dict | None:
        out: dict = {}
        ok = True
        allowed = {p.name for p in kind.params} | _FIXED_KEYS | ({"branches"} if kind.splits else set()) | {
            key for c in checks_of(kind, "incident") + checks_of(kind, "column") for key in c.keys}
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
            if p.dimension in ("text", "material_name"):
                if not isinstance(raw, str) or (p.choices and raw not in p.choices):
                    self.report.add("stage-parameter", f"{label}: expected one of {', '.join(p.choices)}"
                                    if p.choices else f"{label}: expected a name", at + (p.name,))
                    ok = False
                    continue
                out[p.name] = raw
                continue
            try:
                s = parse_angle(label, raw, self.param_tolerance(p.name)) if p.dimension == "angle" else \
                    self.c.values.parse_as(label, raw, p.dimension, self.param_tolerance(p.name),
                                           signed=p.signed or p.dimension in _SIGNED or p.zero)
            except ValueProblem as e:
                self.report.add(e.rule, e.message, at + (p.name,), quantities=(label,))
                ok = False
                continue
            if p.signed and p.dimension not in _SIGNED and s.low <= 0.0 <= s.high:  # a focal length
                self.report.add("stage-parameter", f"{label}: {s.text} is 0 or spans 0; a focal length may be "
                                "negative (a diverging lens) or positive, not 0", at + (p.name,), quantities=(label,))
                ok = False
                continue
            if p.zero and s.low < 0.0:
                self.report.add("non-positive-value", f"{label}: {s.text} must not be negative", at + (p.name,),
                                quantities=(label,))
                ok = False
                continue
            if p.choices and s.typical not in p.choices:
                self.report.add("stage-parameter", f"{label}: must be one of "
                                f"{', '.join(f'{c:g}' for c in p.choices)}", at + (p.name,))
                ok = False
                continue
            signed = p.signed or p.dimension in _SIGNED or p.dimension == "angle"
            low, typ, high = s.low, s.typical, s.high
            if typ is None:  # a bound or {min, max}: a stage needs both ends, and works on the middle
                if not (math.isfinite(high) and math.isfinite(low)) or (low <= 0.0 and not signed) or s.text.lstrip()[:1] in "<>≤≥=":
                    self.report.add("stage-parameter", f"{label}: {s.text} leaves the parameter open on one "
                                    "side; a stage parameter needs a value ('3 mm', '3 mm ± 0.1 mm') or both "
                                    "ends ({min: …, max: …})", at + (p.name,), quantities=(label,))
                    ok = False
                    continue
                typ = (low + high) / 2.0
            if p.fraction:
                if low > 1.0:
                    self.report.add("stage-parameter", f"{label}: {s.text} is more than 100%", at + (p.name,),
                                    quantities=(label,))
                    ok = False
                    continue
                # the spec's own interval (a ± or {min, max}) reaching past an end is said; the default
                # tolerance of a plain "99%" is only clipped
                own = any(mark in s.text for mark in ("±", "+/-", "+-", "{"))
                past = [end for end, beyond in (("100%", high > 1.0), ("0%", own and 2.0 * typ - high < 0.0)) if beyond]
                high, typ = min(high, 1.0), min(typ, 1.0)
                if own and past:
                    ends = past
                    self.report.add("fraction-clipped", f"{label}: {s.text} reaches past {' and '.join(ends)}; "
                                    f"taken as {low:.4g} … {high:.4g}", at + (p.name,), quantities=(label,))
            out[p.name] = (low, typ, high)
        if kind.one_of and not any(k in out or k in stage for k in kind.one_of):  # a bad one is said already
            self.report.add("stage-parameter", f"{name}: a {kind.name} stage needs one of "
                            f"{', '.join(kind.one_of)}", at, key=True)
            ok = False
        for p in kind.params:  # a named material must be in the material table
            if ok and p.dimension == "material_name":
                try:
                    materials.lookup(out[p.name])
                except KeyError as e:
                    self.report.add("unknown-material", f"{name}: {e.args[0]}", at + (p.name,))
                    ok = False
        return out if ok else None

    def column(self, name: str, beam: Beam, measured, at: tuple, before: str = "") -> dict:
        inherited = {q: Carried(q, low, high, typ, BY_NAME[q].display_unit, self.c.units)
                     for q, (low, typ, high) in beam.values.items()}
        block = dict(self.categorical)
        paths = {k: ("laser", k) for k in self.categorical}
        if isinstance(measured, dict):
            for key, value in measured.items():
                block[key] = value
                paths[key] = at + ("measured", key)
        paths[""] = at
        check = BlockCheck(self.c, name, block, self.tolerance, self.report, paths, inherited, notes=False)
        check.before = self.sheet.get(before, {})  # a limit it broke already is reported there only
        cells = check.run()
        cells.update(beam_space.cells(beam, self.c.units))
        if beam.stage_gdd is not None:
            cells["stage_gdd"] = _gdd_cell(beam.stage_gdd)
        if beam.pulse is not None:
            n = beam.pulse.numbers
            (gdd, tod, fod), main = n.net, n.main_peak
            cells["net_gdd"] = _gdd_cell(gdd)
            if tod != (0.0, 0.0, 0.0):
                cells["net_tod"] = Cell("derived", tod[0], tod[2], tod[1], "s^3", "fs^3")
            if abs(fod[1]) > 0.0:
                cells["net_fod"] = Cell("derived", fod[0], fod[2], fod[1], "s^4", "fs^4")
            cells["energy_in_main_peak"] = Cell("derived", main[0], main[2], main[1], "1", "1")
        return cells

    def param_tolerance(self, name: str) -> float:
        builtin = PARAM_TOLERANCES.get(name, (0.05, ""))[0]
        t = self.tolerance
        return t.of(name, builtin) if hasattr(t, "of") else t

    def run_check(self, check, visit: Visit) -> None:
        try:
            check.run(self, visit)
        except NUMERIC_FAILURES as exc:
            self.out_of_range(visit.name, visit.kind, visit.at, exc, check.summary)

    def out_of_range(self, name: str, kind, at: tuple, exc: Exception, what: str = "") -> None:
        """Numbers so far outside a model's range that its arithmetic fails (an overflow, a
        division by zero): said at the stage, instead of a wrong number or a traceback."""
        stage = f"{name}: the {kind.name} stage" + (f" ({what})" if what else "")
        if isinstance(exc, OutOfModelRange):  # the model's own words say what is outside it
            text = f"{stage} cannot be computed for the beam that enters it: {exc}"
        else:
            text = (f"{stage} cannot be computed for the beam that enters it ({_failure(exc)}); a number before "
                    "it is far outside what its model is made for")
        self.report.add("out-of-model-range", text, at, key=True)

    def show(self, q: str, si: float, unit: str) -> str:
        return wording.show(self.c.units, si, unit)

    # ---------------------------------------------------------------- run
    def run(self) -> None:
        self.report.dedupe = True
        laser_cells = self.sheet.get("laser", {})
        notes: list = []
        ctx = self.stage_context(notes)
        shape = self.categorical.get("pulse_shape", DEFAULT_SHAPE)
        # a shape without a transform limit (a Lorentzian) has its field taken as a Gaussian's: so is its τ0
        limit = ctx.transform_limit or PULSE_SHAPES["gaussian"].transform_limit
        beam = beam_from(laser_cells, None, limit, shape if shape in PULSE_SHAPES else DEFAULT_SHAPE,
                         laser_chirp(self), measured_spectrum(self))
        try:
            beam = chirp_duration(self, beam, ctx)
        except NUMERIC_FAILURES as exc:  # a chirp its field cannot hold: said, and the path goes on without it
            self.report.add("out-of-model-range", f"laser: the field of its chirped pulse cannot be computed "
                            f"({_failure(exc)})", ("laser",), key=True)
        if self.data.get("path") and "laser" in self.sheet:  # the beam in space, where a path needs it
            beam = beam_space.at_laser(self, beam)
            self.sheet["laser"].update(beam_space.cells(beam, self.c.units))
        if isinstance(self.data.get("path"), list) or isinstance(self.data.get("target"), dict):
            self.walk(self.data.get("path"), ("path",), beam, ["laser"], self.data.get("target"), ("target",))
        self.report.dedupe = False

    def walk(self, stages, at: tuple, beam: Beam, columns: list, target, target_at: tuple) -> None:
        if not isinstance(stages, list):
            stages = []
        end_at = at  # the place of the branch's last stage, for what is said about its end
        lost = None  # the stage past which the beam is not known
        for i, stage in enumerate(stages):
            here = at + (i,)
            end_at = here
            if not isinstance(stage, dict):
                continue
            kind = STAGE_KINDS.get(stage["kind"]) if isinstance(stage.get("kind"), str) else None
            name = stage.get("name") if isinstance(stage.get("name"), str) else f"stage {len(self.sheet)}"
            if kind is None:
                continue  # the schema names the known kinds
            if name in self.sheet or name in self.named:
                self.report.add("duplicate-name", f"{name!r} names two columns of the sheet; this stage is "
                                f"shown as 'stage {len(self.sheet)}'", here + ("name",))
                name = f"stage {len(self.sheet)}"
            self.named.add(name)
            params = self.params(stage, kind, here, name)
            if params is None or lost:  # past a stage whose beam is not known, parameters are only read
                lost = lost or name
                if lost != name:  # a target of a stage further on is not judged either, and says so
                    self.broken(lost, stage.get("target"), here + ("target",))
                continue
            notes: list = []
            ctx = self.stage_context(notes)
            incident = self.sheet.get(columns[-1], {})
            try:
                out = beam_checks.through_aperture(self, stage, kind.apply(beam, params, ctx))
                _in_range(out)
            except StageProblem as exc:
                self.report.add("stage-parameter", f"{name}: {exc}", here, key=True)
                lost = name  # the beam after this stage is not known: the rest of the branch cannot follow
                continue
            except NUMERIC_FAILURES as exc:
                self.out_of_range(name, kind, here, exc)
                lost = name
                continue
            visit = Visit(name, kind, stage, params, here, incident, out, stage.get("measured"), columns)
            if notes:  # one finding: the report keeps one of a rule per place
                self.report.add("stage-model", f"{name}: " + "; ".join(notes), here, key=True)
            for check in checks_of(kind, "incident"):
                self.run_check(check, visit)
            cells = self.column(name, visit.beam, visit.measured, here, columns[-1])
            self.sheet[name] = cells
            columns = columns + [name]
            beam = beam_from(cells, visit.beam, ctx.transform_limit)
            visit.cells, visit.columns = cells, columns
            for check in checks_of(kind, "column"):
                self.run_check(check, visit)
            if isinstance(stage.get("target"), dict):  # a target of this column's own
                targets.judge(self, columns, stage["target"], here + ("target",))
            if "b_integral_total" not in cells:  # a stage without a nonlinear phase of its own
                self.carry_b(columns)
            if kind.splits:
                self.split(name, kind, stage, params, beam, here, columns)
                if isinstance(target, dict) and target:
                    self.report.add("target-unknown",
                                    f"the path splits at {name!r}, so this target has no single end; give each "
                                    "branch its own target under branches: {…: {target: …}}", target_at,
                                    key=True)
                return
        if lost:
            return self.broken(lost, target, target_at)
        if not self.lean and beam.pulse is not None and getattr(self.c.options, "profiles", False) and columns[-1] != "laser":
            try:
                self.profiles.append(FieldProfile(columns[-1], *beam.pulse.profile()))
            except NUMERIC_FAILURES:
                pass  # a plot the field cannot give: the report goes without it
        targets.finish(self, columns, beam, target, target_at, end_at)

    def broken(self, name: str, target, target_at: tuple) -> None:
        """The path cannot be followed past the stage ``name``: its target is not judged."""
        if isinstance(target, dict) and target:
            self.report.add("target-unknown", f"the path cannot be followed past {name!r} (see the finding "
                            "there), so this target is not judged", target_at, key=True)

    def split(self, name: str, kind, stage: dict, params: dict, beam: Beam, at: tuple, columns: list) -> None:
        """The two branches of a stage that splits the beam, each walked as a path of its own."""
        branches = stage.get("branches")
        if not isinstance(branches, dict) or len(branches) != 2:
            self.report.add("stage-parameter", f"{name}: a {kind.name} stage needs exactly two named branches",
                            at, key=True)
            return
        shares = list(kind.shares(params))
        stated = []
        for k, (branch, spec) in enumerate(branches.items()):
            spec = spec if isinstance(spec, dict) else {}
            if "fraction" in spec:
                try:
                    share = next((p.name for p in kind.params if p.fraction), "")
                    s = self.c.values.parse_as(f"{name}.{branch}.fraction", spec["fraction"], "1",
                                               self.param_tolerance(share))
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
            branch_beam = replace(transmit(beam, share), stage_gdd=None)
            label = str(branch)
            if label in self.sheet:
                self.report.add("duplicate-name", f"branch {label!r} has the name of another column",
                                at + ("branches", branch), key=True)
                label = f"{name}.{branch}"
            cells = self.column(label, branch_beam, spec.get("measured"), at + ("branches", branch), name)
            self.sheet[label] = cells
            self.walk(spec.get("path"), at + ("branches", branch, "path"), beam_from(cells, branch_beam, 0),
                      columns + [label], spec.get("target"), at + ("branches", branch, "target"))

    # ------------------------------------------------------ physical limits
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

def _gdd_cell(v: tuple) -> Cell:
    return Cell("derived", v[0], v[2], v[1], "s^2", "fs^2")



def check_path(checker, data: dict, tolerance: float, report, sheet: dict,
               outcomes: list | None = None, lean: bool = False) -> tuple[list[str], list]:
    """Check the beam path into ``sheet``; return the column that ends each branch, and the field's
    profiles there (where the checker's options ask for them and the path built the field); put each
    target's verdict in ``outcomes``.  ``lean``: a re-check whose notes nobody reads (the remedies'),
    so the compensation search at each branch end, which only a note reports, is left out."""
    walk = PathWalk(checker, data, tolerance, report, sheet, lean)
    walk.run()
    if outcomes is not None:
        outcomes.extend(walk.outcomes)
    return walk.ends, walk.profiles

