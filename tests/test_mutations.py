"""Mutation fuzzing of the command line, starting from the example specs.

Every spec of ``example_specs/`` (copied with its ``data/`` folder, so the
measured files resolve) is edited at random the way people edit specs by
hand: on the text, line by line, so that YAML breaks as it would in an editor.
Units are swapped or misspelt, numbers scaled or pushed past the float range,
bounds and ± values put in odd places (stage parameters included), keys and
lines deleted or duplicated, types changed, quotes added or dropped, digits
written in other scripts, control characters and very long strings typed in.
About a third of the cases also get random what-ifs on the command line
(``--set INPUT=VALUE``: inputs the document has and lacks, values the grammar
reads and values it refuses), from a random stream of their own.
Each document's JSON report is also compared with the Python API's
(``speccheck.check_text`` on the same text: the same document and exit code).

Each mutated document is checked in process by ``cli.run`` in every output
format, and each run must

* let no exception escape,
* exit 0, 1 or 2, with the same code in every format (the exit code comes
  from the findings, not from the writer) and no traceback on stderr,
* write output that is valid for its format (JSON with ``files``, SARIF with
  ``runs``, XML for JUnit, CSV with rows of one length, one ``::`` command per
  line for GitHub, an HTML page that html.parser reads, text otherwise).

Failures are collected over the whole run, grouped into classes (an exception
by its type and the innermost speccheck frame that raised it, an output
problem by its format and kind), each class reduced to a small document that
still shows it, and reported together at the end.

Environment:
  SPECCHECK_FUZZ_CASES=N   how many mutated documents (default below: about a minute
                           on a 2-core machine with every format, HTML plots included)
  SPECCHECK_FUZZ_SEED=S    the seed (default fixed, so that every run sees the same cases;
                           ``random`` picks a new one, printed)
  SPECCHECK_FUZZ_CASE=ID   run only the case with this id (as printed in a failure)
  SPECCHECK_FUZZ_FORMATS=json,csv,...   only these formats (default all; the HTML report
                           draws its plots and takes about two thirds of the time)
"""

from __future__ import annotations

import io
import json
import math
import os
import random
import re
import shutil
import signal
import time
import traceback
from dataclasses import dataclass, field
from pathlib import Path

import pytest

import speccheck
from report_checks import FORMATS as ALL_FORMATS
from report_checks import output_problem
from speccheck import cli
from speccheck.physics.quantities import ALIASES, QUANTITIES

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"
PACKAGE = Path(speccheck.__file__).resolve().parent

DEFAULT_CASES = 180
SET_SHARE = 0.3  # the share of cases also run with random --set arguments
RUN_GUARD = 120  # seconds for one run of the checker: a stall guard for the fuzz budget
MINIMIZE_CALLS = 120  # runs spent reducing the first document of each class


def _seed() -> int:
    raw = os.environ.get("SPECCHECK_FUZZ_SEED", "")
    if raw == "random":
        return random.SystemRandom().randrange(2**32)
    return int(raw) if raw else 20261202


SEED = _seed()
CASES = int(os.environ.get("SPECCHECK_FUZZ_CASES", "") or DEFAULT_CASES)
ONLY = os.environ.get("SPECCHECK_FUZZ_CASE", "")
FORMATS = tuple(f for f in ALL_FORMATS
                if f in (os.environ.get("SPECCHECK_FUZZ_FORMATS", "") or ",".join(ALL_FORMATS)).split(","))


# ------------------------------------------------------------------- vocabulary

UNITS = [
    "nJ", "µJ", "μJ", "uJ", "mJ", "J", "pJ", "nj", "NJ", "fs", "ps", "ns", "as", "s", "fS", "W", "mW", "kW",
    "MW", "GW", "w", "W/cm^2", "W/cm2", "W/cm²", "J/cm2", "J/cm^2", "mJ/cm^2", "W/m^2", "cm2", "cm^2", "um",
    "µm", "μm", "nm", "mm", "m", "cm", "dBm", "dB", "rad/s", "rad/fs", "ua", "THz", "GHz", "MHz", "kHz", "Hz",
    "MHZ", "mhz", "cm^-1", "1/cm", "eV", "fs^2", "fs2", "fs^3", "%", "ppm", "1/s", "rad", "deg", "degC", "V/m",
    "kg", "furlong", "µ", "mu", "nJ nJ", "(nJ", "nJ)", "**", "e", "x", "nJ/", "/nJ", "W^1000", "m^-0.5",
    "W/(cm^2", "nJ;", "nJ,", "fs#", "Ω", "sr", "dBc", "Np", "octave", "cycles", "rpm", "°",
]
SWAPS = [("nJ", "µJ"), ("fs", "ps"), ("W/cm^2", "J/cm2"), ("µm", "um"), ("mm", "µm"), ("MHz", "kHz"),
         ("nm", "µm"), ("mJ", "µJ"), ("W", "mW"), ("J/cm^2", "W/cm^2"), ("THz", "nm"), ("fs^2", "fs")]
NUMBERS = ["1e300", "1e-300", "1e400", "-1e400", "1e308", "1.8e308", "5e-324", "1e-400", "0", "-0", "-1",
           "nan", ".nan", ".inf", "-.inf", "inf", "1 x 10^350", "1×10^350", "1e+999999", "10**400", "0x10",
           "1_000", "1,5", "1.2.3", "1e", "e5", "9" * 400, "0." + "0" * 350 + "1", "1e-5000", "+-1",
           "١٥", "１５", "15.", ".5", "−3", "1/2", "2π", "pi", "1e3e3", "١e400"]
