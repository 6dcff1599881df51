"""The path again at each operating point: a target written once is judged at every point.

A sheet with operating points states one laser at several settings.  The path and its
targets (the top-level one and any stage's) are the same for all of them, so each point is
the laser block with the point's values over it (``overrides.merged``), walked down the same path.
What is said there is what the targets say (met, not met, uncertain, unknown) and the
errors and warnings the walk gives at that point that the laser block's own walk did not,
each beginning with the point's name.  The columns of these walks are not added to the
sheet (it has one path, the laser block's); the targets' outcomes are, for the remedies,
which then re-check the point (``Outcome.point``) and offer the point's own values.
"""

from __future__ import annotations

from dataclasses import replace

from speccheck.checking.column import BlockCheck
from speccheck.checking.overrides import merged
from speccheck.checking.report import Report
from speccheck.records.rules import rule


def places(data: dict, index: int) -> dict:
    """Where each value of ``merged`` is written: the point's own at the point, the rest at the laser."""
    block = data.get("laser") if isinstance(data.get("laser"), dict) else {}
    point = data["operating_points"][index]
    out = {key: ("laser", key) for key in block}
    out.update({key: ("operating_points", index, key) for key in point if key != "name"})
    out[""] = ("operating_points", index)
    return out


def laser_column(checker, data: dict, index: int, tolerance, report: Report) -> BlockCheck:
    """The check of the laser column of the path at operating point ``index`` (its findings go to
    ``report`` when it runs)."""
    return BlockCheck(checker, "laser", merged(data, index), tolerance, report, places(data, index), notes=False)


def walk_points(checker, data: dict, tolerance, report: Report, points: dict, outcomes: list) -> None:
    """Each operating point (``points``: its column name → its index) walked down the path; what
    it says is added to ``report`` and its targets' outcomes to ``outcomes``."""
    from speccheck.checking.walker import check_path

    said = {(f.rule, f.line, f.column) for f in report.findings}
    for name, index in points.items():
        sub = Report(report.path, report.doc)
        sheet = {"laser": laser_column(checker, data, index, tolerance, sub).run()}
        found: list = []
        check_path(checker, {**data, "laser": merged(data, index)}, tolerance, sub, sheet, found, lean=True)
        # a point whose own values contradict each other (said at the point) determines no target
        clash = next((f for f in sub.findings if f.rule == "relation-conflict"), None)
        targets = {o.finding: o for o in found if o.finding is not None}
        kept = {}
        for k, f in enumerate(sub.findings):
            if f.rule.startswith("target-") or f.severity in ("error", "warning") and (f.rule, f.line,
                                                                                         f.column) not in said:
                message = f.message
                if k in targets and clash is not None:
                    where = f"line {clash.line}" if clash.line else "a value set on the command line"
                    f = replace(f, rule="target-unknown", severity=rule("target-unknown").severity)
                    message = (f"target {_key(targets[k])} {targets[k].need.text} is not judged: the point's own "
                               f"values contradict each other ({where})")
                kept[k] = len(report.findings)
                message = message.replace("at 'laser'", "at this point")  # a path without stages ends at the laser
                quantities = tuple(f"{name}.{q[6:]}" if q.startswith("laser.") else q for q in f.quantities)
                report.findings.append(replace(f, message=f"at operating point {name!r}: {message}",
                                               quantities=quantities))
        outcomes.extend(replace(o, finding=kept.get(o.finding), point=(index, name),
                                verdict="unknown" if clash is not None else o.verdict) for o in found)


def _key(outcome) -> str:
    return outcome.at[-1] if outcome.at and isinstance(outcome.at[-1], str) else outcome.need.quantity


def unjudged(outcomes: list) -> set:
    """The findings of the laser block's own targets that it does not determine where every
    operating point was walked: each point speaks for itself (the laser block of such a sheet is
    what the points share, often without a rate or an energy of its own)."""
    return {o.finding for o in outcomes if o.point is None and o.finding is not None
            and (o.verdict == "unknown" or not o.nominal)}
