"""The checks that need the beam in space: what lands on a stage's entrance plane (after its
distance), a clear aperture that clips, and the reach of the paraxial model at a focus.  Their
rows are in ``stage_checks.CHECKS``; each takes the walk and the stage's ``Visit``."""

from __future__ import annotations

import math

from speccheck.physics import gaussian_beam as gb
from speccheck.physics.beam import transmit
from speccheck.reading.values import ValueProblem

NA_NOTE_FROM = 0.4  # a focusing NA above about this leaves the paraxial spot and intensity (common practice)
CLIPPING_WARN = 0.01  # the share of the power an aperture may clip before it is said
ROUGH = 0.10  # …and beyond which the Gaussian carried on is not a fair picture (common practice)


def entrance_value(v, quantity: str) -> float | None:
    """A peak intensity or fluence on the stage's entrance plane: the column before's value times
    its beam area over the area at the entrance (the stage's distance in between)."""
    cell, d_before = v.incident.get(quantity), v.incident.get("beam_diameter")
    g = v.beam.geometry
    if not (cell and cell.value):
        return None
    if g is None or g.entrance_diameter is None or not (d_before and d_before.value):
        return cell.value
    return cell.value * (d_before.value / g.entrance_diameter[1]) ** 2


def passed(a: float, d: float) -> float:
    """The share of a Gaussian beam of 1/e² diameter d that a circular aperture of diameter a passes:
    1 − exp(−2a²/d²), i.e. 1 − exp(−2r²/w²) with r, w the radii (the profile integrated over the disc)."""
    return -math.expm1(-2.0 * (a / d) ** 2) if d > 0 else 1.0


def through_aperture(walk, stage: dict, beam):
    """The beam after a stage's clear aperture: its energy, power and peak power scaled by the share
    the aperture passes (``passed``, at the entrance diameter, over the tolerances of both); the beam
    is taken on as the same Gaussian (the diffraction of its clipped edge is not modelled: the
    warning of ``clear_aperture`` says so).  A value that cannot be read is said by that check."""
    raw = stage.get("clear_aperture")
    g = beam.geometry
    if raw is None or g is None or g.entrance_diameter is None:
        return beam
    try:
        s = walk.c.values.parse_as("clear_aperture", raw, "m", walk.param_tolerance("clear_aperture"))
    except ValueProblem:
        return beam
    d = g.entrance_diameter
    if not (s.typical and s.low > 0 and d[0] > 0 and math.isfinite(s.high)):
        return beam
    t = (passed(s.low, d[2]) if math.isfinite(d[2]) else 0.0, passed(s.typical, d[1]), passed(s.high, d[0]))
    return transmit(beam, t) if t[1] < 1.0 else beam


def clear_aperture(walk, v) -> None:
    """A circular aperture of radius a passes 1 − exp(−2a²/w²) of a Gaussian beam of 1/e² radius w
    (the integral of the Gaussian profile over the disc; A. E. Siegman, Lasers, ch. 17, chapter from memory): more than 1 %
    clipped, D_a < about 1.5 D, is a warning."""
    raw = v.stage.get("clear_aperture")
    g = v.beam.geometry
    if raw is None:
        return
    where = v.at + ("clear_aperture",)
    try:
        s = walk.c.values.parse_as(f"{v.name}.clear_aperture", raw, "m", walk.param_tolerance("clear_aperture"))
    except ValueProblem as e:
        walk.report.add(e.rule, e.message, where)
        return
    if g is None or g.entrance_diameter is None or not s.typical:
        walk.report.add("target-unknown", f"{v.name}: the beam diameter at this stage is not known, so its clear "
                        "aperture cannot be checked", where, key=True)
        return
    d = g.entrance_diameter
    clipped = 1.0 - passed(s.typical, d[1])
    if clipped > CLIPPING_WARN:
        worst = 1.0 - passed(s.typical, d[2]) if math.isfinite(d[2]) else 1.0
        walk.report.add("aperture-clipping",
                        f"{v.name}: a clear aperture of {s.text} clips {100 * clipped:.3g}% of the power of the "
                        f"{walk.show('beam_diameter', d[1], 'mm')} beam (1/e² diameter) on it"
                        + (f" (up to {100 * worst:.3g}% within the tolerances)" if worst > clipped * 1.01 else "")
                        + "; the numbers after it count that loss, but not the diffraction of the clipped edge, "
                        "which they take as the same Gaussian beam (a Gaussian through a circular aperture loses "
                        "exp(−2a²/w²); keep the aperture above about 1.5× the beam's 1/e² diameter)"
                        + (". With this much clipped the beam after it is far from Gaussian: its spot, intensity "
                           "and fluence further on are not reliable" if clipped > ROUGH else ""), where,
                        quantities=(f"{v.name}.beam_diameter",))


def focus_spot(walk, v) -> None:
    """A note where the paraxial Gaussian-beam model stops holding: a spot radius below λ/π, or a
    focusing numerical aperture above about 0.4 (common practice)."""
    name, cells, at = v.name, v.cells, v.at
    w, lam = cells.get("beam_radius"), cells.get("wavelength")
    why = []
    if w and lam and w.value and lam.value and w.value < lam.value / math.pi:
        why.append(f"the 1/e² spot radius {walk.show('beam_radius', w.value, 'µm')} is below "
                   f"λ/π = {walk.show('beam_radius', lam.value / math.pi, 'µm')}")
    g = v.beam.geometry
    if g is not None and gb.waist_ahead(g.q[0]) >= 0.0:
        na = gb.numerical_aperture(g.q[0], g.lam[0])
        if na > NA_NOTE_FROM:
            why.append(f"the focusing numerical aperture is {na:.2g} (sin θ of the far-field half angle "
                       f"θ = atan(M²λ/(π w0)) of the waist ahead), above about {NA_NOTE_FROM:g} (common practice)")
    if why:
        walk.report.add("non-paraxial-focus", f"{name}: " + " and ".join(why) + ": outside the paraxial "
                        "Gaussian-beam model, so the spot and intensity are estimates (a vector-diffraction "
                        "calculation would settle them)", at, key=True)
