"""The inputs of a spec, and values set on the command line (``--set INPUT=VALUE``).

An *input* is a number the check starts from: a quantity of the laser block
(``laser.pulse_energy``), a parameter of a named stage of the path, in any branch
(``lens.focal_length``: every parameter its kind declares in ``physics.stages``,
stated or defaulted), or a quantity of a named operating point (``100 kHz.pulse_energy``).
The name is split at its last dot, so a stage name may hold dots.

Setting an input replaces its value in the parsed document, never in the file, and marks
its place (``loader.Document.mark_setting``) so that a finding there points to the command
line.  What a laser quantity determines moves with it: after the new value, the other stated
typical values are taken in the order of the quantities the path carries (wavelength, rate,
energy, power, duration, …), and each one the values before it already determine through
the relation table, and would not determine without the new value, is dropped, to be derived
again.  At a fixed rate, a new pulse energy therefore moves the average power.  Bounds
(``<= 20 W``) are limits, never dropped.  A setting never hides what the file already gets
wrong: set to the value it has, it moves nothing, and a value the file's own values contradict
stays stated (``moved``).
"""

from __future__ import annotations

import difflib
import json
import math
from dataclasses import dataclass

from speccheck.checking.column import KEYS, NAMES
from speccheck.checking.engine import evaluate, network_for
from speccheck.physics.beam import CARRIED
from speccheck.physics.limits import LIMITS
from speccheck.physics.quantities import BY_NAME, CATEGORICAL, defaults_for
from speccheck.physics.shapes import BEAM_PROFILES, DEFAULT_PROFILE, DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.physics.stages import PARAM_TOLERANCES, STAGE_KINDS
from speccheck.reading.angles import parse_angle
from speccheck.reading.loader import Limits, load
from speccheck.reading.values import ValueProblem
from speccheck.records.rules import RULES

SIGNED = ("s^2", "s^3", "s^4")  # dimensions of parameters that may be negative (a GDD, TOD, FOD)
_UNITS = {"angle": "rad"}  # the SI unit of a parameter dimension that is not a unit text


@dataclass(frozen=True)
class Input:
    name: str  # "<column>.<parameter>"
    column: str  # "laser", a stage's name or an operating point's
    parameter: str  # the spec key
    at: tuple  # where its value is (or would be) in the document
    kind: str  # "quantity" (a block key), "number", "angle" (stage parameters) or "text"
    dimension: str  # the SI unit of a number ("J", "m", "s^2", "1", "rad"); "" for text
    stated: bool  # written in the file (False: a parameter's default, or not there at all)
    value: float | None = None  # the nominal value now, SI; None if not one number
    display_unit: str = ""  # the unit to show it in
    signed: bool = False  # may be negative (a GDD)
    highest: float = math.inf  # a share of the beam: at most 1
    lowest: float = 0.0  # what a quantity's own limit allows (M² ≥ 1), where the same for every shape
    accepts: str = "positive"  # the values its declaration allows: "positive", "zero" (≥ 0) or "any" sign
    exact: bool = False  # a whole number by its nature (a pulse picker's divide_by, a harmonic order)


class SettingProblem(ValueError):
    """A ``--set`` this document cannot take: an unknown input, or a value the grammar refuses."""


def inputs(checker, data) -> dict[str, Input]:
    """Every input of the document ``data``, by name (the first of two stages of one name)."""
    out: dict[str, Input] = {}
    if not isinstance(data, dict):
        return out
    laser = data.get("laser") if isinstance(data.get("laser"), dict) else {}
    for key in sorted(KEYS | set(CATEGORICAL)):
        out[f"laser.{key}"] = _quantity(checker, "laser", key, ("laser", key), laser)
    points = data.get("operating_points")
    for i, point in enumerate(points if isinstance(points, list) else []):
        if isinstance(point, dict):
            name = point.get("name") if isinstance(point.get("name"), str) and point.get("name") else f"point {i + 1}"
            for key in sorted(KEYS):
                out.setdefault(f"{name}.{key}", _quantity(checker, name, key, ("operating_points", i, key), point))
    _stages(checker, data.get("path"), ("path",), out)
    return out


