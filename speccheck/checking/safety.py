"""The laser-safety caution: shown for every spec of a hazardous beam.

speccheck does not classify lasers or compute exposure limits.  It shows the
usual cautions and defers to IEC 60825-1 / ANSI Z136.1, local rules and the
laser safety officer.  When the spec gives a maximum permissible exposure that
the safety officer supplied (``safety: {mpe: ...}``), it does one piece of
arithmetic: the indicative optical density log10(H / MPE) for the largest
exposure H anywhere in the sheet, with the same disclaimer.
"""

from __future__ import annotations

import math

HAZARD_POWER = 1e-3  # W: above a few mW a continuous beam is already an eye hazard (common practice)

CAUTION = (
    "laser safety: this beam can injure eyes and skin, also through stray and specular reflections. "
    "Wear eyewear rated for the wavelength and optical density, enclose beams, keep beam paths below eye "
    "level and control reflections; follow the hazard classification and controls of IEC 60825-1 or "
    "ANSI Z136.1, your local rules and your laser safety officer. speccheck does not classify lasers "
    "or compute exposure limits"
)


def is_hazard(sheet: dict) -> bool:
    laser = sheet.get("laser", {})
    pulsed = any(q in laser for q in ("pulse_duration", "pulse_energy", "repetition_rate", "peak_power"))
    power = max((c["average_power"].value or 0.0 for c in sheet.values() if "average_power" in c), default=0.0)
    return pulsed or power > HAZARD_POWER


def optical_density(sheet: dict, mpe_si: float, as_fluence: bool) -> tuple[float, str] | None:
    """log10(H / MPE) with H the largest peak fluence (or average intensity) in the sheet."""
    quantity = "peak_fluence" if as_fluence else "average_intensity"
    best = None
    for column, cells in sheet.items():
        c = cells.get(quantity)
        if c is not None and c.value and (best is None or c.value > best[0]):
            best = (c.value, column)
    if best is None or best[0] <= 0 or mpe_si <= 0:
        return None
    return math.log10(best[0] / mpe_si), best[1]
