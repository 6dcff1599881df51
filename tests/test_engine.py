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