def _quantity(checker, column: str, key: str, at: tuple, block: dict) -> Input:
    name = f"{column}.{key}"
    if key in CATEGORICAL:
        return Input(name, column, key, at, "text", "", key in block)
    value, unit, si = None, "", BY_NAME[key].si_unit if key in BY_NAME else ""
    if key in block:
        try:
            s = checker.values.parse(key, block[key], 0.0)
            value, unit, si = s.typical, s.unit, BY_NAME[s.quantity].si_unit
        except ValueProblem:
            pass
    unit = unit or (BY_NAME[key].display_unit if key in BY_NAME else "")
    return Input(name, column, key, at, "quantity", si, key in block, value, unit, lowest=_lowest(checker, key))


def _lowest(checker, key: str) -> float:
    """The least value of a quantity that no error refuses by its own limit (``physics.limits``), where
    that limit is the same for every pulse shape and beam profile (M² ≥ 1); 0 where there is none."""
    bounds = set()
    for row in LIMITS:
        if row.quantity == key and row.side == "min" and RULES[row.rule].severity == "error":
            bounds |= {row.bound(checker.context(s, p)) for s in PULSE_SHAPES for p in BEAM_PROFILES}
    return bounds.pop() if len(bounds) == 1 and None not in bounds else 0.0


def _stages(checker, stages, at: tuple, out: dict) -> None:
    for i, stage in enumerate(stages if isinstance(stages, list) else []):
        if not isinstance(stage, dict) or not isinstance(stage.get("kind"), str):
            continue
        kind = STAGE_KINDS.get(stage["kind"])
        name = stage.get("name")
        if kind is None or not isinstance(name, str) or not name:
            continue
        for p in kind.params:
            label = f"{name}.{p.name}"
            if label in out:
                continue
            where = at + (i, p.name)
            if p.dimension in ("text", "material_name") or p.choices:
                out[label] = Input(label, name, p.name, where, "text", "", p.name in stage,
                                   exact=bool(p.choices))
                continue
            signed = p.dimension in SIGNED
            accepts = "any" if signed or p.signed else "zero" if p.zero else "positive"
            raw = stage.get(p.name)
            value, unit = (p.default, p.dimension) if raw is None else (None, p.dimension)
            if raw is not None:
                try:
                    s = parse_angle(label, raw, 0.0) if p.dimension == "angle" else \
                        checker.values.parse_as(label, raw, p.dimension, 0.0, signed=accepts != "positive")
                    value, unit = s.typical, s.unit
                except ValueProblem:
                    pass
            shown = "deg" if p.dimension == "angle" else "%" if p.fraction else unit
            exact = PARAM_TOLERANCES.get(p.name, (0.05,))[0] == 0.0  # exact by its nature: a whole number
            out[label] = Input(label, name, p.name, where, "angle" if p.dimension == "angle" else "number",
                               _UNITS.get(p.dimension, p.dimension), raw is not None, value, shown,
                               signed or p.dimension == "angle", 1.0 if p.fraction else math.inf, exact,
                               accepts=accepts)
        branches = stage.get("branches")
        if isinstance(branches, dict):
            for branch, spec in branches.items():
                if isinstance(spec, dict):
                    _stages(checker, spec.get("path"), at + (i, "branches", branch, "path"), out)


def find(table: dict[str, Input], name: str) -> Input:
    found = table.get(name)
    if found is not None:
        return found
    guess = difflib.get_close_matches(name, list(table), n=1, cutoff=0.75)
    stages = sorted({i.column for i in table.values() if i.kind in ("number", "angle")})
    hint = f"; did you mean {guess[0]!r}?" if guess else (
        "; inputs are laser.<quantity>, <operating point>.<quantity>" +
        (f" and <stage>.<parameter> for the stages {', '.join(map(repr, stages))}" if stages else
         " and <stage>.<parameter> for a named stage"))
    raise SettingProblem(f"this spec has no input {name!r}{hint}")


