"""Invented laser specs for benchmarks: ``generate(n, folder, seed=0)``.

Every spec describes an invented source (an oscillator or an amplifier) whose
numbers are computed from the same physics the checker knows:

* pulse energy        E = P_avg / f_rep
* peak power          P_pk = a · E / τ      (a = 0.9394 Gaussian, 0.8814 sech²)
* bandwidth           Δν = c · Δλ / λ² = c · Δν̃
* time-bandwidth      Δν · τ ≥ 0.441 (Gaussian) / 0.315 (sech²)
* autocorrelation     τ_ac = k · τ          (k = √2 Gaussian, 1.543 sech²)
* beam                w = D / 2, D_fwhm = √(ln2/2) · D, F_pk = 2 E / (π w²), I_pk = 2 P_pk / (π w²)

The free parameters are drawn as round numbers; the quantities that follow
from them are rounded to three or four significant figures, well inside the
tolerance each spec states, so a consistent spec is consistent for the checker.
About 5 % of the specs carry one deliberately wrong number (a µ/n slip, a
radius written as the diameter, fs for ps, mW for W, nm for THz); the returned
records say which.

Deterministic for a given ``(n, seed)``: the same files, byte for byte.

    python benchmarks/generate.py N FOLDER [--seed S] [--manifest]
"""

from __future__ import annotations

import argparse
import json
import math
import random
import sys
from pathlib import Path

C = 299_792_458.0  # m/s
H = 6.626_070_15e-34  # J s
EV = 1.602_176_634e-19  # J

SHAPES = {
    # name: (peak-power factor a, transform limit, autocorrelation factor k)
    "gaussian": (2.0 * math.sqrt(math.log(2.0) / math.pi), 2.0 * math.log(2.0) / math.pi, math.sqrt(2.0)),
    "sech2": (math.log(1.0 + math.sqrt(2.0)), (2.0 * math.acosh(math.sqrt(2.0)) / math.pi) ** 2, 1.5427),
}
FWHM_OF_DIAMETER = math.sqrt(math.log(2.0) / 2.0)  # Gaussian beam: D_fwhm / D(1/e²)

# Units a value may be written in, per SI unit: (text, factor to SI).
UNITS = {
    "J": [("mJ", 1e-3), ("µJ", 1e-6), ("uJ", 1e-6), ("nJ", 1e-9), ("pJ", 1e-12)],
    "W": [("W", 1.0), ("mW", 1e-3)],
    "Wpk": [("GW", 1e9), ("MW", 1e6), ("kW", 1e3), ("W", 1.0)],
    "s": [("ps", 1e-12), ("fs", 1e-15)],
    "Hz": [("MHz", 1e6), ("kHz", 1e3), ("Hz", 1.0)],
    "m": [("mm", 1e-3), ("µm", 1e-6)],
    "wl": [("µm", 1e-6), ("nm", 1e-9)],
    "bw_m": [("nm", 1e-9)],
    "bw_hz": [("THz", 1e12), ("GHz", 1e9)],
    "bw_k": [("cm^-1", 100.0), ("1/cm", 100.0)],
    "J/m^2": [("J/cm^2", 1e4), ("mJ/cm^2", 10.0), ("µJ/cm^2", 1e-2)],
    "W/m^2": [("W/cm^2", 1e4), ("kW/cm^2", 1e7), ("MW/cm^2", 1e10), ("GW/cm^2", 1e13), ("TW/cm^2", 1e16)],
}

