"""The stage kinds' own checks, and the checks every stage gets.

A stage kind (``physics.stages.STAGE_KINDS``) names its checks by id in its row;
this module holds their code and the registry ``CHECKS`` (an unknown id fails
loudly on import).  The walk calls the same hooks for every kind:

* ``incident`` checks run before the stage's column is built and may change what the
  column is built from (``visit.beam``, ``visit.measured``);
* ``column`` checks run after it, with its cells (``visit.cells``), and may add cells.

Each check takes the walk (for the report, the sheet, the value parser and the
path's settings) and the ``Visit`` of one stage.
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Callable

from speccheck.checking.beam_checks import clear_aperture, entrance_value, focus_spot
from speccheck.physics import gaussian_beam as gb
from speccheck.physics import hazards, materials
from speccheck.physics.beam import Beam, typical
from speccheck.physics.stages import STAGE_KINDS, StageKind
from speccheck.reading.values import ValueProblem
from speccheck.records.findings import Cell
from speccheck.records.rules import RULES


@dataclass
class Visit:
    """One stage on the walk: what its checks are given (a working record, not a result)."""

    name: str  # the stage's column
    kind: StageKind
    stage: dict  # as written in the spec
    params: dict  # parsed: name -> (low, typical, high) in SI, or a text
    at: tuple  # the stage's place in the document
    incident: dict  # cells of the column before: the beam entering the stage
    beam: Beam  # the beam the stage puts out
    measured: object  # the stage's ``measured:`` block
    columns: list  # the branch's columns so far (this stage's last, once built)
    cells: dict | None = None  # this stage's column, once built


def interval(cell: Cell) -> tuple:
    """A cell as the walk's interval (low, typical, high): 0 and inf for an unbounded side."""
    low = cell.low if cell.low is not None else 0.0
    high = cell.high if cell.high is not None else math.inf
    return (low, cell.value, high)


@dataclass(frozen=True)
class StageCheck:
    id: str
    phase: str  # "incident" or "column"
    run: Callable  # (walk, visit) -> None
    summary: str
    rules: tuple[str, ...] = ()  # the rule ids it reports (each must be in the rule catalogue)
    keys: tuple[str, ...] = ()  # stage keys it reads besides the kind's parameters


def photon_energy(walk, v: Visit) -> None:
    """Signal and idler must add up to the pump's photon energy."""
    name, incident, params, at = v.name, v.incident, v.params, v.at
    pump = interval(incident["wavelength"]) if incident.get("wavelength") else None
    s, i = params.get("signal_wavelength"), params.get("idler_wavelength")
    _manley_rowe(walk, v, pump, s, i)
    if pump and (s is None) != (i is None):  # one given: it must carry less photon energy than the pump
        given, label = (s, "signal") if s is not None else (i, "idler")
        if given[2] <= pump[0]:
            walk.report.add("photon-energy-not-conserved",
                            f"{name}: the {label} at {given[1] * 1e9:.5g} nm would carry more photon energy than "
                            f"the pump at {pump[1] * 1e9:.5g} nm (1/λp = 1/λs + 1/λi): no parametric stage "
                            f"makes it", at + (f"{label}_wavelength",))
        return
    if not (pump and s and i):
        return
    # 1/λp = 1/λs + 1/λi (photon-energy conservation); compare with the intervals
    lo = 1 / s[2] + 1 / i[2]
    hi = 1 / s[0] + 1 / i[0]
    p_lo, p_hi = 1 / pump[2], 1 / pump[0]
    if hi < p_lo or lo > p_hi:
        implied = 1 / (1 / s[1] + 1 / i[1])
        walk.report.add("photon-energy-not-conserved",
                        f"{name}: signal {s[1] * 1e9:.5g} nm and idler {i[1] * 1e9:.5g} nm need a pump at "
                        f"{implied * 1e9:.5g} nm (1/λp = 1/λs + 1/λi), but the pump is at "
                        f"{pump[1] * 1e9:.5g} nm", at + ("signal_wavelength",))


