"""Hostile input: speccheck must never crash, hang, run code or touch its inputs.

Four groups of tests:

1. Property-based fuzzing (hypothesis, derandomized so every run sees the same
   examples): random bytes, YAML-ish text and specs built from the real quantity
   names with random numbers and unit strings.  ``check_text`` never raises,
   every finding is well formed, ``run()`` exits 0, 1 or 2 without a traceback,
   and the JSON report is valid and byte-for-byte repeatable.
   ``SPECCHECK_LONG_FUZZ=1`` multiplies the number of examples by 20.
2. Resource attacks (alias bombs, deep nesting, huge lines and files, unit
   strings that would make a unit library compute): each ends quickly with a
   finding.  The time bounds are hang guards, not performance targets.
3. YAML tags that would construct objects or run code are findings; nothing runs.
4. Nothing is lost: input files keep their bytes and mtimes, and the output does
   not depend on the hash seed.
"""

from __future__ import annotations

import io
import json
import os
import shutil
import subprocess
import sys
import threading
import time
from contextlib import contextmanager
from pathlib import Path
from unittest import mock

import pytest
import yaml
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import speccheck.reading.schema as schema_module
import speccheck.reading.units as units_module
from speccheck.checking.document import Checker, Options
from speccheck.cli import run
from speccheck.formats import json_format
from speccheck.reading.loader import Limits
from speccheck.physics.quantities import ALIASES, CATEGORICAL, QUANTITIES
from speccheck.records.rules import RULES
from speccheck.reading.units import UnitError, UnitSystem, format_number
from speccheck.reading.values import ValueParser, ValueProblem

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"

UNITS = UnitSystem()  # one registry for this module (creating one is slow)
CHECKER = Checker(UNITS)

SEVERITIES = ("error", "warning", "note")
HANG_GUARD = 20.0  # seconds; only catches hangs, not a performance target

LONG = os.environ.get("SPECCHECK_LONG_FUZZ", "") not in ("", "0")


def fuzz(examples: int):
    """Fixed-seed hypothesis settings; SPECCHECK_LONG_FUZZ=1 runs 20 times as many examples."""
    return settings(
        max_examples=examples * 20 if LONG else examples,
        derandomize=True,
        deadline=None,
        database=None,
        suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large,
                               HealthCheck.filter_too_much, HealthCheck.function_scoped_fixture],
    )


# --------------------------------------------------------------------- helpers


def within(seconds: float, fn, *args):
    """fn(*args), failing if it has not returned after ``seconds`` (a hang guard).

    It runs in a daemon thread so that a Python-level endless loop fails this test
    instead of stopping the whole run.
    """
    box: dict = {}

    def target():
        try:
            box["value"] = fn(*args)
        except BaseException as exc:  # re-raised in the test's thread
            box["error"] = exc

    thread = threading.Thread(target=target, daemon=True)
    start = time.perf_counter()
    thread.start()
    thread.join(seconds)
    elapsed = time.perf_counter() - start
    assert not thread.is_alive(), f"still running after {elapsed:.1f} s (hang guard {seconds} s)"
    if "error" in box:
        raise box["error"]
    return box["value"]


_FAST_LOADER = getattr(yaml, "CSafeLoader", yaml.SafeLoader)


def parses_as_yaml(text) -> bool:
    try:
        for _ in yaml.parse(text, Loader=_FAST_LOADER):
            pass
        return True
    except Exception:
        return False


def assert_well_formed(result, text=None) -> None:
    """Every finding names a known rule and severity and, for YAML input, a position."""
    located = text is None or parses_as_yaml(text)
    for f in result.findings:
        assert isinstance(f.rule, str) and f.rule, f
        assert f.rule in RULES, f"unknown rule id {f.rule!r}"
        assert f.severity in SEVERITIES, f
        assert isinstance(f.message, str) and f.message.strip(), f
        if located:
            assert type(f.line) is int and f.line >= 1, f
            assert type(f.column) is int and f.column >= 1, f
        else:
            assert f.line is None or (type(f.line) is int and f.line >= 1), f
            assert f.column is None or (type(f.column) is int and f.column >= 1), f
    # the JSON contract holds for any result (strict JSON: no NaN or Infinity)
    out = io.StringIO()
    json_format.write([result], out, None)
    json.loads(out.getvalue())


def check(text, path: str = "x.yaml", checker: Checker = CHECKER):
    return checker.check_text(text, path)


def rules(result) -> set[str]:
    return {f.rule for f in result.findings}


@contextmanager
def shared_units():
    """Let run() use this module's UnitSystem instead of building a registry per call."""
    with mock.patch.object(units_module, "UnitSystem", lambda *a, **k: UNITS):
        yield


