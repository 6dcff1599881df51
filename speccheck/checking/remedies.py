"""What it would take: for a target, the range of each single input over which it is met.

For each target not met (every target in a review) and each input it depends on (the
laser's stated quantities, the stated and defaulted parameters of the stages of its
branch: ``overrides.inputs``), the spec is checked again with that input changed and
all else as it is, and ``seek`` finds the interval of the input over which the target's
nominal value meets it.  Re-checking is what makes this generic: what an input determines
moves with it (``overrides.moved``: at a fixed rate a new energy moves the power), every
stage applies its own physics, and nothing here knows a stage kind or a parameter.

Positive inputs are searched in log space from 1/30 to 30 times their value (a share of
the beam up to 1, a whole number from 1 and rounded), signed ones (a GDD) over ±4 times
theirs.  A value at which the check reports an error at the input itself (an M² below 1,
a transmission above 100 %, a value the rest of the spec contradicts) is outside its
domain and does not meet the target.  The laser's wavelength (``quantities.CARRIER``) is not offered.  A met range that reaches the end of the search is open (None) on that side.  A
defaulted parameter is offered only where a value it can take meets the target.
``reachable: false`` means that no value was found in the range searched: a grid of the
range and the secant steps; a met window narrower than the grid's step (a pulse whose
width jumps as a side lobe crosses half maximum) can be missed.  The
re-checks are bounded per target (``BUDGET``) and shared between targets.
"""

from __future__ import annotations

import math
import warnings
from dataclasses import replace

from speccheck.checking import overrides, seek
from speccheck.checking.column import NAMES
from speccheck.checking.engine import evaluate, network_for
from speccheck.physics.beam import CARRIED
from speccheck.physics.quantities import CARRIER
from speccheck.physics.shapes import BEAM_PROFILES, DEFAULT_PROFILE, DEFAULT_SHAPE, PULSE_SHAPES
from speccheck.reading.units import format_number
from speccheck.records.findings import Remedy

SPAN = math.log(30.0)  # positive inputs: searched from 1/30 to 30 times their value
SIGNED_SPAN = 4.0  # signed inputs: ± this many times their size…
# …and at least this size, so that a value at or near zero is searched over a useful range (common
# practice: the GDD, TOD and FOD of ultrafast optics and compressors, and a tilt of a tenth of a radian)
SIGNED_FLOOR = {"s^2": 1000e-30, "s^3": 1e4 * 1e-45, "s^4": 1e5 * 1e-60, "rad": 0.1}
BUDGET = 160  # re-checks per target, at most, shared out evenly over the inputs it depends on
PER_INPUT = 32  # …and at most this many per input…
FIRST = 12  # …of which this many in a first pass over every input
DOCUMENT_BUDGET = 160  # …and per document over its targets not met; a review adds this per met target…
REVIEW_BUDGET = 480  # …up to this many
SHOWN = 3  # remedies said in words (the smallest changes)
UNSETTLED = "unsettled"  # the budget ran out before the search ended


