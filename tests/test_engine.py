"""The generic engine on toy relation tables: no physics, just the algebra."""

import math

import pytest

from speccheck.checking.engine import compile_network, diagnose, evaluate, propagate
from speccheck.physics.relations import Relation
from speccheck.physics.shapes import BEAM_PROFILES, PULSE_SHAPES
from speccheck.physics.relations import Context

CTX = Context(1.0, 1.0, 1.0, PULSE_SHAPES["gaussian"], BEAM_PROFILES["gaussian"])
NAMES = ("pulse_energy", "average_power", "repetition_rate", "pulse_duration", "peak_power")
# E · f / P = 1 and P_pk · τ / E = 1 (toy constant 1)
TOY = (
    Relation("energy", "E = P / f", (("pulse_energy", 1), ("repetition_rate", 1), ("average_power", -1)),
             lambda x: 1.0, "toy"),
    Relation("peak", "P_pk = E / τ", (("peak_power", 1), ("pulse_duration", 1), ("pulse_energy", -1)),
             lambda x: 1.0, "toy"),
)
NET = compile_network(NAMES, CTX, TOY)
E, P, F, T, PK = range(5)


def point(x, rel=0.0):
    return (math.log(x * (1 - rel)), math.log(x * (1 + rel)))


def test_propagation_derives_the_missing_quantities_as_intervals():
    state = propagate(NET, {P: point(2.0, 0.05), F: point(4.0, 0.05), T: point(0.5)})
    assert state.ok
    assert math.exp(state.lo[E]) == pytest.approx(2 * 0.95 / (4 * 1.05))
    assert math.exp(state.hi[E]) == pytest.approx(2 * 1.05 / (4 * 0.95))
    assert math.exp(state.lo[PK]) == pytest.approx(2 * 0.95 / (4 * 1.05) / 0.5)
    assert state.support(PK) == {P, F, T}
    assert state.via(PK) == {"energy", "peak"}


def test_an_unbounded_side_stays_unbounded():
    state = propagate(NET, {P: (math.log(2.0), math.inf), F: point(4.0)})
    assert math.exp(state.lo[E]) == pytest.approx(0.5) and state.hi[E] == math.inf


def test_a_contradiction_is_an_empty_interval_with_its_support():
    state = propagate(NET, {P: point(2.0, 0.01), F: point(4.0, 0.01), E: point(5.0, 0.01)})
    assert not state.ok
    assert state.conflict[1] == {P, F, E}


def test_one_value_that_explains_every_conflict_is_the_suspect():
    # E is checked twice: by P/f and by P_pk·τ; only removing E makes both agree.
    stated = {P: point(2.0, 0.01), F: point(4.0, 0.01), E: point(500.0, 0.01), T: point(0.5, 0.01),
              PK: point(1.0, 0.01)}
    d = diagnose(NET, stated)
    assert d.suspects == (E,) and d.candidates == ()
    assert math.exp(d.state.lo[E]) == pytest.approx(0.5, rel=0.03)


def test_values_that_each_could_explain_it_are_candidates():
    d = diagnose(NET, {P: point(2.0, 0.01), F: point(4.0, 0.01), E: point(5.0, 0.01)})
    assert d.suspects == () and set(d.candidates) == {P, F, E}


def test_two_independent_mistakes_are_found_as_a_pair():
    # P/f/E consistent pair broken in both relations by two separate values.
    names = NAMES + ("duty_cycle",)
    toy = TOY + (Relation("duty", "D = τ f", (("duty_cycle", 1), ("pulse_duration", -1),
                                                ("repetition_rate", -1)), lambda x: 1.0, "toy"),)
    net = compile_network(names, CTX, toy)
    d_index = 5
    stated = {P: point(2.0, 0.01), F: point(4.0, 0.01), E: point(0.5, 0.01), T: point(0.5, 0.01),
              PK: point(1.0, 0.01), d_index: point(2.0, 0.01)}
    assert diagnose(net, stated).consistent
    stated[E] = point(50.0, 0.01)  # wrong, but checked twice (P/f, PK·τ)
    stated[d_index] = point(20.0, 0.01)  # wrong, checked by τ·f
    d = diagnose(net, stated)
    assert set(d.suspects) == {E, d_index}