def _manley_rowe(walk, v: Visit, pump, s, i) -> None:
    """One pump photon makes one signal and one idler photon (Manley–Rowe relations), so one output
    can take at most λp/λout of the pump's energy: an energy efficiency above that is impossible."""
    eff = v.params.get("efficiency")
    if not (pump and eff and pump[1]):
        return
    output = v.params.get("output", "signal")
    lam = s if output == "signal" else i
    if lam is None:  # the other one given: 1/λout = 1/λp − 1/λother
        other = i if output == "signal" else s
        if other is None or not 1 / pump[1] > 1 / other[1]:
            return
        lam_out = 1 / (1 / pump[1] - 1 / other[1])
    else:
        lam_out = lam[1]
    limit = pump[1] / lam_out
    if eff[0] <= limit * (1 + 1e-9) < eff[1]:  # the tolerance reaches below the limit, the typical value not
        walk.report.add("typical-values-disagree",
                        f"{v.name}: the typical energy efficiency {eff[1] * 100:.3g}% into the {output} is above "
                        f"the {limit * 100:.3g}% that the Manley–Rowe relations allow (λp/λout); it holds only at "
                        "the low edge of its tolerance", v.at + ("efficiency",), quantities=(f"{v.name}.efficiency",))
    if eff[0] > limit * (1 + 1e-9):
        walk.report.add("manley-rowe-limit",
                        f"{v.name}: an energy efficiency of {eff[1] * 100:.3g}% into the {output} at "
                        f"{lam_out * 1e9:.5g} nm is more than the {limit * 100:.3g}% one photon of the pump at "
                        f"{pump[1] * 1e9:.5g} nm can give it (Manley–Rowe: at most λp/λout of the pump energy)",
                        v.at + ("efficiency",), quantities=(f"{v.name}.efficiency",))


def measured_spot(walk, v: Visit) -> None:
    """A measured focus spot may be larger than the diffraction limit, never smaller.  One that is
    possible is compared by the column with the spot the path carries (``measured-mismatch`` where
    they disagree: with M² stated, a spot larger than its tolerance allows is a finding too)."""
    name, beam, measured, at, params = v.name, v.beam, v.measured, v.at, v.params
    if not isinstance(measured, dict):
        return
    rest = {k: x for k, x in measured.items() if k not in ("beam_diameter", "beam_radius")}
    key = "beam_diameter" if "beam_diameter" in measured else "beam_radius" if "beam_radius" in measured else None
    limit = beam.get("beam_diameter")
    if key is None or limit is None:
        return
    try:
        s = walk.c.values.parse(key, measured[key], walk.tolerance)
    except ValueProblem:
        return  # reported by the column
    k = 2.0 if key == "beam_radius" else 1.0
    spot = (s.low * k, (s.typical or 0) * k or None, s.high * k)
    if spot[2] < limit[0]:
        walk.report.add(
            "spot-below-diffraction-limit",
            f"{name}: the measured focus {key} {s.text} is smaller than the smallest spot this beam can be "
            f"focused to, {walk.show('beam_diameter', typical(limit) / k, 'µm')} (the 1/e² waist "
            f"{'radius' if k == 2.0 else 'diameter'} of a beam of its M² through f = "
            f"{params['focal_length'][1] * 1e3:.4g} mm; for a collimated beam about 4 M² λ f / (π D), the "
            "diffraction limit times M²)",
            at + ("measured", key), quantities=(f"{name}.{key}",))
        v.measured = rest