class Rechecks:
    """The document checked again with one input changed, each (input, value) once."""

    def __init__(self, checker, doc, nominal: bool = True, budget: int = DOCUMENT_BUDGET) -> None:
        self.c, self.doc, self.data, self.nominal, self.budget = checker, doc, doc.data, nominal, budget
        self.table = overrides.inputs(checker, doc.data)
        self.done: dict = {}
        self.moves: dict = {}

    def base(self, at: tuple, point: int | None = None) -> float | None:
        """The target's value in a re-check of the document as it is (the reference of a search:
        a nominal re-check may differ from the check's own value in the last digits)."""
        self._base(point)
        return self.moves["base", point].get(at)

    def _base(self, point: int | None) -> set:
        """The errors of the document as it is (rule, line, column), re-checked as the searches are."""
        if ("base", point) not in self.moves:
            _, outcomes, findings = self.c.rerun(self.doc, self.data, self.nominal, point)
            self.moves["base", point] = {o.at: o.value for o in outcomes}
            self.moves["errors", point] = {(f.rule, f.line, f.column) for f in findings if f.severity == "error"}
        return self.moves["errors", point]

    def with_value(self, inp: overrides.Input, x: float) -> dict:
        unit = "" if inp.dimension == "1" else " " + inp.dimension
        raw = x if inp.dimension == "1" and inp.kind != "angle" else f"{x!r}{unit}"
        if inp.name not in self.moves:  # what moves with it: found with the input stated
            placed = overrides.replaced(self.data, inp.at, raw)
            block = placed.get("laser") if inp.column == "laser" else overrides.merged(placed, inp.at[1]) \
                if inp.at[0] == "operating_points" else None
            original = self.data.get("laser") if inp.column == "laser" else overrides.merged(self.data, inp.at[1]) \
                if inp.at[0] == "operating_points" else None
            self.moves[inp.name] = overrides.moved(self.c, block, inp.parameter, original,
                                                   self.c.tolerances_of(self.data)) if block is not None else ()
        return overrides.replaced(self.data, inp.at, raw, self.moves[inp.name])

    def run(self, inp: overrides.Input, x: float, point: int | None = None):
        """(value of each target by its place, whether any error was reported) with ``inp`` at x (the
        path walked at operating point ``point``); no target has a value where an error is reported
        at the input itself (outside its domain)."""
        key = (inp.name, x, point)
        if key not in self.done:
            if len(self.done) >= self.budget:
                raise seek.Budget
            try:
                with warnings.catch_warnings():  # far from the spec's values a formula may leave its domain
                    warnings.simplefilter("ignore")
                    sheet, outcomes, findings = self.c.rerun(self.doc, self.with_value(inp, x), self.nominal,
                                                             point)
                places = {self.doc.where(inp.at), self.doc.where(inp.at, key=True)}
                errors = [f for f in findings if f.severity == "error" and not f.rule.startswith("target-")]
                before = self._base(point)
                # outside the input's domain: an error at the input itself, or one the document as it is
                # does not have that names the input's quantity (a rate whose power passes the sheet's
                # maximum, a bandwidth below the duration's transform limit); exact values that agree
                # only within tolerances conflict in both, so such a conflict is not a domain's end
                mine = f".{inp.parameter}"
                outside = any(((f.line, f.column) in places and not (self.nominal and f.rule == "relation-conflict"))
                              or ((f.rule, f.line, f.column) not in before and any(q.endswith(mine) for q in
                                                                                   f.quantities))
                              for f in errors)
                self.done[key] = ({} if outside else {o.at: o.value for o in outcomes}, bool(errors))
            except (ArithmeticError, ValueError):
                self.done[key] = ({}, True)
        return self.done[key]


def candidates(table: dict, columns: tuple, point: tuple | None = None, own: tuple = ()) -> list[overrides.Input]:
    """The inputs a target of a branch with these columns may depend on, with a nominal value; at
    an operating point (``point``: index and name; ``own``: the keys it states), its own values
    and the laser block's others."""
    out = []
    for inp in table.values():
        if inp.kind not in ("quantity", "number", "angle") or inp.value is None:
            continue
        of_point = point is not None and inp.column == point[1] and inp.at[:2] == ("operating_points", point[0])
        searchable = inp.value > 0 or inp.signed or inp.value < 0 and inp.accepts == "any"
        if (inp.column == "laser" and inp.parameter not in own or of_point) and inp.stated \
                and inp.parameter not in CARRIER and searchable:
            out.append(inp)
        elif inp.column in columns and inp.column != "laser" and searchable:
            out.append(inp)
    return out