def cli(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with shared_units():
        code = run(list(argv), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def spec(laser: str, head: str = "spec_version: 1\n") -> str:
    return head + "laser:\n" + laser


# ------------------------------------------------------------------ strategies

NAMES = [q.name for q in QUANTITIES] + sorted(set(ALIASES) - {q.name for q in QUANTITIES})
REAL_UNITS = [
    "nJ", "µJ", "μJ", "uJ", "mJ", "J", "pJ", "W", "mW", "kW", "MW", "GW", "TW", "W/cm^2", "W/cm²",
    "W/m^2", "W cm^-2", "TW/cm^2", "J/cm^2", "J/cm²", "mJ/cm^2", "cm^-1", "cm⁻¹", "1/cm", "1/m",
    "m^-1", "m**-1", "THz", "GHz", "MHz", "kHz", "Hz", "fs", "ps", "ns", "µs", "s", "fs^2", "fs²",
    "fs^3", "fs³", "ps^2", "nm", "µm", "μm", "um", "mm", "cm", "m", "Å", "eV", "meV", "V/m", "GV/m",
    "%", "percent", "W·cm^-2", "W⋅cm^-2", "kg*m^2/s^3", "(W)", "1/s",
]
GARBAGE_UNITS = [
    "", " ", "nanojewels", "J J J", "W/", "/W", "W//cm", "^2", "W^", "W^-", "W^--2", "(W", "W)", "()",
    "**", "µ", "μ", "Ｊ", "ｎJ", "nJ\u200b", "n\u0408", "Ｗ", "𝐖", "ℓ", "K", "degC", "°", "Ω", "e",
    "W^2^2^2^2^2^2", "W**2**2**2**2**2**2", "W²²²²²²", "m**99999999", "km^99", "km^-99", "ym^-99",
    "((((W^99)^99)^99)^99)", "W^(2^99)", "W^½", "W^1.5", "W^(1/2)", "W**0.5", "10**10**10",
    "inf", "nan", "1/0", "0/0", "__import__('os').system('true')", "eval", "W; rm -rf /", "{W}",
    "W\n", "W\t", "m^-99", "*".join(["W"] * 1000), "*".join(["W"] * 30), "/".join(["m"] * 32),
    "nJ ± ", "± 1 nJ", "%%", "% %", "W%", "1", "11", "1/", "1/1/1", "µµJ", "uuJ", "kilo", "mega W",
    "dimensionless", "radian", "delta_degC", "W ** -", "W^ 2", "W ^2", "W^ -2", "ＴＨｚ",
]
NUMBERS = [
    "0", "-0", "0.0", "1", "25", "-25", "+5", ".5", "5.", "1e308", "-1e308", "1e-320", "5e-324",
    "1e999999", "1e-999999", "1.7976931348623e308", "2.2250738585072014e-308", "9" * 200,
    "1" * 150 + ".5", "0." + "0" * 190 + "1", "--5", "1e", "1e+", "0x10", "1_000", "1,5", "½",
    "٣", "１２", "1 x 10^9999", "2×10^-3", "1*10**4", "3 x 10^400", "NaN", "nan", "inf", "-inf",
    ".inf", "Infinity", "1e308 x 10^308", "10**10**10",
]
LOOKALIKES = "µμΜмΑАＷＪ\u2009\u202f\u00a0\u2212\u2013\u2014\u200b\ufeff±∓＋≥≤＞＜⁻¹²³·⋅×"
YAML_PUNCT = ":-?,[]{}#&*!|>'\"%@`~ \t\n\r"

numbers = st.one_of(
    st.sampled_from(NUMBERS),
    st.floats(allow_nan=True, allow_infinity=True).map(repr),
    st.integers(min_value=-(10**30), max_value=10**30).map(str),
    st.integers(min_value=-400, max_value=400).map(lambda e: f"1e{e}"),
)
units = st.one_of(
    st.sampled_from(REAL_UNITS),
    st.sampled_from(GARBAGE_UNITS),
    st.text(alphabet="AJWHzsmnkfpµμu/^*-0123456789²³⁻¹()· %", max_size=14),
)


@st.composite
def value_texts(draw) -> str:
    n, u = draw(numbers), draw(units)
    form = draw(st.integers(0, 10))
    if form == 0:
        return f"{n}{u}"
    if form == 1:
        return f"{n} {u} {draw(st.sampled_from(['±', '+/-', '+-']))} {draw(numbers)} {draw(units)}"
    if form == 2:
        return f"{n} ± {draw(numbers)} {u}"
    if form == 3:
        return f"{n} {u} {draw(st.sampled_from(['±', '+/-']))} {draw(numbers)}{draw(st.sampled_from(['%', ' %', '']))}"
    if form == 4:
        op = draw(st.sampled_from([">=", "<=", "≥", "≤", ">", "<", "=>", "=<", ">>", "<>"]))
        return f"{op} {n} {u}"
    if form == 5:
        return f"({n} ± {draw(numbers)}) {u}"
    if form == 6:
        return f"{n} {u} ± {draw(numbers)} {u} ± {draw(numbers)} {u}"
    if form == 7:
        text = f"{n} {u}"
        pos = draw(st.integers(0, len(text)))
        return text[:pos] + draw(st.text(alphabet=LOOKALIKES, min_size=1, max_size=3)) + text[pos:]
    return f"{n} {u}"


scalars = st.one_of(
    value_texts(),
    st.floats(allow_nan=True, allow_infinity=True),
    st.integers(min_value=-(10**40), max_value=10**40),
    st.booleans(),
    st.none(),
    st.text(max_size=30),
)
values = st.one_of(
    scalars,
    scalars,
    st.dictionaries(st.sampled_from(["min", "typical", "max", "mean", ""]), scalars, max_size=4),
    st.lists(scalars, max_size=3),
)
_BLOCK_KEYS = sorted(schema_module.schema().get("$defs", {}).get("quantities", {}).get("properties", {}))
MEASURED_KEYS = [k for k in ("spectrum", "autocorrelation") if k in _BLOCK_KEYS]
laser_keys = st.one_of(
    st.sampled_from(NAMES),
    st.sampled_from(NAMES),
    st.sampled_from(list(CATEGORICAL) + ["pulse_enrgy", "Wavelength", "wave length", "λ", "m²"]
                    + MEASURED_KEYS + _BLOCK_KEYS),
)
measured_values = st.fixed_dictionaries(
    {"file": st.sampled_from(["data.csv", "data.csv", "spec.yaml", "missing.csv", "../data.csv",
                              "/etc/hostname", ".", "", "data.csv/x"])},
    optional={"wavelength_unit": units, "delay_unit": units, "extra": scalars},
)
categorical_values = st.sampled_from(["gaussian", "sech2", "sech²", "lorentzian", "flat_top", "top_hat",
                                      "GAUSSIAN", "", "gauss"])


# The beam path, operating points and targets, by the names the published schema gives.
_DEFS = schema_module.schema().get("$defs", {})
_STAGE = _DEFS.get("stage", {}).get("properties", {})
STAGE_KINDS = list(_STAGE.get("kind", {}).get("enum", [])) + ["laser_gun", ""]
STAGE_PARAMS = sorted(k for k in _STAGE if k not in ("name", "kind", "measured", "branches", "material", "output"))
MATERIALS = ["fused_silica", "n_bk7", "sapphire", "caf2", "air", "unobtainium", "", "FUSED_SILICA"]
TOP_LEVEL = set(schema_module.schema().get("properties", {}))


@st.composite
def blocks(draw, max_keys: int = 12) -> dict:
    block = {}
    for key in draw(st.lists(laser_keys, max_size=max_keys)):
        if key in CATEGORICAL:
            block[key] = draw(categorical_values)
        elif key in MEASURED_KEYS:
            block[key] = draw(measured_values | values)
        else:
            block[key] = draw(values)
    return block


@st.composite
def stages(draw, depth: int = 2) -> dict:
    stage: dict = {"name": draw(st.sampled_from(["s1", "s2", "lens", "", "laser"]) | st.text(max_size=8)),
                   "kind": draw(st.sampled_from(STAGE_KINDS))}
    for key in draw(st.lists(st.sampled_from(STAGE_PARAMS), max_size=4)) if STAGE_PARAMS else ():
        stage[key] = draw(values)
    if draw(st.integers(0, 3)) == 0:
        stage["material"] = draw(st.sampled_from(MATERIALS))
    if draw(st.integers(0, 4)) == 0:
        stage["measured"] = draw(blocks(max_keys=3))
    if depth > 0 and draw(st.integers(0, 4)) == 0:
        names = draw(st.lists(st.sampled_from(["pump", "probe", "third"]), min_size=1, max_size=3, unique=True))
        stage["branches"] = {n: {"fraction": draw(values),
                                 "path": draw(st.lists(stages(depth - 1), max_size=2)),
                                 "target": draw(blocks(max_keys=3))} for n in names}
    return stage


@st.composite
def spec_data(draw) -> dict:
    data: dict = {"spec_version": draw(st.sampled_from([1, 1, 1, 2, "1", 1.0, None]))}
    if draw(st.booleans()):
        data["title"] = draw(st.text(max_size=40))
    if draw(st.integers(0, 3)) == 0:
        data["defaults"] = {"tolerance": draw(st.one_of(st.sampled_from(
            ["5%", "2 %", "0.05", "100%", "-1%", "1e999%", "nan%", "%"]), st.floats(), st.integers()))}
    if draw(st.integers(0, 9)):
        data["laser"] = draw(blocks())
    if "path" in TOP_LEVEL and draw(st.integers(0, 2)) == 0:
        data["path"] = draw(st.lists(stages(), max_size=5))
    if "target" in TOP_LEVEL and draw(st.integers(0, 3)) == 0:
        data["target"] = draw(blocks(max_keys=4))
    if "operating_points" in TOP_LEVEL and draw(st.integers(0, 3)) == 0:
        points = draw(st.lists(blocks(max_keys=4), max_size=4))
        for i, point in enumerate(points):
            if draw(st.booleans()):
                point["name"] = f"point {i % 2}"
        data["operating_points"] = points
    return data


def _plain_or_quoted(draw, value) -> str:
    if isinstance(value, str):
        style = draw(st.integers(0, 2))
        if style == 0:
            return value  # plain: may well not be valid YAML, which is the point
        if style == 1:
            return "'" + value.replace("'", "''") + "'"
        return json.dumps(value, ensure_ascii=False)
    return "null" if value is None else json.dumps(value) if not isinstance(value, float) else repr(value)


@st.composite
def hand_rendered(draw) -> str:
    """A spec rendered by hand with random indentation (spaces, tabs, a mix) and quoting."""
    data = draw(spec_data())
    indent = draw(st.sampled_from(["  ", "    ", " ", "\t", " \t", "\t ", "        "]))
    lines = []
    for key, value in data.items():
        if isinstance(value, dict):
            lines.append(f"{key}:")
            for k, v in value.items():
                if isinstance(v, dict) and draw(st.booleans()):
                    inner = ", ".join(f"{kk}: {_plain_or_quoted(draw, vv)}" for kk, vv in v.items())
                    lines.append(f"{indent}{k}: {{{inner}}}")
                elif isinstance(v, (dict, list)):
                    lines.append(f"{indent}{k}: {json.dumps(v, ensure_ascii=False, default=str)}")
                else:
                    lines.append(f"{indent}{k}: {_plain_or_quoted(draw, v)}")
        else:
            lines.append(f"{key}: {_plain_or_quoted(draw, value)}")
    newline = draw(st.sampled_from(["\n", "\n", "\r\n", "\r"]))
    return newline.join(lines) + draw(st.sampled_from(["", newline]))


@st.composite
def dumped(draw) -> str:
    """A spec rendered by PyYAML itself: always valid YAML."""
    data = draw(spec_data())
    return yaml.safe_dump(data, allow_unicode=draw(st.booleans()), sort_keys=False,
                          default_flow_style=draw(st.sampled_from([False, True, None])),
                          indent=draw(st.integers(2, 9)), width=draw(st.sampled_from([20, 80, 10**6])))


FRAGMENTS = [
    "spec_version: 1\n", "laser:\n", "  ", "\t", "- ", "? ", ": ", "&a ", "*a", "!!str ", "!!int ",
    "!!python/object:os.system ", "!foo ", "%YAML 1.1\n", "%TAG ! tag:x,2000:\n", "---\n", "...\n",
    "{", "}", "[", "]", ", ", "'", '"', "|\n", ">-\n", "# c\n", "<<: *a\n", "pulse_energy: 25 nJ\n",
    "wavelength: 800 nm\n", "\ufeff", "\x00", "\x85", "\u2028", "\\", "\\u00", "~", "null", ".nan",
]
yamlish = st.one_of(
    st.lists(st.one_of(st.sampled_from(FRAGMENTS), st.sampled_from(NAMES).map(lambda n: f"  {n}: "),
                       value_texts(), st.text(alphabet=YAML_PUNCT + "ab1" + LOOKALIKES, max_size=8)),
             max_size=30).map("".join),
    st.text(alphabet=YAML_PUNCT + "abcnJW019." + LOOKALIKES, max_size=200),
    st.text(max_size=100),
)
any_input = st.one_of(
    st.binary(max_size=300),
    yamlish,
    hand_rendered(),
    dumped(),
    hand_rendered().map(lambda t: t.encode("utf-8")),
    dumped().map(lambda t: b"\xef\xbb\xbf" + t.encode("utf-8")),
)


# ------------------------------------------------------------ 1. fuzzing core


@fuzz(300)
@given(st.binary(max_size=2000))
def test_random_bytes_never_crash(data):
    assert_well_formed(check(data), data)


@fuzz(500)
@given(yamlish)
def test_yamlish_text_never_crashes(text):
    assert_well_formed(check(text), text)
    assert_well_formed(check(text.encode("utf-8")), text)


@fuzz(500)
@given(hand_rendered())
def test_hand_rendered_specs_never_crash(text):
    assert_well_formed(check(text), text)


@fuzz(600)
@given(dumped())
def test_valid_yaml_specs_never_crash(text):
    result = check(text)
    assert_well_formed(result, text)
    assert "yaml-syntax" not in rules(result), text  # PyYAML's own output is valid YAML


@fuzz(400)
@given(laser_keys.filter(lambda k: k not in CATEGORICAL), values)
def test_value_parser_raises_only_value_problems(key, raw):
    parser = ValueParser(UNITS)
    key = key if key in NAMES else "pulse_energy"
    try:
        stated = parser.parse(key, raw, 0.05)
    except ValueProblem as p:
        assert p.rule in RULES and p.message
    else:
        assert 0.0 <= stated.low <= stated.high


@fuzz(400)
@given(units)
def test_unit_parser_raises_only_unit_errors(text):
    try:
        unit = UNITS.parse(text)
    except UnitError as exc:
        assert str(exc)
    else:
        assert unit.factor > 0.0 and unit.factor < float("inf")


@fuzz(300)
@given(st.floats(allow_nan=False, allow_infinity=False), st.integers(1, 8))
def test_format_number_takes_every_float(x, digits):
    text = format_number(x, digits)
    assert text
    if x != 0 and "e" in text:
        mantissa = float(text.split("e")[0])
        assert 1 <= abs(mantissa) < 10, text  # never "10.02e-321" or "10e8"
    if x != 0 and abs(x) < 1e307:  # "2e308" for 1.5e308 is right but is no float
        assert float(text) == pytest.approx(x, rel=10 ** (1 - digits))


@pytest.fixture(scope="module")
def fuzz_dir(tmp_path_factory):
    return tmp_path_factory.mktemp("fuzz")


table_lines = st.lists(
    st.tuples(st.floats(allow_nan=True, allow_infinity=True), st.floats(allow_nan=True, allow_infinity=True)),
    max_size=300,
)


@st.composite
def data_tables(draw) -> bytes:
    """A measured-data file: two columns of numbers (a spectrum, a trace), or not quite."""
    kind = draw(st.integers(0, 4))
    if kind == 0:
        return draw(st.binary(max_size=500))
    sep = draw(st.sampled_from([",", ";", "\t", " ", "  ", ", "]))
    if kind == 1:  # a smooth peak, as a real measurement would be
        n = draw(st.integers(0, 400))
        centre, width = draw(st.floats(1, 2000)), draw(st.floats(1e-3, 500))
        rows = [(centre + (i - n / 2) * width / 40, 2.718281828 ** (-((i - n / 2) / 40) ** 2)) for i in range(n)]
    else:
        rows = draw(table_lines)
    head = draw(st.sampled_from(["", "wavelength,intensity\n", "# measured\n", "x y\nunits\n"]))
    return (head + "\n".join(f"{x!r}{sep}{y!r}" for x, y in rows)).encode()


@fuzz(120)
@given(any_input, data_tables())
def test_command_line_never_tracebacks_and_json_is_deterministic(fuzz_dir, data, table):
    path = fuzz_dir / "spec.yaml"
    (fuzz_dir / "data.csv").write_bytes(table)
    path.write_bytes(data if isinstance(data, bytes) else data.encode("utf-8", "surrogatepass"))
    code, out1, err1 = cli("check", "--format", "json", str(path))
    assert code in (0, 1, 2)
    assert "Traceback" not in err1
    report = json.loads(out1)
    code2, out2, err2 = cli("check", "--format", "json", str(path))
    assert (code2, out2, err2) == (code, out1, err1)  # byte-identical
    errors = report["counts"]["error"]
    assert code == (1 if errors else 0)
    code3, out3, err3 = cli("check", "--no-color", str(path))
    assert code3 == code and "Traceback" not in err3 and out3


@pytest.mark.skipif(not MEASURED_KEYS, reason="no measured data files in this schema")
@fuzz(150)
@given(st.sampled_from(MEASURED_KEYS or ["spectrum"]), st.sampled_from(["nm", "µm", "fs", "ps", "THz", "m",
                                                                      "W", "", "nanojewels"]), data_tables())
def test_measured_data_files_never_crash(fuzz_dir, key, unit, table):
    (fuzz_dir / "data.csv").write_bytes(table)
    unit_key = "wavelength_unit" if key == "spectrum" else "delay_unit"
    path = fuzz_dir / "measured.yaml"
    path.write_text("spec_version: 1\nlaser:\n  wavelength: 800 nm\n  pulse_duration: 100 fs\n"
                    f"  {key}: {{file: data.csv, {unit_key}: {json.dumps(unit, ensure_ascii=False)}}}\n",
                    encoding="utf-8")
    code, out, err = cli("check", "--format", "json", str(path))
    assert code in (0, 1, 2) and "Traceback" not in err
    report = json.loads(out)
    for f in report["files"][0]["findings"]:
        assert f["rule"] in RULES and f["severity"] in SEVERITIES


# ------------------------------------------------------ 2. resource attacks


def assert_limit_or_syntax(result) -> None:
    assert rules(result) & {"input-limit", "yaml-syntax"}, [f.message for f in result.findings]


def test_billion_laughs_alias_bomb():
    lines = ['a0: &a0 ["lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol", "lol"]']
    for i in range(1, 10):
        lines.append(f"a{i}: &a{i} [" + ", ".join([f"*a{i - 1}"] * 9) + "]")
    text = "\n".join(lines) + "\nlaser: *a9\n"
    result = within(HANG_GUARD, check, text)
    assert "input-limit" in rules(result)
    assert_well_formed(result, text)


def test_alias_bomb_of_mappings():
    lines = ["m0: &m0 {" + ", ".join(f"k{j}: x" for j in range(9)) + "}"]
    for i in range(1, 10):
        lines.append(f"m{i}: &m{i} {{" + ", ".join(f"k{j}: *m{i - 1}" for j in range(9)) + "}")
    result = within(HANG_GUARD, check, "\n".join(lines))
    assert "input-limit" in rules(result)


@pytest.mark.parametrize("text", ["a: &a [*a]", "&a [*a]", "&a {x: *a}", "a: &a {b: [1, {c: *a}]}"])
def test_recursive_alias_is_reported(text):
    result = within(HANG_GUARD, check, text)
    assert any("recursive" in f.message for f in result.findings), result.findings
    assert_well_formed(result, text)


DEEP = 10_000


@pytest.mark.parametrize("text", [
    "[" * DEEP + "]" * DEEP,
    "{a: " * DEEP + "1" + "}" * DEEP,
    "".join(" " * i + "-\n" for i in range(DEEP)),
    "".join(" " * i + "k:\n" for i in range(DEEP)),
    "laser: " + "[" * DEEP,
    "[" * 999 + "]" * 999,  # under the parser's own nesting limit
    "".join(" " * i + "- \n" for i in range(999)),
], ids=["flow-seq", "flow-map", "block-seq", "block-map", "unclosed", "flow-999", "block-999"])
def test_deep_nesting(text):
    result = within(HANG_GUARD, check, text)
    assert_limit_or_syntax(result)
    assert_well_formed(result, text)


def test_nesting_deeper_than_a_custom_limit():
    checker = Checker(UNITS, Options(limits=Limits(max_depth=5)))
    result = check("a: [[[[[[[1]]]]]]]", checker=checker)
    assert "input-limit" in rules(result)


MB = 1024 * 1024


@pytest.mark.parametrize("text", [
    spec("  pulse_energy: " + "1" * MB + " nJ\n"),
    spec("  pulse_energy: '" + "1" * MB + " nJ'\n"),
    spec("  pulse_energy: 25 " + "n" * MB + "J\n"),
    spec("  pulse_shape: " + "x" * MB + "\n"),
    spec("  " + "x" * MB + ": 1\n"),
    spec("  wavelength: 800 nm\n", head="spec_version: 1\ntitle: " + "t" * MB + "\n"),
    "# " + "c" * MB + "\n" + spec("  wavelength: 800 nm\n"),
    "[" + "1," * (MB // 2) + "1]",
], ids=["number", "quoted", "unit", "categorical", "key", "title", "comment", "flow-list"])
def test_one_megabyte_line(text):
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)
    for f in result.findings:
        assert len(f.message) < 2000, "a finding repeats a megabyte of input"


def test_one_megabyte_number_is_a_finding():
    result = within(HANG_GUARD, check, spec("  pulse_energy: " + "1" * MB + " nJ\n"))
    assert "invalid-value" in rules(result)


def test_file_over_a_custom_size_limit():
    checker = Checker(UNITS, Options(limits=Limits(max_bytes=1000)))
    body = spec("  wavelength: 800 nm\n")
    big = body + "#" * (1001 - len(body))
    assert "input-limit" in rules(check(big.encode(), checker=checker))
    assert "input-limit" in rules(check(big, checker=checker))  # str input is bounded too
    assert "input-limit" in rules(check("é" * 501, checker=checker))  # by its UTF-8 size
    fits = body + "#" * (1000 - len(body))
    assert "input-limit" not in rules(check(fits.encode(), checker=checker))


def test_fifty_megabytes_against_the_default_limit():
    data = b"a: 1\n" * (10 * MB)  # 50 MB
    result = within(HANG_GUARD, check, data)
    assert [f.rule for f in result.findings] == ["input-limit"]
    result = within(HANG_GUARD, check, data.decode())
    assert [f.rule for f in result.findings] == ["input-limit"]


def test_fifty_megabyte_file_on_the_command_line(tmp_path):
    path = tmp_path / "big.yaml"
    path.write_bytes(b"a: 1\n" * (10 * MB))
    code, out, err = within(HANG_GUARD, cli, "check", "--format", "json", str(path))
    assert code == 1 and "Traceback" not in err
    assert [f["rule"] for f in json.loads(out)["files"][0]["findings"]] == ["input-limit"]


@pytest.mark.parametrize("data", [
    b"- 1\n" * (10 * MB // 4),  # 2.6 million nodes just under the size limit
    b"".join(b"k%d: 1\n" % i for i in range(1_000_000))[: 10 * MB],  # a million keys
    b"[" + b"1," * (10 * MB // 2 - 2) + b"1]",
], ids=["block-list", "keys", "flow-list"])
def test_many_nodes_just_under_the_size_limit(data):
    assert len(data) <= Limits().max_bytes
    result = within(HANG_GUARD, check, data)
    assert "input-limit" in rules(result)


def test_node_limit_counts_literal_nodes_too():
    checker = Checker(UNITS, Options(limits=Limits(max_nodes=50)))
    result = check("[" + ", ".join(["1"] * 100) + "]", checker=checker)
    assert "input-limit" in rules(result)
    result = check(spec("  wavelength: 800 nm\n"), checker=checker)
    assert "input-limit" not in rules(result)


UNIT_ATTACKS = {
    "1e999999 W": {"non-finite-value"},
    "1e-999999 W": {"non-positive-value", "non-finite-value"},
    "10**10**10 W": {"unknown-unit", "invalid-value"},
    "10^10^10 W": {"unknown-unit", "invalid-value"},
    "1 x 10^9999 W": {"non-finite-value"},
    "1 m**99999999": {"unknown-unit", "wrong-dimension"},
    "1 m^99999999": {"unknown-unit", "wrong-dimension"},
    "1 km^99": {"unknown-unit", "wrong-dimension"},
    "1 km^-99": {"unknown-unit", "wrong-dimension"},
    "1 W^2^2^2^2^2^2": {"unknown-unit"},
    "1 W**2**2**2**2**2**2": {"unknown-unit"},
    "1 W^2^-2^2^-2^2": {"unknown-unit"},
    "1 (W^2)^2^2^2^2^2": {"unknown-unit"},
    "1 W²²²²²²": {"unknown-unit"},
    "1 ((((((((((W^99)^99)^99)^99)^99)^99)^99)^99)^99)^99)": {"unknown-unit"},
    "1 ((((((((((km^99)^99)^99)^99)^99)^99)^99)^99)^99)^99)": {"unknown-unit"},
    "1 W^(2^(2^(2^(2^2))))": {"unknown-unit"},
    "1 " + "*".join(["W"] * 1000): {"invalid-value"},
    "1 " + "*".join(["W"] * 30): {"unknown-unit", "wrong-dimension"},
    "1 " + "W/" * 30 + "W": {"unknown-unit", "wrong-dimension"},
    "1" * 200 + " W": {"invalid-value"},
    "1" * 197 + " W": set(),  # 1.1e196 W: a (silly) finite power
    "0." + "0" * 190 + "1 W": set(),  # 1e-191 W: tiny but positive
    "1e308 TW": {"non-finite-value"},
    "5e-324 fW": {"non-positive-value", "non-finite-value"},
}


@pytest.mark.parametrize("value", list(UNIT_ATTACKS), ids=[v[:30] for v in UNIT_ATTACKS])
def test_unit_string_attacks(value):
    text = spec("  average_power: " + json.dumps(value, ensure_ascii=False) + "\n")
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)
    at_value = {f.rule for f in result.findings if f.line == 3 and f.severity == "error"}
    expected = UNIT_ATTACKS[value]
    if expected:
        assert at_value & expected, (value[:60], [f.message for f in result.findings])


@pytest.mark.parametrize("unit", ["W^2^2^2^2^2^2", "W**2**2**2**2**2**2", "m^9^9^9^9", "W^-2^-2^-2"])
def test_unit_system_refuses_exponent_towers(unit):
    with pytest.raises(UnitError):
        within(HANG_GUARD, UNITS.parse, unit)


@pytest.mark.parametrize("digits", [400, 4000, 4300, 5000, 100_000])
def test_integers_with_thousands_of_digits(digits):
    for text in (spec(f"  m2: {'9' * digits}\n"),
                 spec(f"  m2: {{min: 1, max: {'9' * digits}}}\n"),
                 "spec_version: 1\ndefaults:\n  tolerance: " + "9" * digits + "\nlaser:\n  m2: 1.1\n",
                 f"spec_version: {'9' * digits}\nlaser: {{}}\n"):
        result = within(HANG_GUARD, check, text)
        assert_well_formed(result, text)
        assert any(f.severity == "error" for f in result.findings)


@pytest.mark.parametrize("value", ["1e308 W", "1e-320 W", "5e-324 W", "1.7e308 W ± 1e308 W",
                                   "1.75e308 W", "{typical: 1.75e308 W}", "1e308 W +/- 90%"])
def test_extreme_but_finite_single_values(value):
    text = spec(f"  average_power: {value}\n")
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)
    cell = result.sheet.get("laser", {}).get("average_power")
    if cell is not None and "±" not in value and "%" not in value:
        assert cell.high is not None, "a plain value must not turn into a lower bound"


def test_largest_float_in_json_output():
    # once a crash: the JSON writer rounded 1.7976931348623157e308 to 15 digits, which is inf
    text = spec("  average_power: 1.7976931348623157e308 W\n",
                head="spec_version: 1\ndefaults: {tolerance: 0%}\n")
    assert_well_formed(check(text), text)


EXTREME_SPECS = {
    "tiny": "  pulse_duration: 5e-324 s\n  spectral_bandwidth: 5e-324 Hz\n  wavelength: 5e-324 m\n"
            "  average_power: 5e-324 W\n  repetition_rate: 5e-324 Hz\n  pulse_energy: 5e-324 J\n"
            "  beam_radius: 5e-324 m\n",
    "huge": "  pulse_duration: 1e308 s\n  spectral_bandwidth: 1e308 Hz\n  wavelength: 1e308 m\n"
            "  average_power: 1e308 W\n  repetition_rate: 1e308 Hz\n  pulse_energy: 1e308 J\n"
            "  beam_radius: 1e308 m\n  peak_intensity: 1e308 W/m^2\n",
    "mixed": "  average_power: 1e308 W\n  repetition_rate: 1e-300 Hz\n  pulse_duration: 1e-300 s\n"
             "  beam_radius: 1e-300 m\n  wavelength: 1e300 m\n",
    "range-edge-large": "  average_power: 1e100 W\n  repetition_rate: 1e-100 Hz\n  pulse_duration: 1e-100 s\n"
                        "  beam_radius: 1e-100 m\n  wavelength: 1e-100 m\n  spectral_bandwidth: 1e100 Hz\n",
}


@pytest.mark.parametrize("name", list(EXTREME_SPECS))
def test_extreme_values_related_to_each_other(name):
    # once crashes in the checker: exp() overflow and a division by an underflowed zero
    text = spec(EXTREME_SPECS[name])
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)
    if "range-edge" not in name:  # beyond the range speccheck accepts: a finding, not a sheet
        assert any(f.severity == "error" for f in result.findings)


# Values inside the accepted range whose products leave the range of a float.
RANGE_EDGE_SPECS = {
    "implied-underflow": "  pulse_energy: 1e100 J\n  pulse_duration: 1e-100 s\n  beam_radius: 1e-100 m\n"
                         "  peak_intensity: 1e-100 W/m^2\n",
    "all-small": "  average_power: 1e-100 W\n  repetition_rate: 1e100 Hz\n  pulse_duration: 1e100 s\n"
                 "  beam_radius: 1e100 m\n  wavelength: 1e100 m\n  spectral_bandwidth: 1e-100 Hz\n"
                 "  peak_intensity: 1e-100 W/m^2\n",
}


@pytest.mark.parametrize("name", list(RANGE_EDGE_SPECS))
def test_values_at_the_edge_of_the_range_related_to_each_other(name):
    # regression: an implied low end that underflowed to 0.0 made show_interval divide by zero
    text = spec(RANGE_EDGE_SPECS[name])
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)