# Invented product lines: (kind, family, wavelengths in nm, rep-rate range in Hz,
# power or energy range, duration range in s, shapes, beam diameter range in m).
FAMILIES = (
    ("oscillator", "titanium-sapphire oscillator", (780, 790, 800, 810, 820, 830), (60e6, 100e6),
     ("P", 0.2, 3.0), (8e-15, 120e-15), ("sech2", "gaussian"), (0.8e-3, 2.5e-3)),
    ("oscillator", "ytterbium fibre oscillator", (1030, 1035, 1040, 1045, 1064), (10e6, 100e6),
     ("P", 0.02, 5.0), (80e-15, 400e-15), ("sech2",), (0.6e-3, 3.0e-3)),
    ("oscillator", "erbium fibre oscillator", (1550, 1560, 1565, 1580), (20e6, 100e6),
     ("P", 0.005, 0.3), (50e-15, 500e-15), ("sech2",), (0.3e-3, 1.5e-3)),
    ("oscillator", "thulium fibre oscillator", (1900, 1950, 2000, 2050), (5e6, 80e6),
     ("P", 0.01, 1.0), (150e-15, 2e-12), ("sech2", "gaussian"), (0.5e-3, 2.0e-3)),
    ("oscillator", "cavity-dumped oscillator", (800, 1030, 1040), (1e3, 1e6),
     ("E", 20e-9, 500e-9), (50e-15, 300e-15), ("sech2",), (1.0e-3, 3.0e-3)),
    ("amplifier", "ytterbium regenerative amplifier", (1030, 1030, 1035, 1040), (1e3, 2e6),
     ("E", 1e-6, 2e-3), (200e-15, 10e-12), ("gaussian", "sech2"), (1.5e-3, 8e-3)),
    ("amplifier", "titanium-sapphire amplifier", (790, 800, 800, 805), (1e3, 10e3),
     ("E", 0.5e-3, 10e-3), (25e-15, 100e-15), ("gaussian",), (5e-3, 15e-3)),
    ("amplifier", "frequency-doubled ytterbium amplifier", (515, 517, 520), (1e3, 1e6),
     ("E", 0.5e-6, 500e-6), (150e-15, 5e-12), ("gaussian",), (1.0e-3, 6e-3)),
    ("amplifier", "fibre chirped-pulse amplifier", (1030, 1040, 1550), (100e3, 50e6),
     ("P", 1.0, 100.0), (150e-15, 800e-15), ("sech2", "gaussian"), (1.5e-3, 5e-3)),
)

LABS = ("north-wing", "basement-b", "cleanroom-2", "annex", "teaching-lab", "hall-7")
PURPOSES = ("two-photon imaging", "micromachining", "pump-probe spectroscopy", "OPA pump",
            "THz generation", "seed source", "frequency comb", "nonlinear microscopy",
            "surface structuring", "harmonic generation", "ablation tests", "waveguide writing")
ERRORS = ("micro-nano-slip", "radius-for-diameter", "fs-for-ps", "milli-watt-slip", "nm-for-thz")


# ------------------------------------------------------------------ numbers

def sig(x: float, digits: int) -> str:
    """``x`` rounded to ``digits`` significant figures, written plainly (no exponent)."""
    if x == 0:
        return "0"
    y = float(f"{x:.{digits}g}")
    decimals = max(digits - 1 - math.floor(math.log10(abs(y))), 0)
    text = f"{y:.{decimals}f}"
    if "." in text:
        text = text.rstrip("0").rstrip(".")
    return text


def pick_unit(rng: random.Random, si: float, family: str) -> tuple[str, float]:
    """A unit of ``family`` that writes ``si`` as a number between 0.1 and 10 000."""
    fits = [(u, f) for u, f in UNITS[family] if 0.1 <= si / f < 10_000]
    good = [(u, f) for u, f in fits if 1 <= si / f < 1000]
    return rng.choice(good or fits or UNITS[family][:1])


def quantity(rng: random.Random, si: float, family: str, digits: int = 3) -> str:
    unit, factor = pick_unit(rng, si, family)
    x = si / factor
    if not 0.1 <= x < 10_000:  # no prefix fits: scientific notation, as people write it too
        return f"{x:.{digits - 1}e} {unit}".replace("e+0", "e").replace("e+", "e").replace("e-0", "e-")
    return f"{sig(x, digits)} {unit}"


def round_number(rng: random.Random, low: float, high: float) -> float:
    """A number a person would write, log-uniform between low and high (two significant figures)."""
    x = math.exp(rng.uniform(math.log(low), math.log(high)))
    exponent = math.floor(math.log10(x))
    step = 10.0 ** (exponent - 1) * rng.choice((1, 1, 2, 5))
    return max(round(x / step) * step, step)


# ------------------------------------------------------------------ one spec

