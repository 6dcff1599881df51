"""The stage kinds that act on the pulse's field: spectral phase (a given dispersion, a glass,
a compressor given by its dispersion, a grating pair, a prism pair) and harmonics."""

from __future__ import annotations

import math
from dataclasses import replace
from typing import Callable

from speccheck.physics.beam import ENERGY_LIKE, Beam, Value, point, scaled, transmit, typical


def add_phase(beam: Beam, ctx, terms: Callable, gdd: Value, tod: Value | None = None,
              fod: Value | None = None) -> Beam:
    """The beam after a phase-only stage: ``terms(typical values)`` gives its phase terms;
    the tolerances of its GDD and TOD widen the pulse's windows (its FOD's only the net FOD shown)."""
    made = beam.field(ctx)
    beam = replace(beam, stage_gdd=gdd)
    if made is None:
        ctx.note("the pulse's duration after this stage is not known: the laser block needs a duration or a "
                 "bandwidth, and a wavelength")
        return beam.with_values(pulse_duration=None, peak_power=None)
    spread_tod = (tod[0] - tod[1], tod[2] - tod[1]) if tod is not None else (0.0, 0.0)
    made = made.adding(terms(), (gdd[0] - gdd[1], gdd[2] - gdd[1]), spread_tod,
                       (fod[0] - fod[1], fod[2] - fod[1]) if fod is not None else (0.0, 0.0))
    return beam.with_pulse(made, ctx)


def _poly_terms(gdd: Value, tod: Value | None, fod: Value | None):
    from speccheck.physics.phase_terms import Poly

    return lambda: tuple(Poly(k, v[1]) for k, v in ((2, gdd), (3, tod), (4, fod)) if v is not None and v[1])


_NONE = (0.0, 0.0, 0.0)


def dispersion(beam, p, ctx):
    gdd = p.get("gdd") or _NONE  # a stage may add only TOD or FOD (a chirped mirror's residual)
    return add_phase(beam, ctx, _poly_terms(gdd, p.get("tod"), p.get("fod")), gdd, p.get("tod"), p.get("fod"))


def material(beam, p, ctx):
    lam = beam.get("wavelength")
    if lam is None or typical(lam) is None:
        ctx.note("the wavelength is not known here, so the material's dispersion cannot be computed")
        return transmit(beam, p["transmission"])
    gvd = ctx.gvd(p["material"], typical(lam))
    thickness = p["thickness"]
    gdd = tuple(sorted((gvd * thickness[0], gvd * thickness[2]))) if gvd else (0.0, 0.0)
    value = (gdd[0], gvd * thickness[1], gdd[1])
    tod = ctx.tod(p["material"], typical(lam), thickness[1])
    tod_value = tuple(sorted((tod / thickness[1] * thickness[0], tod / thickness[1] * thickness[2])))

    def terms():
        from speccheck.physics.phase_terms import glass
        return (glass(p["material"], thickness[1], ctx.c),)
    return add_phase(transmit(beam, p["transmission"]), ctx, terms, value, (tod_value[0], tod, tod_value[1]))


def compressor(beam, p, ctx):
    beam = transmit(beam, p["transmission"])
    if p.get("gdd") is None and p.get("tod") is None and p.get("fod") is None:
        return beam
    gdd = p.get("gdd") or _NONE
    return add_phase(beam, ctx, _poly_terms(gdd, p.get("tod"), p.get("fod")), gdd, p.get("tod"), p.get("fod"))


def harmonic(beam, p, ctx):
    n = int(round(p["order"][1]))
    root = math.sqrt(n)
    eff = p["efficiency"]
    changes = {q: scaled(beam.get(q), eff) for q in ENERGY_LIKE if beam.get(q)}
    if beam.get("wavelength"):
        changes["wavelength"] = scaled(beam.get("wavelength"), point(1.0 / n))
    if beam.get("pulse_duration"):  # the field's, where the pump's field is known (below)
        changes["pulse_duration"] = scaled(beam.get("pulse_duration"), point(1.0 / root))
    if beam.get("spectral_bandwidth"):
        changes["spectral_bandwidth"] = scaled(beam.get("spectral_bandwidth"), point(root))
    # the n-th power of a Gaussian profile exp(-2r²/w²) is exp(-2n r²/w²): a 1/e² width w/√n with the
    # pump's q (beam_geometry.follow_wavelength keeps q and scales the effective wavelength by 1/n)
    m2 = beam.get("m2")
    ctx.note(f"the harmonic's beam taken as D/√{n} with the pump's Rayleigh range and wavefront (undepleted "
             "pump, thin crystal, a TEM00 Gaussian beam)" + (
                 "; with an M² above 1 this is only an estimate" if m2 and (m2[1] or m2[2]) > 1.05 else ""))
    made = beam.field(ctx)
    beam = beam.with_values(**changes)
    if made is None:
        ctx.note(f"duration and bandwidth of the harmonic taken as τ/√{n} and √{n}·Δν (Gaussian pulse, "
                 "undepleted pump, no group-velocity mismatch: common practice)")
        if beam.get("peak_power"):  # the energy × efficiency in a pulse √n shorter
            beam = beam.with_values(peak_power=scaled(beam.get("peak_power"), point(root)))
        return beam
    ctx.note(f"the harmonic's field taken as E(t)^{n} of the pump's field (thin crystal, undepleted pump, no "
             "group-velocity mismatch)")
    if made.share[1] < 1.0:
        ctx.note(f"the share of the energy in the main peak ({made.share[1]:.3g}) is carried through unchanged: a "
                 "long, weak pedestal converts less than the main peak, so the harmonic's main peak holds more "
                 "than that share and its peak power here is a lower bound")
    made = made.harmonic(n)
    beam = beam.with_pulse(made, ctx)
    if beam.get("spectral_bandwidth"):
        bw = made.envelope.bandwidth() / (2.0 * math.pi)
        beam = beam.with_values(spectral_bandwidth=(bw * made.tl[1] / made.tl[2], bw, bw * made.tl[1] / made.tl[0]))
    return beam