def test_extreme_value_in_an_operating_point():
    # found by the long fuzz run (then a crash in the checker's cells())
    text = ("spec_version: 1\nlaser: {}\noperating_points:\n- wavelength: 0nJ\n  photon_energy: 1e276J\n")
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)


@pytest.mark.parametrize("value", ['{min: ">= 0"}', '{min: ">= 1 W", max: 2 W}', '{max: "<= 3 W"}',
                                   "{min: {min: 1 W}}", "{typical: {max: 1 W}}", "{min: 1 W, max: [2 W]}"])
def test_mapping_parts_that_are_not_plain_values(value):
    # found by the long fuzz run: a bound inside {min, max} raised TypeError in the value parser
    for key in ("average_power", "m2"):
        text = spec(f"  {key}: {value}\n")
        result = within(HANG_GUARD, check, text)
        assert_well_formed(result, text)
        assert any(f.severity == "error" and f.line == 3 for f in result.findings)


@pytest.mark.skipif("transmission" not in STAGE_PARAMS, reason="no stage parameters in this schema")
@pytest.mark.parametrize("value", ["{min: 0nJ}", "{typical: 1e999999 %}", "[1, 2]",
                                   "{max: !!python/name:os.system }", "''"])
def test_stage_parameter_of_any_shape(value):
    # found by the long fuzz run: a {min: ...} stage parameter raised KeyError in the value parser
    text = ("spec_version: 1\nlaser: {wavelength: 800 nm, average_power: 1 W, repetition_rate: 1 kHz}\n"
            f"path:\n  - name: s1\n    kind: attenuator\n    transmission: {value}\n")
    result = within(HANG_GUARD, check, text)
    assert_well_formed(result, text)
    assert any(f.severity == "error" and f.line == 6 for f in result.findings), result.findings


