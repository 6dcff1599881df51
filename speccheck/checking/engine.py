"""The generic engine: interval propagation over the relation table in log space.

Every relation Π q_i^e_i = K is the linear equation Σ e_i y_i = ln K in the
logarithms y_i = ln q_i.  Each stated value is an interval of y; propagation
narrows every quantity's interval with every relation until nothing changes
(a fixed point).  The result is the derived interval of every quantity, or a
proof of contradiction: an empty interval, together with the set of stated
values it came from (each bound carries its *support*: the stated values and
relations it was computed from).

``diagnose`` then looks for the smallest set of stated values whose removal
makes the rest consistent: each single value of the conflict, then pairs.
The engine knows no physics; ``relations.py`` supplies it all.
"""

from __future__ import annotations

import math
from collections import deque
from dataclasses import dataclass, field
from functools import lru_cache

from speccheck.checking.engine_code import EMPTY_BY as _EMPTY, GENERATE_AFTER, TIGHTEN as _TIGHTEN, generated_steps
from speccheck.physics.relations import RELATIONS, Context, Relation

_MAX_STEPS = 20_000

EMPTY: frozenset = frozenset()


@dataclass(frozen=True)
class Network:
    """The relation table compiled for one context: integer indices, ln K as floats."""

    names: tuple[str, ...]
    index: dict
    relations: tuple[tuple[Relation, tuple[tuple[int, float], ...], float], ...]
    touching: tuple[tuple[int, ...], ...]  # var -> relations it takes part in
    # per relation, per unknown j: (j, e_j, ((k, e_k) for the other terms))
    solved: tuple = ()
    in_relations: tuple = ()  # var -> bit mask of the relations it takes part in
    # per relation, its narrowing step and its evaluation step as straight-line code (``_generate``),
    # made once the network has been used often enough to repay compiling them:
    # [uses, narrowing steps or None, evaluation steps or None]
    generated: list = field(default_factory=lambda: [0, None, None], compare=False, repr=False)


def compile_network(names: tuple[str, ...], context: Context,
                    relations: tuple[Relation, ...] = RELATIONS) -> Network:
    index = {n: i for i, n in enumerate(names)}
    compiled = []
    for rel in relations:
        terms = tuple((index[q], float(e)) for q, e in rel.terms)
        compiled.append((rel, terms, math.log(rel.constant(context))))
    touching = [[] for _ in names]
    for r, (_, terms, _) in enumerate(compiled):
        for i, _ in terms:
            touching[i].append(r)
    solved = tuple(tuple((j, ej, tuple((k, ek) for k, ek in terms if k != j)) for j, ej in terms)
                   for _, terms, _ in compiled)
    in_relations = tuple(sum(1 << r for r in t) for t in touching)
    touching = tuple(tuple(t) for t in touching)
    return Network(tuple(names), index, tuple(compiled), touching, solved, in_relations)


def _members(mask: int) -> frozenset:
    """The set bits of an integer, as a frozenset of indices."""
    out = []
    i = 0
    while mask:
        if mask & 1:
            out.append(i)
        mask >>= 1
        i += 1
    return frozenset(out)


@dataclass
class State:
    """Intervals of ln q after propagation, each bound with its support.

    Supports are bit masks inside (bit i: stated var i; for ``via``, bit r: relation r), which
    keeps the inner loop on plain integers; the accessors return frozensets."""

    net: Network
    lo: list
    hi: list
    lo_support: list  # bit mask of stated var indices
    hi_support: list
    lo_via: list  # bit mask of relation indices
    hi_via: list
    conflict: tuple | None = None  # (var, support, via) when an interval became empty

    @property
    def ok(self) -> bool:
        return self.conflict is None

    def support(self, i: int) -> frozenset:
        return _members(self.lo_support[i] | self.hi_support[i])

    def via(self, i: int) -> frozenset:
        return frozenset(self.net.relations[r][0].id for r in _members(self.lo_via[i] | self.hi_via[i]))

    def uses_quantity(self, indices, var: int) -> bool:
        """Whether any of these quantities was derived through a relation that involves ``var``."""
        mask = 0
        for i in indices:
            mask |= self.lo_via[i] | self.hi_via[i]
        return bool(mask & self.net.in_relations[var])

    def known(self, i: int) -> bool:
        return self.lo[i] > -math.inf or self.hi[i] < math.inf


