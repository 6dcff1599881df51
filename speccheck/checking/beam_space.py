"""The beam in space along the path: where the laser's beam starts (its waist at the output plane,
or a stated ``waist_position`` or ``beam_divergence``), and the path cells each column shows of it
(wavefront radius, Rayleigh range, the distance to the next waist and that waist's diameter).

These numbers are signed or infinite (a wavefront at a waist is flat, a waist behind the plane is
at a negative distance), so they stay outside the log-space relation table: cells of the path, as
the net GDD is.  JSON writes them as signed numbers, and an infinite one (or an unbounded side) as
null."""

from __future__ import annotations

import math

from speccheck.physics import beam_geometry as optics
from speccheck.physics import gaussian_beam as gb
from speccheck.physics.beam import Beam, typical
from speccheck.physics.quantities import LASER_BEAM
from speccheck.reading.angles import parse_angle
from speccheck.reading.units import choose_unit
from speccheck.reading.values import ValueProblem
from speccheck.records.findings import Cell

PLACEMENT = LASER_BEAM  # laser-block keys, read here


def at_laser(walk, beam: Beam) -> Beam:
    """The beam with its geometry at the laser's output plane."""
    laser = walk.data.get("laser") if isinstance(walk.data.get("laser"), dict) else {}
    d, lam = beam.get("beam_diameter"), beam.get("wavelength")
    given = [k for k in PLACEMENT if laser.get(k) is not None]
    if not (d and lam and typical(d) and typical(lam)):
        return beam
    place = spread = None
    # both: the divergence places the beam (it has one beam, a waist position two) and the waist
    # position is checked against it
    key = "beam_divergence" if len(given) == 2 else given[0] if given else None
    if key is not None:
        try:
            s = walk.c.values.parse_as("laser.waist_position", laser[key], "m", walk.param_tolerance(key),
                                       signed=True) if key == "waist_position" else \
                parse_angle("laser.beam_divergence", laser[key], walk.param_tolerance(key))
        except ValueProblem as e:
            walk.report.add(e.rule, e.message, ("laser", key), quantities=(f"laser.{key}",))
            s = None
        if s is not None and s.typical is None:
            walk.report.add("invalid-value", f"laser.{key}: {s.text} leaves it open; give a value "
                            "('-0.5 m', '1.2 mrad ± 0.1 mrad')", ("laser", key))
            s = None
        if s is not None and key == "beam_divergence" and not s.low > 0.0:
            walk.report.add("invalid-value", f"laser.beam_divergence: {s.text} must be a positive full angle",
                            ("laser", key))
            s = None
        if s is not None:
            place = gb.at_plane if key == "waist_position" else gb.from_divergence
            spread = (s.low, s.typical, s.high)
    g = optics.start(d, lam, beam.get("m2"), place, spread)
    if g is not None and place is not None:
        _placed(walk, laser, g, key, len(given) == 2)
    if g is None and place is not None:
        m2 = typical(beam.get("m2")) if beam.get("m2") else 1.0
        shown = walk.show("beam_diameter", typical(d), "mm")
        why = (f"a Gaussian beam of 1/e² diameter {shown} (M² {m2:.3g}) cannot have its waist "
               f"{walk.show('beam_diameter', abs(spread[1]), 'mm')} away: that needs w² ≥ 2 M²λ|z|/π"
               if key == "waist_position" else
               f"a full divergence of {spread[1] * 1e3:.4g} mrad is below the diffraction limit of a beam of "
               f"1/e² diameter {shown} (M² {m2:.3g}): its waist 2 M²λ/(πθ) would be wider than the beam")
        walk.report.add("beam-geometry-impossible", f"laser.{key}: {why}; the beam is taken at its waist at the "
                        "output plane", ("laser", key), quantities=(f"laser.{key}",))
        g = optics.start(d, lam, beam.get("m2"))
    return optics.with_geometry(beam, g) if g is not None else beam


def cells(beam: Beam, units) -> dict:
    """The path cells of the beam at a column's plane (``Geometry.plane``: wavefront radius, Rayleigh
    range, the distance to the next waist, negative behind, and that waist's diameter); none without
    a geometry.  An unbounded side is None; an infinite typical value (a flat wavefront) stays infinite."""
    g = beam.geometry
    if g is None:
        return {}
    out = {}
    for name, (low, typ, high) in g.plane().items():
        typ += 0.0  # a waist here is 0, not −0
        ref = abs(typ) if math.isfinite(typ) and typ else 1e-3
        out[name] = Cell("derived", low if math.isfinite(low) else None, high if math.isfinite(high) else None,
                         typ, "m", choose_unit(units, ref, "mm"))
    return out


def _placed(walk, laser: dict, g, key: str, both: bool) -> None:
    """A waist position alone fits two beams of the stated diameter: the nearly collimated one is
    taken, and a note names the other.  With a divergence too (a maker's sheet gives both), the
    divergence places the beam and the waist position is checked against it, within 5 % of the
    distance beyond its own tolerance, for the diameter and M² (common practice)."""
    q, lam = g.q[0], g.lam[0]
    w0 = math.sqrt(lam * q.imag / math.pi)
    taken = 2.0 * lam / (math.pi * w0)  # full far-field angle of the 1/e² radius
    if both:
        try:
            s = walk.c.values.parse_as("laser.waist_position", laser["waist_position"], "m",
                                       walk.param_tolerance("waist_position"), signed=True)
        except ValueProblem:
            return  # said where the divergence alone is read
        z = -q.real  # where the waist is, from the output plane
        slack = 0.05 * max(abs(s.low), abs(s.high))
        if s.typical is not None and not s.low - slack <= z <= s.high + slack:
            walk.report.add("beam-geometry-impossible", f"laser.waist_position: {s.text} does not fit the beam "
                            f"that beam_divergence and beam_diameter give, whose waist is "
                            f"{walk.show('waist_position', z, 'mm')} from the output plane; one of them is wrong "
                            "(beam_divergence is used)", ("laser", "waist_position"),
                            quantities=("laser.waist_position", "laser.beam_divergence"))
        return
    if key != "waist_position":
        return
    w = gb.radius(q, lam)
    other_sq = w * w - w0 * w0  # the other root of w² = w0² + (λz/(π w0))²: w0_a² + w0_b² = w²
    if other_sq > 0.0:
        other = math.sqrt(other_sq)
        walk.report.add("stage-model", f"laser.waist_position: two beams have this diameter with their waist "
                        f"there; the one taken has a {walk.show('beam_diameter', 2 * w0, 'mm')} waist and "
                        f"{taken * 1e3:.4g} mrad full divergence, the other a "
                        f"{walk.show('beam_diameter', 2 * other, 'mm')} waist and "
                        f"{2.0 * lam / (math.pi * other) * 1e3:.4g} mrad; state beam_divergence as well to "
                        "check it", ("laser", "waist_position"), key=True)