# --------------------------------------------------- 3. no code runs from input


CODE_TAGS = [
    '!!python/object/apply:os.system ["echo pwned > {marker}"]',
    "!!python/object/apply:subprocess.check_call [[touch, {marker}]]",
    "!!python/object/new:os.system [touch {marker}]",
    "!!python/name:os.system",
    "!!python/module:os",
    "!!python/object:builtins.object {{}}",
    "!!python/tuple [1, 2]",
    '!<tag:yaml.org,2002:python/object/apply:os.system> ["touch {marker}"]',
    "!python/object/apply:os.system [touch {marker}]",
]


def _tag_documents(tag: str) -> list[str]:
    return [
        tag + "\n",
        "spec_version: 1\nlaser: " + tag + "\n",
        "spec_version: 1\nlaser:\n  pulse_energy: " + tag + "\n",
        "spec_version: 1\nlaser:\n  average_power: [" + tag + " , 1]\n",
        "spec_version: 1\nx: &evil " + tag + "\nlaser:\n  pulse_energy: *evil\n",
        "spec_version: 1\n? " + tag + "\n: 1\nlaser: {}\n",
        "%TAG !! tag:yaml.org,2002:\n---\nspec_version: 1\nlaser: " + tag + "\n",
    ]


@pytest.mark.parametrize("tag", CODE_TAGS, ids=[t.split()[0][:40] for t in CODE_TAGS])
def test_object_tags_are_findings_and_nothing_runs(tag, tmp_path):
    marker = tmp_path / "pwned"
    calls = []

    def refuse(*args, **kwargs):
        calls.append(args)
        raise AssertionError("input made speccheck start a process")

    with mock.patch("os.system", refuse), mock.patch("subprocess.Popen", refuse), \
            mock.patch("os.popen", refuse):
        for text in _tag_documents(tag.format(marker=marker)):
            result = within(HANG_GUARD, check, text)
            assert_well_formed(result, text)
            assert "unsupported-yaml-tag" in rules(result), (text, [f.message for f in result.findings])
            path = tmp_path / "evil.yaml"
            path.write_text(text, encoding="utf-8")
            code, out, err = cli("check", "--format", "json", str(path))
            assert code == 1 and "Traceback" not in err
            assert "unsupported-yaml-tag" in {f["rule"] for f in json.loads(out)["files"][0]["findings"]}
    assert not calls
    assert not marker.exists()