def make_spec(rng: random.Random, index: int, error: str | None, lab: str) -> tuple[str, dict]:
    kind, family, wavelengths, f_range, (energy_kind, e_low, e_high), t_range, shapes, d_range = \
        rng.choice(FAMILIES)
    wl = float(rng.choice(wavelengths)) * 1e-9
    f_rep = round_number(rng, *f_range)
    if energy_kind == "P":
        p_avg = round_number(rng, e_low, e_high)
        energy = p_avg / f_rep
    else:
        energy = round_number(rng, e_low, e_high)
        p_avg = energy * f_rep
    tau = round_number(rng, *t_range)
    shape = rng.choice(shapes)
    a, tbp_min, k_ac = SHAPES[shape]
    tbp = tbp_min * rng.uniform(1.03, 1.6)
    d_nu = tbp / tau
    diameter = round_number(rng, *d_range)
    m2 = round(rng.uniform(1.0, 1.4), 2) if kind == "oscillator" else round(rng.uniform(1.05, 1.6), 2)
    peak = a * energy / tau
    w = diameter / 2.0
    fluence = 2.0 * energy / (math.pi * w * w)
    intensity = 2.0 * peak / (math.pi * w * w)
    tolerance = rng.choice((0.02, 0.03, 0.05, 0.05, 0.05, 0.1))
    tol_pct = round(tolerance * 100)

    # Which quantities to state: always the carrier, the rate and the duration;
    # the pulse-energy triangle (P, E, f) fully when an error needs it.
    lines: dict[str, str] = {}
    needs_triangle = error in ("micro-nano-slip", "milli-watt-slip")
    needs_beam_check = error == "radius-for-diameter"
    needs_bandwidth = error in ("fs-for-ps", "nm-for-thz")

    r = rng.random()
    if r < 0.8:
        lines["wavelength"] = quantity(rng, wl, "wl", 4)
    elif r < 0.9:
        lines["carrier_frequency"] = f"{sig(C / wl / 1e12, 4)} THz"
    else:
        lines["photon_energy"] = f"{sig(H * C / wl / EV, 4)} eV"
    lines["repetition_rate"] = quantity(rng, f_rep, "Hz", 3)
    power_first = energy_kind == "P"
    if power_first or needs_triangle or rng.random() < 0.6:
        lines["average_power"] = quantity(rng, p_avg, "W", 3)
    if not power_first or needs_triangle or rng.random() < 0.6:
        lines["pulse_energy"] = quantity(rng, energy, "J", 3)
    lines["pulse_duration"] = quantity(rng, tau, "s", 3)
    if kind == "amplifier" or rng.random() < 0.3:
        lines["peak_power"] = quantity(rng, peak, "Wpk", 3)
    if rng.random() < 0.8 or needs_bandwidth:
        which = rng.random()
        if which < 0.6 or error == "nm-for-thz":
            lines["spectral_bandwidth"] = quantity(rng, d_nu * wl * wl / C, "bw_m", 3)
        elif which < 0.8:
            lines["spectral_bandwidth"] = quantity(rng, d_nu, "bw_hz", 3)
        else:
            lines["spectral_bandwidth"] = quantity(rng, d_nu / C, "bw_k", 3)
    if rng.random() < 0.15 or needs_bandwidth:
        lines["time_bandwidth_product"] = sig(tbp, 3)
    if rng.random() < 0.2:
        lines["autocorrelation_width"] = quantity(rng, k_ac * tau, "s", 3)
    beam = rng.random()
    if beam < 0.7 or needs_beam_check:
        lines["beam_diameter"] = quantity(rng, diameter, "m", 3)
    elif beam < 0.85:
        lines["beam_radius"] = quantity(rng, w, "m", 3)
    if needs_beam_check or rng.random() < 0.1:
        lines["beam_diameter_fwhm"] = quantity(rng, FWHM_OF_DIAMETER * diameter, "m", 3)
    if "beam_diameter" in lines or "beam_radius" in lines:
        if kind == "amplifier" and rng.random() < 0.4:
            lines["peak_fluence"] = quantity(rng, fluence, "J/m^2", 3)
        elif rng.random() < 0.1:
            lines["peak_intensity"] = quantity(rng, intensity, "W/m^2", 3)
    if rng.random() < 0.75:
        lines["m2"] = str(m2)
    if rng.random() < 0.1:
        lines["repetition_period"] = _period(1.0 / f_rep)

    # Tolerance styles: explicit ±, ± percent, bounds, min/typical/max.
    styled = [k for k in lines if k not in ("m2", "time_bandwidth_product")]
    for key in rng.sample(styled, k=min(len(styled), rng.choice((0, 0, 1, 1, 2, 3)))):
        narrow = key in ("wavelength", "carrier_frequency", "photon_energy")  # never a wide range
        lines[key] = _restyle(rng, lines[key], tolerance, narrow)

    record = {"index": index, "kind": kind, "family": family, "shape": shape, "error": None}
    if error:
        record["error"] = error
        record["wrong_key"] = _make_wrong(error, lines, rng)

    purpose = rng.choice(PURPOSES)
    title = f"{purpose[0].upper() + purpose[1:]}, {family}, {lab} #{index}"
    out = ["spec_version: 1", f"title: {json.dumps(title, ensure_ascii=False)}"]
    if rng.random() < 0.85:
        out += ["defaults:", f"  tolerance: {tol_pct}%" if rng.random() < 0.9 else f"  tolerance: {tolerance}"]
    out.append("laser:")
    if rng.random() < 0.3:
        out.append(f"  # {kind}, {family}")
    for key, value in lines.items():
        out.append(f"  {key}: {_yaml_scalar(value)}")
    if rng.random() < 0.8 or shape != "gaussian":
        out.append(f"  pulse_shape: {shape}")
    if rng.random() < 0.5:
        out.append("  beam_profile: gaussian")
    return "\n".join(out) + "\n", record


