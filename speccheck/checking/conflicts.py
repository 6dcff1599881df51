"""Conflicts of a column and their diagnosis: the suspect, what the rest of the spec implies
for it, the ratio between the two and the catalogued mistake that ratio matches."""

from __future__ import annotations

import math
from speccheck.checking.engine import Diagnosis, State, implied
from speccheck.checking.logspace import centre, exp, ln
from speccheck.checking.wording import format_ratio, join
from speccheck.physics.mistakes import likely_causes
from speccheck.physics.relations import BY_ID


def describe_via(col, via) -> str:
    text = "; ".join(BY_ID[r].formula.split("  (")[0] for r in sorted(via))
    assumed = sorted({k for r in via for k in BY_ID[r].uses if k not in col.block})
    if assumed:
        text += ", assuming a " + " and a ".join(
            f"{col.context.shape.name if k == 'pulse_shape' else col.context.profile.name} "
            f"{k.replace('_', ' ')}" for k in assumed)
    return text


def implied_text(col, var: int, state: State, exclude=()) -> tuple[str, float | None]:
    q = col.net.names[var]
    low, high = exp(state.lo[var]), exp(state.hi[var])
    point = col.nominal(exclude or (var,)).get(var)
    value = None
    if point is not None and low is not None and high is not None:
        value = min(max(exp(point) or high, low), high)
    return col.show_interval(q, low, high, value), value if value is not None else centre(low, high)


def ratio_text(col, quantity: str, implied_centre: float | None) -> str:
    s = col.stated[quantity]
    mine = s.typical if s.typical is not None else centre(exp(ln(s.low)), exp(ln(s.high)))
    if not mine or not implied_centre:
        return ""
    r = mine / implied_centre
    if not (r > 0 and math.isfinite(r) and math.isfinite(1 / r)):
        return ""
    return f" The stated value is {format_ratio(r)} the implied one."


def likely(col, var: int, state: State) -> list:
    """Catalogue mistakes that explain the ratio of stated to implied (best first)."""
    q = col.net.names[var]
    s = col.stated[q]
    value = s.typical if s.typical is not None else (s.low if s.low > 0 else s.high)
    i_lo, i_hi = exp(state.lo[var]), exp(state.hi[var])
    if not value or not math.isfinite(value) or i_lo is None or i_hi is None:
        return []
    point = col.nominal((var,)).get(var)
    implied_value = exp(point) if point is not None else None
    if s.typical is not None and implied_value:
        # Nominal against nominal, spread by the tolerances of the values involved added in
        # quadrature (independent errors): a ratio of 1.30 is not a factor of 1.41 because the
        # worst cases of four tolerances happen to reach it.
        support = [col.net.names[i] for i in state.support(var)] + [q]
        spread = math.sqrt(sum(col.tolerance_of(n) ** 2 for n in support if n in col.stated
                               and col.stated[n].typical is not None))
        r = s.typical / implied_value
        return likely_causes(q, r / (1 + spread), r * (1 + spread), col.context)
    s_lo = s.low if s.low > 0 else value
    s_hi = s.high if math.isfinite(s.high) else value
    return likely_causes(q, s_lo / i_hi, s_hi / i_lo, col.context)


def cause_text(causes) -> str:
    if not causes:
        return ""
    text = f" Likely cause: {causes[0][1]}"
    if len(causes) > 1:
        text += f" (or {causes[1][1]})"
    return text + "."


def report(col) -> None:
    d: Diagnosis = col.diagnosis
    if d.consistent:
        return
    names = col.net.names
    involved = sorted({names[i] for i in d.conflict} | {names[i] for i in d.removed})
    dotted = [col.dotted(q) for q in involved if q in col.stated]
    if d.suspects:
        for s in d.suspects:
            q = names[s]
            text, centre = implied_text(col, s, d.state, d.removed)
            support = d.state.support(s)
            via = d.state.via(s)
            causes = likely(col, s, d.state)
            col.report.add(
                "relation-conflict",
                f"{col.name}.{q} is stated as {col.stated[q].text}, but the rest of the spec "
                f"({col.describe_support(support)}) implies {text}, via {describe_via(col, via)}."
                + ratio_text(col, q, centre) + cause_text(causes),
                col.at(q), quantities=[col.dotted(q)] + [col.dotted(names[i]) for i in sorted(support)
                                                          if names[i] in col.stated],
                suspect=col.dotted(q), cause=causes[0][0].id if causes else None,
                related=[col.at(names[i]) for i in support if names[i] in col.stated])
        return
    if not d.candidates:  # only defaults conflict: nothing the user stated can be blamed
        return
    first = col.first_in_file([names[i] for i in d.candidates])
    lines, explained = [], []
    for c in sorted(d.candidates, key=lambda c: col.report.doc.where(col.at(names[c]))):
        rest = implied(col.net, col.log_stated, c)
        if rest.ok:
            text, point = implied_text(col, c, rest)
            causes = likely(col, c, rest)
            why = f"; perhaps {causes[0][1]}" if causes else ""
            lines.append(f"{names[c]} (the rest implies {text}{why})")
            if causes:
                explained.append((c, rest, text, point, causes))
        else:
            lines.append(names[c])
    full = via_of_candidates(col, d)
    if len(explained) == 1:  # one candidate, and only one, matches a catalogued mistake: the likely suspect
        c, rest, text, point, causes = explained[0]
        q = names[c]
        others = [line for line in lines if not line.startswith(f"{q} ")]
        col.report.add(
            "relation-conflict",
            f"{col.name}.{q} is likely the wrong one: it is stated as {col.stated[q].text}, but the rest of "
            f"the spec ({col.describe_support(rest.support(c))}) implies {text}, via "
            f"{describe_via(col, rest.via(c))}." + ratio_text(col, q, point) + cause_text(causes)
            + f" Each of the others could also explain the conflict, with no catalogued mistake: {join(others)}.",
            col.at(q), quantities=dotted, suspect=col.dotted(q),
            candidates=[col.dotted(names[k]) for k in d.candidates], cause=causes[0][0].id, likely=True,
            related=[col.at(n) for n in involved if n in col.stated])
        return
    col.report.add(
        "relation-conflict",
        f"{col.name}: these stated values cannot all be true: {col.describe_support(d.conflict)}"
        f"{' (via ' + describe_via(col, full) + ')' if full else ''}. "
        f"Any one of them could be the wrong one: {join(lines)}; state more numbers to tell them apart.",
        col.at(first), quantities=dotted, candidates=[col.dotted(names[c]) for c in d.candidates],
        related=[col.at(n) for n in involved if n in col.stated])


def via_of_candidates(col, d: Diagnosis) -> frozenset:
    via = frozenset()
    for c in d.candidates:
        rest = implied(col.net, col.log_stated, c)
        if rest.ok:
            via |= rest.via(c)
    return via