def test_python_tag_in_a_subprocess_runs_nothing(tmp_path):
    marker = tmp_path / "pwned"
    path = tmp_path / "evil.yaml"
    path.write_text(f'spec_version: 1\nlaser: !!python/object/apply:os.system ["echo pwned > {marker}"]\n',
                    encoding="utf-8")
    proc = subprocess.run([sys.executable, "-m", "speccheck", "check", str(path)], capture_output=True,
                          text=True, env=_env("0"), timeout=120)
    assert proc.returncode == 1 and "unsupported-yaml-tag" in proc.stdout
    assert "Traceback" not in proc.stderr
    assert not marker.exists()


# ---------------------------------------------------------- 4. nothing lost


def _example_copies(tmp_path: Path) -> list[Path]:
    """Copies of the shipped examples (mtimes kept) plus a few hostile files."""
    folder = tmp_path / "specs"
    if EXAMPLES.is_dir():
        shutil.copytree(EXAMPLES, folder)
    else:  # pragma: no cover - the examples are part of the repository
        folder.mkdir()
    hostile = {
        "tags.yaml": "spec_version: 1\nlaser: !!python/object/apply:os.system [true]\n",
        "bomb.yaml": "a: &a [1, 1, 1, 1, 1, 1, 1, 1, 1]\nb: &b [*a, *a, *a, *a, *a, *a, *a, *a, *a]\n"
                     "c: [*b, *b, *b, *b, *b, *b, *b, *b, *b]\n",
        "mess.yaml": "spec_version: 1\nlaser:\n  pulse_energy: 25 µJ ± 1 μJ\n  average_power: '>= 2 W'\n"
                     "  repetition_rate: {min: 79 MHz, max: 81 MHz}\n  wavelength: 800 nm\n"
                     "  spectral_bandwidth: 1e999999 THz\n  pulse_duration: 1 W^2^2^2^2^2^2\n",
        "binary.yaml": bytes(range(256)),
    }
    for name, content in hostile.items():
        data = content if isinstance(content, bytes) else content.encode("utf-8")
        (folder / name).write_bytes(data)
    return sorted(folder.glob("*.yaml"))