def test_fixed_values_are_never_suspected():
    d = diagnose(NET, {P: point(2.0), F: point(4.0), E: point(5.0)}, fixed=frozenset({P, F}))
    assert d.suspects == (E,)


def test_evaluate_fills_cells_like_a_spreadsheet():
    values = evaluate(NET, {P: math.log(2.0), F: math.log(4.0), T: math.log(0.5)})
    assert math.exp(values[E]) == pytest.approx(0.5) and math.exp(values[PK]) == pytest.approx(1.0)


# ------------------------------------------------- the generated steps against the loop
def _random_stated(rng, n):
    stated = {}
    for i in rng.sample(range(n), rng.randint(1, min(n, 12))):
        c, w, kind = rng.uniform(-40, 40), rng.choice([0.0, 1e-13, 0.01, 0.1, 2.0]), rng.random()
        stated[i] = (c - w, c + w) if kind < 0.8 else (c, math.inf) if kind < 0.9 else (-math.inf, c)
    return stated


def _same_state(a, b):
    return (a.lo, a.hi, a.lo_support, a.hi_support, a.lo_via, a.hi_via, a.conflict) == \
        (b.lo, b.hi, b.lo_support, b.hi_support, b.lo_via, b.hi_via, b.conflict)


def _generated(net):
    from speccheck.checking import engine_code

    net.generated[1] = engine_code.generated_steps(net)
    return net


def test_the_generated_steps_give_the_loops_numbers_bit_for_bit_on_the_relation_table():
    # the real table in every pulse shape and beam profile, with random stated intervals (about half
    # of them contradictions): intervals, supports, relations used and the conflict all identical
    import random

    from speccheck.checking.column import NAMES as COLUMN_NAMES
    from speccheck.checking.engine import reference_evaluate, reference_propagate
    from speccheck.physics.relations import RELATIONS

    rng = random.Random(7)
    conflicts = 0
    for shape in PULSE_SHAPES:
        for profile in BEAM_PROFILES:
            ctx = Context(299792458.0, 6.62607015e-34, 8.8541878128e-12, PULSE_SHAPES[shape], BEAM_PROFILES[profile])
            net = _generated(compile_network(COLUMN_NAMES, ctx, RELATIONS))
            for _ in range(150):
                stated = _random_stated(rng, len(COLUMN_NAMES))
                fast, slow = propagate(net, stated), reference_propagate(net, stated)
                assert _same_state(fast, slow)
                conflicts += not slow.ok
                known = {i: lo for i, (lo, hi) in stated.items() if math.isfinite(lo)}
                # the point values too, in the same order (the first relation to reach a quantity wins)
                assert list(evaluate(net, known).items()) == list(reference_evaluate(net, known).items())
    assert conflicts > 100  # both outcomes were exercised


def test_the_generated_steps_agree_on_random_tables_with_any_exponents():
    import random

    from speccheck.checking.engine import reference_propagate

    from speccheck.checking.column import NAMES as COLUMN_NAMES
    from speccheck.checking.engine import reference_evaluate

    rng = random.Random(11)
    names = COLUMN_NAMES[:9]
    for _ in range(40):
        relations = []
        for r in range(rng.randint(1, 8)):
            chosen = rng.sample(names, rng.randint(2, 4))
            terms = tuple((q, rng.choice([1, -1, 2, -2, 0.5, -0.5, 3])) for q in chosen)
            k = rng.uniform(0.1, 10.0)
            relations.append(Relation(f"r{r}", "toy", terms, lambda x, k=k: k, "toy"))
        net = _generated(compile_network(names, CTX, tuple(relations)))
        for _ in range(40):
            stated = _random_stated(rng, len(names))
            assert _same_state(propagate(net, stated), reference_propagate(net, stated))
            known = {i: lo for i, (lo, hi) in stated.items() if math.isfinite(lo)}
            assert list(evaluate(net, known).items()) == list(reference_evaluate(net, known).items())


def test_a_network_changes_to_the_generated_steps_after_enough_uses():
    from speccheck.checking import engine

    net = compile_network(NAMES, CTX, TOY)
    stated = {P: point(2.0, 0.05), F: point(4.0, 0.05), T: point(0.5)}
    first = propagate(net, stated)
    assert net.generated[1] is None
    for _ in range(engine.GENERATE_AFTER):
        later = propagate(net, stated)
    assert net.generated[1] is not None and _same_state(first, later)