def self_focusing(walk, v: Visit) -> None:
    """Self-focusing and B-integral of a material stage, for the pulse entering it (it only gets longer
    inside, so the entrance is the worst case) and the beam at each depth: the B-integral is the entrance
    intensity over the Kerr length ∫ w(0)²/w(z)² dz, the collapse distance Marburger's for the
    entrance's radius with his lens transformation for a converging beam."""
    name, params, cells, incident, at, columns = v.name, v.params, v.cells, v.incident, v.at, v.columns
    material = materials.lookup(params["material"])
    lam = cells.get("wavelength")
    peak = incident.get("peak_power") or cells.get("peak_power")
    intensity = incident.get("peak_intensity") or cells.get("peak_intensity")
    at_entrance = entrance_value(v, "peak_intensity") if incident.get("peak_intensity") else None
    g = v.beam.geometry
    if material.n2 is None or not lam or not lam.value:
        return  # the walk carries the B-integral of the columns before
    n0 = float(materials.refractive_index(material, lam.value))
    p_low = hazards.critical_power(lam.value, n0, material.n2[1])
    p_high = hazards.critical_power(lam.value, n0, material.n2[0])
    cells["critical_power"] = Cell("derived", p_low, p_high, math.sqrt(p_low * p_high), "W", "MW")
    solid = material.name != "air"
    if peak and peak.value:
        shown = walk.show("peak_power", peak.value, "MW")
        crit = walk.show('peak_power', p_low, 'MW') + (
            "" if p_high / p_low < 1.001 else f" … {walk.show('peak_power', p_high, 'MW')}")
        n2 = f"{material.n2[0]:.3g}" + ("" if material.n2[1] == material.n2[0] else f"–{material.n2[1]:.3g}")
        where = f"P_cr = 3.77 λ²/(8π n0 n2) = {crit} for {material.label} (n2 {n2} m²/W, " \
                f"{material.n2_source})"
        radius = incident.get("beam_radius") or cells.get("beam_radius")
        radius = g.entrance_diameter[1] / 2.0 if g is not None and g.entrance_diameter else \
            radius.value if radius and radius.value else None
        length = params["thickness"][1]
        z_f = hazards.collapse_distance(peak.value, p_low, lam.value, n0, radius) \
            if radius else None  # no beam size: the collapse distance is not known
        wavefront = gb.wavefront_radius(g.entrance) if g is not None and g.entrance is not None else math.inf
        if z_f is not None and math.isfinite(wavefront):  # in the glass the wavefront radius is n times longer
            z_f = gb.converging_collapse(z_f, wavefront * n0)
            where += (f"; the collapse distance for its {'converging' if wavefront < 0 else 'diverging'} wavefront "
                      f"(R = {walk.show('beam_radius', wavefront, 'mm')} at the entrance, negative converging) by "
                      "Marburger's lens transformation 1/z_f' = 1/z_f − 1/(n0 R)")
        if (peak.high or peak.value) > p_low and z_f is not None and z_f < length:
            walk.report.add("self-focusing" if solid else "self-focusing-air",
                            f"{name}: the peak power {shown} is above the critical power for self-focusing "
                            f"and the beam collapses within the stage (Marburger's distance "
                            f"{walk.show('beam_radius', z_f, 'mm')} < {walk.show('beam_radius', length, 'mm')}"
                            f"), {where}", at, key=True, quantities=(f"{name}.peak_power",))
        elif (peak.high or peak.value) > p_low:
            walk.report.add("self-focusing-risk",
                            f"{name}: the peak power {shown} is above the critical power for self-focusing, "
                            f"{where}; " + (f"the collapse distance {walk.show('beam_radius', z_f, 'mm')} is "
                                            "longer than the stage, so the B-integral decides" if z_f is not None
                                            else "without a beam size the collapse distance is not known: state "
                                            "beam_diameter to tell whether the beam collapses in the stage"),
                            at, key=True,
                            quantities=(f"{name}.peak_power",))
    before = walk.b_total(columns[:-1])
    if intensity and intensity.value:
        if at_entrance is not None:
            intensity = intensity._replace(value=at_entrance)
        # the Kerr length: the entrance intensity over it gives the integral of I(z) through the plate
        length = gb.kerr_length(g.entrance, params["thickness"][1], n0) if g is not None and g.entrance else \
            params["thickness"][1]
        n2 = math.sqrt(material.n2[0] * material.n2[1])
        b = hazards.b_integral(lam.value, n2, intensity.value, length)
        cells["b_integral"] = Cell("derived", hazards.b_integral(lam.value, material.n2[0], intensity.value, length),
                                   hazards.b_integral(lam.value, material.n2[1], intensity.value, length), b, "1", "1")
        total = before + b
        cells["b_integral_total"] = Cell("derived", total, total, total, "1", "1")
        if total > walk.b_limit >= before:
            thickness = params["thickness"][1]
            # the peak intensity's integral through the plate: its entrance value times the plate's length,
            # or times a Kerr length where the beam narrows or widens inside it
            formula = "B = (2π/λ) Σ n2 ∫ I dz" + (
                "" if abs(length / thickness - 1.0) < 1e-3 else
                f", here n2 I L_eff with the entrance intensity and an effective length "
                f"{walk.show('beam_radius', length, 'mm')} for the {walk.show('beam_radius', thickness, 'mm')} "
                "plate, as the beam's size changes inside it")
            walk.report.add("b-integral",
                            f"{name}: the accumulated B-integral reaches {total:.3g} rad here ({b:.3g} rad in "
                            f"this stage; {formula}), above the limit of {walk.b_limit:g} rad",
                            at, key=True, quantities=(f"{name}.b_integral",))
    elif before:
        cells["b_integral_total"] = Cell("derived", before, before, before, "1", "1")