def _snapshot(folder: Path) -> dict:
    return {p.relative_to(folder): (p.read_bytes(), p.stat().st_mtime_ns)
            for p in sorted(folder.rglob("*")) if p.is_file()}


def test_checking_changes_no_input_file(tmp_path):
    files = _example_copies(tmp_path)
    folder = files[0].parent
    before = _snapshot(folder)
    time.sleep(0.01)  # an mtime rewrite would show
    for path in files:
        for argv in (["check", str(path)], ["check", "--format", "json", str(path)],
                     ["check", "--no-color", "--no-sheet", str(path)]):
            code, _, err = cli(*argv)
            assert code in (0, 1) and "Traceback" not in err
    code, _, err = cli("check", "--format", "json", str(folder))
    assert code in (0, 1) and "Traceback" not in err
    assert _snapshot(folder) == before  # same files, same bytes, same mtimes, nothing added


def test_report_is_not_written_over_an_input(tmp_path):
    path = tmp_path / "spec.yaml"
    original = b"spec_version: 1\nlaser:\n  wavelength: 800 nm\n"
    path.write_bytes(original)
    code, _, _ = cli("check", "-o", str(path), str(path))
    assert path.read_bytes() == original
    assert code == 2


def _env(seed: str) -> dict:
    env = dict(os.environ)
    env["PYTHONPATH"] = str(ROOT)
    env["PYTHONHASHSEED"] = seed
    env.pop("NO_COLOR", None)
    return env


