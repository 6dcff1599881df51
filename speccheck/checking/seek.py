"""Goal seek in one coordinate: the interval of ``t`` around ``t0`` where ``lo_band ≤ g(t) ≤ hi_band``.

``g`` is any function that may fail (None); speccheck's is the logarithm of a target's
nominal value after re-checking the spec with one input changed, and ``t`` is the
logarithm of a positive input (or a signed input itself).  The relation table is a set
of monomials, so through it (and through the stages that scale a beam) ``g`` is a
straight line in these coordinates: the secant through the value now and one probe lands
on the bound, and a third evaluation confirms it to rounding.  Where ``g`` bends (the
pulse's field, a window of GDD), the secant steps are followed by a regula falsi
(Illinois) on the bracket they find, two interior points check that the path to the bound
was monotonic, and when that fails, or no bracket is found, a scan of the whole range
decides.  Every evaluation is counted against a budget.
"""

from __future__ import annotations

from dataclasses import dataclass

EPS = 1e-12  # in ln of the value: a value this close to a bound meets it
CLOSE = 1e-7  # …and a met value this close to it (in ln) is taken as the boundary
WIDTH = 1e-7  # a bracket this narrow (in t) is the boundary
DOMAIN_WIDTH = 1e-4  # …and this narrow where g fails beyond it (the end of what the input can be: bisection)


@dataclass
class Found:
    low: float | None  # the ends in t; None: met to the end of the range searched
    high: float | None
    reachable: bool
    depends: bool = True  # False: g does not change with t at all
    domain: tuple[bool, bool] = (False, False)  # each end where g fails beyond it, not a bound of the band


class Budget(Exception):
    pass


class Seeker:
    def __init__(self, g, t0: float, g0: float | None, lo: float, hi: float, band: tuple[float, float],
                 step: float, budget: int) -> None:
        self.g, self.t0, self.lo, self.hi, self.band, self.step = g, t0, lo, hi, band, step
        self.left = budget
        self.seen: dict[float, float | None] = {t0: g0}
        self.domain_ends: set[float] = set()  # the ends ``edge`` found against a point where g fails

    def at(self, t: float) -> float | None:
        t = min(max(t, self.lo), self.hi)
        if t not in self.seen:
            if self.left <= 0:
                raise Budget
            self.left -= 1
            self.seen[t] = self.g(t)
        return self.seen[t]

    def met(self, t: float) -> bool:
        v = self.at(t)
        return v is not None and self.band[0] - EPS <= v <= self.band[1] + EPS

    def edge(self, inside: float, outside: float) -> float:
        """The boundary between a point that meets the band and one that does not: regula falsi on
        g − bound (the bound the outside point misses), Illinois-weighted; bisection where g fails."""
        vb = self.at(outside)
        bound = None if vb is None else self.band[0] if vb < self.band[0] else self.band[1]

        def h(t):
            v = self.at(t)
            return None if v is None or bound is None else v - bound

        a, b, ha, hb, last = inside, outside, h(inside), h(outside), 0
        if ha is not None and abs(ha) <= CLOSE:
            return a
        for _ in range(60):
            if abs(b - a) <= (WIDTH if self.seen.get(b) is not None else DOMAIN_WIDTH) * max(1.0, abs(a)):
                break
            t = (a + b) / 2.0
            if ha is not None and hb is not None and ha != hb:
                t = b - hb * (b - a) / (hb - ha)
                if not min(a, b) < t < max(a, b):
                    t = (a + b) / 2.0
            ht = h(t)
            if self.met(t):
                if ht is not None and abs(ht) <= CLOSE:
                    return t
                a, ha = t, ht
                if last == 1 and hb is not None:
                    hb /= 2.0
                last = 1
            else:
                b, hb = t, (ht if ht is not None and ha is not None and (ht > 0) != (ha > 0) else None)
                if last == -1 and ha is not None:
                    ha /= 2.0
                last = -1
        if self.seen.get(b) is None:
            self.domain_ends.add(a)
        return a

    def open_ahead(self, start: float, direction: int, slope: float) -> bool:
        """On a straight line with no bound ahead (the band open on the side the line heads for), the
        rest of the range meets it: confirmed at the range's end."""
        bound = self.band[1] if slope * direction > 0 else self.band[0]
        end = self.hi if direction > 0 else self.lo
        return bound in (float("inf"), float("-inf")) and end != start and self.met(end)

    def outward(self, start: float, direction: int) -> float | None:
        """From a point that meets the band, the boundary in ``direction`` (None: none in range).
        Steps grow threefold, or jump to just past where the secant through the last two points
        meets the bound it heads for (a straight line, as through the relation table, is then
        bracketed at once and ``edge`` lands on it in one step)."""
        step, t = self.step, start
        end = self.hi if direction > 0 else self.lo
        while (end - t) * direction > 0:
            nxt = t + direction * step
            nxt = min(nxt, end) if direction > 0 else max(nxt, end)
            if not self.met(nxt):
                return self.edge(t, nxt)
            t, step = nxt, max(step * 3.0, self._to_bound(t - direction * step, t, direction))
        return None

    def _to_bound(self, a: float, b: float, direction: int) -> float:
        """How far past b, in ``direction``, the secant through a and b crosses the bound it heads for
        (2 % beyond it, to bracket it); 0 where there is none."""
        ga, gb = self.seen.get(a), self.seen.get(b)
        if ga is None or gb is None or ga == gb or a == b:
            return 0.0
        slope = (gb - ga) / (b - a)
        bound = self.band[1] if slope * direction > 0 else self.band[0]
        if bound in (float("inf"), float("-inf")):
            return 0.0
        reach = (bound - gb) / slope * direction
        return 1.02 * reach + 1e-9 if reach > 0 else 0.0

    def component(self, t: float) -> Found:
        return self.found(self.outward(t, -1), self.outward(t, +1))

    def found(self, low: float | None, high: float | None) -> Found:
        return Found(low, high, True, domain=(low in self.domain_ends, high in self.domain_ends))


