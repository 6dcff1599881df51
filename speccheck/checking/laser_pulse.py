"""The laser's pulse, as the path's field is built from it: its transform-limited duration
(a measured spectrum's, or the shape's limit over the bandwidth, or the duration itself
when nothing else is known: a transform-limited pulse), its duration, and the chirp the
laser block states (``chirp``, or a signed ``gdd`` and ``tod``)."""

from __future__ import annotations

import math
from dataclasses import replace

from speccheck.checking.column import BlockCheck
from speccheck.checking.stage_checks import interval
from speccheck.physics.shapes import DEFAULT_SHAPE
from speccheck.physics.beam import CARRIED, Beam, LaserPulse, typical
from speccheck.reading.units import UnitError
from speccheck.reading.values import Stated, ValueProblem


def beam_from(cells: dict, old: Beam | None, shape_limit: float | None = None, shape: str = DEFAULT_SHAPE,
              chirp: dict | None = None, spectrum: tuple = ()) -> Beam:
    """The beam a column passes on: its carried values, and (from the laser's column) what its
    pulse's field is built from."""
    values = {q: interval(cells[q]) for q in CARRIED if q in cells}
    if "pulse_energy" not in cells and "peak_power" in cells:  # a laser stated by its peak power
        values["peak_power"] = interval(cells["peak_power"])
    if old is not None:
        return replace(old, values=values, stage_gdd=None)
    source = "bandwidth"
    if "transform_limited_duration" in cells:
        tl, source = interval(cells["transform_limited_duration"]), "measured"
    elif shape_limit is not None and "spectral_bandwidth" in cells and typical(values["spectral_bandwidth"]):
        bw = values["spectral_bandwidth"]
        tl = (shape_limit / bw[2], shape_limit / typical(bw), shape_limit / bw[0] if bw[0] else math.inf)
    elif "pulse_duration" in values:
        tl, source = values["pulse_duration"], "duration"
    else:
        tl = None
    chirp = chirp or {}
    share = interval(cells["energy_in_main_peak"]) if "energy_in_main_peak" in cells else (1.0, 1.0, 1.0)
    share = (share[0], typical(share) or 1.0, share[2] if math.isfinite(share[2]) else 1.0)
    return Beam(values, LaserPulse(shape, tl, values.get("pulse_duration"), chirp.get("chirp"), chirp.get("gdd"),
                                   chirp.get("tod"), share, source, spectrum if source == "measured" else ()))


def measured_spectrum(walk) -> tuple:
    """The laser's measured spectrum as the field's amplitude, (ω, √S(ω)): the analysis the laser's
    column made of it (the checker keeps it), or () where there is none or it could not be used (the
    column has said why)."""
    laser = walk.data.get("laser") if isinstance(walk.data.get("laser"), dict) else {}
    raw = laser.get("spectrum")
    if not isinstance(raw, dict) or not isinstance(raw.get("file"), str) or walk.c.read is None:
        return ()
    from speccheck.physics.trace_cleaning import DataProblem

    try:
        unit = walk.c.units.parse(str(raw.get("wavelength_unit", "nm")))
        result = walk.c.data_files.analysis(walk.c.read, raw["file"], walk.report.path, "spectrum", unit.factor,
                                            walk.c.units.constants.c)
    except (DataProblem, UnitError, ValueError):  # reported where the laser's column read it
        return ()
    return (result.field_omega, result.field_amplitude) if result.field_omega else ()


