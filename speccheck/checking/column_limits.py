"""Limits on single quantities of a column (``physics.limits``), and the notes on what a
column assumed (the pulse shape and beam profile when they are not stated)."""

from __future__ import annotations

import math
from speccheck.checking.wording import join
from speccheck.physics.limits import LIMITS
from speccheck.physics.quantities import BY_NAME, DEFAULTS
from speccheck.physics.relations import BY_ID
from speccheck.physics.shapes import DEFAULT_PROFILE, DEFAULT_SHAPE
from speccheck.reading.units import format_quantity
from speccheck.records.findings import Cell


def report_limits(col, cells: dict[str, Cell]) -> None:
    """Each limit the column's values break; one the column before already broke (a beam path
    carries it on) is reported once, where it arose."""
    for limit in LIMITS:
        cell = cells.get(limit.quantity)
        if cell is None or cell.status == "conflict":
            continue
        low = cell.low if cell.low is not None else 0.0
        high = cell.high if cell.high is not None else math.inf
        if not limit.violated(low, high, col.context):
            continue
        before = col.before.get(limit.quantity) if col.before else None
        if before is not None and before.status != "conflict" and limit.violated(
                before.low if before.low is not None else 0.0,
                before.high if before.high is not None else math.inf, col.context):
            continue
        q = limit.quantity
        i = col.net.index[q]
        support = col.diagnosis.state.support(i) - {col.net.index[d] for d in DEFAULTS}
        where = q if q in col.stated else col.nearest([col.net.names[k] for k in support] or [q], q)
        origin = "" if q in col.stated else f" (from {col.describe_support(support)})"
        bound = limit.bound(col.context)
        what = limit.what.format(shape=col.context.shape.name)
        # a bound that is a number already ("100 ps", "1") is said once; one in words gets its number
        bound_text = f"{what}" if what[:1].isdigit() else \
            f"{what} ({format_quantity(col.c.units, bound, col.unit_for(q, bound))})"
        relation = "below" if limit.side == "min" else "at or above" if bound == 1.0 else "above"
        col.report.add(
            limit.rule,
            f"{col.name}.{q} is {col.show_interval(q, cell.low, cell.high, cell.value)}{origin}, {relation} "
            f"{bound_text}: {limit.consequence}.",
            col.at(where), quantities=[col.dotted(q)] + sorted(
                col.dotted(col.net.names[k]) for k in support if col.net.names[k] != q),
            related=[col.at(col.net.names[k]) for k in support if col.net.names[k] in col.stated])


_BANDWIDTHS = ("spectral_bandwidth", "spectral_bandwidth_wavelength", "spectral_bandwidth_wavenumber")
LINEARISED_FROM = 0.2  # Δλ/λ beyond which c Δλ/λ² is more than 1% off


def report_bandwidth(col, cells: dict[str, Cell]) -> None:
    """A spectrum wider than its carrier frequency reaches zero frequency: no optical pulse has
    one (definition of the FWHM about a positive carrier)."""
    bw, carrier = cells.get("spectral_bandwidth"), cells.get("carrier_frequency")
    if not (bw and carrier and bw.value and carrier.value) or bw.status == "conflict":
        return
    fraction = bw.value / carrier.value
    if LINEARISED_FROM < fraction <= 1.0 and any(q in col.stated and q not in col.inherited
                                                 for q in _BANDWIDTHS[:2]):  # said where it is stated
        # the half-maximum points λ ∓ Δλ/2 give Δν = c Δλ / (λ² − Δλ²/4) exactly; c Δλ / λ² is
        # (Δλ/λ)²/4 short of it: 1% at Δλ/λ = 20% (Taylor expansion of 1/λ)
        where = next(q for q in _BANDWIDTHS if q in col.stated)
        col.report.add(
            "bandwidth-linearised",
            f"{col.name}: the bandwidth is {fraction * 100:.3g}% of the carrier, so converting it between "
            f"wavelength and frequency with Δν = c Δλ/λ² is {fraction ** 2 / 4 * 100:.2g}% off the exact "
            "conversion of its half-maximum points (c Δλ / (λ² − Δλ²/4)); the sheet uses the linear one",
            col.at(where), quantities=[col.dotted("spectral_bandwidth")])
    if bw.value <= carrier.value:  # the numbers as stated: no tolerance makes this possible
        return
    where = next((q for q in _BANDWIDTHS if q in col.stated), "spectral_bandwidth")
    col.report.add(
        "bandwidth-exceeds-carrier",
        f"{col.name}: the spectral bandwidth {col.show_interval('spectral_bandwidth', bw.low, bw.high, bw.value)} "
        f"is larger than the carrier frequency "
        f"{col.show_interval('carrier_frequency', carrier.low, carrier.high, carrier.value)}: the spectrum "
        "would reach below zero frequency (a bandwidth in the wrong unit, or a typing slip?)",
        col.at(where), quantities=[col.dotted("spectral_bandwidth"), col.dotted("carrier_frequency")])


def report_assumptions(col, cells: dict[str, Cell]) -> None:
    state = col.diagnosis.state
    for key, default in (("pulse_shape", DEFAULT_SHAPE), ("beam_profile", DEFAULT_PROFILE)):
        if key in col.block:
            continue
        relying = sorted(
            q for q, cell in cells.items() if cell.status == "derived" and not BY_NAME[q].secondary
            and any(key in BY_ID[r].uses for r in state.via(col.net.index[q])))
        if relying:
            col.report.add(
                "assumed-shape",
                f"{col.name}.{key} is not stated, so a {default} {key.replace('_', ' ')} is assumed "
                f"for the derived {join(relying)}; state {key} to make them exact.",
                col.paths.get("", (col.name,)), key=True, quantities=[col.dotted(q) for q in relying])