def test_output_does_not_depend_on_the_hash_seed(tmp_path):
    files = [str(p) for p in _example_copies(tmp_path)]
    outputs = {}
    for seed in ("0", "1", "4242"):
        for fmt in ("json", "human"):
            proc = subprocess.run([sys.executable, "-m", "speccheck", "check", "--format", fmt, "--no-color",
                                   *files], capture_output=True, env=_env(seed), cwd=tmp_path, timeout=120)
            assert proc.returncode in (0, 1, 2), proc.stderr
            assert b"Traceback" not in proc.stderr
            if fmt == "json":
                json.loads(proc.stdout)
            outputs.setdefault(fmt, set()).add(proc.stdout)
    assert len(outputs["json"]) == 1
    assert len(outputs["human"]) == 1


def _unblock(fifo: Path) -> None:
    """Open the write end of a FIFO so that a reader blocked on it sees end of file."""
    try:
        fd = os.open(fifo, os.O_WRONLY | os.O_NONBLOCK)
    except OSError:  # no reader is waiting
        return
    os.close(fd)


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="needs named pipes")
@pytest.mark.parametrize("where", ["data-file", "spec-in-folder"])
def test_named_pipe_does_not_block(tmp_path, where):
    folder = tmp_path / "specs"
    folder.mkdir()
    if where == "data-file":
        fifo = folder / "spectrum.csv"
        (folder / "spec.yaml").write_text("spec_version: 1\nlaser:\n  spectrum: {file: spectrum.csv}\n",
                                          encoding="utf-8")
        argv = ["check", "--format", "json", str(folder / "spec.yaml")]
    else:
        fifo = folder / "pipe.yaml"
        argv = ["check", "--format", "json", str(folder)]
    os.mkfifo(fifo)
    box: dict = {}
    thread = threading.Thread(target=lambda: box.setdefault("result", cli(*argv)), daemon=True)
    thread.start()
    thread.join(2.0)  # reading a regular file takes milliseconds
    blocked = thread.is_alive()
    while thread.is_alive():  # let the reader go, so nothing is left running
        _unblock(fifo)
        thread.join(0.1)
    assert not blocked, "speccheck blocked reading a named pipe"
    code, out, err = box["result"]
    assert code in (1, 2) and "Traceback" not in err
    json.loads(out)