def _period(t: float) -> str:
    # six figures: a period restates the rate, which is known to 0.01 % (quantities.py)
    for unit, factor in (("ns", 1e-9), ("µs", 1e-6), ("ms", 1e-3)):
        if t / factor < 1000:
            return f"{sig(t / factor, 6)} {unit}"
    return f"{sig(t, 6)} s"


def _restyle(rng: random.Random, text: str, tolerance: float, narrow: bool = False) -> str:
    number, unit = text.split(" ", 1)
    x = float(number)
    style = rng.choice(("pm", "pm%", "typical") if narrow else ("pm", "pm%", "bound", "mapping", "typical"))
    if style == "pm":
        return f"{number} {unit} ± {sig(x * max(tolerance, 0.03), 2)} {unit}"
    if style == "pm%":
        return f"{number} {unit} +/- {max(round(tolerance * 100), 3)}%"
    if style == "bound":
        if rng.random() < 0.5:
            return f">= {sig(x * 0.9, 2)} {unit}"
        return f"<= {sig(x * 1.15, 2)} {unit}"
    if style == "mapping":
        return {"min": f"{sig(x * 0.9, 3)} {unit}", "typical": text, "max": f"{sig(x * 1.1, 3)} {unit}"}
    return {"typical": text}


def _yaml_scalar(value) -> str:
    if isinstance(value, dict):
        return "{" + ", ".join(f"{k}: {v}" for k, v in value.items()) + "}"
    if value[:1] in "<>":
        return f'"{value}"'
    return value


_SWAP = {"n": "µ", "µ": "n", "u": "n", "m": "µ", "p": "n"}


def _make_wrong(error: str, lines: dict, rng: random.Random) -> str:
    """Spoil one number in place; returns the key spoiled."""
    def value_unit(key):
        v = lines[key]
        if isinstance(v, dict):  # fall back to a plain value
            v = v.get("typical") or next(iter(v.values()))
        v = v.lstrip("<>= ")
        number, unit = v.split(" ", 1)
        return number, unit.split(" ")[0]

    if error == "micro-nano-slip":
        number, unit = value_unit("pulse_energy")
        lines["pulse_energy"] = f"{number} {_SWAP.get(unit[0], 'n')}J"
        return "pulse_energy"
    if error == "milli-watt-slip":
        number, unit = value_unit("average_power")
        lines["average_power"] = f"{number} {'W' if unit == 'mW' else 'mW'}"
        return "average_power"
    if error == "radius-for-diameter":
        number, unit = value_unit("beam_diameter")
        lines["beam_diameter"] = f"{sig(float(number) / 2.0, 3)} {unit}"
        return "beam_diameter"
    if error == "fs-for-ps":
        number, unit = value_unit("pulse_duration")
        lines["pulse_duration"] = f"{number} {'fs' if unit == 'ps' else 'ps'}"
        return "pulse_duration"
    if error == "nm-for-thz":
        number, unit = value_unit("spectral_bandwidth")
        lines["spectral_bandwidth"] = f"{number} {'THz' if unit == 'nm' else 'nm'}"
        return "spectral_bandwidth"
    raise ValueError(error)