def laser_chirp(walk) -> dict:
    """The chirp the laser's pulse carries: ``chirp`` (its sign), or a signed ``gdd`` and ``tod``."""
    laser = walk.data.get("laser") if isinstance(walk.data.get("laser"), dict) else {}
    out: dict = {}
    if laser.get("chirp") in ("positive", "negative"):
        out["chirp"] = laser["chirp"]
    for key, dimension in (("gdd", "s^2"), ("tod", "s^3")):
        if laser.get(key) is None:
            continue
        try:
            s = walk.c.values.parse_as(f"laser.{key}", laser[key], dimension, walk.param_tolerance(key),
                                       signed=True)
        except ValueProblem as e:
            walk.report.add(e.rule, e.message, ("laser", key), quantities=(f"laser.{key}",))
            continue
        typ = s.typical
        if typ is None and math.isfinite(s.low) and math.isfinite(s.high) and s.text.startswith("{"):
            typ = (s.low + s.high) / 2.0  # {min, max}: both ends given, the middle typical
        if typ is None:
            walk.report.add("invalid-value", f"laser.{key}: {s.text} leaves the chirp open; give a value "
                            "('-2000 fs^2 ± 200 fs^2') or both ends ({min: …, max: …})", ("laser", key))
            continue
        out[key] = (s.low, typ, s.high)
    if "tod" in out and "gdd" not in out:
        out["gdd"] = (0.0, 0.0, 0.0)
    if "gdd" in out and "chirp" in out and out["gdd"][1] and (out["gdd"][1] > 0) != (out["chirp"] == "positive"):
        walk.report.add("invalid-value", f"laser.chirp: {out['chirp']} and a GDD of sign "
                        f"{'+' if out['gdd'][1] > 0 else '−'} disagree", ("laser", "chirp"))
    return out


def chirp_duration(walk, beam: Beam, ctx) -> Beam:
    """The duration the laser's stated GDD (and TOD) gives its pulse, against the stated duration: a
    ``laser-chirp-mismatch`` where they cannot both hold, a note with the duration where none is stated.
    The field is built here, so the path starts from it."""
    chirp = beam.laser.gdd if beam.laser is not None else None
    if chirp is None:
        return beam
    made = beam.field(ctx)
    if made is None:
        return beam
    beam = replace(beam, pulse=made)
    got = made.numbers.duration
    stated = beam.get("pulse_duration")
    shown = (walk.show("pulse_duration", got[1], "fs") if got[2] <= got[0] * 1.001 else
             f"{walk.show('pulse_duration', got[1], 'fs')} ({walk.show('pulse_duration', got[0], 'fs')} … "
             f"{walk.show('pulse_duration', got[2], 'fs')})")
    key = "gdd" if isinstance(walk.data.get("laser"), dict) and "gdd" in walk.data["laser"] else "tod"
    if stated is None:
        walk.report.add("stage-model", f"laser.{key}: the pulse it carries lasts {shown} (its field by FFT); "
                        "the laser column states no pulse_duration, and shows this one", ("laser", key), key=True)
        return _with_duration(walk, beam, got, shown)
    elif got[0] > stated[2] * 1.001 or got[2] < stated[0] * 0.999:
        tl = walk.show("pulse_duration", made.tl[1], "fs")
        walk.report.add("laser-chirp-mismatch", f"laser.{key}: with the chirp the laser's pulse carries, a "
                        f"pulse of {tl} at its transform limit lasts {shown}, but its pulse_duration is "
                        f"{walk.show('pulse_duration', stated[1] or stated[0], 'fs')}; one of them is wrong",
                        ("laser", key), quantities=(f"laser.{key}", "laser.pulse_duration"))
    return beam


def _with_duration(walk, beam: Beam, got: tuple, shown: str) -> Beam:
    """The laser column again, with the duration of its chirped field carried into it (as a stage's
    column takes what the path carries), so that its peak power and what follows are shown; the
    beam carries the new column's values and keeps its field."""
    block = walk.data.get("laser")
    if not isinstance(block, dict) or "laser" not in walk.sheet:
        return beam
    inherited = {"pulse_duration": Stated("pulse_duration", got[0], got[2], got[1], "fs",
                                          f"{shown} (from the laser's chirp)")}
    cells = BlockCheck(walk.c, "laser", block, walk.tolerance, walk.report, None, inherited, notes=False).run()
    walk.sheet["laser"] = cells
    return replace(beam, values={q: interval(cells[q]) for q in CARRIED if q in cells})