def dispersion_range(walk, v: Visit) -> None:
    """A material's dispersion formula holds only over its published range: the part of the
    spectrum that carries the pulse's energy (the centre ± one FWHM) must lie inside it."""
    material = materials.lookup(v.params["material"])
    lam, width = v.incident.get("wavelength"), v.incident.get("spectral_bandwidth_wavelength")
    if not (lam and lam.value):
        return
    half = width.value if width and width.value else 0.0
    lo, hi = lam.value - half, lam.value + half
    r_lo, r_hi = (x * 1e-6 for x in material.valid_range_um)
    if lo >= r_lo and hi <= r_hi:
        return
    span = walk.show("wavelength", lam.value, "nm") + (f" ± {walk.show('wavelength', half, 'nm')}" if half else "")
    walk.report.add("outside-dispersion-range",
                    f"{v.name}: the spectrum ({span}) reaches outside the range of {material.label}'s dispersion "
                    f"formula ({walk.show('wavelength', r_lo, 'nm')} … {walk.show('wavelength', r_hi, 'nm')}, "
                    f"{material.source}): its GDD and TOD here are extrapolated", v.at, key=True,
                    quantities=(f"{v.name}.wavelength",))


def optic_damage(walk, v: Visit) -> None:
    raw = v.stage.get("damage_threshold")
    if not isinstance(raw, dict):
        return
    name, incident, at = v.name, v.incident, v.at
    where = at + ("damage_threshold",)
    try:
        rated = walk.c.values.parse_as(f"{name}.damage_threshold.fluence", raw.get("fluence"), "J/m^2", 0.0)
        tau_ref = (walk.c.values.parse_as(f"{name}.damage_threshold.pulse_duration", raw["pulse_duration"],
                                          "s", 0.0).typical if "pulse_duration" in raw else None)
        lam_ref = (walk.c.values.parse_as(f"{name}.damage_threshold.wavelength", raw["wavelength"], "m",
                                          0.0).typical if "wavelength" in raw else None)
    except ValueProblem as e:
        walk.report.add(e.rule, e.message, where)
        return
    fluence, tau, lam = (incident.get(q) for q in ("peak_fluence", "pulse_duration", "wavelength"))
    face = ""
    if fluence and fluence.value:  # on the optic: at its entrance plane, after the stage's distance
        fluence = fluence._replace(value=entrance_value(v, "peak_fluence"))
        # a plate's exit face sees the beam as it leaves (smaller in a converging beam): the worse face
        leaving = (v.cells or {}).get("peak_fluence") if "thickness" in v.params else None
        if leaving is not None and leaving.value and leaving.value > fluence.value:
            fluence, face = fluence._replace(value=leaving.value), " (on its exit face, where the beam is smaller)"
    if not fluence or not fluence.value or not rated.typical:
        walk.report.add("target-unknown", f"{name}: the peak fluence on this optic is not determined, so its "
                        "damage threshold cannot be checked", where, key=True)
        return
    threshold, how = hazards.scaled_threshold(rated.typical, tau_ref, tau.value if tau else None)
    notes = []
    if how == "does not transfer":
        notes.append(f"the rating is for {walk.show('pulse_duration', tau_ref, 'fs')} and the pulse here is "
                     f"{walk.show('pulse_duration', tau.value, 'fs')}: below about 10 ps a damage rating does "
                     "not transfer between durations (common practice), so this comparison is only indicative")
    elif how != "as rated":
        notes.append(f"threshold {how} to {walk.show('peak_fluence', threshold, 'J/cm^2')}")
    if lam_ref and lam and lam.value and abs(lam.value / lam_ref - 1) > 0.05:
        notes.append(f"rated at {walk.show('wavelength', lam_ref, 'nm')}, used at "
                     f"{walk.show('wavelength', lam.value, 'nm')}")
    margin = threshold / fluence.value
    text = (f"{name}: peak fluence {walk.show('peak_fluence', fluence.value, 'J/cm^2')}{face} on an optic rated "
            f"{rated.text}; margin {margin:.3g}×" + ("; " + "; ".join(notes) if notes else ""))
    if margin < 1:
        walk.report.add("optic-damage", text + ". Expect damage to this optic.", where, key=True)
    elif margin < walk.safety_factor:
        walk.report.add("optic-damage-margin", text + f", less than the safety factor {walk.safety_factor:g}.",
                        where, key=True)
    elif how == "does not transfer":
        walk.report.add("damage-rating-not-transferable", text + ".", where, key=True)