def read_value(checker, inp: Input, text: str):
    """The value ``text`` (in the spec's grammar: '3 mJ', '>= 20 W', '{min: 1 mJ, max: 2 mJ}') as
    the document would hold it, after checking that the value grammar reads it."""
    # a bound written as on the command line ('>= 20 W') is a string: YAML would read '>' as a folded block
    doc = load(json.dumps(text) if text.lstrip()[:1] in (">", "|") else text, Limits(max_bytes=1000, max_nodes=10,
                                                                               max_depth=2))
    raw = doc.data
    if doc.problems or raw is None or isinstance(raw, (list, bool)) or (isinstance(raw, dict) and inp.kind == "text"):
        raise SettingProblem(f"cannot read the value {text!r}")
    try:
        if inp.kind == "quantity":
            checker.values.parse(inp.parameter, raw, 0.0)
        elif inp.kind == "angle":
            parse_angle(inp.name, raw, 0.0)
        elif inp.kind == "number":
            got = checker.values.parse_as(inp.name, raw, inp.dimension, 0.0, signed=inp.accepts != "positive")
            if inp.accepts == "zero" and got.low < 0.0:
                raise SettingProblem(f"{inp.name} is never negative, got {text!r}")
        elif not isinstance(raw, str):
            raise SettingProblem(f"{inp.name}: expected a name, got {text!r}")
    except ValueProblem as e:
        raise SettingProblem(e.message) from None
    return raw


def replaced(data: dict, at: tuple, value, drop: tuple = ()) -> dict:
    """A copy of ``data`` with ``value`` at the path ``at`` and the keys ``drop`` of the same
    mapping removed; only the containers along the path are copied."""
    def put(node, path):
        new = list(node) if isinstance(node, list) else dict(node) if isinstance(node, dict) else {}
        head = path[0]
        if len(path) == 1:
            new[head] = value
            for key in drop:
                new.pop(key, None)
        else:
            new[head] = put(new[head] if isinstance(new, list) or head in new else {}, path[1:])
        return new

    return put(data, tuple(at))


def merged(data: dict, index: int) -> dict:
    """The laser block with operating point ``index``'s values over it (its name left out)."""
    block = data.get("laser") if isinstance(data.get("laser"), dict) else {}
    points = data.get("operating_points")
    point = points[index] if isinstance(points, list) and 0 <= index < len(points) else None
    if not isinstance(point, dict):
        return dict(block)
    return {**block, **{k: v for k, v in point.items() if k != "name"}}


def moved(checker, block: dict, key: str, original: dict | None = None, tolerances=None) -> tuple[str, ...]:
    """The stated keys of ``block`` that the value of ``key`` moves: each one that ``key`` and the values
    before it (in the order above) determine, and that they would not determine without ``key`` (a
    value the rest fixes on its own, the rate with the power and the energy, stays where it is).

    A what-if never hides a disagreement the spec already has: with ``original`` (the block as the
    file has it, read with ``tolerances``), nothing moves when ``key`` keeps its value, and a value
    the file's own stated values contradict (the stated values of each contradiction the engine
    finds) stays stated, so the check still reports it."""
    if not isinstance(block, dict):
        return ()
    shape = block.get("pulse_shape") if block.get("pulse_shape") in PULSE_SHAPES else DEFAULT_SHAPE
    profile = block.get("beam_profile") if block.get("beam_profile") in BEAM_PROFILES else DEFAULT_PROFILE
    net = network_for(NAMES, checker.context(shape, profile))
    typical = _typical(checker, block)
    if key not in typical:
        return ()
    kept: set[str] = set()
    if isinstance(original, dict):
        before = _typical(checker, original)
        if key in before and math.isclose(before[key][1], typical[key][1], rel_tol=1e-12):
            return ()  # the value it has already: the spec as it is
        kept = _contradicted(checker, net, original, tolerances)
    order = list(CARRIED) + [q for q in NAMES if q not in CARRIED]
    rest = sorted((k for k in typical if k != key), key=lambda k: order.index(typical[k][0]))
    idx = net.index
    without = {idx[q]: math.log(v) for q, v in defaults_for({q for q, _ in typical.values()}).items()}
    known = dict(without)
    out = []
    for k in [key] + rest:
        q, v = typical[k]
        if k != key and k not in kept and idx[q] in evaluate(net, known) and idx[q] not in evaluate(net, without):
            out.append(k)
            continue
        known[idx[q]] = math.log(v)
        if k != key:
            without[idx[q]] = math.log(v)
    return tuple(out)