def domain(inp: overrides.Input):
    """(t0, lowest t, highest t, first step, t -> x) of the coordinate searched: ln x for a
    positive input, ln |x| for a negative one that keeps its sign (a diverging lens: the search does
    not pass through infinity), x in units of its own size for a signed one."""
    x0 = inp.value
    if inp.signed:
        size = max(abs(x0), SIGNED_FLOOR.get(inp.dimension, 0.0)) or 1.0
        t0 = x0 / size
        return t0, t0 - SIGNED_SPAN, t0 + SIGNED_SPAN, 0.1, lambda t: t * size
    if x0 < 0:
        t0 = math.log(-x0)
        return t0, t0 - SPAN, t0 + SPAN, 0.1, lambda t: -math.exp(t)
    t0 = math.log(x0)
    lo, hi = t0 - SPAN, t0 + SPAN
    if math.isfinite(inp.highest):
        hi = min(hi, math.log(inp.highest))
    if inp.exact:
        lo = max(lo, 0.0)
    if inp.lowest > 0:
        lo = max(lo, math.log(inp.lowest))
    return t0, min(lo, t0), max(hi, t0), 0.1, math.exp


def remedy_for(rechecks: Rechecks, inp: overrides.Input, at: tuple, need, value: float | None,
               budget: int, point: int | None = None) -> tuple[Remedy | None, int]:
    """The remedy of one input for the target at ``at`` (None: it does not depend on it), and the
    re-checks it used."""
    if value is None or value <= 0.0:
        return None, 0
    t0, lo, hi, step, to_x = domain(inp)
    band = (math.log(need.low) if need.low > 0 else -math.inf, math.log(need.high) if math.isfinite(need.high)
            else math.inf)
    before = len(rechecks.done)

    def g(t: float):
        got = rechecks.run(inp, to_x(t), point)[0].get(at)
        return math.log(got) if got is not None and got > 0 else None

    found = seek.seek(g, t0, math.log(value), lo, hi, band, step, min(budget, PER_INPUT))
    used = len(rechecks.done) - before
    if found is None:
        return UNSETTLED, used
    if not found.depends:
        return None, used
    low = None if found.low is None or not found.reachable else to_x(found.low)
    high = None if found.high is None or not found.reachable else to_x(found.high)
    binding = (low is not None and not found.domain[0], high is not None and not found.domain[1])
    if inp.value < 0 and not inp.signed:  # ln |x| grows as x falls: the ends change places
        low, high, binding = high, low, binding[::-1]
    reachable = found.reachable
    if found.reachable and math.isfinite(inp.highest) and found.high is None:
        high = inp.highest  # a share of the beam is met up to all of it
    if inp.exact and reachable:  # a whole number: the whole numbers inside
        low = float(math.ceil(low - 1e-9)) if low is not None else 1.0
        high = float(math.floor(high + 1e-9)) if high is not None else None
        reachable = high is None or low <= high
    if not reachable and not inp.stated:
        return None, used  # a default offered only where a value it can take meets the target
    return Remedy(inp.name, inp.column, inp.parameter, low if reachable else None, high if reachable else None,
                  inp.dimension, reachable, inp.stated, inp.value, inp.display_unit, binding), used


def depends(rechecks: Rechecks, inp: overrides.Input, at: tuple, value: float, point: int | None = None) -> bool:
    """Whether the target at ``at`` moves when the input moves by one first step either way (the
    same points the search starts from, so they are checked once)."""
    t0, lo, hi, step, to_x = domain(inp)
    for t in (t0 + step, t0 - step):
        if lo <= t <= hi:
            got = rechecks.run(inp, to_x(t), point)[0].get(at)
            if got is None or abs(math.log(got / value) if got > 0 else math.inf) >= seek.EPS:
                return True
    return False