@pytest.mark.parametrize("name", ["../outside.csv", "/etc/passwd", "..", ".", "", "a\x00b.csv",
                                  "x" * 5000 + ".csv", "link.csv"])
def test_measured_data_file_names(tmp_path, name):
    folder = tmp_path / "specs"
    folder.mkdir()
    (tmp_path / "outside.csv").write_text("1 1\n2 2\n", encoding="utf-8")
    (folder / "link.csv").symlink_to(tmp_path / "outside.csv")
    path = folder / "spec.yaml"
    path.write_text("spec_version: 1\nlaser:\n  spectrum: {file: " + json.dumps(name) + "}\n"
                    "  autocorrelation: {file: " + json.dumps(name) + "}\n", encoding="utf-8")
    code, out, err = within(HANG_GUARD, cli, "check", "--format", "json", str(path))
    assert code in (1, 2) and "Traceback" not in err
    report = json.loads(out)
    assert report["counts"]["error"] >= 1


def test_a_stage_parameter_as_min_and_max_is_an_interval():
    text = ("spec_version: 1\nlaser: {wavelength: 800 nm, average_power: 1 W, repetition_rate: 1 kHz}\n"
            "path:\n  - name: s1\n    kind: attenuator\n    transmission: {min: 10%, max: 20%}\n")
    result = check(text)
    assert not [f for f in result.findings if f.severity == "error"]
    power = result.sheet["s1"]["average_power"]
    assert power.low == pytest.approx(0.1 * 0.97) and power.high == pytest.approx(0.2 * 1.03)  # 1 W to 3 %