VALUE_FORMS = [
    ">= {v}", "<= {v}", "> {v}", "< {v}", ">={v}", "≥ {v}", "{v} ± {w}", "{v} +/- {w}", "{v} ± 5%",
    "{v} ± 200%", "{v} ± -1", "{v} ± 60%", "{{min: {v}, max: {v}}}", "{{min: {v}}}", "{{max: {v}}}",
    "{{typical: {v}}}", "{{min: {{min: {v}}}}}", "{{min: {v}, typical: {v}, max: {v}}}", "{{min: {w}, max: {v}}}",
    "{{min: [{v}]}}", "{{min: null}}", "{{}}", "{{min: {v}, foo: 1}}", "[{v}, {v}]", '"{v}"', '">= {v} ± {w}"',
    "{{max: {{typical: {v}}}}}", "{{min: {v}, max: 1e400}}", "'<= {v}'", "{v} ± {v} ± {w}", ">= >= {v}",
]
STAGE_PARAMS = {
    "thickness": ["1 mm", "6.35 mm", "1e60 m", "-2 mm", "0 mm", "1 J"],
    "gdd": ["-800 fs^2", "1e300 fs^2", "100 fs", "0 fs^2", "-1e-300 fs^2"],
    "tod": ["1000 fs^3", "-1e308 fs^3", "5 fs^2"],
    "ratio": ["80%", "1.5", "0.5", "-0.2", "150%"],
    "transmission": ["92%", "1.5", "1.5 ± 0.6", "-5%", "0", "2"],
    "efficiency": ["30%", "1.2", "1.5 ± 0.6", "0", "-1"],
    "magnification": ["0.5", "1e-160", "1e160", "-2", "0", "2 mm"],
    "focal_length": ["150 mm", "1e-300 m", "1e300 m", "-150 mm", "0 mm", "5"],
    "divide_by": ["10", "0", "-3", "0.5", "1e400", "10 Hz"],
    "gain": ["1000", "30 dB", "1e308", "0", "-5"],
    "order": ["2", "3", "4", "0", "2.5", "1e400"],
    "material": ["fused_silica", "n_bk7", "unobtainium", "[fused_silica]", "AIR", "water"],
    "signal_wavelength": ["1300 nm", "400 nm", "1e60 nm", "0 nm", "-1300 nm"],
    "idler_wavelength": ["2000 nm", "500 nm", "1e-60 nm"],
    "output": ["signal", "idler", "both", "[signal]"],
    "output_energy": ["1 mJ", "1e300 J", "0 J"],
    "output_power": ["10 W", "1e300 W", "30 dBm"],
    "kind": ["optic", "material", "focus", "parametric", "harmonic", "splitter", "[optic]", "{optic: 1}",
             "Optic", "amplifier", "dispersion", "telescope", "pulse_picker", "compressor", "beam_expander",
             "attenuator", "lens", "null"],
    "measured": ["{average_power: 1 W}", "{beam_diameter: 2 µm}", "{pulse_energy: [1 nJ]}", "1 W", "[]"],
    "damage_threshold": ["{fluence: 0.1 J/cm^2, pulse_duration: 150 fs, wavelength: 1030 nm}",
                         "{fluence: 1e400 J/cm^2}", "0.1 J/cm^2", "{fluence: {min: {min: 1 J/cm^2}}}"],
    "branches": ["{}", "[]", "{a: {path: []}, b: {path: []}}", "{a: 1, b: 2}"],
}
LASER_KEYS = {
    "wavelength": ["800 nm", "1e60 nm", "1e-60 nm", "0.8 µm", "375 THz", "[800 nm]"],
    "photon_energy": ["1.55 eV", "1e400 eV"],
    "carrier_frequency": ["375 THz", "2.36e15 rad/s", "1 Hz"],
    "carrier_period": ["2.67 fs", "1e300 s"],
    "repetition_rate": ["80 MHz", "5e14 rad/s", "1e-300 Hz"],
    "repetition_period": ["12.5 ns"],
    "pulse_duration": ["25 fs", "1e-300 fs", "1e300 fs", "[25 fs]"],
    "duty_cycle": ["1e-6", "2", "50%"],
    "cycles_per_pulse": ["10", "0.5"],
    "average_power": ["30 dBm", "1 W", "1e308 W", "-3 dBm"],
    "pulse_energy": ["1 x 10^350 nJ", "15 nJ", "1e400 nJ", "{min: {min: 1 nJ}}"],
    "peak_power": ["530 kW", "1e308 W"],
    "spectral_bandwidth": ["500 THz", "30 nm", "1e300 Hz", "5000 cm^-1", "1e15 rad/s"],
    "time_bandwidth_product": ["0.1", "0.44"],
    "autocorrelation_width": ["57 fs"],
    "beam_diameter": ["2 mm", "1e-300 m", "[2 mm]"],
    "beam_radius": ["1 mm"],
    "beam_diameter_fwhm": ["1.2 mm"],
    "m2": ["0.5", "1.1", "1e300"],
    "peak_intensity": ["1e14 W/cm^2", "1e400 W/cm^2", "1e14 J/cm2"],
    "average_intensity": ["1 W/cm^2"],
    "peak_fluence": ["1 J/cm^2", "1 W/cm^2"],
    "peak_field": ["1e10 V/m"],
    "refractive_index": ["1.5", "0", "-1"],
    "pulse_shape": ["gaussian", "sech2", "[gaussian]", "{gaussian: 1}", "Gaussian", "square"],
    "beam_profile": ["gaussian", "flat_top", "[flat_top]"],
    "spectrum": ["{file: data/fibre-oscillator-spectrum.csv, wavelength_unit: nm}",
                 "{file: data, wavelength_unit: nm}", "{file: /etc/hostname}", "{file: [a]}",
                 "{file: data/fibre-oscillator-spectrum.csv, wavelength_unit: rad/s}"],
    "autocorrelation": ["{file: data/fibre-oscillator-autocorrelation.txt, delay_unit: ps}",
                        "{file: ../x.txt, delay_unit: fs}"],
}
OTHER_DIGITS = ["٠١٢٣٤٥٦٧٨٩", "۰۱۲۳۴۵۶۷۸۹", "०१२३४५६७८९", "０１２３４５６７８９", "০১২৩৪৫৬৭৮৯",
                "𝟎𝟏𝟐𝟑𝟒𝟓𝟔𝟕𝟖𝟗", "⁰¹²³⁴⁵⁶⁷⁸⁹", "₀₁₂₃₄₅₆₇₈₉", "߀߁߂߃߄߅߆߇߈߉"]
CONTROLS = ["\x1b[31m", "\x1b]0;title\x07", "\x07", "\x9b2J", "\x00", "\x08", "\x0b", "\x0c", "\x7f",
            "\x85", "\u2028", "\u2029", "\u202e", "\ufeff", "\r", "\x1c", "\udcff", "\udcc3(", "\t"]
CONTROL_ESCAPES = ["\\e[31m", "\\a", "\\x9b2J", "\\0", "\\b", "\\v", "\\f", "\\x7f", "\\N", "\\L", "\\P",
                   "\\u202e", "\\ufeff", "\\r", "\\x1c", "\\t", "\\e]0;title\\a", "\\n", "\\x85", "\\x00"]