def remedies_for(rechecks: Rechecks, outcome, budget: int = BUDGET) -> tuple[tuple[Remedy, ...], list[str]]:
    """The remedy of each input the target depends on, the budget of re-checks shared out evenly;
    and the inputs it depends on whose search the budget cut short."""
    start = len(rechecks.done)
    index = outcome.point[0] if outcome.point else None
    value = rechecks.base(outcome.at, index)
    if value is None or value <= 0:
        return (), []
    own = tuple(k for k in rechecks.data["operating_points"][index] if k != "name") if outcome.point else ()
    try:
        chosen = [inp for inp in candidates(rechecks.table, outcome.columns, outcome.point, own)
                  if len(rechecks.done) - start < budget and depends(rechecks, inp, outcome.at, value, index)]
    except seek.Budget:
        return (), ["every input"]
    # first a short search of every input (a straight line settles in a few re-checks), then what is
    # left of the budget shared between the ones still open; a search run again replays its first
    # re-checks from the cache, so only the new ones cost
    found: dict = {}
    first = min(FIRST, max(6, budget // max(len(chosen), 1)))
    for pass_budget in (first, None):
        open_ = [inp for inp in chosen if found.get(inp.name, UNSETTLED) == UNSETTLED]
        for k, inp in enumerate(open_):
            left = budget - (len(rechecks.done) - start)
            if pass_budget is None and left <= 0:
                break
            share = pass_budget or min(PER_INPUT, first + max(left // (len(open_) - k), 0))
            found[inp.name], _ = remedy_for(rechecks, inp, outcome.at, outcome.need, value, share, index)
    out = tuple(r for inp in chosen if (r := found.get(inp.name)) not in (None, UNSETTLED))
    return out, [inp.name for inp in chosen if found.get(inp.name, UNSETTLED) == UNSETTLED]


def attach(checker, doc, outcomes: list, findings: list, every: bool) -> list:
    """The findings, those of targets not met (with ``every``, of every target the path
    determines) carrying their remedies and the smallest of them in words."""
    met = sum(1 for o in outcomes if every and o.verdict != "not-met")
    rechecks = Rechecks(checker, doc, budget=min(DOCUMENT_BUDGET * (1 + met), REVIEW_BUDGET))
    findings = list(findings)
    # the targets not met first, the re-checks a document allows shared out evenly between them,
    # then (in a review) the met ones
    unmet = sum(1 for o in outcomes if o.verdict == "not-met" and o.finding is not None)
    share = min(BUDGET, max(PER_INPUT * 2, DOCUMENT_BUDGET // max(unmet, 1)))
    for o in sorted(outcomes, key=lambda o: o.verdict != "not-met"):
        if o.finding is None or o.verdict == "unknown" or not (every or o.verdict == "not-met"):
            continue
        found, cut = remedies_for(rechecks, o, share if o.verdict == "not-met" else BUDGET)
        f = findings[o.finding]
        findings[o.finding] = replace(f, remedies=found, message=f.message + words(checker.units, found, o, cut))
    return findings


# ------------------------------------------------------------------ wording

def change(r: Remedy) -> float:
    """How far the input has to move, as |ln| of a factor; met now: the margin to the nearer end
    where the target stops being met (inf where it has none)."""
    x, end = r.value, _end(r)
    return math.inf if not r.reachable or x is None or end is None else _distance(x, end)


def _end(r: Remedy) -> float | None:
    """The end of the remedy the input is measured against: the one it has to reach, or met now,
    the nearer one where the target stops being met (an end that only says what the input can be,
    a share at 1 or a pulse at its transform limit, is not one)."""
    x = r.value
    if x is None:
        return None
    # (an end where the input stops being what it can be is found to a bisection's width: a value
    # at that end, as a point at the sheet's maximum, is inside)
    if r.low is not None and x < r.low * (1 - (0.0 if r.binding[0] else 1e-3)):
        return r.low
    if r.high is not None and x > r.high * (1 + (0.0 if r.binding[1] else 1e-3)):
        return r.high
    ends = [e for e, b in zip((r.low, r.high), r.binding) if e is not None and b]
    return min(ends, key=lambda e: _distance(x, e), default=None)


def _distance(x: float, end: float) -> float:
    if x > 0 and end > 0:
        return abs(math.log(end / x))
    return math.log1p(abs(end - x) / max(abs(x), 1e-300))


def phrase(units, r: Remedy) -> str:
    from speccheck.checking.wording import show

    unit = r.display_unit or r.unit
    name = r.parameter.replace("_", " ")
    where = "at the laser" if r.column == "laser" else f"at {r.column!r}"

    x = r.value
    end = _end(r)
    # an end within 0.1 % of the value now is shown with the digits that tell them apart
    close = end is not None and x is not None and x != 0 and abs(end - x) < 1e-3 * abs(x)
    digits = 7 if close else 4

    def v(y):
        return show(units, y, unit, digits) if unit != "1" else format_number(y, digits)

    if r.low is None and r.high is None:
        return f"any {name} {where}"
    if r.low is not None and r.high is not None and r.low != r.high and not (r.high == 1.0 and unit == "%"):
        text = f"{name} {v(r.low)} … {v(r.high)}"
    elif r.low is not None and (r.high is None or unit == "%" or r.low == r.high):
        text = f"{name} ≥ {v(r.low)}" if r.low != r.high else f"{name} {v(r.low)}"
    else:
        text = f"{name} ≤ {v(r.high)}"
    signed = r.unit in overrides.SIGNED or r.unit == "rad"  # a factor says nothing of a signed number
    factor = f" (×{format_number(end / x, 6 if close else 3)})" if end and x and x > 0 and end > 0 and not signed \
        else f" (now {v(x)})"
    default = "" if r.stated else ", not stated"
    return f"{text} {where}{factor}{default}"


def words(units, found: tuple[Remedy, ...], outcome, cut=()) -> str:
    met = outcome.verdict == "met" or outcome.value is not None and outcome.need.low <= outcome.value \
        <= outcome.need.high
    # a remedy without an end where the target stops being met says nothing to do: met whatever the
    # input (within what it can be); met now, the nearest such end first; not met, the smallest move
    good = sorted((r for r in found if r.reachable and any(r.binding)), key=change)[:SHOWN]
    rest = f" (not settled within the re-checks allowed: {', '.join(cut)})" if cut else ""
    if not found:
        return (f" No remedy was settled within the re-checks allowed ({', '.join(cut)})." if cut else
                "" if met else " No single input of the spec changes it.")
    tried = ", ".join(r.input for r in found[:5]) + (", …" if len(found) > 5 else "")
    if not good and met:
        return f" It stays met over the whole range searched of each input tried ({tried}){rest}."
    if not good:
        return f" No value of a single input was found to meet it in the range searched (tried: {tried}){rest}."
    parts = [phrase(units, r) for r in good]
    lead = " It stays met with " if met else " Reach it with "
    return lead + (", or ".join([", ".join(parts[:-1]), parts[-1]]) if len(parts) > 1 else parts[0]) + rest + "."


# --------------------------------------------------------- what is missing

def determining(walk, column: str, quantity: str) -> str:
    """Which laser quantities would determine ``quantity`` at ``column``, found through the
    relation table: the quantities known there, those the laser states but a stage could not
    carry (a focus without a wavelength drops the beam size), and the candidate."""
    shape = walk.categorical.get("pulse_shape")
    profile = walk.categorical.get("beam_profile")
    ctx = walk.c.context(shape if shape in PULSE_SHAPES else DEFAULT_SHAPE,
                         profile if profile in BEAM_PROFILES else DEFAULT_PROFILE)
    net = network_for(NAMES, ctx)
    laser, end = walk.sheet.get("laser", {}), walk.sheet.get(column, {})

    def known(cells):
        return {q for q, c in cells.items() if q in net.index and (c.value is not None or c.low is not None)}

    at_laser, at_end = known(laser), known(end)
    base = at_end | {q for q in CARRIED if q in at_laser and q not in at_end}
    missing = [q for q in CARRIED if q not in at_laser]

    def determines(extra) -> bool:
        return net.index[quantity] in evaluate(net, {net.index[q]: 0.0 for q in base | set(extra)})

    singles = [q for q in missing if determines((q,))]
    if singles:
        return "stating " + " or ".join(f"laser.{q}" for q in singles) + " would determine it"
    pairs = [(a, b) for i, a in enumerate(missing) for b in missing[i + 1:] if determines((a, b))][:3]
    if pairs:
        return "stating " + " or ".join(f"both laser.{a} and laser.{b}" for a, b in pairs) + " would determine it"
    return "state the numbers it needs"