class StageProblem(ValueError):
    """A stage whose parameters its model cannot take (no diffracted order at this angle): said as a
    finding at the stage, with this message."""


def _spread(value: Value, gdd: float, tod: float) -> tuple[Value, Value]:
    """GDD and TOD intervals of a stage whose dispersion scales with the parameter ``value``."""
    lo, hi = value[0] / value[1], value[2] / value[1]
    g = tuple(sorted((gdd * lo, gdd * hi)))
    t = tuple(sorted((tod * lo, tod * hi)))
    return (g[0], gdd, g[1]), (t[0], tod, t[1])


def grating_compressor(beam, p, ctx):
    """A double-pass parallel grating pair: the exact phase (ω/c)·G·cos θ_d per pass (Treacy 1969),
    G the perpendicular distance between the gratings, first order."""
    from speccheck.physics import compressors

    beam = transmit(beam, p["transmission"])
    lam = beam.get("wavelength")
    if lam is None or typical(lam) is None:
        ctx.note("the wavelength is not known here, so the grating pair's dispersion cannot be computed")
        return beam
    density, angle, gap = p["groove_density"][1], p["incidence_angle"][1], p["separation"]
    try:
        gdd, tod = compressors.grating_pair_dispersion(typical(lam), density, angle, gap[1], ctx.c)
    except ValueError as exc:
        raise StageProblem(f"no first diffracted order at {typical(lam) * 1e9:.4g} nm for this groove density and "
                           f"incidence angle ({exc})") from None
    bw = beam.get("spectral_bandwidth")
    if bw and typical(bw):  # the order must exist across the spectrum (two FWHMs either side)
        nu = ctx.c / typical(lam)
        for edge in (nu - 2.0 * typical(bw), nu + 2.0 * typical(bw)):
            try:
                compressors.grating_pair_dispersion(ctx.c / max(edge, 1e-3 * nu), density, angle, gap[1], ctx.c)
            except ValueError:
                raise StageProblem(f"the first diffracted order does not exist at {ctx.c / edge * 1e9:.4g} nm, "
                                   "inside the pulse's spectrum, for this groove density and incidence angle") \
                    from None
    ctx.note("the grating pair is taken in first order and double pass, with the exact phase of the grating "
             "equation; the tolerance of the separation is carried, the angle's is not")
    gdd_value, tod_value = _spread(gap, float(gdd), float(tod))

    def terms():
        import numpy as np

        from speccheck.physics.phase_terms import Exact

        def fn(w):  # NaN where the first order does not exist (the far wings of the grid)
            ok = np.abs(2.0 * math.pi * ctx.c / w * density - math.sin(angle)) < 1.0
            out = np.full(w.shape, np.nan)
            if np.any(ok):
                out[ok] = compressors.grating_pair_phase(w[ok], density, angle, gap[1], ctx.c)
            return out
        return (Exact("grating pair", fn),)
    return add_phase(beam, ctx, terms, gdd_value, tod_value)


def prism_compressor(beam, p, ctx):
    """A double-pass Brewster prism pair cut for the beam's wavelength: the exact phase by ray tracing
    (Fork, Martinez and Gordon 1984), the glass of its insertion included."""
    from speccheck.physics import compressors

    beam = transmit(beam, p["transmission"])
    lam = beam.get("wavelength")
    if lam is None or typical(lam) is None:
        ctx.note("the wavelength is not known here, so the prism pair's dispersion cannot be computed")
        return beam
    lam0, name, apex, depth = typical(lam), p["material"], p["apex_separation"], p["insertion"][1]
    n = ctx.index(name, lam0)
    if n < 1.2:  # no glass is below about 1.3 (from memory: fluorides ~1.38): a gas is not a prism
        raise StageProblem(f"a prism pair needs a glass; {name}'s refractive index is {n:.6g} at "
                           f"{lam0 * 1e9:.4g} nm, so it makes no prism")
    try:
        gdd, tod = compressors.prism_pair_dispersion(lam0, name, apex[1], depth, ctx.c)
    except ValueError as exc:
        raise StageProblem(f"the prism pair cannot be traced at {lam0 * 1e9:.4g} nm ({exc})") from None
    ctx.note("the prism pair is taken at Brewster incidence and minimum deviation for the beam's wavelength, "
             "double pass, the insertion the depth of the beam in the second prism; the tolerance of the apex "
             "separation is carried, the insertion's is not")
    gdd_value, tod_value = _spread(apex, float(gdd), float(tod))

    def terms():
        from speccheck.physics.phase_terms import Exact
        return (Exact("prism pair", lambda w: compressors.prism_pair_phase(w, name, apex[1], depth, lam0, ctx.c)),)
    return add_phase(beam, ctx, terms, gdd_value, tod_value)