CHECKS: dict[str, StageCheck] = {c.id: c for c in (
    StageCheck("photon-energy", "incident", photon_energy, "1/λp = 1/λs + 1/λi for a parametric stage",
               ("photon-energy-not-conserved", "manley-rowe-limit", "typical-values-disagree")),
    StageCheck("measured-spot", "incident", measured_spot, "a measured spot against the diffraction limit",
               ("spot-below-diffraction-limit",)),
    StageCheck("focus-spot", "column", focus_spot, "the paraxial limit of a focus: spot radius and NA",
               ("non-paraxial-focus",)),
    StageCheck("clear-aperture", "column", clear_aperture, "the power a stage's clear aperture clips",
               ("aperture-clipping", "target-unknown"), keys=("clear_aperture",)),
    StageCheck("self-focusing", "column", self_focusing, "critical power, collapse distance and B-integral",
               ("self-focusing", "self-focusing-air", "self-focusing-risk", "b-integral")),
    StageCheck("dispersion-range", "column", dispersion_range, "the spectrum inside the material's formula range",
               ("outside-dispersion-range",)),
    StageCheck("optic-damage", "column", optic_damage, "peak fluence against a stated damage threshold",
               ("optic-damage", "optic-damage-margin", "damage-rating-not-transferable", "target-unknown"),
               keys=("damage_threshold",)),
)}

EVERY_STAGE = ("optic-damage", "clear-aperture")  # checks of every stage, whatever its kind

_unknown = sorted({c for k in STAGE_KINDS.values() for c in k.checks} - set(CHECKS)) or \
    sorted(set(EVERY_STAGE) - set(CHECKS))
if _unknown:
    raise ValueError(f"stage kinds name checks that do not exist: {', '.join(_unknown)}")
_unknown = sorted({r for c in CHECKS.values() for r in c.rules} - set(RULES))
if _unknown:
    raise ValueError(f"stage checks name rules that are not in the catalogue: {', '.join(_unknown)}")


def checks_of(kind: StageKind, phase: str) -> list[StageCheck]:
    return [CHECKS[c] for c in kind.checks + EVERY_STAGE if CHECKS[c].phase == phase]
