"""The engine's relation steps as generated straight-line code (``engine.propagate``, ``engine.evaluate``).

Each relation's narrowing step and its evaluation step are the engine's loops for that one
relation with its indices, exponents and the name of its ln K written in, the loops over its
terms unrolled: the same operations in the same order, so the numbers are bit for bit those of
``engine.reference_propagate`` and ``engine.reference_evaluate`` (tests/test_engine.py).  The code
is compiled once per relation table and bound to each context's ln K afterwards.
"""

from __future__ import annotations

import math

TIGHTEN = 1e-12  # smallest change in ln q worth propagating
EMPTY_BY = 1e-9  # lo > hi by more than this in ln q is a contradiction

# The generated steps cost about 15 ms to compile (once per process and relation table: the ln K of
# each context are bound afterwards) and save about 60 µs per propagation, so they are made after this
# many propagations of one network; before that the loop (``reference_propagate``) runs.  Both give
# the same numbers bit for bit, so which one ran never shows (DEVELOPERS.md, Speed).
GENERATE_AFTER = 200
_CODE: dict = {}  # the compiled steps by the table's structure (indices, exponents, touching)


def generated_steps(net) -> tuple:
    """The network's narrowing steps (returned) and evaluation steps (``net.generated[2]``), compiled
    once per relation table and bound to the network's ln K."""
    structure = (tuple(terms for _, terms, _ in net.relations), net.touching)
    code = _CODE.get(structure)
    if code is None:
        code = _CODE[structure] = _generate(net.solved, net.touching, tuple(t for _, t, _ in net.relations))
    namespace = {"NINF": -math.inf, "INF": math.inf, "isfinite": math.isfinite} | {
        f"K{r}": ln_k for r, (_, _, ln_k) in enumerate(net.relations)}
    exec(code, namespace)
    net.generated[2] = tuple(namespace[f"evaluate_{r}"] for r in range(len(net.relations)))
    return tuple(namespace[f"step_{r}"] for r in range(len(net.relations)))


def _generate(solved, touching, all_terms):
    """Each relation's narrowing step (``reference_propagate``'s inner loop for one relation) as a
    function of straight-line code: its indices, exponents and ln K written in, the loops over its
    terms unrolled, the same operations in the same order, so the numbers are bit for bit the same
    (``tests/test_engine.py`` compares the two on random networks); relation r's ln K is the global
    ``K<r>``, bound for each context.  A step returns None, -1 where it was skipped (two unknowns: it
    counts no steps), or the quantity whose interval became empty; it queues the relations of each
    quantity it narrowed.  Returns the compiled code, which defines ``step_<r>``."""
    source = []
    for r, (terms, per_unknown) in enumerate(zip(all_terms, solved)):
        out = [f"def step_{r}(lo, hi, lo_s, hi_s, lo_v, hi_v, queued, append):"]
        if len(terms) > 1:  # two or more quantities still wholly unknown: no bound on any of them
            unknown = " + ".join(f"(lo[{k}] == NINF and hi[{k}] == INF)" for k, _ in terms)
            out.append(f"    if {unknown} > 1:")
            out.append("        return -1")
        for j, ej, others in per_unknown:
            s_lo, s_hi, sup_lo, sup_hi, via_lo, via_hi = [], [], [], [], [], []
            for k, ek in others:
                if ek > 0:
                    s_lo.append(_times(ek, f"lo[{k}]"))
                    s_hi.append(_times(ek, f"hi[{k}]"))
                    sup_lo.append(f"lo_s[{k}]"), sup_hi.append(f"hi_s[{k}]")
                    via_lo.append(f"lo_v[{k}]"), via_hi.append(f"hi_v[{k}]")
                else:
                    s_lo.append(_times(ek, f"hi[{k}]"))
                    s_hi.append(_times(ek, f"lo[{k}]"))
                    sup_lo.append(f"hi_s[{k}]"), sup_hi.append(f"lo_s[{k}]")
                    via_lo.append(f"hi_v[{k}]"), via_hi.append(f"lo_v[{k}]")
            k_text = f"K{r}"
            lo_sum, hi_sum = _sum(s_lo), _sum(s_hi)
            if ej > 0:
                new_lo, new_hi = _over(f"{k_text} - ({hi_sum})", ej), _over(f"{k_text} - ({lo_sum})", ej)
                nlo_s, nhi_s, nlo_v, nhi_v = sup_hi, sup_lo, via_hi, via_lo
            else:
                new_lo, new_hi = _over(f"{k_text} - ({lo_sum})", ej), _over(f"{k_text} - ({hi_sum})", ej)
                nlo_s, nhi_s, nlo_v, nhi_v = sup_lo, sup_hi, via_lo, via_hi
            bit = 1 << r
            out += [f"    a = {new_lo}",
                    f"    b = {new_hi}",
                    "    changed = False",
                    f"    if a > lo[{j}] + {TIGHTEN!r}:",
                    f"        lo[{j}] = a",
                    f"        lo_s[{j}] = {_or(nlo_s)}",
                    f"        lo_v[{j}] = {_or(nlo_v)} | {bit}",
                    "        changed = True",
                    f"    if b < hi[{j}] - {TIGHTEN!r}:",
                    f"        hi[{j}] = b",
                    f"        hi_s[{j}] = {_or(nhi_s)}",
                    f"        hi_v[{j}] = {_or(nhi_v)} | {bit}",
                    "        changed = True",
                    "    if changed:",
                    f"        if lo[{j}] > hi[{j}] + {EMPTY_BY!r}:",
                    f"            return {j}"]
            out += [f"        for o in {touching[j]!r}:",
                    "            if not queued[o]:",
                    "                queued[o] = True",
                    "                append(o)"]
        out.append("    return None")
        source.append("\n".join(out))
        source.append(_evaluation_step(r, terms, touching))
    return compile("\n\n".join(source), "<relation table>", "exec")


def _evaluation_step(r: int, terms, touching) -> str:
    """``reference_evaluate``'s work on relation r as straight-line code: with exactly one of its
    quantities unknown, that one is solved for (the others' sum from 0.0, in the terms' order)."""
    out = [f"def evaluate_{r}(values, queued, append):"]
    missing = " + ".join(f"({j} not in values)" for j, _ in terms)
    out += [f"    if {missing} != 1:", "        return"]
    for n, (j, ej) in enumerate(terms):
        rest = " + ".join(["0.0"] + [_times(ek, f"values[{k}]") for k, ek in terms if k != j])
        out += [f"    {'if' if n == 0 else 'elif'} {j} not in values:",
                f"        rest = {rest}",
                "        if isfinite(rest):",
                f"            values[{j}] = {_over(f'K{r} - rest', ej)}",
                f"            for o in {touching[j]!r}:",
                "                if not queued[o]:",
                "                    queued[o] = True",
                "                    append(o)"]
    return "\n".join(out)


def _times(e: float, term: str) -> str:
    """e·term; multiplying by 1 or -1 is exact, so it is written as the term or its negative."""
    return term if e == 1.0 else f"(-{term})" if e == -1.0 else f"{e!r} * {term}"


def _sum(parts: list) -> str:
    """The sum left to right, as the loop adds from 0.0 (0.0 + x is x, and -0.0 only ever meets ln K - …)."""
    return " + ".join(parts) if parts else "0.0"


def _over(expression: str, e: float) -> str:
    return f"({expression})" if e == 1.0 else f"-({expression})" if e == -1.0 else f"({expression}) / {e!r}"


def _or(parts: list) -> str:
    return " | ".join(parts) if parts else "0"