def seek(g, t0: float, g0: float | None, lo: float, hi: float, band: tuple[float, float], step: float,
         budget: int) -> Found | None:
    """The met interval nearest ``t0`` (None when the budget ran out first)."""
    s = Seeker(g, t0, g0, lo, hi, band, step, budget)
    try:
        return _seek(s, t0, g0)
    except Budget:
        return None


def _seek(s: Seeker, t0: float, g0: float | None) -> Found:
    if s.met(t0):
        return s.component(t0)
    probe = t0 + s.step if t0 + s.step <= s.hi else t0 - s.step
    g1 = s.at(probe)
    if g0 is not None and g1 is not None and abs(g1 - g0) < EPS:
        other = t0 - s.step if probe > t0 else t0 + s.step
        g2 = s.at(other)
        if g2 is not None and abs(g2 - g0) < EPS:
            return Found(None, None, False, depends=False)
    if g0 is not None and g1 is not None and g1 != g0:
        hit = _secant(s, t0, g0, probe, g1)
        if hit is not None:
            return hit
    return _scan(s, t0)


def _secant(s: Seeker, t0: float, g0: float, t1: float, g1: float) -> Found | None:
    """Secant steps toward the bound g0 misses; the met interval of the first point that meets it,
    provided the way there was monotonic (None: let the scan decide)."""
    bound = s.band[0] if g0 < s.band[0] else s.band[1]
    ta, ga, tb, gb = t0, g0, t1, g1
    for step in range(12):
        if gb == ga:
            return None
        slope = (gb - ga) / (tb - ta)
        t = min(max(tb + (bound - gb) / slope, s.lo), s.hi)
        if s.met(t):
            up = t > t0
            # the first secant landing on the bound: three points on one straight line (the relation
            # table's monomials), so the way there was monotonic and, with no bound ahead, so is the rest
            line = step == 0 and abs(s.at(t) - bound) <= CLOSE
            # the near end: between t and the closest point seen on the way that misses the band
            before = [u for u in s.seen if (t0 <= u < t if up else t < u <= t0) and not s.met(u)]
            near = s.edge(t, max(before) if up else min(before))
            if not line and any(s.met(t0 + (near - t0) * k / 3.0) for k in (1, 2)):
                return None
            direction = 1 if up else -1
            far = None if line and s.open_ahead(t, direction, slope) else s.outward(t, direction)
            return s.found(near, far) if up else s.found(far, near)
        gt = s.at(t)
        if gt is None or t in (s.lo, s.hi) and t == tb:
            return None
        ta, ga, tb, gb = tb, gb, t, gt
    return None


def region(g, t0: float, g0: float | None, lo: float, hi: float, band: tuple[float, float], step: float,
           budget: int, n: int = 24) -> Found | None:
    """As ``seek``, for a ``g`` that only says in or out (no secant): the component of t0, or of
    the point nearest it on a grid of ``n``; None when the budget ran out first."""
    s = Seeker(g, t0, g0, lo, hi, band, step, budget)
    try:
        return s.component(t0) if s.met(t0) else _scan(s, t0, n)
    except Budget:
        return None


def _scan(s: Seeker, t0: float, n: int = 12) -> Found:
    """A grid over the whole range; the met run nearest t0, its ends refined."""
    grid = sorted({s.lo + (s.hi - s.lo) * k / n for k in range(n + 1)} | {t0})
    nearest = next((t for t in sorted(grid, key=lambda t: abs(t - t0)) if s.met(t)), None)  # nearest first
    if nearest is None:
        return Found(None, None, False)
    return s.component(nearest)
