"""The end of each branch of the path: its targets, the dispersion that would compress the
pulse there, and the strong-field figures at high intensity."""

from __future__ import annotations

import math
from dataclasses import dataclass

from speccheck.physics import hazards
from speccheck.physics.quantities import BY_NAME
from speccheck.physics.beam import Beam, typical
from speccheck.reading.units import format_number
from speccheck.reading.values import Stated, ValueProblem
from speccheck.records.findings import Cell


ROUNDING = 1e-9  # relative: a value this close to a target's bound meets it


@dataclass(frozen=True)
class Outcome:
    """One target's verdict, for what comes after the walk (``remedies``): where it is written, the
    column it is compared with (and the columns of its branch), what it needs, the nominal value
    the path gives (None: not determined), and the index of its finding in the report."""

    at: tuple
    column: str
    columns: tuple
    need: Stated
    value: float | None
    verdict: str  # "met" | "not-met" | "uncertain" | "unknown"
    finding: int | None = None
    point: tuple | None = None  # (index, column name) of the operating point walked; None: the laser block
    nominal: bool = True  # False: the column has no typical value, only bounds (the value is an end of them)


def _record(walk, where, last, columns, need, value, verdict, before: int, nominal: bool = True) -> None:
    found = len(walk.report.findings) - 1 if len(walk.report.findings) > before else None
    walk.outcomes.append(Outcome(where, last, tuple(columns), need, value, verdict, found, nominal=nominal))


def finish(walk, columns: list, beam: Beam, target, target_at: tuple, end_at: tuple = ()) -> None:
    """Targets are compared with the last column of their branch."""
    last = columns[-1]
    if last != "laser":
        walk.ends.append(last)
    # what the branch's end is told is placed at its target, or without one at its last stage
    at = target_at if isinstance(target, dict) and target else end_at or target_at
    if not walk.lean:
        compensation(walk, last, beam, at)
    strong_field(walk, last, target, at)
    judge(walk, columns, target, target_at)


def judge(walk, columns: list, target, target_at: tuple) -> None:
    """A target against the last of ``columns`` (a branch's end, or a stage with its own target)."""
    last = columns[-1]
    cells = walk.sheet.get(last, {})
    if not isinstance(target, dict):
        return
    for key, raw in target.items():
        if key not in BY_NAME and key != "spectral_bandwidth":
            continue  # the schema reports unknown keys
        try:
            need = walk.c.values.parse(key, raw, walk.tolerance)
        except ValueProblem as e:
            walk.report.add(e.rule, f"target.{e.message}", target_at + (key,))
            continue
        cell = cells.get(need.quantity)
        where = target_at + (key,)
        before = len(walk.report.findings)
        if cell is None or cell.value is None and cell.low is None:
            from speccheck.checking.remedies import determining

            walk.report.add("target-unknown", f"target {key} {need.text}: the path does not determine "
                            f"{need.quantity} at {last!r}; {determining(walk, last, need.quantity)}", where)
            _record(walk, where, last, columns, need, None, "unknown", before)
            continue
        # a value with both ends known has a nominal value; an open one (a bound) shows only an end
        nominal = cell.value is not None and cell.low is not None and cell.high is not None
        low = cell.low if cell.low is not None else 0.0
        high = cell.high if cell.high is not None else math.inf
        value = cell.value if cell.value is not None else (low if low > 0 else high)
        shown = walk.show(need.quantity, value, need.unit)
        # a value equal to its bound meets it: the arithmetic that derived it may leave the last digits
        need_low, need_high = need.low * (1 - ROUNDING), need.high * (1 + ROUNDING)
        if low >= need_low and high <= need_high:
            margin = _margin(value, need)
            walk.report.add("target-met", f"target {key} {need.text} is met at {last!r}: {shown}{margin}.",
                            where, quantities=(f"{last}.{need.quantity}",))
            _record(walk, where, last, columns, need, value, "met", before, nominal)
        elif high < need_low or low > need_high:
            cost = costliest(walk, columns, need) + _below_limit(walk, cells, need)
            walk.report.add("target-not-met",
                            f"target {key} {need.text} is not met at {last!r}: the path gives {shown}"
                            f"{_margin(value, need)}.{cost}", where,
                            quantities=(f"{last}.{need.quantity}",))
            _record(walk, where, last, columns, need, value, "not-met", before, nominal)
        else:
            span = f"({walk.show(need.quantity, low, need.unit)} … {walk.show(need.quantity, high, need.unit)})"
            said = ("it is known only by its bounds" if not nominal else
                    f"its nominal value does{'' if need_low <= value <= need_high else ' not'} meet it")
            walk.report.add("target-uncertain",
                            f"target {key} {need.text} may not be met at {last!r}: the path gives {shown} {span}; "
                            f"{said}, and within the tolerances it may go either way.", where,
                            quantities=(f"{last}.{need.quantity}",))
            _record(walk, where, last, columns, need, value, "uncertain", before, nominal)