NUMBER = re.compile(r"(?<![\w.])[-+]?(?:\d+\.?\d*|\.\d+)(?:[eE][-+]?\d+)?")
UNIT_AFTER_NUMBER = re.compile(r"(?<=\d)(\s*)([A-Za-zµμ°Å%Ω][A-Za-z0-9µμ^²³/*·.\-]*)")
KEY_VALUE = re.compile(r"([A-Za-z_][A-Za-z0-9_]*):[ \t]+([^,{}\[\]#\n]*[^,{}\[\]#\s])")
KEY = re.compile(r"(?:^|[{,\s])([A-Za-z_][A-Za-z0-9_]*)(?=:\s|:$)")


# ------------------------------------------------------------------- mutations

@dataclass
class Doc:
    lines: list[str]
    folder: Path  # where the spec is written (its data/ beside it)
    case: str
    notes: list[str] = field(default_factory=list)
    bom: bool = False
    newline: str = "\n"

    def text(self) -> str:
        return ("\ufeff" if self.bom else "") + self.newline.join(self.lines) + self.newline

    def pick_line(self, rng, pattern=None) -> int | None:
        idx = [i for i, s in enumerate(self.lines) if (pattern is None and s.strip())
               or (pattern is not None and re.search(pattern, s))]
        return rng.choice(idx) if idx else None


def _replace_span(s: str, m: re.Match, group: int, new: str) -> str:
    return s[:m.start(group)] + new + s[m.end(group):]


def _pick_match(rng, pattern: re.Pattern, s: str, group: int = 0):
    found = [m for m in pattern.finditer(s) if m.group(group)]
    return rng.choice(found) if found else None


def _pick_line_and_match(rng, doc: Doc, pattern: re.Pattern, group: int):
    """A random line matching ``pattern`` and a random match on it, or None."""
    i = doc.pick_line(rng, pattern.pattern)
    if i is None:
        return None
    m = _pick_match(rng, pattern, doc.lines[i], group)
    return None if m is None else (i, m)


def _values(doc: Doc):
    return [(i, m) for i, s in enumerate(doc.lines) if not s.lstrip().startswith("#")
            for m in KEY_VALUE.finditer(s)]


def _plain(rng, v: str) -> str:
    """Mostly quote a value that YAML would not read as a plain scalar (a bound starting with '>',
    a tag character, ': ' inside); sometimes leave it, as a hurried hand would."""
    risky = v[:1] != "" and v[:1] in ">|!&*%@`" or ": " in v or " #" in v
    if risky and not v.startswith(("{", "[", '"', "'")) and rng.random() < 0.85:
        return '"' + v.replace("\\", "\\\\").replace('"', '\\"') + '"'
    return v


def _random_value(rng) -> str:
    v = rng.choice(["800 nm", "25 nJ", "1 W", "35 fs", "80 MHz", "2 mm", "1e14 W/cm^2", "0.5", "92%",
                    "1e400 nJ", "1e-300 fs", "1 x 10^350 nJ", "30 dBm", "2.4e15 rad/s", "١٥ nJ", "１５ fs"])
    if rng.random() < 0.4:
        v = rng.choice(VALUE_FORMS).format(v=v, w=rng.choice(["1 nJ", "5%", "0.6", "2 fs", "1e400"]))
    return v


def m_swap_unit(rng, doc):
    i = doc.pick_line(rng, UNIT_AFTER_NUMBER.pattern)
    if i is None:
        return None
    s = doc.lines[i]
    m = _pick_match(rng, UNIT_AFTER_NUMBER, s, 2)
    if m is None:
        return None
    old = m.group(2)
    pair = [b if a == old else a for a, b in SWAPS if old in (a, b)]
    new = rng.choice(pair) if pair and rng.random() < 0.6 else rng.choice(UNITS)
    sep = rng.choice(["", " ", " ", "  ", "\u00a0", "\u2009", "\t"]) if rng.random() < 0.3 else m.group(1)
    doc.lines[i] = s[:m.start(1)] + sep + new + s[m.end(2):]
    return f"unit {old!r} -> {new!r} (line {i + 1})"


def m_misspell_unit(rng, doc):
    found = _pick_line_and_match(rng, doc, UNIT_AFTER_NUMBER, 2)
    if found is None:
        return None
    i, m = found
    u = m.group(2)
    k = rng.randrange(len(u))
    how = rng.choice(["drop", "double", "case", "swap", "greek"])
    if how == "drop":
        new = u[:k] + u[k + 1:]
    elif how == "double":
        new = u[:k] + u[k] + u[k:]
    elif how == "case":
        new = u.swapcase()
    elif how == "swap" and len(u) > 1:
        k = min(k, len(u) - 2)
        new = u[:k] + u[k + 1] + u[k] + u[k + 2:]
    else:
        new = u.replace("µ", "μ").replace("u", "µ").replace("^2", "²").replace("2", "^2")
    doc.lines[i] = _replace_span(doc.lines[i], m, 2, new)
    return f"unit {u!r} misspelt {new!r} (line {i + 1})"


def m_scale_number(rng, doc):
    i = doc.pick_line(rng, NUMBER.pattern)
    if i is None:
        return None
    s = doc.lines[i]
    if s.lstrip().startswith("#"):
        return None
    m = _pick_match(rng, NUMBER, s)
    if m is None:
        return None
    try:
        x = float(m.group(0))
    except ValueError:
        return None
    how = rng.random()
    if how < 0.45:
        f = rng.choice([1e3, 1e-3, 1e6, 1e-6, 10, 0.1, 2 * math.pi, 1 / (2 * math.pi), 2, 0.5, math.sqrt(2), -1])
        new = repr(x * f)
    elif how < 0.6:
        new = f"{x:g}e{rng.choice([300, -300, 400, -400, 308, -324, 5000])}"
    else:
        new = rng.choice(NUMBERS)
    doc.lines[i] = _replace_span(s, m, 0, new)
    return f"number {m.group(0)!r} -> {new!r} (line {i + 1})"


def m_bound_value(rng, doc):
    vals = _values(doc)
    if not vals:
        return None
    i, m = rng.choice(vals)
    v = m.group(2)
    w = rng.choice(["1 nJ", "5%", "0.6", "2 fs", v, "1e400", "-1", "10 mm", "60%"])
    new = _plain(rng, rng.choice(VALUE_FORMS).format(v=v, w=w))
    doc.lines[i] = _replace_span(doc.lines[i], m, 2, new)
    return f"{m.group(1)}: {v!r} -> {new!r} (line {i + 1})"


