"""The dimension of the value at each place of a spec, from the tables: a block's quantities
(``physics.quantities``), a stage's parameters (``physics.stages``), a damage rating and the
safety block's MPE.  The schema states these places as text (a number there needs its unit, and
an editor's YAML language server flags a bare one); ``schema.validate`` reports a bare number
there in the value grammar's words (``values.missing_unit``)."""

from __future__ import annotations

from speccheck.physics.quantities import ALIASES, BY_NAME
from speccheck.physics.stages import STAGE_KINDS

# Keys of a laser block besides the quantity table's (``checking/laser_pulse.py``, ``beam_space.py``).
BLOCK_EXTRA = {"gdd": ("s^2",), "tod": ("s^3",), "waist_position": ("m",), "beam_divergence": ("angle",)}
# A stage's rated damage threshold (``stage_checks.optic_damage``) and keys every stage may have.
RATING = {"fluence": ("J/m^2",), "pulse_duration": ("s",), "wavelength": ("m",)}
STAGE_EXTRA = {"clear_aperture": ("m",)}
SAFETY = {"mpe": ("J/m^2", "W/m^2")}
PARTS = ("min", "typical", "max")  # the parts of a {min, typical, max} value


def _stage_params() -> dict[str, tuple[str, ...]]:
    found: dict[str, set[str]] = {}
    for kind in STAGE_KINDS.values():
        for p in kind.params:
            found.setdefault(p.name, set()).add(p.dimension)
    return {name: tuple(sorted(dims)) for name, dims in found.items()}


STAGE_PARAMS = _stage_params()


def block_dimensions(key: str) -> tuple[str, ...]:
    if key in ALIASES:
        return tuple(ALIASES[key])
    if key in BY_NAME:
        return (BY_NAME[key].si_unit,)
    return BLOCK_EXTRA.get(key, ())


def stage_dimensions(key: str) -> tuple[str, ...]:
    return STAGE_PARAMS.get(key) or STAGE_EXTRA.get(key, ())


def dimensions(path: tuple) -> tuple[str, ...]:
    """The dimensions the value at a document path may have, as keys of ``units.DIMENSION_NAMES``
    (or ``"angle"``); ``()`` where the value is a number without a unit, text, or not a value."""
    place, key = "top", None
    for step in path:
        if isinstance(step, int):
            if place in ("stages", "points"):
                place = "stage" if place == "stages" else "block"
                continue
            return ()
        if step in PARTS and key is not None:
            continue
        if place == "top":
            place, key = {"laser": "block", "target": "block", "operating_points": "points", "path": "stages",
                          "safety": "safety"}.get(step, "none"), None
        elif place == "stage":
            if step in ("measured", "target"):
                place, key = "block", None
            elif step == "damage_threshold":
                place, key = "rating", None
            elif step == "branches":
                place, key = "branches", None
            else:
                place, key = "stage param", step
        elif place == "branches":
            place = "branch"
        elif place == "branch":
            place, key = {"path": "stages", "measured": "block", "target": "block"}.get(step, "none"), None
        elif place in ("block", "rating", "safety") and key is None:
            key = step
        else:
            return ()
    if key is None:
        return ()
    dims = {"block": block_dimensions, "stage param": stage_dimensions, "rating": lambda k: RATING.get(k, ()),
            "safety": lambda k: SAFETY.get(k, ())}.get(place, lambda k: ())(key)
    return () if dims in ((), ("1",)) or set(dims) <= {"1", "text", "material_name"} else dims