def _below_limit(walk, cells: dict, need: Stated) -> str:
    """A duration asked for below what the column's spectrum allows at its widest: said as the reason."""
    bw = cells.get("spectral_bandwidth")
    shape = walk.stage_context([]).transform_limit
    if need.quantity != "pulse_duration" or not (bw and bw.high and shape) or not math.isfinite(need.high):
        return ""
    shortest = shape / bw.high
    if need.high >= shortest:
        return ""
    return (f" No pulse of this spectrum can be that short: its transform limit is "
            f"{walk.show('pulse_duration', shortest, 'fs')} at the widest bandwidth here.")


def _margin(value: float, need: Stated) -> str:
    bound = need.low if need.low > 0 and not math.isfinite(need.high) else need.high \
        if math.isfinite(need.high) and need.low == 0 else need.typical
    if not bound or not value:
        return ""
    return f", {format_number(value / bound, 3)}× the required {need.text.lstrip('<>=≤≥ ')}"


def costliest(walk, columns: list, need: Stated) -> str:
    """The stage whose column changes the target's quantity the wrong way the most."""
    q = need.quantity
    wants_more = need.low > 0 and not math.isfinite(need.high) or (
        need.typical is not None and need.low > 0)
    worst, factor = None, None
    for before, after in zip(columns, columns[1:]):
        a, b = walk.sheet.get(before, {}).get(q), walk.sheet.get(after, {}).get(q)
        if not (a and b and a.value and b.value):
            continue
        f = b.value / a.value
        if factor is None or (f < factor if wants_more else f > factor):
            worst, factor = after, f
    if worst is None or (wants_more and factor >= 0.99) or (not wants_more and factor <= 1.01):
        return ""
    change = f"loses a factor {1 / factor:.3g}" if wants_more else f"grows it by a factor {factor:.3g}"
    return f" The stage that costs the most is {worst!r}: it {change} in {q.replace('_', ' ')}."


def compensation(walk, last: str, beam: Beam, at: tuple) -> None:
    """The GDD and TOD that would give the highest peak power at the end of this branch."""
    made = beam.pulse
    tau = beam.get("pulse_duration")
    if made is None or not tau or not typical(tau):
        return
    tl = made.envelope.tl
    if typical(tau) < 1.05 * tl:
        return
    try:
        gdd, tod = made.compensation()
    except (ValueError, OverflowError, ZeroDivisionError, FloatingPointError):
        return
    net = made.numbers.net
    tod_text = f" and {format_number(tod * 1e45, 4)} fs³" if abs(tod) * (4.0 / tl) ** 3 / 6.0 >= 0.01 else ""
    walk.report.add("dispersion-compensation",
                    f"at {last!r} the pulse is {walk.show('pulse_duration', typical(tau), 'fs')} against "
                    f"{walk.show('pulse_duration', tl, 'fs')} transform-limited: the net GDD there is "
                    f"{format_number(net[0][1] * 1e30, 4)} fs² (TOD {format_number(net[1][1] * 1e45, 4)} fs³); adding "
                    f"{format_number(gdd * 1e30, 4)} fs²"
                    f"{tod_text} (a compressor or prechirp) would give the highest peak power"
                    + ("; the laser's chirp sign is not stated, and this is for positive chirp (state laser.chirp "
                       "for the other)" if made.sign_unknown else ""), at, key=True)