def _start(net: Network, stated: dict) -> State:
    """The intervals before propagation: each stated value with itself as its support, the rest open."""
    n = len(net.names)
    inf = math.inf
    lo, hi = [-inf] * n, [inf] * n
    lo_s, hi_s = [0] * n, [0] * n
    for i, (a, b) in stated.items():
        lo[i], hi[i] = a, b
        lo_s[i] = hi_s[i] = 1 << i
    return State(net, lo, hi, lo_s, hi_s, [0] * n, [0] * n)


def propagate(net: Network, stated: dict) -> State:
    """``stated``: var index -> (ln low, ln high).  Returns the fixed point (each relation's step as
    generated code, ``engine_code``; the same as ``reference_propagate``, bit for bit)."""
    generated = net.generated
    steps_of = generated[1]
    if steps_of is None:
        generated[0] += 1
        if generated[0] < GENERATE_AFTER:
            return reference_propagate(net, stated)
        steps_of = generated[1] = generated_steps(net)
    state = _start(net, stated)
    lo, hi, lo_s, hi_s, lo_v, hi_v = state.lo, state.hi, state.lo_support, state.hi_support, state.lo_via, state.hi_via
    sizes = [len(terms) for _, terms, _ in net.relations]
    queue = deque(range(len(steps_of)))
    append, popleft = queue.append, queue.popleft
    queued = [True] * len(steps_of)
    steps = 0
    while queue and steps < _MAX_STEPS:
        r = popleft()
        queued[r] = False
        empty = steps_of[r](lo, hi, lo_s, hi_s, lo_v, hi_v, queued, append)
        if empty is None:
            steps += sizes[r]
        elif empty >= 0:
            state.conflict = (empty, _members(lo_s[empty] | hi_s[empty]), lo_v[empty] | hi_v[empty])
            return state
    return state


def reference_propagate(net: Network, stated: dict) -> State:
    """``propagate`` as a loop over the compiled terms: the reference the generated steps are tested
    against (and the plainest statement of what a step does)."""
    state = _start(net, stated)
    lo, hi, lo_s, hi_s, lo_v, hi_v = state.lo, state.hi, state.lo_support, state.hi_support, state.lo_via, state.hi_via
    inf = math.inf
    relations = net.relations
    touching = net.touching
    solved = net.solved
    queue = deque(range(len(relations)))
    queued = [True] * len(relations)
    steps = 0
    while queue and steps < _MAX_STEPS:
        r = queue.popleft()
        queued[r] = False
        ln_k = relations[r][2]
        bit = 1 << r
        # A relation with two or more quantities still wholly unknown cannot bound any of them.
        unknown = 0
        for k, _ in relations[r][1]:
            if lo[k] == -inf and hi[k] == inf:
                unknown += 1
        if unknown > 1:
            continue
        for j, ej, others in solved[r]:
            steps += 1
            # Σ_{k≠j} e_k y_k as an interval [s_lo, s_hi], with the supports of each end.
            s_lo = s_hi = 0.0
            sup_lo = sup_hi = via_lo = via_hi = 0
            for k, ek in others:
                if ek > 0:
                    s_lo += ek * lo[k]
                    s_hi += ek * hi[k]
                    sup_lo |= lo_s[k]
                    sup_hi |= hi_s[k]
                    via_lo |= lo_v[k]
                    via_hi |= hi_v[k]
                else:
                    s_lo += ek * hi[k]
                    s_hi += ek * lo[k]
                    sup_lo |= hi_s[k]
                    sup_hi |= lo_s[k]
                    via_lo |= hi_v[k]
                    via_hi |= lo_v[k]
            if ej > 0:
                new_lo, new_hi = (ln_k - s_hi) / ej, (ln_k - s_lo) / ej
                nlo_s, nhi_s, nlo_v, nhi_v = sup_hi, sup_lo, via_hi, via_lo
            else:
                new_lo, new_hi = (ln_k - s_lo) / ej, (ln_k - s_hi) / ej
                nlo_s, nhi_s, nlo_v, nhi_v = sup_lo, sup_hi, via_lo, via_hi
            changed = False
            if new_lo > lo[j] + _TIGHTEN:
                lo[j], lo_s[j], lo_v[j] = new_lo, nlo_s, nlo_v | bit
                changed = True
            if new_hi < hi[j] - _TIGHTEN:
                hi[j], hi_s[j], hi_v[j] = new_hi, nhi_s, nhi_v | bit
                changed = True
            if changed:
                if lo[j] > hi[j] + _EMPTY:
                    state.conflict = (j, _members(lo_s[j] | hi_s[j]), lo_v[j] | hi_v[j])
                    return state
                for other in touching[j]:
                    if not queued[other]:
                        queued[other] = True
                        queue.append(other)
    return state