def m_stage_param(rng, doc):
    """Add a stage parameter (often as a bound, a ± value or a mapping) to a stage of the path."""
    name = rng.choice(list(STAGE_PARAMS))
    value = rng.choice(STAGE_PARAMS[name])
    if rng.random() < 0.4:
        value = rng.choice(VALUE_FORMS).format(v=value, w=rng.choice(["0.6", "10%", value]))
    value = _plain(rng, value)
    flow = [i for i, s in enumerate(doc.lines) if re.match(r"\s*- \{.*\}\s*(#.*)?$", s)]
    block = [i for i, s in enumerate(doc.lines) if re.match(r"\s*kind:\s", s)]
    if not flow and not block:
        return None
    i = rng.choice(flow + block)
    s = doc.lines[i]
    if i in flow:
        end = s.rindex("}")
        doc.lines[i] = s[:end] + f", {name}: {value}" + s[end:]
    else:
        indent = re.match(r"\s*", s).group(0)
        doc.lines.insert(i + 1, f"{indent}{name}: {value}")
    return f"stage parameter {name}: {value} (line {i + 1})"


def m_laser_key(rng, doc):
    """Add (or restate) a quantity of the laser block or of an operating point."""
    i = doc.pick_line(rng, r"^laser:\s*$|^  - name:")
    if i is None:
        return None
    name = rng.choice(list(LASER_KEYS))
    value = rng.choice(LASER_KEYS[name])
    if rng.random() < 0.25:
        value = rng.choice(VALUE_FORMS).format(v=value, w=rng.choice(["5%", "0.6", value]))
    value = _plain(rng, value)
    indent = "  " if doc.lines[i].startswith("laser") else "    "
    doc.lines.insert(i + 1, f"{indent}{name}: {value}")
    return f"added {name}: {value} (after line {i + 1})"


def m_delete_line(rng, doc):
    i = doc.pick_line(rng)
    if i is None:
        return None
    gone = doc.lines.pop(i)
    return f"deleted line {i + 1} {gone[:60]!r}"


def m_delete_key_block(rng, doc):
    i = doc.pick_line(rng, r"^\s*(- )?[A-Za-z_]\w*:\s*$")
    if i is None:
        return None
    indent = len(doc.lines[i]) - len(doc.lines[i].lstrip(" -"))
    j = i + 1
    while j < len(doc.lines) and (not doc.lines[j].strip() or
                                  len(doc.lines[j]) - len(doc.lines[j].lstrip(" -")) > indent):
        j += 1
    del doc.lines[i:j]
    return f"deleted lines {i + 1}-{j}"


def m_duplicate_line(rng, doc):
    i = doc.pick_line(rng)
    if i is None:
        return None
    j = i + 1 if rng.random() < 0.7 else rng.randrange(len(doc.lines) + 1)
    doc.lines.insert(j, doc.lines[i])
    return f"line {i + 1} copied to {j + 1}"


def m_swap_lines(rng, doc):
    if len(doc.lines) < 2:
        return None
    i = rng.randrange(len(doc.lines) - 1)
    j = i + 1 if rng.random() < 0.7 else rng.randrange(len(doc.lines))
    doc.lines[i], doc.lines[j] = doc.lines[j], doc.lines[i]
    return f"lines {i + 1} and {j + 1} swapped"


def m_indent(rng, doc):
    i = doc.pick_line(rng)
    if i is None:
        return None
    s = doc.lines[i]
    how = rng.choice(["in", "out", "tab", "odd"])
    if how == "in":
        doc.lines[i] = "  " + s
    elif how == "out":
        doc.lines[i] = s[2:] if s.startswith("  ") else s.lstrip()
    elif how == "tab":
        doc.lines[i] = "\t" + s.lstrip(" ")
    else:
        doc.lines[i] = " " + s
    return f"indentation {how} (line {i + 1})"


def m_change_type(rng, doc):
    vals = _values(doc)
    if not vals:
        return None
    i, m = rng.choice(vals)
    v = m.group(2)
    new = rng.choice([f"[{v}]", f"[{v}, {v}]", f"{{{v}: 1}}", "[gaussian]", "{}", "[]", "null", "~", "true",
                      "no", f"!!float {v}", f"!!int {v}", f"!!str {v}", f"!!binary {v}", f"&a {v}", "*a",
                      "!!float 1e400", f"!!timestamp {v}", "2001-12-14", "12:30:00", "0o17", "=", "<<: *a",
                      f"[[[[{v}]]]]", f"{{min: {{min: {{min: {v}}}}}}}"])
    doc.lines[i] = _replace_span(doc.lines[i], m, 2, new)
    return f"{m.group(1)}: {v!r} -> {new!r} (line {i + 1})"


def m_block_type(rng, doc):
    """Turn a block key's value into a list or a scalar, the way a stray dash or paste does."""
    i = doc.pick_line(rng, r"^\s*[A-Za-z_]\w*:\s*\S")
    if i is None:
        return None
    s = doc.lines[i]
    key, _, value = s.partition(":")
    indent = re.match(r"\s*", s).group(0)
    how = rng.choice(["list", "block", "folded", "empty"])
    if how == "list":
        doc.lines[i] = f"{key}:"
        doc.lines.insert(i + 1, f"{indent}  - {value.strip()}")
    elif how == "block":
        doc.lines[i] = f"{key}: |"
        doc.lines.insert(i + 1, f"{indent}  {value.strip()}")
    elif how == "folded":
        doc.lines[i] = f"{key}: >-"
        doc.lines.insert(i + 1, f"{indent}  {value.strip()}")
    else:
        doc.lines[i] = f"{key}:"
    return f"{key.strip()} as {how} (line {i + 1})"


def m_quotes(rng, doc):
    vals = _values(doc)
    if not vals:
        return None
    i, m = rng.choice(vals)
    v = m.group(2)
    if v[:1] in "\"'" and rng.random() < 0.7:
        new = v.strip("\"'") if rng.random() < 0.5 else v[1:]
    else:
        new = rng.choice([f'"{v}"', f"'{v}'", f'"{v}', f"{v}'", f'"{v}\'', f'"\\x1b{v}"', f'"{v}\\0"',
                          f'"{v}\\u2028"', f'"\\ud800{v}"', f"'{v}''", f'"{v}\\"'])
    doc.lines[i] = _replace_span(doc.lines[i], m, 2, new)
    return f"quotes {v!r} -> {new!r} (line {i + 1})"


def m_other_digits(rng, doc):
    i = doc.pick_line(rng, NUMBER.pattern)
    if i is None:
        return None
    m = _pick_match(rng, NUMBER, doc.lines[i])
    if m is None:
        return None
    digits = rng.choice(OTHER_DIGITS)
    new = m.group(0).translate(str.maketrans("0123456789", digits))
    if rng.random() < 0.3:
        new = new.replace("-", "\u2212").replace(".", rng.choice(["٫", ",", "．"]))
    doc.lines[i] = _replace_span(doc.lines[i], m, 0, new)
    return f"digits {m.group(0)!r} -> {new!r} (line {i + 1})"


