"""What the walk says when a stage's arithmetic fails: the failures it catches, the check that a
stage's output stays within what a float holds sensibly, and the words for each failure (a model's own,
``physics.model_range.OutOfModelRange``, where it has them)."""

from __future__ import annotations

import math

from speccheck.physics.beam import Beam
from speccheck.physics.model_range import OutOfModelRange

NUMERIC_FAILURES = (OverflowError, ZeroDivisionError, ValueError, FloatingPointError)
SI_RANGE = (1e-100, 1e100)  # as the value grammar's: what the relation table can work with


def in_range(beam: Beam) -> None:
    """A stage that puts out a carried number beyond what a float holds sensibly (a chain of
    gains reaching 1e300 W, a picker dividing a rate down to 0 Hz) has left its model's range."""
    for q, (low, typ, high) in beam.values.items():
        for x in (typ, high if math.isfinite(high) else None):
            if x is None:
                continue
            if math.isnan(x) or x < 0 or (x != 0 and not SI_RANGE[0] <= x <= SI_RANGE[1]):
                raise OverflowError(q)
        if typ == 0.0 or (high == 0.0):
            raise ZeroDivisionError(q)


def failure(exc: Exception) -> str:
    if isinstance(exc, OverflowError):
        return "a number overflows"
    if isinstance(exc, ZeroDivisionError):
        return "a division by zero"
    if isinstance(exc, OutOfModelRange):  # the model's own words: say them
        return str(exc)
    return "a number outside a formula's domain"