@dataclass(frozen=True)
class Diagnosis:
    state: State  # propagation with the removed values left out
    removed: tuple[int, ...]  # stated values left out: suspects, or candidates, or the conflict
    suspects: tuple[int, ...]  # values that alone (or as the one pair) explain every conflict
    candidates: tuple[int, ...]  # when ambiguous: each of these alone would explain it
    conflict: frozenset  # the stated values of the first contradiction found (empty if none)

    @property
    def consistent(self) -> bool:
        return not self.conflict


def diagnose(net: Network, stated: dict, fixed: frozenset = EMPTY) -> Diagnosis:
    """Propagate; on contradiction find which stated values explain it.

    ``fixed`` are stated vars that are never suspected (defaults, not the user's).
    """
    full = propagate(net, stated)
    if full.ok:
        return Diagnosis(full, (), (), (), EMPTY)
    conflict = full.conflict[1]
    removable = sorted(conflict - fixed)
    if not removable:
        return Diagnosis(full, (), (), (), conflict)

    def without(drop) -> State:
        return propagate(net, {i: v for i, v in stated.items() if i not in drop})

    singles = []
    rests = {}
    for i in removable:
        rest = without((i,))
        rests[i] = rest
        if rest.ok:
            singles.append(i)
    if len(singles) == 1:
        return Diagnosis(rests[singles[0]], tuple(singles), tuple(singles), (), conflict)
    if singles:
        return Diagnosis(without(singles), tuple(singles), (), tuple(singles), conflict)
    pairs = set()
    for a in removable:
        second = rests[a].conflict[1] - fixed - {a}
        for b in sorted(second):
            pair = tuple(sorted((a, b)))
            if pair not in pairs and without(pair).ok:
                pairs.add(pair)
    if len(pairs) == 1:
        pair = next(iter(pairs))
        return Diagnosis(without(pair), pair, pair, (), conflict)
    if pairs:
        members = tuple(sorted({i for p in pairs for i in p}))
        return Diagnosis(without(members), members, (), members, conflict)
    members = tuple(removable)
    return Diagnosis(without(members), members, (), members, conflict)


def implied(net: Network, stated: dict, var: int) -> State:
    """Propagation of every stated value except ``var``: what the rest implies for it."""
    return propagate(net, {i: v for i, v in stated.items() if i != var})


@lru_cache(maxsize=64)
def network_for(names: tuple[str, ...], context: Context) -> Network:
    return compile_network(names, context)


def evaluate(net: Network, known: dict) -> dict:
    """Spreadsheet-style point values: solve every relation with one unknown left.

    ``known``: var index -> ln value.  Where values are over-determined the first
    relation to reach a quantity wins; intervals (``propagate``) decide consistency,
    this only gives the nominal number to show for each derived cell.  Each relation's step is
    generated code once the network has been used often (``propagate`` makes them), the same as
    ``reference_evaluate`` bit for bit.
    """
    steps = net.generated[2]
    if steps is None:
        return reference_evaluate(net, known)
    values = dict(known)
    queue = deque(range(len(steps)))
    append, popleft = queue.append, queue.popleft
    queued = [True] * len(steps)
    while queue:
        r = popleft()
        queued[r] = False
        steps[r](values, queued, append)
    return values


def reference_evaluate(net: Network, known: dict) -> dict:
    """``evaluate`` as a loop over the compiled terms (the reference its generated steps are tested
    against); the others' sum is taken from 0.0 left to right, as the generated code does."""
    values = dict(known)
    queue = deque(range(len(net.relations)))
    queued = [True] * len(net.relations)
    while queue:
        r = queue.popleft()
        queued[r] = False
        _, terms, ln_k = net.relations[r]
        unknown = None
        for j, ej in terms:
            if j not in values:
                if unknown is not None:
                    break
                unknown = (j, ej)
        else:
            if unknown is None:
                continue
            j, ej = unknown
            rest = 0.0
            for k, e in terms:
                if k != j:
                    rest = rest + e * values[k]
            if math.isfinite(rest):
                values[j] = (ln_k - rest) / ej
                for other in net.touching[j]:
                    if not queued[other]:
                        queued[other] = True
                        queue.append(other)
    return values