def m_control(rng, doc):
    """A control character in a title, a name or a value: mostly as a YAML escape in a
    double-quoted string (raw ones are not allowed in YAML and stop at the syntax check)."""
    if rng.random() < 0.7:
        vals = [(i, m) for i, m in _values(doc) if m.group(1) in ("title", "name") or rng.random() < 0.2]
        if not vals:
            return None
        i, m = rng.choice(vals)
        v = m.group(2).strip("\"'").replace("\\", "").replace('"', "")
        k = rng.randrange(len(v) + 1)
        esc = rng.choice(CONTROL_ESCAPES)
        new = '"' + v[:k] + esc + v[k:] + '"'
        doc.lines[i] = _replace_span(doc.lines[i], m, 2, new)
        return f"{m.group(1)}: {v!r} -> {new!r} (line {i + 1})"
    i = doc.pick_line(rng, r"^title:|name:|:") if rng.random() < 0.8 else doc.pick_line(rng)
    if i is None:
        return None
    s = doc.lines[i]
    c = rng.choice(CONTROLS)
    k = rng.randrange(len(s) + 1)
    doc.lines[i] = s[:k] + c + s[k:]
    return f"raw control {c!r} at line {i + 1} col {k + 1}"


def m_control_key(rng, doc):
    found = _pick_line_and_match(rng, doc, KEY, 1)
    if found is None:
        return None
    i, m = found
    if rng.random() < 0.7:
        esc = rng.choice(CONTROL_ESCAPES)
        new = '"' + (m.group(1) + esc if rng.random() < 0.5 else esc + m.group(1)) + '"'
    else:
        c = rng.choice(CONTROLS)
        new = m.group(1) + c if rng.random() < 0.5 else c + m.group(1)
    doc.lines[i] = _replace_span(doc.lines[i], m, 1, new)
    return f"key {m.group(1)!r} -> {new!r} (line {i + 1})"


