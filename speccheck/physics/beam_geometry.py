"""The beam's geometry carried along the path: its complex parameter q (``gaussian_beam``) at the
typical values, and at each end of every tolerance that moves it.

The tolerances are carried to first order, as a sensitivity analysis: each *source* (the laser's
diameter, M², wavelength and waist, each lens's focal length, each distance) holds two states, q
with that source at its low and at its high end and everything else typical (λ and M² are one
source, the effective wavelength M²λ, as they enter only as their product).  A number at a plane
(the beam diameter, the Rayleigh range, …) is then its typical value with, on each side, the sum
over the sources of the largest move either end makes that way: the worst case of interval
arithmetic, taken to first order (for a positive number the moves combine as factors), so that a
focus's waist keeps the interval 4 M²λf/(πD) has.
A source open on one side (M² not stated: 1 … ∞) is probed at twice its typical value, and the
side it moves a number to is left unbounded.  A focus puts each state at its own waist (the
column sits at the waist, wherever a tolerance moves it).  A plate's thickness and index are
taken at their typical values (their tolerances move a beam
far less than a distance's).  A stage that changes the wavelength (a harmonic, a parametric
stage) keeps q, its effective wavelength scaled with the carrier's.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace
from functools import cached_property
from typing import Callable

from speccheck.physics import gaussian_beam as gb
from speccheck.physics.beam import Beam, Value, typical

PROBE = 2.0  # an open side is probed at this factor of the typical value


def _diameter(q: complex, lam: float) -> float:
    return 2.0 * gb.radius(q, lam)


@dataclass(frozen=True)
class Geometry:
    q: tuple  # complex per state: the typical state, then (low end, high end) of each source
    lam: tuple  # the effective wavelength M²λ of each state, m
    open_low: frozenset = frozenset()  # sources (by number) whose low / high end is unbounded
    open_high: frozenset = frozenset()
    m2_open: bool = False  # M² was not stated: a lower bound of 1
    entrance: complex | None = None  # the typical q where the last stage begins (after its distance)
    entrance_diameter: Value | None = None

    @property
    def sources(self) -> int:
        return (len(self.q) - 1) // 2

    def spread(self, fn: Callable[[complex, float], float], positive: bool = True) -> Value:
        """A number at this plane: (low, typical, high) by the sum of first-order moves.  Unbounded
        sides are 0 and inf for a positive number, -inf and inf for a signed one."""
        typ = fn(self.q[0], self.lam[0])
        if not math.isfinite(typ):
            return (0.0 if positive else -math.inf, typ, math.inf)
        try:
            xs = [fn(q, lam) if q is not None else math.nan for q, lam in zip(self.q, self.lam)]
        except (ZeroDivisionError, ValueError, OverflowError):
            return (0.0 if positive else -math.inf, typ, math.inf)
        return self.combine(xs, positive)

    def combine(self, xs: list, positive: bool) -> Value:
        """(low, typical, high) of a number from its value in each state (``xs``, the typical first)."""
        typ = xs[0]
        floor = 0.0 if positive else -math.inf
        if not math.isfinite(typ):
            return (floor, typ, math.inf)
        low = high = typ  # moves add up for a signed number; for a positive one they multiply (as factors
        # they are exact for a power law, like 4 M²λf/(πD), as the relation table's intervals are)
        factors = positive and typ > 0.0
        for s in range(self.sources):
            a, b = xs[1 + 2 * s] - typ, xs[2 + 2 * s] - typ
            if not (math.isfinite(a) and math.isfinite(b)):
                return (floor, typ, math.inf)
            if s in self.open_low:  # a probe: the way it moves the number is unbounded
                low, high = (floor if a < 0.0 else low), (math.inf if a > 0.0 else high)
            if s in self.open_high:
                low, high = (floor if b < 0.0 else low), (math.inf if b > 0.0 else high)
            down, up = min(0.0, a, b), max(0.0, a, b)  # the larger move of the source's two ends, each way
            if factors:
                low, high = low * (1.0 + down / typ), high * (1.0 + up / typ)
            else:
                low, high = low + down, high + up
        return (max(low, floor), typ, high)

    def plane(self) -> dict:
        """The numbers of each state at this plane in one pass (``gaussian_beam``'s formulas, inline):
        wavefront radius R = z + z_R²/z (infinite at a waist), Rayleigh range, the distance to the
        next waist −z, and the waist's 1/e² diameter 2√(lam z_R/π); each as (low, typical, high)."""
        r, zr, ahead, waist = [], [], [], []
        nan = math.nan
        for q, lam in zip(self.q, self.lam):
            if q is None or not q.imag > 0.0:
                r.append(nan), zr.append(nan), ahead.append(nan), waist.append(nan)
                continue
            z, b = q.real, q.imag
            r.append(z + b * b / z if z else math.inf)
            zr.append(b)
            ahead.append(-z)
            waist.append(2.0 * math.sqrt(lam * b / math.pi))
        radius = self.combine(r, False)
        # R jumps through infinity at a waist (|R| ≥ 2 z_R on either side): states on both sides of one,
        # or moves that reach 0, leave it open on both sides instead of an interval through 0
        if math.isfinite(radius[1]) and (radius[0] < 0.0 < radius[2] or any(
                math.isfinite(x) and x * radius[1] < 0.0 for x in r[1:])):
            radius = (-math.inf, radius[1], math.inf)
        return {"wavefront_radius": radius, "rayleigh_range": self.combine(zr, True),
                "waist_distance": self.combine(ahead, False), "waist_diameter": self.combine(waist, True)}

    @cached_property
    def diameter_spread(self) -> Value:
        return self.spread(_diameter)

    def diameter(self) -> Value:
        return self.diameter_spread

    def step(self, matrix: Callable[..., gb.Matrix], **params: Value) -> "Geometry":
        """Every state through ``matrix(**params)`` at the typical values; each parameter with a
        spread adds a source (the typical state through the matrix at that end)."""
        typ = {k: v[1] for k, v in params.items()}
        m = matrix(**typ)
        q = [None if x is None else gb.apply(m, x) for x in self.q]
        lam = list(self.lam)
        for k, v in params.items():
            if not v[2] > v[0]:
                continue
            for end in (v[0], v[2]):
                q.append(gb.apply(matrix(**{**typ, k: end}), self.q[0]))
                lam.append(self.lam[0])
        return replace(self, q=tuple(q), lam=tuple(lam))

    def to_waists(self) -> "Geometry":
        """Each state at its own waist ahead (where it has one)."""
        return replace(self, q=tuple(None if x is None else complex(max(x.real, 0.0), x.imag) for x in self.q))

    def scaled_wavelength(self, factor: float) -> "Geometry":
        return replace(self, lam=tuple(x * factor for x in self.lam))


def start(d: Value, lam: Value, m2: Value | None, place: Callable[[float, float], complex | None] | None = None,
          place_spread: Value | None = None) -> Geometry | None:
    """The geometry of a beam of diameter ``d`` at this plane, wavelength ``lam`` and quality ``m2``
    (None: not stated, at least 1).  ``place(w, lam_eff, x)`` gives q at the plane from the radius
    and a placing number x (a waist position, a divergence) with spread ``place_spread``; without
    it the plane is the beam's waist.  None when the typical beam cannot be placed."""
    m2_open = m2 is None
    m2 = (1.0, 1.0, math.inf) if m2 is None else m2
    if place is None:
        place, place_spread = (lambda w, lam_eff, x: gb.at_waist(w, lam_eff)), (0.0, 0.0, 0.0)
    if typical(lam) is None or typical(m2) is None:
        return None
    # λ and M² enter only as their product, the effective wavelength: one source
    lam_eff = (lam[0] * m2[0], typical(lam) * typical(m2), lam[2] * m2[2])
    values = {"d": d, "lam": lam_eff, "x": place_spread}
    typ = {k: typical(v) if k != "x" else v[1] for k, v in values.items()}
    if any(v is None for v in typ.values()):
        return None

    def state(v: dict) -> tuple:
        lam_eff = v["lam"]
        try:
            return place(v["d"] / 2.0, lam_eff, v["x"]), lam_eff
        except (ZeroDivisionError, ValueError, OverflowError):
            return None, lam_eff

    q0, lam0 = state(typ)
    if q0 is None:
        return None
    qs, lams, open_low, open_high = [q0], [lam0], set(), set()
    for k, v in values.items():
        lo, hi = v[0], v[2]
        if not hi > lo:
            continue
        source = (len(qs) - 1) // 2
        if k != "x" and lo <= 0.0:
            lo = typ[k] / PROBE
            open_low.add(source)
        if not math.isfinite(hi):
            hi = typ[k] * PROBE
            open_high.add(source)
        for end in (lo, hi):
            q, lam_eff = state({**typ, k: end})
            qs.append(q)
            lams.append(lam_eff)
    return Geometry(tuple(qs), tuple(lams), frozenset(open_low), frozenset(open_high), m2_open)


def at_laser_waist(beam: Beam) -> Geometry | None:
    d, lam = beam.get("beam_diameter"), beam.get("wavelength")
    if not d or not lam:
        return None
    return start(d, lam, beam.get("m2"))


def with_geometry(beam: Beam, g: Geometry | None) -> Beam:
    """The beam with this geometry, its carried diameter the geometry's."""
    if g is None:
        return replace(beam, geometry=None)
    return replace(beam, geometry=g).with_values(beam_diameter=g.diameter())


def travel(beam: Beam, distance: Value, ctx) -> Beam:
    """Free space from the last plane to the stage; the stage's entrance is kept for its checks.  A
    beam whose size is known but not its geometry (none from the laser) starts here, at its waist."""
    g = beam.geometry
    if g is None:
        g = at_laser_waist(beam)
        if g is None:
            return beam
        if distance[2] > 0.0:
            ctx.note("the beam's geometry is not known before this stage: its diameter here is taken as a waist")
    if distance[2] > 0.0:
        g = g.step(gb.free, d=distance)
    elif g is beam.geometry and g.entrance == g.q[0] and g.entrance_diameter is not None:
        return beam  # no distance: the entrance is where the column before left the beam
    g = replace(g, entrance=g.q[0], entrance_diameter=g.diameter())
    return with_geometry(beam, g)


def follow_wavelength(before: Beam, after: Beam) -> Beam:
    """A stage that changes the carrier keeps q (the harmonic of a Gaussian beam, undepleted, has
    the pump's wavefront and Rayleigh range), its effective wavelength scaled with the carrier's."""
    g = after.geometry
    if g is None:
        return after
    lam0, lam1 = before.get("wavelength"), after.get("wavelength")
    if lam0 is lam1 and g is before.geometry and after.get("beam_diameter") is before.get("beam_diameter"):
        return after  # nothing in space changed
    if lam1 is None or not typical(lam1):
        return with_geometry(after.with_values(beam_diameter=None), None)
    if lam0 and typical(lam0) and typical(lam1) != typical(lam0):
        g = g.scaled_wavelength(typical(lam1) / typical(lam0))
    return with_geometry(after, g)


# ------------------------------------------------------------------ the kinds' optics

def _needs_geometry(beam: Beam, ctx) -> Geometry | None:
    if beam.geometry is None:
        ctx.note("the beam diameter and wavelength before this stage are needed for the beam after it")
    return beam.geometry


def _m2_note(g: Geometry, ctx) -> None:
    if g.m2_open:
        ctx.note("M² is not stated, so it is taken as at least 1 (1 for the typical values): the beam size "
                 "after this stage is a lower bound and the intensity and fluence upper bounds; state m2 to "
                 "make them exact")


def lens(beam: Beam, p: dict, ctx) -> Beam:
    g = _needs_geometry(beam, ctx)
    if g is None:
        return beam.with_values(beam_diameter=None)
    _m2_note(g, ctx)
    return with_geometry(beam, g.step(lambda f: gb.lens(f), f=p["focal_length"]))


def focus(beam: Beam, p: dict, ctx) -> Beam:
    g = _needs_geometry(beam, ctx)
    if g is None:
        return beam.with_values(beam_diameter=None)
    _m2_note(g, ctx)
    g = g.step(lambda f: gb.lens(f), f=p["focal_length"])
    ahead = gb.waist_ahead(g.q[0])
    if ahead <= 0.0:
        ctx.note(f"the beam after this optic has no waist ahead of it (its waist is {-ahead * 1e3:.4g} mm "
                 "before it): the column shows the beam just after the optic")
        return with_geometry(beam, g)
    f = p["focal_length"][1]
    if abs(ahead - f) > 1e-3 * abs(f):  # where the next stage's distance starts from, when not at f
        ctx.note(f"its waist lies {ahead * 1e3:.4g} mm after the optic, not at its focal length "
                 f"{f * 1e3:.4g} mm (the next stage's distance counts from the waist)")
    return with_geometry(beam, g.to_waists())


def plate(beam: Beam, p: dict, ctx) -> Beam:
    g, lam = beam.geometry, beam.get("wavelength")
    if g is None or lam is None or not typical(lam):
        return beam
    n = ctx.index(p["material"], typical(lam))
    thickness = p["thickness"][1]
    return with_geometry(beam, g.step(lambda: gb.plate(thickness, n)))


def telescope(beam: Beam, p: dict, ctx) -> Beam:
    g = beam.geometry
    if g is None:  # no geometry: the diameter scales as the magnification says
        d = beam.get("beam_diameter")
        m = p["magnification"]
        return beam.with_values(beam_diameter=(d[0] * m[0], typical(d) * m[1], d[2] * m[2])) if d and typical(d) \
            else beam
    if p.get("focal_length") is None:
        ctx.note("the telescope is taken as a relay imaging its entrance onto its exit (q × m²); state "
                 "focal_length (its first lens's) for the planes of its two lenses")
        return with_geometry(beam, g.step(lambda m: gb.relay(m), m=p["magnification"]))
    return with_geometry(beam, g.step(lambda f, m: gb.telescope(f, m), f=p["focal_length"], m=p["magnification"]))
