"""The cells of a column of the sheet: each quantity stated, derived or in conflict, with its
interval and the unit it is shown in."""

from __future__ import annotations

import math
from speccheck.checking.engine import implied
from speccheck.checking.logspace import centre, exp
from speccheck.physics.quantities import BY_NAME
from speccheck.reading.units import choose_unit
from speccheck.reading.values import SI_RANGE
from speccheck.checking.wording import join
from speccheck.records.findings import Cell


def build(col) -> dict[str, Cell]:
    d = col.diagnosis
    names = col.net.names
    removed = set(d.removed)
    nominal = col.nominal(removed)
    # a value stated only by its bounds shows what the typical values give it, else the centre of its
    # narrowed interval, and the values derived from it follow from that one (so that one column
    # agrees with itself: a peak power is its energy over its duration)
    centres = {}
    for q, s in col.stated.items():
        i = col.net.index[q]
        if s.typical is None and i not in removed and q not in col.carried:
            value = _typical_of(nominal.get(i), *_narrowed(s, d.state, i))
            if value and i not in nominal:
                centres[i] = math.log(value)
    typical = col.nominal_with(removed, centres) if centres else nominal
    out: dict[str, Cell] = {}
    far: list = []  # derived values outside the range a stated value may have
    state_lo, state_hi, fixed, units, stated = d.state.lo, d.state.hi, col.fixed, col.c.units, col.stated
    inf = math.inf
    for i, q in enumerate(names):
        if q not in stated:  # derived (the branch most cells take, written out for speed)
            y_lo, y_hi = state_lo[i], state_hi[i]
            if not (y_lo > -inf or y_hi < inf) or i in fixed:
                continue
            low, high = exp(y_lo), exp(y_hi)
            if i in typical:
                value = min(max(exp(typical[i]) or inf, low or 0.0), high or inf)
                value = value if math.isfinite(value) else None
            else:
                value = centre(low, high)
            if value is None and low is None and high is None:
                far.append((q, None, y_lo, y_hi))  # beyond what a float holds: nothing to show, and said
                continue
            if value is not None and not SI_RANGE[0] <= value <= SI_RANGE[1]:
                far.append((q, value, y_lo, y_hi))
            quantity = BY_NAME[q]
            ref = value if value is not None else (low if low is not None else high)
            out[q] = Cell("derived", low, high, value, quantity.si_unit, choose_unit(units, ref, quantity.display_unit))
            continue
        quantity = BY_NAME[q]
        s = stated[q]
        low = s.low if s.low > 0.0 else None
        high = s.high if math.isfinite(s.high) else None
        value = s.typical if s.typical is not None else centre(low, high)
        if i in removed:
            state = d.state if d.suspects else implied(col.net, col.log_stated, i)
            ilo, ihi = (exp(state.lo[i]), exp(state.hi[i])) if state.ok else (None, None)
            out[q] = Cell("conflict", low, high, value, quantity.si_unit, s.unit, ilo, ihi,
                          text=s.text, overridden=col.overridden(q), inherited=col.from_laser(q))
        elif q in col.carried:  # shown in its display unit (``BlockCheck.unit_for`` of a carried value)
            unit = choose_unit(units, value, quantity.display_unit) if value else s.unit
            out[q] = Cell("derived", low, high, value, quantity.si_unit, unit)
        else:
            # what the rest of the spec implies narrows the stated interval ("<= 80 µJ" with
            # ">= 30 W" at 600 kHz is 50 … 80 µJ); the text as written stays in the cell
            low, high = _narrowed(s, d.state, i)
            if s.typical is None:
                value = _typical_of(nominal.get(i), low, high)
            out[q] = Cell("stated", low, high, value, quantity.si_unit, s.unit, text=s.text,
                          overridden=col.overridden(q), inherited=col.from_laser(q))
    derived_from = [col.net.index[c] for c in out]
    for q, value in col.defaults.items():
        if q not in out and d.state.uses_quantity(derived_from, col.net.index[q]):
            out[q] = Cell("derived", value, value, value, BY_NAME[q].si_unit, "1", assumed=True)
    if far:
        _far(col, far)
    return {q: out[q] for q in names if q in out}


def _narrowed(s, state, i: int) -> tuple:
    """A stated interval narrowed by what the rest of the column implies (None: open)."""
    low = s.low if s.low > 0.0 else None
    high = s.high if math.isfinite(s.high) else None
    n_low, n_high = exp(state.lo[i]), exp(state.hi[i])
    if n_low is not None and (low is None or n_low > low):
        low = n_low
    if n_high is not None and (high is None or n_high < high):
        high = n_high
    return low, high


def _typical_of(log_value, low, high):
    """The value the typical values give (ln), kept inside [low, high]; else the interval's centre."""
    if log_value is None:
        return centre(low, high)
    value = min(max(exp(log_value) or math.inf, low or 0.0), high or math.inf)
    return value if math.isfinite(value) else centre(low, high)


def _far(col, far: list) -> None:
    """Derived values outside the range a stated value may have (or beyond a float, left out of the
    sheet): one finding per column, where they first follow (not again at each column they are carried to)."""
    def outside(cell) -> bool:
        return cell.value is None or not SI_RANGE[0] <= cell.value <= SI_RANGE[1]

    new = [item for item in far if not (item[0] in col.before and outside(col.before[item[0]]))]
    if not new:
        return
    parts = []
    for q, value, y_lo, y_hi in new:
        if value is not None:
            parts.append(f"{q} {value:.4g} {BY_NAME[q].si_unit}")
        else:
            ends = [y for y in (y_lo, y_hi) if math.isfinite(y)]
            parts.append(f"{q} {'above about 1e308' if ends and ends[0] > 0 else 'below about 1e-308'} "
                         f"{BY_NAME[q].si_unit} (beyond what a float holds: left out of the sheet)")
    col.report.add("derived-out-of-range", f"{col.name}: the stated values give {join(parts)}, outside "
                   f"{SI_RANGE[0]:g} … {SI_RANGE[1]:g} in SI units, the range a stated value may have; the numbers "
                   "they come from are far outside an experiment's (a unit or exponent slip?)",
                   col.at(new[0][0]), quantities=tuple(col.dotted(q) for q, *_ in new))