# ------------------------------------------------------------------ many specs

_STAGES = (
    "{{name: {name}, kind: optic, transmission: {t}%}}",
    "{{name: {name}, kind: material, material: fused_silica, thickness: {mm} mm}}",
    "{{name: {name}, kind: dispersion, gdd: -{gdd} fs^2}}",
    "{{name: {name}, kind: telescope, magnification: {m}}}",
    "{{name: {name}, kind: attenuator, transmission: {a}%}}",
)


_GLASS_COMPRESSOR = (
    "{{name: {name}, kind: material, material: fused_silica, thickness: {mm} mm}}",
    "{{name: {name}, kind: compressor, gdd: -{gdd} fs^2, transmission: {a}%}}",
)


def path_block(rng: random.Random, n_stages: int, kinds: str = "mixed") -> str:
    """A beam path of ``n_stages`` invented stages, ending at a loose focus (``kinds``: "mixed", or
    "glass-compressor" for a glass, a compressor, …)."""
    lines = ["path:"]
    stages = _GLASS_COMPRESSOR if kinds == "glass-compressor" else _STAGES
    for k in range(n_stages - 1):
        template = stages[k % len(stages)]
        lines.append("  - " + template.format(name=f"s{k}", t=rng.choice((95, 98, 99)), mm=rng.choice((1, 2, 3)),
                                               gdd=rng.choice((50, 100, 200)), m=rng.choice((0.9, 1, 1.1)),
                                               a=rng.choice((80, 90))))
    lines.append(f"  - {{name: focus, kind: focus, focal_length: {rng.choice((300, 500, 1000))} mm}}")
    return "\n".join(lines) + "\n"


def generate(n: int, folder, seed: int = 0, error_rate: float = 0.05, path_rate: float = 0.1,
             stages: int | None = None, kinds: str = "mixed") -> list[dict]:
    """Write ``n`` specs under ``folder`` (in a few lab subfolders); return one record per spec.

    A share ``path_rate`` of them gets a short beam path; with ``stages`` every spec gets a path
    of that many stages (for the scaling over stages)."""
    rng = random.Random(seed)
    folder = Path(folder)
    records = []
    for i in range(n):
        error = rng.choice(ERRORS) if rng.random() < error_rate else None
        lab = LABS[i % len(LABS)]
        text, record = make_spec(rng, i, error, lab)
        n_stages = stages if stages is not None else (3 if rng.random() < path_rate else 0)
        if n_stages and "beam_diameter" in text and "wavelength" in text:
            text += path_block(rng, n_stages, kinds)
            record["stages"] = n_stages
        sub = folder / lab
        sub.mkdir(parents=True, exist_ok=True)
        path = sub / f"spec-{i:05d}.{'yml' if i % 10 == 9 else 'yaml'}"
        path.write_text(text, encoding="utf-8", newline="\n")
        record["path"] = str(path)
        records.append(record)
    return records


def main(argv: list[str] | None = None) -> int:
    p = argparse.ArgumentParser(description="write N invented laser specs into FOLDER")
    p.add_argument("n", type=int)
    p.add_argument("folder")
    p.add_argument("--seed", type=int, default=0)
    p.add_argument("--manifest", action="store_true", help="also write FOLDER/manifest.json (what is wrong where)")
    args = p.parse_args(argv)
    records = generate(args.n, args.folder, args.seed)
    wrong = [r for r in records if r["error"]]
    if args.manifest:
        (Path(args.folder) / "manifest.json").write_text(json.dumps(records, indent=1) + "\n", encoding="utf-8")
    print(f"wrote {len(records)} specs to {args.folder} ({len(wrong)} with a deliberate error)")
    return 0


if __name__ == "__main__":
    sys.exit(main())