def m_long_string(rng, doc):
    how = rng.choice(["title", "value", "key", "unit", "digits", "name", "comment", "flow", "exponent"])
    n = rng.choice([1000, 10_000, 100_000])
    if how == "title":
        i = doc.pick_line(rng, r"^title:")
        if i is None:
            return None
        doc.lines[i] = "title: " + ("Très long titre, " * (n // 16))[:n]
    elif how == "value":
        vals = _values(doc)
        if not vals:
            return None
        i, m = rng.choice(vals)
        doc.lines[i] = _replace_span(doc.lines[i], m, 2, m.group(2) * (n // max(1, len(m.group(2)))))
    elif how == "key":
        i = doc.pick_line(rng, r"^laser:")
        if i is None:
            return None
        doc.lines.insert(i + 1, "  " + "pulse_energy" * (n // 12) + ": 1 nJ")
    elif how == "unit":
        vals = _values(doc)
        if not vals:
            return None
        i, m = rng.choice(vals)
        doc.lines[i] = _replace_span(doc.lines[i], m, 2, "1 " + "nJ*" * (n // 30) + "nJ")
    elif how == "digits":
        vals = _values(doc)
        if not vals:
            return None
        i, m = rng.choice(vals)
        doc.lines[i] = _replace_span(doc.lines[i], m, 2, "1" * min(n, 20_000) + " nJ")
    elif how == "name":
        i = doc.pick_line(rng, r"name:")
        if i is None:
            return None
        doc.lines[i] = re.sub(r"name:\s*[^,}]*", "name: " + "x" * n, doc.lines[i], count=1)
    elif how == "comment":
        i = rng.randrange(len(doc.lines) + 1)
        doc.lines.insert(i, "# " + "ä" * n)
    elif how == "flow":
        depth = rng.choice([50, 500, 5000])
        doc.lines.append("extra: " + "[" * depth + "]" * depth)
    else:
        vals = _values(doc)
        if not vals:
            return None
        i, m = rng.choice(vals)
        doc.lines[i] = _replace_span(doc.lines[i], m, 2, "1e" + "9" * rng.choice([5, 50, 500]) + " nJ")
    return f"long {how} ({n})"


def m_misspell_key(rng, doc):
    found = _pick_line_and_match(rng, doc, KEY, 1)
    if found is None:
        return None
    i, m = found
    k = m.group(1)
    j = rng.randrange(len(k))
    new = rng.choice([k[:j] + k[j + 1:], k[:j] + k[j] + k[j:], k.upper(), k.replace("_", "-"),
                      k.replace("_", " "), k + " ", k.title(), k[::-1], k + "s",
                      k[:j] + k[j + 1:j + 2] + k[j:j + 1] + k[j + 2:]])
    doc.lines[i] = _replace_span(doc.lines[i], m, 1, new)
    return f"key {k!r} -> {new!r} (line {i + 1})"


def m_kind(rng, doc):
    i = doc.pick_line(rng, r"kind:\s*\w+")
    if i is None:
        return None
    new = rng.choice(STAGE_PARAMS["kind"])
    doc.lines[i] = re.sub(r"kind:\s*\w+", f"kind: {new}", doc.lines[i], count=1)
    return f"kind -> {new!r} (line {i + 1})"


def m_splice(rng, doc):
    """Paste a line of another example at a random place (and indentation)."""
    other = rng.choice(sorted(EXAMPLES.glob("*.yaml"))).read_text(encoding="utf-8").splitlines()
    line = rng.choice([s for s in other if s.strip()])
    if rng.random() < 0.5:
        line = rng.choice(["", "  ", "    ", "      "]) + line.lstrip()
    i = rng.randrange(len(doc.lines) + 1)
    doc.lines.insert(i, line)
    return f"pasted {line[:60]!r} at line {i + 1}"


def m_truncate(rng, doc):
    if not doc.lines:
        return None
    i = rng.randrange(len(doc.lines))
    s = doc.lines[i]
    cut = rng.randrange(len(s) + 1)
    doc.lines[i:] = [s[:cut]]
    return f"truncated at line {i + 1} col {cut + 1}"


def m_whole(rng, doc):
    how = rng.choice(["crlf", "cr", "bom", "join", "blank", "document", "trailing"])
    if how == "crlf":
        doc.newline = "\r\n"
    elif how == "cr":
        doc.newline = "\r"
    elif how == "bom":
        doc.bom = True
    elif how == "join" and len(doc.lines) > 1:
        i = rng.randrange(len(doc.lines) - 1)
        doc.lines[i:i + 2] = [doc.lines[i] + rng.choice([" ", "", ", "]) + doc.lines[i + 1].lstrip()]
    elif how == "blank":
        doc.lines.insert(rng.randrange(len(doc.lines) + 1), rng.choice(["", "   ", "\t", "#", "---", "..."]))
    elif how == "document":
        doc.lines += ["---"] + list(doc.lines)
    else:
        i = rng.randrange(len(doc.lines)) if doc.lines else 0
        if doc.lines:
            doc.lines[i] += rng.choice(["  ", "\t", " #", " # speccheck: allow", ":", " :"])
    return f"whole document: {how}"


DATA_LINE = re.compile(r"file:\s*([^,}\s]+)")


def m_data_file(rng, doc):
    """Point a measured-data entry elsewhere, or at a copy of its file edited by hand."""
    i = doc.pick_line(rng, DATA_LINE.pattern)
    if i is None:
        return None
    m = DATA_LINE.search(doc.lines[i])
    source = doc.folder / m.group(1)
    how = rng.choice(["edit", "edit", "edit", "elsewhere"])
    if how == "elsewhere" or not source.is_file():
        new = rng.choice(["data", "data/", "missing.csv", "/etc/hostname", "../outside.csv", "data/../data",
                          "'data/fibre-oscillator-spectrum.csv'", "[data]", "data/fibre-oscillator-spectrum.csv\x00",
                          "./data/./fibre-oscillator-spectrum.csv", "DATA/FIBRE.csv", "~"])
        doc.lines[i] = _replace_span(doc.lines[i], m, 1, new)
        return f"data file -> {new!r} (line {i + 1})"
    rows = source.read_text(encoding="utf-8").splitlines()
    edit = rng.choice(["huge", "tiny", "nan", "negative", "delete", "empty", "one", "reverse", "columns",
                       "text", "zero", "duplicate", "inf", "commas", "flat"])
    out = []
    for k, row in enumerate(rows):
        parts = re.split(r"([,\t ;]+)", row)
        nums = [j for j, p in enumerate(parts) if NUMBER.fullmatch(p)]
        if nums and edit in ("huge", "tiny", "nan", "negative", "zero", "inf", "flat"):
            j = nums[-1] if edit != "negative" else nums[0]
            x = float(parts[j])
            parts[j] = {"huge": f"{x * 1e306:.6e}", "tiny": f"{x * 1e-320:.3e}", "nan": "nan" if k % 7 == 0
                        else parts[j], "negative": f"{-x}", "zero": "0", "inf": "inf" if k % 11 == 0 else parts[j],
                        "flat": "1"}[edit]
            row = "".join(parts)
        if edit == "delete" and rng.random() < 0.5:
            continue
        if edit == "columns" and len(nums) == 2:
            row = f"{parts[nums[1]]},{parts[nums[0]]},{parts[nums[0]]}"
        if edit == "text" and rng.random() < 0.05:
            row = "not,a,number"
        if edit == "duplicate" and rng.random() < 0.2:
            out.append(row)
        if edit == "commas":
            row = row.replace(".", ",")
        out.append(row)
    if edit == "empty":
        out = []
    elif edit == "one":
        out = out[:3]
    elif edit == "reverse":
        out = out[::-1]
    name = f"data/fuzz-{doc.case}{source.suffix}"
    (doc.folder / name).write_text("\n".join(out) + "\n", encoding="utf-8")
    doc.lines[i] = _replace_span(doc.lines[i], m, 1, name)
    return f"data file edited ({edit}) -> {name} (line {i + 1})"


SECTIONS = {
    "defaults": ["tolerance: 500%", "tolerance: -5%", "tolerance: 1e400", "tolerance: [5%]", "tolerance: 5 nJ",
                 "tolerance: {min: 1%}", "b_integral_limit: 0", "b_integral_limit: 1e400 rad",
                 "damage_safety_factor: 0", "damage_safety_factor: -2", "damage_safety_factor: [2]"],
    "target": ["gas: argon", "gas: xenon", "gas: unobtainium", "gas: [argon]", "peak_intensity: '>= 1e400 W/cm^2'",
               "peak_intensity: {min: {min: 1e14 W/cm^2}}", "pulse_duration: '<= 45 fs ± 1 fs'",
               "beam_diameter: '<= 1e-300 m'", "peak_fluence: 1e14 W/cm^2", "wavelength: '>= 1e60 nm'"],
    "safety": ["mpe: 1e-7 J/cm^2", "mpe: 0 J/cm^2", "mpe: 1e400 J/cm^2", "mpe: [1]", "mpe: 1e-7 W"],
    "operating_points": ["- {name: x, repetition_rate: 1e-300 Hz}", "- {name: 50 kHz, repetition_rate: 50 kHz}",
                         "- name: [a]", "- {}", "- 5", "- {name: y, pulse_energy: {min: {min: 1 nJ}}}"],
}


def m_section(rng, doc):
    """Add a top-level section (or an entry of one) that the example did not have."""
    name = rng.choice(list(SECTIONS))
    entry = rng.choice(SECTIONS[name])
    i = doc.pick_line(rng, rf"^{name}:\s*$")
    if i is None:
        doc.lines += [f"{name}:", "  " + entry]
        return f"added section {name} with {entry!r}"
    doc.lines.insert(i + 1, "  " + entry)
    return f"added {entry!r} to {name} (line {i + 1})"


def m_suppression(rng, doc):
    i = doc.pick_line(rng, r":\s*\S")
    if i is None:
        return None
    comment = rng.choice(["# speccheck: allow relation-conflict -- checked", "# speccheck: allow",
                          "# speccheck: allow relation-conflict", "# speccheck: allow nonsense -- x",
                          "# speccheck: allow relation-conflict, , -- x", "# speccheck: allow -- --",
                          "# speccheck: allow relation-conflict -- \x1b[2J", "# speccheck:allow x--y"])
    doc.lines[i] += "   " + comment
    return f"suppression {comment!r} (line {i + 1})"


def m_top(rng, doc):
    i = doc.pick_line(rng, r"^(spec_version|title):")
    if i is None:
        return None
    new = rng.choice(["spec_version: 2", "spec_version: '1'", "spec_version: [1]", "spec_version: 1.0",
                      "spec_version: 1e400", "title: [a, b]", "title: {a: 1}", "title: 12", "title: ''",
                      "title: null", "title: \"\\x1b]8;;http://x\\x07link\""])
    doc.lines[i] = new
    return f"line {i + 1} -> {new!r}"


MUTATIONS = [  # (weight, mutation): edits of values weigh more than edits that break the YAML
    (10, m_swap_unit), (5, m_misspell_unit), (11, m_scale_number), (11, m_bound_value), (12, m_stage_param),
    (9, m_laser_key), (4, m_delete_line), (3, m_delete_key_block), (3, m_duplicate_line), (2, m_swap_lines),
    (2, m_indent), (8, m_change_type), (3, m_block_type), (4, m_quotes), (4, m_other_digits), (4, m_control),
    (3, m_control_key), (2, m_long_string), (4, m_misspell_key), (6, m_kind), (3, m_splice), (1, m_truncate),
    (2, m_whole), (5, m_data_file), (4, m_section), (2, m_suppression), (2, m_top),
]


STAGE_NAME = re.compile(r"\bname:\s*([A-Za-z_][\w-]*)")
SET_PARAMS = ["focal_length", "transmission", "gdd", "thickness", "divide_by", "magnification", "material",
              "tod", "efficiency", "ratio", "nonsense"]


def settings_for(rng: random.Random, doc: Doc) -> tuple[str, ...]:
    """Command-line what-ifs (``--set INPUT=VALUE``) for a mutated document: inputs it has and
    inputs it lacks, values of the spec grammar and values that break it."""
    names = [m.group(1) for line in doc.lines for m in STAGE_NAME.finditer(line)] or ["lens"]
    out = []
    for _ in range(rng.choice([1, 1, 2, 3])):
        target = rng.choice(["laser", "laser", rng.choice(names), rng.choice(names), "nowhere", "", "laser.x"])
        param = rng.choice(sorted(ALIASES) + [q.name for q in QUANTITIES] + SET_PARAMS) if target.startswith("laser") \
            else rng.choice(SET_PARAMS + list(STAGE_PARAMS))
        value = rng.choice([_random_value(rng), rng.choice(STAGE_PARAMS.get(param, ["1"])), "", "{min: 1 mJ",
                            "[1]", "sapphire", "sech2", "!!python/object:os.system x", "a: b", "\x1b[2J 1 mJ"])
        out.append(f"--set={target}.{param}={value}" if rng.random() < 0.9 else f"--set={target}{param}{value}")
    return tuple(out)


def mutate(rng: random.Random, doc: Doc) -> None:
    count = rng.choice([1, 1, 1, 2, 2, 3, 4, 6])
    weights = [w for w, _ in MUTATIONS]
    fns = [f for _, f in MUTATIONS]
    tries = 0
    while len(doc.notes) < count and tries < 4 * count:
        tries += 1
        fn = rng.choices(fns, weights)[0]
        note = fn(rng, doc)
        if note:
            doc.notes.append(f"{fn.__name__[2:]}: {note}")


# ------------------------------------------------------------------- checking

class _Stalled(BaseException):
    pass


def _on_alarm(signum, frame):
    raise _Stalled()


def innermost_frame(tb) -> str:
    """file:function of the innermost frame inside the speccheck package ('?' when none)."""
    where = "?"
    for frame in traceback.extract_tb(tb):
        path = Path(frame.filename).resolve()
        if path.is_relative_to(PACKAGE):
            where = f"{path.relative_to(PACKAGE.parent).as_posix()}:{frame.name}"
    return where


def _short_traceback(exc: BaseException) -> str:
    frames = [f for f in traceback.extract_tb(exc.__traceback__)
              if Path(f.filename).resolve().is_relative_to(PACKAGE)][-4:]
    lines = [f"    {Path(f.filename).name}:{f.lineno} {f.name}: {f.line}" for f in frames]
    return "\n".join(lines + [f"    {type(exc).__name__}: {str(exc)[:300]}"])


@dataclass
class Failure:
    key: tuple
    fmt: str
    detail: str


def check_once(path: str, fmt: str, extra: tuple = ()) -> tuple[int | None, list[Failure]]:
    """Run the command line on one file in one format; (exit code, what went wrong)."""
    out, err = io.StringIO(), io.StringIO()
    argv = ["check", "--no-config", "--format", fmt, *extra, path]
    previous = signal.signal(signal.SIGALRM, _on_alarm)
    signal.alarm(RUN_GUARD)
    try:
        code = cli.run(argv, stdout=out, stderr=err)
    except KeyboardInterrupt:
        raise
    except _Stalled:
        return None, [Failure(("no result within the stall guard", fmt), fmt, f"{RUN_GUARD} s")]
    except BaseException as exc:  # noqa: BLE001 - anything escaping run() is the finding
        where = innermost_frame(exc.__traceback__)
        return None, [Failure((type(exc).__name__, where), fmt, _short_traceback(exc))]
    finally:
        signal.alarm(0)
        signal.signal(signal.SIGALRM, previous)
    problems = []
    if code not in (0, 1, 2):
        problems.append(Failure(("exit code outside 0, 1, 2", fmt), fmt, f"exit code {code!r}"))
    if "Traceback (most recent call last)" in err.getvalue():
        problems.append(Failure(("traceback on stderr", fmt), fmt, err.getvalue()[-600:]))
    if extra and code == 2 and not out.getvalue():  # a --set this document cannot take: a usage error, said
        return code, problems                         # on stderr (argparse's own stream for a malformed one)
    problem = output_problem(fmt, out.getvalue())
    if problem:
        sample = out.getvalue()
        problems.append(Failure((f"invalid {fmt} output", problem), fmt,
                                f"{problem}; output begins {sample[:300]!r}"))
    elif fmt == "json" and out.getvalue():
        problems += api_problems(path, extra, code, out.getvalue())
    return code, problems


def api_problems(path: str, extra: tuple, code: int, out: str) -> list[Failure]:
    """The library call on the same text (``speccheck.check_text``, its data files under the spec's
    folder) gives the document and the exit code the command line gave."""
    try:
        result = speccheck.check_text(Path(path).read_bytes(), path=path, base=Path(path).parent, config=False,
                                      sets=[e.split("=", 1)[1] for e in extra])
    except BaseException as exc:  # noqa: BLE001 - anything escaping the API is the finding
        return [Failure((type(exc).__name__, innermost_frame(exc.__traceback__), "api"), "api",
                        _short_traceback(exc))]
    if result.exit_code != code or result.to_dict() != json.loads(out):
        return [Failure(("check_text differs from --format json",), "api",
                        f"exit code {result.exit_code}, the command line's {code}")]
    return []


def check_all(path: str, formats=FORMATS, extra: tuple = ()) -> list[Failure]:
    failures: list[Failure] = []
    codes: dict[str, int] = {}
    for fmt in formats:
        code, problems = check_once(path, fmt, extra)
        failures += problems
        if code is not None:
            codes[fmt] = code
    if len(set(codes.values())) > 1:
        failures.append(Failure(("exit code depends on the format",), ",".join(codes),
                                ", ".join(f"{f}={c}" for f, c in codes.items())))
    return failures


# ------------------------------------------------------------------- reducing

def _write(path: Path, text: str) -> None:
    path.write_bytes(text.encode("utf-8", "surrogateescape"))


def minimize(text: str, key: tuple, formats: tuple, path: Path, budget: int = MINIMIZE_CALLS,
             extra: tuple = ()) -> str:
    """A shorter document that still shows the failure class ``key`` (greedy line deletion,
    then shortening of long lines)."""
    calls = 0

    def still_fails(lines: list[str]) -> bool:
        nonlocal calls
        calls += 1
        _write(path, "\n".join(lines) + "\n")
        return any(f.key == key for f in check_all(str(path), formats, extra))

    lines = text.split("\n")
    if lines and lines[-1] == "":
        lines.pop()
    chunk = max(1, len(lines) // 2)
    while chunk >= 1 and calls < budget:
        i, changed = 0, False
        while i < len(lines) and calls < budget:
            trial = lines[:i] + lines[i + chunk:]
            if trial and still_fails(trial):
                lines, changed = trial, True
            else:
                i += chunk
        if not changed:
            chunk //= 2
    for i in range(len(lines)):  # entries of flow mappings, comments, then long lines
        s = lines[i]
        if calls >= budget:
            break
        for m in reversed(list(re.finditer(r",\s*[A-Za-z_]\w*:\s*(\{[^{}]*\}|[^,{}]*)", s))):
            if calls >= budget:
                break
            shorter = s[:m.start()] + s[m.end():]
            if still_fails(lines[:i] + [shorter] + lines[i + 1:]):
                lines[i] = s = shorter
        bare = re.sub(r"\s+#[^'\"]*$", "", s)
        if bare != s and still_fails(lines[:i] + [bare] + lines[i + 1:]):
            lines[i] = s = bare
        while len(s) > 120 and calls < budget:
            short = s[:60 + (len(s) - 60) // 2]
            if still_fails(lines[:i] + [short] + lines[i + 1:]):
                lines[i] = s = short
            else:
                break
    return "\n".join(lines) + "\n"


def _shown(text: str, limit: int = 1500) -> str:
    body = text if len(text) <= limit else text[:limit] + f"\n… ({len(text)} characters in all)"
    return "\n".join("      | " + ascii(line)[1:-1] if not line.isascii() or not line.isprintable()
                     else "      | " + line for line in body.split("\n"))


# ------------------------------------------------------------------- the test

@dataclass
class FailureClass:
    key: tuple
    first_case: str
    spec: str
    notes: list[str]
    fmt: str
    detail: str
    text: str
    cases: list[str] = field(default_factory=list)
    formats: set[str] = field(default_factory=set)
    minimal: str | None = None
    extra: tuple = ()  # the --set arguments of the first case


def test_mutated_specs_never_break_the_command_line(tmp_path, monkeypatch):
    monkeypatch.setenv("SPECCHECK_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.delenv("NO_COLOR", raising=False)
    work = tmp_path / "specs"
    shutil.copytree(EXAMPLES, work)
    monkeypatch.chdir(tmp_path)
    specs = sorted(p.name for p in work.glob("*.yaml"))
    assert specs, "no example specs to start from"
    originals = {name: (work / name).read_text(encoding="utf-8") for name in specs}

    ids = [ONLY] if ONLY else [str(i) for i in range(CASES)]
    classes: dict[tuple, FailureClass] = {}
    started = time.monotonic()
    for case in ids:
        rng = random.Random(f"{SEED}:{case}")
        spec = rng.choice(specs)
        doc = Doc(originals[spec].split("\n")[:-1], work, case)
        mutate(rng, doc)
        set_rng = random.Random(f"{SEED}:{case}:set")  # its own stream: the edits of a case stay the same
        extra = settings_for(set_rng, doc) if set_rng.random() < SET_SHARE else ()
        text = doc.text()
        path = work / f"fuzz-{case}.yaml"
        _write(path, text)
        for failure in check_all(f"specs/{path.name}", FORMATS, extra):
            known = classes.get(failure.key)
            if known is None:
                known = classes[failure.key] = FailureClass(failure.key, case, spec, list(doc.notes) + list(extra),
                                                            failure.fmt, failure.detail, text, extra=extra)
            if case not in known.cases:
                known.cases.append(case)
            known.formats.update(failure.fmt.split(","))
        path.unlink()

    fuzzing = time.monotonic() - started
    if not classes:
        print(f"mutation fuzz: seed {SEED}, {len(ids)} cases x {len(FORMATS)} formats in {fuzzing:.0f} s, no failure")
        return

    for c in classes.values():  # reduce each class's first document, with its cheapest format
        formats = tuple(f for f in FORMATS if f in c.formats)
        formats = formats if c.key == ("exit code depends on the format",) else formats[:1]
        c.minimal = minimize(c.text, c.key, formats, work / f"minimal-{c.first_case}.yaml", extra=c.extra)

    reducing = time.monotonic() - started - fuzzing
    report = [f"mutation fuzz: seed {SEED}, {len(ids)} cases x {len(FORMATS)} formats in {fuzzing:.0f} s "
              f"(and {reducing:.0f} s reducing): "
              f"{len(classes)} distinct failure classes (rerun one case with "
              f"SPECCHECK_FUZZ_SEED={SEED} SPECCHECK_FUZZ_CASE=<id>)"]
    for n, c in enumerate(sorted(classes.values(), key=lambda c: -len(c.cases)), 1):
        report += [
            "",
            f"[{n}] {' @ '.join(c.key)}",
            f"    {len(c.cases)} case(s), e.g. {', '.join(c.cases[:8])}; formats: {', '.join(sorted(c.formats))}",
            f"    first: case {c.first_case} from {c.spec} ({c.fmt}); edits: " + "; ".join(c.notes),
            c.detail if c.detail.startswith("    ") else "    " + c.detail[:600],
            "    minimal document:",
            _shown(c.minimal or c.text),
        ]
    text = "\n".join(report)
    pytest.fail(text, pytrace=False)