def _typical(checker, block: dict) -> dict[str, tuple[str, float]]:
    """The stated keys of a block with a typical value: key -> (quantity, typical, SI)."""
    out: dict[str, tuple[str, float]] = {}
    for k, raw in block.items():
        if k in KEYS and k not in CATEGORICAL:
            try:
                s = checker.values.parse(k, raw, 0.0)
            except ValueProblem:
                continue
            if s.typical is not None and s.typical > 0.0:
                out[k] = (s.quantity, s.typical)
    return out


def _contradicted(checker, net, block: dict, tolerances) -> set[str]:
    """The keys of the stated values in each contradiction among a block's own values (with their
    tolerances), as the engine finds them: the first contradiction's values, then again without them."""
    from speccheck.checking.engine import propagate
    from speccheck.checking.logspace import ln
    from speccheck.reading.values import Tolerances

    tolerances = tolerances if tolerances is not None else Tolerances()
    idx = net.index
    stated: dict[int, tuple[float, float]] = {}
    keys: dict[int, str] = {}
    for k, raw in block.items():
        if k in KEYS and k not in CATEGORICAL:
            try:
                s = checker.values.parse(k, raw, tolerances)
            except ValueProblem:
                continue
            if s.quantity in idx and idx[s.quantity] not in stated:
                stated[idx[s.quantity]] = (ln(s.low), ln(s.high))
                keys[idx[s.quantity]] = k
    for q, value in defaults_for({net.names[i] for i in stated}).items():
        stated.setdefault(idx[q], (math.log(value), math.log(value)))
    out: set[str] = set()
    for _ in range(len(stated)):
        state = propagate(net, stated)
        if state.ok:
            break
        support = state.conflict[1] & set(keys)
        if not support:
            break
        out |= {keys[i] for i in support}
        stated = {i: v for i, v in stated.items() if i not in support}
    return out


def apply(checker, doc, settings) -> list[str]:
    """Set each ``(INPUT, VALUE text)`` of ``settings`` in ``doc.data``; returns what was applied,
    in words ('laser.pulse_energy=3 mJ (laser.average_power follows)').  Raises
    ``SettingProblem`` for an input the document does not have or a value the grammar refuses."""
    applied = []
    for name, text in settings:
        if not isinstance(doc.data, dict):
            raise SettingProblem("the file holds no spec to set values in")
        inp = find(inputs(checker, doc.data), name)
        raw = read_value(checker, inp, text)
        data = replaced(doc.data, inp.at, raw)
        follow = moved(checker, data.get("laser"), inp.parameter, doc.data.get("laser"),
                       checker.tolerances_of(doc.data)) if inp.column == "laser" else ()
        doc.data = replaced(data, inp.at, raw, follow) if follow else data
        doc.mark_setting(inp.at, f"--set {name}={text}")
        applied.append(f"{name}={text}" + (f" ({', '.join('laser.' + k for k in follow)} "
                                           f"follow{'s' if len(follow) == 1 else ''})" if follow else ""))
    return applied
