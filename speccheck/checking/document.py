"""The checker: a parsed document in, a ``FileResult`` (findings and sheet) out.

This is the core of speccheck and it does no I/O: the command line reads
files and formats results.  Checks say *what* (a rule id, a message, the
quantities); ``Report`` says *where*, stamping file, line, column and the
rule's severity from the document's node marks.  ``Checker`` works on the
whole document (schema, columns, safety); ``column.BlockCheck`` checks one
column of quantities and ``walker`` the beam path.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from typing import Mapping

from speccheck.checking.column import KEYS, BlockCheck
from speccheck.checking.measured_data import DataFiles
from speccheck.checking.report import Report
from speccheck.records.findings import Cell, FileResult, Finding
from speccheck.reading.loader import Limits, load
from speccheck.physics.quantities import LASER_CHIRP
from speccheck.physics.relations import Context
from speccheck.reading.schema import validate
from speccheck.physics.shapes import BEAM_PROFILES, DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.reading.units import UnitSystem
from speccheck.reading.values import Tolerances, ValueParser, ValueProblem, parse_tolerance, tolerance_names


@dataclass(frozen=True)
class Options:
    limits: Limits = Limits()
    tolerance: float | None = None  # the project configuration's global tolerance
    tolerances: Mapping[str, float] = field(default_factory=dict)  # …and its per-quantity ones
    profiles: bool = False  # keep the field's profiles at the branch ends (the HTML report plots them)
    settings: tuple[tuple[str, str], ...] = ()  # (INPUT, VALUE) of each --set, in order
    remedies: str = "unmet"  # what would meet a target: for the "unmet" ones, "all" (a review), or "none"


class Checker:
    """Checks documents.  ``read(name, spec_path) -> bytes`` opens measured data files named
    in a spec (the command line supplies one that reads next to the spec); without it, data
    files are reported as not read.  A checker reads and analyses each data file once per
    document, and equal bytes once in its life (``measured_data.DataFiles``)."""

    def __init__(self, units: UnitSystem, options: Options = Options(), read=None) -> None:
        self.units = units
        self.options = options
        self.values = ValueParser(units)
        self.read = read
        self.data_files = DataFiles()
        self.path = ""  # the name of the document being checked

    def check_text(self, text: str | bytes, path: str) -> FileResult:
        self.data_files.new_document()
        self.path = path  # the spec's name: its data files are read beside it, in reruns too
        doc, settings, problem = self._prepared(text)
        if problem:
            return FileResult(path, (), set_problems=(problem,))
        return self._check(doc, path, settings)

    def solve(self, text: str | bytes, path: str, name: str):
        """(the check of the document, ``solving.Solution``: the range of the input ``name`` over
        which every target is met and no error is reported); raises ``overrides.SettingProblem``."""
        from speccheck.checking import overrides, solving

        self.data_files.new_document()
        self.path = path
        doc, settings, problem = self._prepared(text)
        if problem:
            raise overrides.SettingProblem(problem)
        result = self._check(doc, path, settings, remedies=False)
        return result, solving.solve(self, doc, name, result)

    def _prepared(self, text) -> tuple:
        """The document read, the --set values applied: (doc, what was set, a problem or None)."""
        doc = load(text, self.options.limits)
        if not self.options.settings or doc.problems:
            return doc, [], None
        from speccheck.checking import overrides

        try:
            return doc, overrides.apply(self, doc, self.options.settings), None
        except overrides.SettingProblem as e:
            return doc, [], str(e)

    def _check(self, doc, path: str, settings: list, remedies: bool = True) -> FileResult:
        report = Report(path, doc)
        for p in doc.problems:
            report.add(p.rule, p.message, line=p.line, column=p.column)
        sheet: dict[str, dict[str, Cell]] = {}
        data = doc.data
        bare: list = []  # numbers without their unit: the value grammar says so where it reads them
        if not doc.problems or data is not None:
            for rule_id, at, message, at_key in validate(data):
                if rule_id == "missing-unit":
                    bare.append((at, message))
                else:
                    report.add(rule_id, message, at, key=at_key)
        title = None
        shape, shape_stated, ends, fields = None, False, (), ()
        if isinstance(data, dict):
            title = data.get("title") if isinstance(data.get("title"), str) else None
            tolerance = self._tolerance(data, report)
            block = data.get("laser")
            if isinstance(block, dict):
                sheet["laser"] = BlockCheck(self, "laser", block, tolerance, report).run()
                if not any(c.status != "derived" for c in sheet["laser"].values()) and not data.get("path") \
                        and not data.get("operating_points") and not any(f.severity == "error"
                                                                         for f in report.findings):
                    # an emptied or unfinished spec passes nothing: it is said, not a silent "0 errors"
                    report.add("nothing-checked", "laser: the block states no quantity (and the spec has no "
                               "operating points or path), so nothing was checked", ("laser",), key=True)
                shape_stated = isinstance(block.get("pulse_shape"), str) and block["pulse_shape"] in PULSE_SHAPES
                shape = block["pulse_shape"] if shape_stated else DEFAULT_SHAPE
                points = data.get("operating_points")
                if isinstance(points, list):
                    self._operating_points(block, points, tolerance, report, sheet)
                # the path, and also a laser that states the chirp its pulse carries (its duration is checked)
                if isinstance(data.get("path"), list) or isinstance(data.get("target"), dict) or any(
                        block.get(k) is not None for k in LASER_CHIRP if k != "chirp"):
                    from speccheck.checking.walker import check_path

                    outcomes: list = []
                    ends, fields = check_path(self, data, tolerance, report, sheet, outcomes)
                    drop: set = set()
                    if report.points and (outcomes or data.get("path")):  # the path at every operating point too
                        from speccheck.checking.point_paths import unjudged, walk_points

                        walk_points(self, data, tolerance, report, dict(report.points), outcomes)
                        drop = unjudged(outcomes)
                    if remedies and self._wants_remedies(outcomes):
                        from speccheck.checking import remedies

                        report.findings = remedies.attach(self, doc, outcomes, report.findings,
                                                          self.options.remedies == "all")
                    report.findings = [f for k, f in enumerate(report.findings) if k not in drop]
            if sheet:
                self._safety(data, sheet, report)
        said = {(f.line, f.column) for f in report.findings}
        for at, message in bare:  # …and the schema where nothing else read it (a stage after the path ended)
            if doc.where(tuple(at)) not in said:
                report.add("missing-unit", message, at)
        findings = tuple(sorted(report.findings, key=Finding.sort_key))
        points = tuple(name for name in sheet if name in report.points)
        return FileResult(path, findings, sheet, title, shape, shape_stated, tuple(ends), points, tuple(fields),
                          tuple(settings))

    def _wants_remedies(self, outcomes: list) -> bool:
        mode = self.options.remedies
        return mode == "all" and bool(outcomes) or mode == "unmet" and any(o.verdict == "not-met" for o in outcomes)

    def rerun(self, doc, data: dict, nominal: bool = False, point: int | None = None) -> tuple[dict, list, list]:
        """The laser column and the path of ``data`` (the document with an input changed) checked
        again, for the remedies: (sheet, the targets' outcomes, findings).  ``doc`` gives places;
        ``point``: the path walked at that operating point (its values over the laser block's).
        ``nominal``: every plain value exact (no default tolerance), so that each interval is the
        nominal value alone and the pulse's field is computed once per column, not per corner;
        the nominal values are the same, and values that agree only within tolerances conflict."""
        from speccheck.checking.walker import check_path

        report = Report(self.path, doc)
        tolerance = self._tolerance(data, report)
        if nominal:
            tolerance = Tolerances({}, {}, 0.0, 0.0, tolerance.margin)
        sheet: dict = {}
        outcomes: list = []
        block = data.get("laser")
        if isinstance(block, dict) and point is not None:  # the path at an operating point
            from speccheck.checking import point_paths

            check = point_paths.laser_column(self, data, point, tolerance, report)
            sheet["laser"] = check.run()
            # a value beyond the sheet's own limits is outside what the point can be
            self._sheet_limits("laser", block, data["operating_points"][point], point, check, report)
            data = {**data, "laser": point_paths.merged(data, point)}
            check_path(self, data, tolerance, report, sheet, outcomes, lean=True)
        elif isinstance(block, dict):
            sheet["laser"] = BlockCheck(self, "laser", block, tolerance, report, notes=False).run()
            check_path(self, data, tolerance, report, sheet, outcomes, lean=True)
        return sheet, outcomes, report.findings

    def _safety(self, data: dict, sheet: dict, report: Report) -> None:
        from speccheck.checking import safety

        if not safety.is_hazard(sheet):
            return
        text = safety.CAUTION
        raw = data.get("safety", {}).get("mpe") if isinstance(data.get("safety"), dict) else None
        if raw is not None:
            try:
                mpe = self.values.parse_as("safety.mpe", raw, "J/m^2", 0.0)
                as_fluence = True
            except ValueProblem:
                try:
                    mpe = self.values.parse_as("safety.mpe", raw, "W/m^2", 0.0)
                    as_fluence = False
                except ValueProblem as e:
                    report.add(e.rule, "safety.mpe: expected a fluence (J/cm^2) or an irradiance (W/cm^2), "
                               f"got {raw!r}", ("safety", "mpe"))
                    mpe = None
            if mpe is not None and mpe.typical:
                od = safety.optical_density(sheet, mpe.typical, as_fluence)
                if od is not None:
                    text += (f". With the MPE you gave ({mpe.text}), the indicative optical density at "
                             f"{od[1]!r} is log10(H/MPE) = {od[0]:.2g}: a figure to discuss with your laser "
                             "safety officer, not an eyewear specification")
        report.add("laser-safety", text + ".", ("laser",), key=True)

    def _operating_points(self, block: dict, points: list, tolerance: float, report: Report,
                          sheet: dict) -> None:
        """Each point overrides the laser block and is checked as a column of its own."""
        report.dedupe = True  # findings already reported for the laser block are not repeated
        for i, point in enumerate(points):
            if not isinstance(point, dict):
                continue
            raw_name = point.get("name")
            name = raw_name if isinstance(raw_name, str) and raw_name else f"point {i + 1}"
            if name in sheet:
                report.add("duplicate-name", f"operating_points[{i}]: the name {name!r} is already used; "
                           f"this point is shown as 'point {i + 1}'", ("operating_points", i, "name"))
                name = f"point {i + 1}"
            merged, paths = dict(block), {key: ("laser", key) for key in block}
            for key, value in point.items():
                if key != "name":
                    merged[key] = value
                    paths[key] = ("operating_points", i, key)
            paths[""] = ("operating_points", i)
            check = BlockCheck(self, name, merged, tolerance, report, paths, notes=False)  # noted once, at the laser
            sheet[name] = check.run()
            report.points[name] = i
            before = len(report.findings)
            self._sheet_limits(name, block, point, i, check, report)
            for f in report.findings[before:]:  # a value beyond the sheet's own limit is marked in its cell
                for q in f.quantities:
                    column, _, quantity = q.partition(".")
                    cell = sheet[name].get(quantity) if column == name else None
                    if cell is not None and cell.status == "stated":
                        sheet[name][quantity] = cell._replace(status="conflict")
        report.dedupe = False

    def _sheet_limits(self, name: str, block: dict, point: dict, i: int, check: "BlockCheck",
                      report: Report) -> None:
        """A point may not claim more than the sheet's own minimum or maximum for a quantity."""
        for key, value in point.items():
            if key == "name" or key not in block or key not in KEYS:
                continue
            try:
                limit = self.values.parse(key, block[key], tolerance=0.0)
                mine = self.values.parse(key, value, tolerance=0.0)
            except ValueProblem:
                continue  # reported where it was read
            if limit.typical is not None and limit.low == limit.high:
                continue  # a plain nominal value of the laser block: overriding it is the point
            line = report.doc.where(("laser", key))[0]
            line = f"line {line}" if line else "set on the command line"
            if mine.low > limit.high:
                side, bound = "above the sheet's maximum", limit.high
            elif mine.high < limit.low:
                side, bound = "below the sheet's minimum", limit.low
            else:
                continue
            report.add("operating-point-beyond-limit",
                       f"operating point {name!r}: {key} {mine.text} is {side} "
                       f"{check.show(limit.quantity, bound, limit.unit)} (laser.{key}: {limit.text}, {line})",
                       ("operating_points", i, key), quantities=(f"{name}.{key}", f"laser.{key}"))

    def tolerances_of(self, data: dict) -> Tolerances:
        """The spec's tolerances without reporting what is wrong in them (the check itself reports it)."""
        class _Quiet:
            def add(self, *args, **kwargs) -> None:
                pass

        return self._tolerance(data if isinstance(data, dict) else {}, _Quiet())  # type: ignore[arg-type]

    def _tolerance(self, data: dict, report: Report) -> Tolerances:
        """The tolerances of this spec: its ``defaults``, then the configuration's, then the table."""
        defaults = data.get("defaults") if isinstance(data.get("defaults"), dict) else {}
        spec_global = None
        if "tolerance" in defaults:
            try:
                spec_global = parse_tolerance(defaults["tolerance"])
            except ValueProblem as p:
                report.add(p.rule, f"defaults.tolerance: {p.message}", ("defaults", "tolerance"))
        spec: dict[str, float] = {}
        per = defaults.get("tolerances")
        if isinstance(per, dict):
            known = tolerance_names()
            for name, raw in per.items():
                if name not in known:
                    continue  # the schema names the known ones, with "did you mean"
                try:
                    spec[name] = parse_tolerance(raw)
                except ValueProblem as p:
                    report.add(p.rule, f"defaults.tolerances.{name}: {p.message}", ("defaults", "tolerances", name))
        margin = 0.01
        if "nominal_margin" in defaults:
            try:
                margin = parse_tolerance(defaults["nominal_margin"])
            except ValueProblem as p:
                report.add(p.rule, f"defaults.nominal_margin: {p.message}", ("defaults", "nominal_margin"))
        return Tolerances(spec, self.options.tolerances, spec_global, self.options.tolerance, margin)

    def context(self, shape: str, profile: str) -> Context:
        k = self.units.constants
        return Context(k.c, k.h, k.eps0, PULSE_SHAPES[shape], BEAM_PROFILES[profile])
