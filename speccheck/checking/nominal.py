"""Typical values must agree: a maker claims its typical numbers together.

The intervals of a column may agree only because each value's tolerance stretches far
enough; the nominal values (the ``typical`` of ``{min, typical, max}``, or the plain
number of ``25 nJ``; a bound has none) are checked against each other as well:

* every relation whose terms all have a nominal value, one of them stated in this column,
  must hold within the margin (``defaults: {nominal_margin: 1%}``, 1 % by default);
* every limit on a single quantity must hold for the nominal value computed from them;
* a value stated only as a bound must contain the nominal value the others imply.

Each is a warning that names the numbers; it is reported only where the intervals agree
(a conflict says more).
"""

from __future__ import annotations

import math

from speccheck.checking.logspace import exp
from speccheck.checking.wording import join
from speccheck.physics.limits import LIMITS
from speccheck.physics.quantities import DEFAULTS

DEFAULT_MARGIN = 0.01


def _nominals(col) -> dict[int, float]:
    """ln of every nominal value the column has: stated typical values and defaults."""
    idx = col.net.index
    known = {idx[q]: math.log(s.typical) for q, s in col.stated.items()
             if s.typical is not None and s.typical > 0.0 and s.low < s.high * (1 - 1e-12)}
    known |= {idx[q]: math.log(v) for q, v in col.defaults.items()}
    return known


def report(col, margin: float = DEFAULT_MARGIN) -> None:
    if not col.diagnosis.consistent:
        return
    own = {col.net.index[q] for q in col.stated if q not in col.carried and q not in col.measured}
    if not own:
        return
    # the typical values stated, and every number they determine (w from D, P_pk from E and τ), so a
    # relation that needs a derived number is checked as well
    known = dict(col.nominal())
    known.update(_nominals(col))
    names = col.net.names
    reported: set[int] = set()
    tolerance = math.log1p(margin)
    relations = col.net.relations
    for r in sorted({r for i in own for r in col.net.touching[i]}):  # the relations a stated value is in
        rel, terms, ln_k = relations[r]
        if not all(i in known for i, _ in terms):
            continue
        if rel.id == "time-bandwidth-product":
            continue  # the product against the transform limit is a limit (``_limits``), said in its terms
        residual = sum(e * known[i] for i, e in terms) - ln_k
        if abs(residual) <= tolerance * max(abs(e) for _, e in terms):
            continue
        # the least well known of the column's own values takes the blame in the message
        q_i, q_e = max(((i, e) for i, e in terms if i in own), key=lambda t: col.tolerance_of(names[t[0]]))
        if q_i in reported:
            continue
        reported.add(q_i)
        q = names[q_i]
        implied = exp(known[q_i] - residual / q_e)
        stated = col.stated[q]
        others = [f"{col.keys.get(names[i], names[i])} {col.stated[names[i]].text}" if names[i] in col.stated
                  else f"{names[i]} {col.show(names[i], exp(known[i]))} (from the stated values)"
                  for i, _ in terms if i != q_i and names[i] not in DEFAULTS]
        col.report.add(
            "typical-values-disagree",
            f"{col.name}.{q} agrees with the rest only at the edges of the tolerances: with the stated "
            f"{join(others)}, {rel.formula.split('  (')[0]} gives {col.show(q, implied, stated.unit)}, not the "
            f"stated {stated.text} ({(stated.typical / implied - 1) * 100:+.2g}%)",
            col.at(q), quantities=[col.dotted(q)] + [col.dotted(names[i]) for i, _ in terms if i != q_i],
            related=[col.at(names[i]) for i, _ in terms if names[i] in col.stated])
    _limits(col, _nominals(col), margin)
    _bounds(col, known, margin)


def _limits(col, known: dict, margin: float) -> None:
    values = col.nominal()
    for limit in LIMITS:
        i = col.net.index[limit.quantity]
        if i not in values or i in known and limit.quantity not in col.stated:
            continue
        value = exp(values[i])
        if value is None:
            continue
        bound = limit.bound(col.context)
        if bound is None:
            continue
        beyond = value < bound * (1 - margin) if limit.side == "min" else value >= bound * (1 + margin)
        if not beyond:
            continue
        state = col.diagnosis.state
        low, high = exp(state.lo[i]), exp(state.hi[i])
        if limit.violated(low or 0.0, high if high is not None else math.inf, col.context):
            continue  # the interval is beyond the limit too: the limit's own finding says so
        q = limit.quantity
        support = col.diagnosis.state.support(i) - {col.net.index[d] for d in DEFAULTS}
        own = [col.net.names[k] for k in support if col.net.names[k] in col.stated
               and col.net.names[k] not in col.carried]
        if not own:
            continue
        if q not in col.stated and all(col.stated[n].typical is None for n in own):
            continue
        where = q if q in col.stated else col.nearest(own, q)
        col.report.add(
            "typical-values-disagree",
            f"{col.name}: the typical values agree only at the edges of the tolerances: with the stated "
            f"{join(f'{col.keys.get(n, n)} {col.stated[n].text}' for n in sorted(own))}, {q} is "
            f"{col.show(q, value)}, {'below' if limit.side == 'min' else 'above'} "
            f"{limit.what.format(shape=col.context.shape.name)} ({col.show(q, bound)}): {limit.consequence}",
            col.at(where), quantities=[col.dotted(q)] + [col.dotted(n) for n in sorted(own)],
            related=[col.at(n) for n in own])


def _bounds(col, known: dict, margin: float) -> None:
    """A value stated only as a bound must hold the nominal value the others imply."""
    for q, s in col.stated.items():
        if s.typical is not None or q in col.carried:
            continue
        i = col.net.index[q]
        implied = col.nominal(exclude=(i,)).get(i)
        value = exp(implied) if implied is not None else None
        if value is None:
            continue
        if s.low > 0 and value < s.low * (1 - margin):
            side = f"below its stated bound {s.text}"
        elif math.isfinite(s.high) and value > s.high * (1 + margin):
            side = f"above its stated bound {s.text}"
        else:
            continue
        col.report.add(
            "typical-values-disagree",
            f"{col.name}.{q}: the typical values of the rest give {col.show(q, value, s.unit)}, {side}; the "
            "bound holds only at the edges of their tolerances",
            col.at(q), quantities=[col.dotted(q)])