def strong_field(walk, last: str, target, target_at: tuple) -> None:
    """Ponderomotive energy, a0 and, for a named gas, Keldysh parameter and HHG cutoff."""
    cells = walk.sheet.get(last, {})
    intensity, lam = cells.get("peak_intensity"), cells.get("wavelength")
    if not (intensity and intensity.value and lam and lam.value) or intensity.value < hazards.STRONG_FIELD_FROM:
        return
    k = walk.c.units.constants
    up = hazards.ponderomotive_energy(intensity.value, lam.value, k)
    polarization = target.get("polarization", "linear") if isinstance(target, dict) else "linear"
    polarization = polarization if polarization in ("linear", "circular") else "linear"
    a0 = hazards.vector_potential(intensity.value, lam.value, k, polarization)
    cells["ponderomotive_energy"] = Cell("derived", None, None, up, "J", "eV")
    cells["normalized_vector_potential"] = Cell("derived", None, None, a0, "1", "1")
    if a0 >= hazards.A0_NOTE_FROM:
        walk.report.add("relativistic-intensity",
                        f"at {last!r} the normalized vector potential a0 = {a0:.3g} approaches 1: electrons "
                        "become relativistic and the non-relativistic strong-field figures lose validity",
                        target_at, key=True)
    gas = target.get("gas") if isinstance(target, dict) else None
    if not isinstance(gas, str):
        return
    gas = hazards.GAS_ALIASES.get(gas.lower(), gas.lower())
    if gas not in hazards.IONIZATION_ENERGY_EV:
        return  # the schema lists the gases
    ev = walk.c.units.constants.e
    ip = hazards.IONIZATION_ENERGY_EV[gas] * ev
    gamma = hazards.keldysh(ip, up)
    cutoff = hazards.hhg_cutoff(ip, up)
    photon = cells.get("photon_energy")
    cells["ionization_potential"] = Cell("derived", ip, ip, ip, "J", "eV")
    cells["keldysh_parameter"] = Cell("derived", None, None, gamma, "1", "1")
    cells["hhg_cutoff_energy"] = Cell("derived", None, None, cutoff, "J", "eV")
    bsi = hazards.barrier_suppression_intensity(ip, walk.c.units.constants, polarization=polarization)
    cells["barrier_suppression_intensity"] = Cell("derived", None, None, bsi, "W/m^2", "W/cm^2")
    if intensity.value > bsi:
        walk.report.add("above-barrier-suppression",
                        f"at {last!r} the peak intensity {walk.show('peak_intensity', intensity.value, 'W/cm^2')} "
                        f"is above the barrier-suppression intensity of {gas} "
                        f"({walk.show('peak_intensity', bsi, 'W/cm^2')}; Augst et al. 1989): the gas is ionized "
                        "before the pulse's peak, so the cutoff and Keldysh figures, which assume the neutral "
                        "atom, overstate what the peak does", target_at + ("gas",),
                        quantities=(f"{last}.peak_intensity",))
    order = ""
    if photon and photon.value and cutoff / photon.value >= 1.0:
        # a gas of atoms (inversion-symmetric) gives odd harmonics only: the highest one at or below the cutoff
        # (P. B. Corkum, Phys. Rev. Lett. 71, 1994 (1993); the odd orders from the symmetry, from memory)
        highest = math.floor(cutoff / photon.value)
        highest -= 1 - highest % 2
        order = f" (the highest harmonic below it: order {highest}, as a gas gives odd orders only)"
    regime = "tunnel" if gamma < 1 else "multiphoton"
    circular = "; with circular light, high-harmonic generation is suppressed (the returning electron misses " \
        "the ion), so the cutoff is only the linear-light figure" if polarization == "circular" else ""
    walk.report.add("strong-field-figures",
                    f"at {last!r} in {gas}: U_p = {up / ev:.3g} eV, Keldysh γ = {gamma:.3g} ({regime} regime), "
                    f"high-harmonic cutoff I_p + 3.17 U_p = {cutoff / ev:.4g} eV{order}, a0 = {a0:.3g} "
                    f"({polarization} polarization){circular}",
                    target_at + ("gas",), quantities=(f"{last}.peak_intensity",))
