"""Regression tests for the issue "Unbreakable": one test per item.

Every item is a way to make the command line fall over.  Each must end in a
finding at file:line:col, or in exit code 2 with a one-line message, never in
a traceback; and one bad file never costs the others: the spec-level items
check two files in one run, the bad one first, and the good one's report must
be there, the same as when it is checked alone.

Runs are in process (``cli.run``) wherever that is possible; a subprocess
(``speccheck.cli.main``) is used where the item is about the process itself
(standard output closed or full, its encoding, a broken pipe, SIGTERM) or
where a run could block or use unbounded memory (FIFOs, devices, a 2 GB
file, symlink loops).  Subprocesses have a timeout that only guards against a
hang, and a memory limit where memory is the point.

Nothing here can damage the machine: output targets that are devices are
device nodes made in the test's own folder (``mknod``, skipped where not
allowed), and the one run that names a real device under /dev as ``-o``
goes through a guard that stops the process before it could rename, replace
or delete anything under /dev (the test then fails), after checking that the
device is what it should be.
"""

from __future__ import annotations

import io
import json
import math
import os
import re
import resource
import shutil
import signal
import stat
import subprocess
import sys
import textwrap
import time
import traceback
from dataclasses import dataclass
from pathlib import Path

import pytest

import speccheck
from report_checks import FORMATS, output_problem
from speccheck import cli

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"
PACKAGE = Path(speccheck.__file__).resolve().parent
CLEAN_TEXT = (EXAMPLES / "oscillator-consistent.yaml").read_text(encoding="utf-8")
HANG_GUARD = 30  # seconds a subprocess may take before it counts as hanging (a run takes about 1 s)


# ---------------------------------------------------------------- running the command line

@dataclass
class Run:
    code: int
    out: str
    err: str

    @property
    def report(self) -> dict:
        return json.loads(self.out)

    def file(self, name: str) -> dict | None:
        return next((f for f in self.report["files"] if f["path"] == name), None)

    def findings(self, name: str) -> list[dict]:
        entry = self.file(name)
        assert entry is not None, f"{name} is missing from the report:\n{self.out[:2000]}\nstderr: {self.err}"
        return [f for f in entry["findings"] if f["rule"] != "laser-safety"]


def _escaped(exc: BaseException) -> str:
    where = "?"
    for frame in traceback.extract_tb(exc.__traceback__):
        if Path(frame.filename).resolve().is_relative_to(PACKAGE):
            where = f"{Path(frame.filename).name}:{frame.lineno} {frame.name}"
    return f"{type(exc).__name__} escaped from cli.run, raised at {where}: {str(exc)[:300]}"


def run_cli(*args: str) -> Run:
    """``speccheck <args>`` in process; an exception that escapes fails the test with its origin."""
    out, err = io.StringIO(), io.StringIO()
    try:
        code = cli.run(list(args), stdout=out, stderr=err)
    except KeyboardInterrupt:
        raise
    except BaseException as exc:  # noqa: BLE001 - anything escaping is the failure
        pytest.fail(_escaped(exc), pytrace=False)
    assert "Traceback (most recent call last)" not in err.getvalue(), err.getvalue()
    return Run(code, out.getvalue(), err.getvalue())


def check(*args: str, fmt: str = "json") -> Run:
    return run_cli("check", "--no-config", "--format", fmt, *args)


@pytest.fixture
def here(tmp_path, monkeypatch):
    """A work folder as the current folder, with the good spec clean.yaml in it."""
    monkeypatch.chdir(tmp_path)
    monkeypatch.setenv("SPECCHECK_CACHE_DIR", str(tmp_path / ".cache"))
    monkeypatch.delenv("NO_COLOR", raising=False)
    (tmp_path / "clean.yaml").write_text(CLEAN_TEXT, encoding="utf-8")
    return tmp_path


_ALONE: dict = {}


def _clean_alone(folder: Path) -> dict:
    if not _ALONE:
        run = check("clean.yaml")
        _ALONE.update(run.file("clean.yaml"))
    return _ALONE


def check_pair(folder: Path, bad_text: str | bytes | None, *extra: str, bad: str = "bad.yaml") -> Run:
    """Check ``bad`` (written from ``bad_text`` unless None) and then clean.yaml in one JSON run;
    the clean file's report must be the one it gets alone."""
    if bad_text is not None:
        data = bad_text.encode("utf-8") if isinstance(bad_text, str) else bad_text
        (folder / bad).write_bytes(data)
    alone = _clean_alone(folder)
    run = check(*extra, bad, "clean.yaml")
    assert run.code in (0, 1, 2), run.code
    good = run.file("clean.yaml")
    assert good is not None, f"the good file's report is missing:\n{run.out[:1500]}\nstderr: {run.err}"
    assert good["findings"] == alone["findings"] and good.get("sheet") == alone.get("sheet"), \
        "the bad file changed the good file's report"
    return run


def spec(body: str) -> str:
    return "spec_version: 1\n" + textwrap.dedent(body).lstrip("\n")


def line_of(text: str, needle: str) -> int:
    return next(i for i, s in enumerate(text.splitlines(), 1) if needle in s)


def col_of(text: str, needle: str, value: str) -> int:
    s = text.splitlines()[line_of(text, needle) - 1]
    return s.index(value) + 1


def one_line(err: str) -> str:
    lines = [s for s in err.splitlines() if s.strip()]
    assert len(lines) == 1, f"expected a one-line message, got:\n{err}"
    assert "Traceback" not in err
    return lines[0]


def errors_at(findings: list[dict], line: int, severity: str = "error", rules=None) -> list[dict]:
    return [f for f in findings if f["line"] == line and f["severity"] == severity
            and isinstance(f["column"], int) and f["column"] >= 1 and (rules is None or f["rule"] in rules)]


def expect_refused(run: Run, name: str, line: int, rules=None, column: int | None = None) -> None:
    """An error finding at the line (and column), or exit 2 with one line naming the file."""
    if run.code == 2 and not run.findings(name):
        assert name in one_line(run.err)
        return
    found = errors_at(run.findings(name), line, rules=rules)
    assert found, (f"no error{' ' + str(sorted(rules)) if rules else ''} at {name}:{line}; findings: "
                   f"{[(f['rule'], f['line'], f['column']) for f in run.findings(name)]}")
    if column is not None:
        assert any(f["column"] == column for f in found), [(f["rule"], f["line"], f["column"]) for f in found]
    assert run.code in (1, 2)


def expect_handled(run: Run, name: str) -> None:
    """Permissive: some finding at a line and column of the file, exit 1 or 2 (or exit 2 with a
    one-line message)."""
    assert run.code in (1, 2), run.code
    located = [f for f in run.findings(name) if f["line"] and f["column"] and f["severity"] in ("error", "warning")]
    if not located:
        assert run.code == 2 and name in one_line(run.err), run.findings(name)


def cell(run: Run, name: str, column: str, quantity: str) -> dict | None:
    return (run.file(name).get("sheet") or {}).get(column, {}).get(quantity)


# ---------------------------------------------------------------- subprocesses

_GUARD = r"""
import builtins, os, sys

def _under_dev(path):
    try:
        target = os.path.abspath(os.fsdecode(path))
    except TypeError:
        return None
    return target if target == "/dev" or target.startswith("/dev/") else None

def _stop(what, target):
    sys.stderr.write(f"GUARD: {what} of {target} stopped\n")
    sys.stderr.flush()
    os._exit(99)

def _guarded(fn, positions):
    def call(*args, **kwargs):
        for i in positions:
            if i < len(args) and _under_dev(args[i]):
                _stop(fn.__name__, _under_dev(args[i]))
        return fn(*args, **kwargs)
    return call

for _name, _positions in (("replace", (1,)), ("rename", (1,)), ("unlink", (0,)), ("remove", (0,)),
                          ("rmdir", (0,)), ("mkdir", (0,)), ("link", (1,)), ("symlink", (1,)), ("mknod", (0,))):
    setattr(os, _name, _guarded(getattr(os, _name), _positions))

_os_open = os.open
def _open_fd(path, flags, *args, **kwargs):  # creating a new file under /dev (a temporary file there)
    if flags & os.O_CREAT and _under_dev(path) and not os.path.lexists(path):
        _stop("creating a file", _under_dev(path))
    return _os_open(path, flags, *args, **kwargs)
os.open = _open_fd

_open = builtins.open
def _open_file(file, mode="r", *args, **kwargs):
    if isinstance(file, (str, bytes, os.PathLike)) and any(c in mode for c in "wax") and _under_dev(file) \
            and not os.path.lexists(file):
        _stop("creating a file", _under_dev(file))
    return _open(file, mode, *args, **kwargs)
builtins.open = _open_file

sys.argv = ["speccheck"] + sys.argv[1:]
from speccheck.cli import main
main()
"""


def _limit_memory(limit: int):
    def apply():
        resource.setrlimit(resource.RLIMIT_AS, (limit, limit))
    return apply


def subprocess_cli(folder: Path, *args: str, env: dict | None = None, memory: int | None = None,
                   shell_suffix: str = "", **kwargs) -> subprocess.CompletedProcess:
    """``speccheck <args>`` through ``speccheck.cli.main`` in a new process, behind the /dev guard."""
    guard = folder / ".guard.py"
    guard.write_text(_GUARD, encoding="utf-8")
    full_env = {**os.environ, "SPECCHECK_CACHE_DIR": str(folder / ".cache"), **(env or {})}
    full_env.pop("NO_COLOR", None)
    cmd = [sys.executable, str(guard), *args]
    if shell_suffix:
        cmd = ["sh", "-c", 'exec "$@" ' + shell_suffix, "sh", *cmd]
    try:
        done = subprocess.run(cmd, cwd=folder, env=full_env, capture_output="stdout" not in kwargs,
                              timeout=HANG_GUARD, preexec_fn=_limit_memory(memory) if memory else None, **kwargs)
    except subprocess.TimeoutExpired:
        done = None  # (failing outside the handler keeps the report short)
    if done is None:
        pytest.fail(f"speccheck {' '.join(args)} did not end within {HANG_GUARD} s (blocked or hanging)",
                    pytrace=False)
    err = done.stderr.decode("utf-8", "replace") if isinstance(done.stderr, bytes) else (done.stderr or "")
    assert "GUARD:" not in err, f"speccheck tried to replace or delete a device: {err}"
    assert "Traceback (most recent call last)" not in err, err
    return done


def _stderr(done) -> str:
    return done.stderr.decode("utf-8", "replace") if isinstance(done.stderr, bytes) else done.stderr


def make_device(path: Path, major: int, minor: int) -> Path:
    """A character device node in the test's folder (skips where mknod is not allowed)."""
    try:
        os.mknod(path, 0o666 | stat.S_IFCHR, os.makedev(major, minor))
    except (PermissionError, OSError) as exc:
        pytest.skip(f"cannot make a device node here: {exc}")
    return path


def snapshot(path: Path) -> tuple:
    """What must not change about an output target: its kind, identity and (for a file) bytes."""
    st = os.lstat(path)
    kind = stat.S_IFMT(st.st_mode)
    extra = None
    if stat.S_ISLNK(st.st_mode):
        extra = os.readlink(path)
    elif stat.S_ISREG(st.st_mode):
        extra = path.read_bytes()
    elif stat.S_ISDIR(st.st_mode):
        extra = sorted(os.listdir(path))
    elif stat.S_ISCHR(st.st_mode) or stat.S_ISBLK(st.st_mode):
        extra = st.st_rdev
    return kind, st.st_ino, extra


# ================================================================ the items

# -- exponents that overflow a float

@pytest.mark.parametrize("key, value", [
    ("pulse_energy", "1 x 10^350 nJ"),
    ("pulse_energy", "1×10^350 nJ"),
    ("pulse_energy", "1e400 nJ"),
    ("m2", "1e400"),
])
def test_an_exponent_that_overflows_a_float_is_a_finding(here, key, value):
    text = spec(f"""
        laser:
          wavelength: 800 nm
          {key}: {value}
        """)
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, key), rules={"non-finite-value", "invalid-value"},
                   column=col_of(text, key, value))


# -- magnitudes that overflow inside a formula

def _spectrum_file(path: Path, scale: float) -> None:
    rows = ["wavelength_nm,counts"]
    for i in range(321):
        lam = 990.0 + 0.25 * i
        rows.append(f"{lam:.2f},{scale * math.exp(-((lam - 1030.0) / 10.0) ** 2):.6e}")
    path.write_text("\n".join(rows) + "\n", encoding="utf-8")


_OVERFLOW_IN_FORMULA = {
    "wavelength 1e60 nm into a material stage": """
        laser:
          wavelength: 1e60 nm
          repetition_rate: 1 kHz
          pulse_energy: 1 mJ
          pulse_duration: 30 fs
          beam_diameter: 5 mm
        path:
          - {name: window, kind: material, material: fused_silica, thickness: 1 mm}
        """,
    "magnification 1e-160 before a focus": """
        laser:
          wavelength: 800 nm
          repetition_rate: 1 kHz
          pulse_energy: 1 mJ
          pulse_duration: 30 fs
          beam_diameter: 5 mm
        path:
          - {name: shrink, kind: telescope, magnification: 1e-160}
          - {name: lens, kind: focus, focal_length: 100 mm}
        """,
}


@pytest.mark.parametrize("case", list(_OVERFLOW_IN_FORMULA))
def test_a_magnitude_that_overflows_inside_a_formula_is_a_finding(here, case):
    run = check_pair(here, spec(_OVERFLOW_IN_FORMULA[case]))
    expect_handled(run, "bad.yaml")


def test_spectrum_counts_near_the_float_maximum_are_measured_or_refused(here):
    _spectrum_file(here / "huge.csv", 1.7e308)
    _spectrum_file(here / "plain.csv", 1.0)
    body = """
        laser:
          repetition_rate: 40 MHz
          average_power: 200 mW
          pulse_duration: 280 fs
          spectrum: {{file: {name}, wavelength_unit: nm}}
        """
    (here / "plain.yaml").write_text(spec(body.format(name="plain.csv")), encoding="utf-8")
    text = spec(body.format(name="huge.csv"))
    run = check_pair(here, text)
    refused = errors_at(run.findings("bad.yaml"), line_of(text, "spectrum"))
    if refused:
        return
    # measured: the width must be the one of the same spectrum at ordinary counts
    plain = check("plain.yaml")
    got = cell(run, "bad.yaml", "laser", "spectral_bandwidth")
    want = cell(plain, "plain.yaml", "laser", "spectral_bandwidth")
    assert got is not None and want is not None, run.findings("bad.yaml")
    assert got["value"] == pytest.approx(want["value"], rel=1e-6)


# -- a list or mapping where a name or number is expected

_WRONG_SHAPES = {
    "pulse_shape as a list": ("laser:\n  wavelength: 800 nm\n  pulse_shape: [gaussian]\n", "pulse_shape"),
    "pulse_shape as a mapping": ("laser:\n  wavelength: 800 nm\n  pulse_shape: {gaussian: 1}\n", "pulse_shape"),
    "beam_profile as a list": ("laser:\n  wavelength: 800 nm\n  beam_profile: [flat_top]\n", "beam_profile"),
    "stage kind as a list": ("laser:\n  wavelength: 800 nm\npath:\n  - {name: m, kind: [optic], transmission: 0.9}\n",
                             "kind"),
    "stage kind as a mapping": ("laser:\n  wavelength: 800 nm\npath:\n  - {name: m, kind: {optic: 1}}\n", "kind"),
    "material as a list": ("laser:\n  wavelength: 800 nm\npath:\n"
                           "  - {name: w, kind: material, material: [fused_silica], thickness: 1 mm}\n", "material"),
    "nested min in a quantity": ("laser:\n  wavelength: 800 nm\n  pulse_energy: {min: {min: 1 nJ}}\n", "pulse_energy"),
    "nested min in a stage parameter": ("laser:\n  wavelength: 800 nm\npath:\n"
                                        "  - {name: m, kind: optic, transmission: {min: {min: 0.5}}}\n", "transmission"),
    "nested min in a damage rating": ("laser:\n  wavelength: 800 nm\npath:\n  - {name: m, kind: optic, "
                                      "damage_threshold: {fluence: {min: {min: 1 J/cm^2}}}}\n", "damage_threshold"),
}


@pytest.mark.parametrize("case", list(_WRONG_SHAPES))
def test_a_list_or_mapping_where_a_name_or_number_is_expected_is_a_finding(here, case):
    body, key = _WRONG_SHAPES[case]
    text = spec(body)
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, key),
                   rules={"schema-violation", "invalid-value", "stage-parameter"})


# -- every numeric stage parameter written as an interval

_LASER = """
    laser:
      wavelength: 800 nm
      repetition_rate: 1 kHz
      pulse_energy: 1 mJ
      pulse_duration: 30 fs
      spectral_bandwidth: 35 nm
      beam_diameter: 5 mm
      m2: 1.2
    path:
    """
# parameter: (stage before the value, unit, typical, spread, column of the sheet, quantity that
#             follows it, how: "direct" (proportional), "inverse", fraction?, signed?)
_PARAMS = {
    "thickness": ("kind: material, material: fused_silica", "mm", 2.0, 0.2, "s", "stage_gdd", "direct"),
    "gdd": ("kind: dispersion", "fs^2", 500.0, 50.0, "s", "stage_gdd", "direct"),
    "tod": ("kind: dispersion, gdd: 100 fs^2", "fs^3", 1000.0, 100.0, "s", "net_tod", "direct"),
    "ratio": ("kind: splitter, branches: {near: {path: []}, far: {path: []}}", "", 0.5, 0.1, "near",
              "pulse_energy", "direct"),
    "transmission": ("kind: optic", "", 0.8, 0.1, "s", "pulse_energy", "direct"),
    "efficiency": ("kind: harmonic, order: 2", "", 0.3, 0.05, "s", "pulse_energy", "direct"),
    "magnification": ("kind: telescope", "", 2.0, 0.2, "s", "beam_diameter", "direct"),
    "focal_length": ("kind: focus", "mm", 200.0, 20.0, "s", "beam_diameter", "direct"),
    "divide_by": ("kind: pulse_picker", "", 10.0, 1.0, "s", "repetition_rate", "inverse"),
    "gain": ("kind: amplifier", "", 10.0, 1.0, "s", "pulse_energy", "direct"),
}
_FRACTIONS = {"ratio", "transmission", "efficiency"}
_SIGNED = {"gdd", "tod"}
_REFUSALS = {"stage-parameter", "invalid-value", "schema-violation", "missing-unit", "wrong-dimension",
             "non-positive-value", "non-finite-value", "empty-interval", "unknown-unit"}


def _num(x: float, unit: str) -> str:
    return f"{x:g} {unit}".strip()


def _forms(name: str) -> dict:
    _, unit, x, d, *_ = _PARAMS[name]
    top = 1.0 if name in _FRACTIONS else math.inf
    bottom = -math.inf if name in _SIGNED else 0.0
    return {  # form: (text, low, high of the interval it states)
        "lower bound": (f'">= {_num(x, unit)}"', x, top),
        "upper bound": (f'"<= {_num(x, unit)}"', bottom, x),
        "plus-minus": (f'"{_num(x, unit)} ± {_num(d, unit)}"', x - d, x + d),
        "min-typical-max": (f"{{min: {_num(x - d, unit)}, typical: {_num(x, unit)}, max: {_num(x + d, unit)}}}",
                            x - d, x + d),
    }


def _stage_doc(name: str, value: str) -> str:
    before = _PARAMS[name][0]
    return spec(_LASER) + f"  - {{name: s, {before}, {name}: {value}}}\n"


def _contains(got: dict, low: float, high: float, scale: float) -> bool:
    """Does the sheet's interval (None: unbounded) cover [low, high] (in the cell's SI numbers)?"""
    eps = 1e-9
    g_low, g_high = got.get("low"), got.get("high")
    if low == -math.inf:
        low_ok = g_low is None
    elif low <= 0:
        low_ok = g_low is None or g_low <= abs(scale) * eps
    else:
        low_ok = g_low is None or g_low <= low * (1 + eps)
    high_ok = g_high is None if high == math.inf else (g_high is None or g_high >= high * (1 - eps))
    return low_ok and high_ok


@pytest.mark.parametrize("form", ["lower bound", "upper bound", "plus-minus", "min-typical-max"])
@pytest.mark.parametrize("name", list(_PARAMS))
def test_every_numeric_stage_parameter_is_an_interval_or_refused(here, name, form):
    text_value, p_low, p_high = _forms(name)[form]
    _, unit, x, _, column, quantity, how = _PARAMS[name]
    text = _stage_doc(name, text_value)
    run = check_pair(here, text)
    line = line_of(text, "name: s,")
    refusals = [f for f in errors_at(run.findings("bad.yaml"), line) if f["rule"] in _REFUSALS]
    if refusals:
        return  # refused with a finding at the stage
    got = cell(run, "bad.yaml", column, quantity)
    assert got is not None, f"neither refused nor in the sheet: {run.findings('bad.yaml')}"
    (here / "plain.yaml").write_text(_stage_doc(name, _num(x, unit)), encoding="utf-8")
    plain = cell(check("plain.yaml"), "plain.yaml", column, quantity)
    assert plain is not None and plain["value"], "the plain value gives no reference"
    q0 = plain["value"]
    if how == "direct":
        want = (q0 * p_low / x, q0 * p_high / x)
    else:
        want = (q0 * x / p_high if p_high != math.inf else 0.0, q0 * x / p_low if p_low > 0 else math.inf)
    assert _contains(got, *want, q0), (f"{name}: {text_value} accepted, but {column}.{quantity} is "
                                        f"[{got.get('low')}, {got.get('high')}], narrower than [{want[0]}, {want[1]}]")


# -- fractions beyond [0, 1]

_FRACTION_STAGES = {
    "transmission": ("kind: optic", "s"),
    "efficiency": ("kind: harmonic, order: 2", "s"),
    "ratio": ("kind: splitter, branches: {near: {path: []}, far: {path: []}}", "near"),
}


def _fraction_doc(name: str, value: str) -> str:
    return spec(_LASER) + f"  - {{name: s, {_FRACTION_STAGES[name][0]}, {name}: {value}}}\n"


@pytest.mark.parametrize("value", ['"1.5 ± 0.1"', "{min: 1.2, max: 1.4}", '"-0.5 ± 0.1"'])
@pytest.mark.parametrize("name", list(_FRACTION_STAGES))
def test_a_fraction_wholly_outside_zero_to_one_is_an_error(here, name, value):
    text = _fraction_doc(name, value)
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, "name: s,"))


@pytest.mark.parametrize("value", ['"1.5 ± 0.6"', '"0.5 ± 0.6"'])
@pytest.mark.parametrize("name", list(_FRACTION_STAGES))
def test_a_fraction_partly_outside_zero_to_one_is_clipped_with_a_warning(here, name, value):
    text = _fraction_doc(name, value)
    run = check_pair(here, text)
    line = line_of(text, "name: s,")
    assert errors_at(run.findings("bad.yaml"), line, severity="warning"), \
        f"no warning at line {line}: {[(f['rule'], f['severity'], f['line']) for f in run.findings('bad.yaml')]}"
    energy_in = cell(run, "bad.yaml", "laser", "pulse_energy")
    energy_out = cell(run, "bad.yaml", _FRACTION_STAGES[name][1], "pulse_energy")
    assert energy_out is not None, "the stage is missing from the sheet"
    assert energy_out["high"] is not None and energy_out["high"] <= energy_in["high"] * (1 + 1e-9), \
        f"not clipped to 100%: {energy_out}"


# -- a parametric signal or idler that energy conservation forbids

@pytest.mark.parametrize("given, output", [
    ("signal_wavelength: 600 nm", "signal"),
    ("signal_wavelength: 600 nm", "idler"),
    ("idler_wavelength: 700 nm", "signal"),
    ("idler_wavelength: 700 nm", "idler"),
])
def test_a_parametric_wavelength_that_energy_conservation_forbids_is_an_error(here, given, output):
    text = spec(_LASER) + (f"  - {{name: opa, kind: parametric, {given}, output: {output}, efficiency: 0.2}}\n"
                           "  - {name: lens, kind: focus, focal_length: 200 mm}\n")
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, "name: opa"), rules={"photon-energy-not-conserved"})


# -- a measured-data path that is a symlink loop

@pytest.mark.parametrize("loop", ["two links", "one link"])
def test_a_measured_data_file_that_is_a_symlink_loop_is_a_finding(here, loop):
    if loop == "two links":
        os.symlink("loop-b.csv", here / "loop-a.csv")
        os.symlink("loop-a.csv", here / "loop-b.csv")
    else:
        os.symlink("loop-a.csv", here / "loop-a.csv")
    text = spec("""
        laser:
          repetition_rate: 40 MHz
          average_power: 200 mW
          pulse_duration: 280 fs
          spectrum: {file: loop-a.csv, wavelength_unit: nm}
        """)
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, "spectrum"), rules={"measured-data"})


# -- --review with partial bounds and two focus stages

def test_review_with_partial_bounds_and_two_focus_stages(here):
    text = spec("""
        title: two foci, bounds only
        laser:
          wavelength: ">= 780 nm"
          repetition_rate: 1 kHz
          pulse_energy: "<= 2 mJ"
          pulse_duration: {min: 25 fs}
          beam_diameter: {max: 10 mm}
          m2: ">= 1.1"
        path:
          - {name: lens1, kind: focus, focal_length: 500 mm}
          - {name: lens2, kind: focus, focal_length: ">= 100 mm"}
        target:
          peak_intensity: ">= 1e14 W/cm^2"
        """)
    (here / "bad.yaml").write_text(text, encoding="utf-8")
    for args in (["--review"], ["--format", "review"]):
        run = run_cli("check", "--no-config", *args, "bad.yaml", "clean.yaml")
        assert run.code in (0, 1, 2)
        assert "clean.yaml" in run.out and "bad.yaml" in run.out, run.out[:1000]
    assert check_pair(here, None).file("bad.yaml") is not None


# -- invalid include/exclude patterns and deeply nested TOML

@pytest.mark.parametrize("pattern", ["[]", "[!]", "[z-a]"])
@pytest.mark.parametrize("key", ["include", "exclude"])
def test_an_invalid_include_or_exclude_pattern_is_a_configuration_mistake(here, key, pattern):
    (here / "speccheck.toml").write_text(f'{key} = ["{pattern}"]\n', encoding="utf-8")
    run = run_cli("check", "--format", "json", "clean.yaml", ".")
    assert run.code == 2
    message = one_line(run.err)
    assert "speccheck.toml" in message and key in message, message


@pytest.mark.parametrize("shape", ["arrays", "inline tables"])
def test_deeply_nested_toml_is_a_configuration_mistake(here, shape):
    n = 100_000
    body = "[" * n + "]" * n if shape == "arrays" else "{a = " * n + "1" + "}" * n
    (here / "speccheck.toml").write_text(f"include = {body}\n", encoding="utf-8")
    run = run_cli("check", "--format", "json", "clean.yaml")
    assert run.code == 2
    assert "speccheck.toml" in one_line(run.err)


# -- --max-depth 100000

@pytest.mark.parametrize("shape", ["lists", "mappings"])
def test_max_depth_100000_with_a_deep_document(here, shape):
    n = 900  # deeper than Python's recursion allows, shallower than the YAML parser's own limit
    deep = "[" * n + "]" * n if shape == "lists" else "{a: " * n + "1" + "}" * n
    text = spec(f"laser:\n  wavelength: 800 nm\nextra: {deep}\n")
    (here / "bad.yaml").write_text(text, encoding="utf-8")
    run = run_cli("check", "--no-config", "--format", "json", "--max-depth", "100000", "bad.yaml", "clean.yaml")
    if run.code == 2 and not run.out:
        one_line(run.err)  # the limit itself refused
        return
    check_pair(here, None, "--max-depth", "100000")
    located = [f for f in run.findings("bad.yaml") if f["line"] and f["severity"] == "error"]
    assert located, run.findings("bad.yaml")


# -- file names that are not valid UTF-8, in every format

@pytest.mark.parametrize("fmt", FORMATS)
def test_a_file_name_that_is_not_valid_utf8_in_every_format(here, fmt):
    name = os.fsdecode(b"spec-\xff.yaml")
    (here / name).write_text((EXAMPLES / "maker-sheet-one-wrong.yaml").read_text(encoding="utf-8"), encoding="utf-8")
    for args in ([name, "clean.yaml"], ["."]):
        run = run_cli("check", "--no-config", "--format", fmt, *args)
        assert run.code in (1, 2), run.code
        try:
            run.out.encode("utf-8")
        except UnicodeEncodeError as exc:
            pytest.fail(f"{fmt}: the report holds text that cannot be written as UTF-8: {exc}", pytrace=False)
        problem = output_problem(fmt, run.out)
        assert problem is None, problem
        assert "clean.yaml" in run.out


def test_a_file_name_that_is_not_valid_utf8_in_a_real_process(here):
    name = os.fsdecode(b"spec-\xff.yaml")
    (here / name).write_text(CLEAN_TEXT, encoding="utf-8")
    done = subprocess_cli(here, "check", "--no-config", "--format", "json", name, "clean.yaml")
    assert done.returncode in (0, 1, 2)
    report = json.loads(done.stdout.decode("utf-8"))  # strict: the bytes written must be UTF-8
    assert [f["path"] for f in report["files"]][-1] == "clean.yaml"


# -- standard output closed, a full device, an ASCII-only encoding, a broken pipe

@pytest.mark.parametrize("fmt", ["human", "json"])
def test_standard_output_closed(here, fmt):
    done = subprocess_cli(here, "check", "--no-config", "--format", fmt, "clean.yaml", shell_suffix=">&-")
    assert done.returncode == 2, (done.returncode, _stderr(done))
    one_line(_stderr(done))


@pytest.mark.parametrize("fmt", ["human", "json"])
def test_standard_output_on_a_full_device(here, fmt):
    full = Path("/dev/full")
    if not (full.exists() and stat.S_ISCHR(os.stat(full).st_mode)):
        pytest.skip("no /dev/full character device")
    with open(full, "wb") as sink:  # only written to: nothing can replace the device through it
        done = subprocess_cli(here, "check", "--no-config", "--format", fmt, "clean.yaml", stdout=sink,
                              stderr=subprocess.PIPE)
    assert done.returncode == 2, (done.returncode, _stderr(done))
    one_line(_stderr(done))


@pytest.mark.parametrize("where", ["a full device node", "/dev/full"])
def test_report_file_on_a_full_device(here, where):
    if where == "/dev/full":
        target = Path("/dev/full")
        if not (target.exists() and stat.S_ISCHR(os.stat(target).st_mode)):
            pytest.skip("no /dev/full character device")
    else:
        target = make_device(here / "full", 1, 7)
    before = snapshot(target)
    done = subprocess_cli(here, "check", "--no-config", "-o", str(target), "clean.yaml")
    assert snapshot(target) == before, f"{target} was changed"
    assert done.returncode == 2, done.returncode
    one_line(_stderr(done))


@pytest.mark.parametrize("fmt", ["human", "json", "review", "html"])
def test_an_ascii_only_standard_output(here, fmt):
    done = subprocess_cli(here, "check", "--no-config", "--format", fmt, "clean.yaml",
                          env={"PYTHONIOENCODING": "ascii"})
    if done.returncode == 2:
        one_line(_stderr(done))
        return
    assert done.returncode == 0, (done.returncode, _stderr(done))
    done.stdout.decode("ascii")
    assert b"clean.yaml" in done.stdout


@pytest.mark.parametrize("files", [1, 80])
def test_a_broken_pipe_exits_zero(here, files):
    names = ["clean.yaml"]
    for i in range(1, files):  # enough output to fill the pipe before it is closed
        names.append(f"clean-{i}.yaml")
        (here / names[-1]).write_text(CLEAN_TEXT, encoding="utf-8")
    guard = here / ".guard.py"
    guard.write_text(_GUARD, encoding="utf-8")
    env = {**os.environ, "SPECCHECK_CACHE_DIR": str(here / ".cache")}
    proc = subprocess.Popen([sys.executable, str(guard), "check", "--no-config", "--sheet", *names], cwd=here,
                            env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE)  # the sheets: output enough
    try:
        first = proc.stdout.readline()  # `| head -1`
        proc.stdout.close()
        err = proc.stderr.read().decode("utf-8", "replace")
        code = proc.wait(timeout=HANG_GUARD)
    except subprocess.TimeoutExpired:
        proc.kill()
        pytest.fail("speccheck did not end after its reader went away", pytrace=False)
    assert first.startswith(b"caution [laser-safety]") and first.rstrip().endswith(names[-1].encode() + b".")
    assert "Traceback" not in err, err
    assert code == 0, (code, err)


# -- SIGTERM while writing a report

def test_sigterm_while_writing_a_report_leaves_no_temporary_file(here):
    for spec_file in sorted(EXAMPLES.glob("*.yaml")):
        for i in range(4):  # enough plots to be still writing when the signal comes
            shutil.copy(spec_file, here / f"{i}-{spec_file.name}")
    shutil.copytree(EXAMPLES / "data", here / "data")
    report = here / "report.html"
    report.write_text("the previous report\n", encoding="utf-8")
    guard = here / ".guard.py"
    guard.write_text(_GUARD, encoding="utf-8")
    env = {**os.environ, "SPECCHECK_CACHE_DIR": str(here / ".cache")}
    proc = subprocess.Popen([sys.executable, str(guard), "check", "--no-config", "--format", "html",
                             "-o", "report.html", "."], cwd=here, env=env,
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE)
    deadline = time.monotonic() + HANG_GUARD  # hang guard for the wait below, not a timing claim
    partial = []
    while proc.poll() is None and time.monotonic() < deadline and not partial:
        partial = [p for p in os.listdir(here) if p.startswith(".report.html")]
        time.sleep(0.01)
    if not partial:
        proc.kill()
        proc.wait()
        pytest.skip("the report was written before a signal could be sent")
    proc.send_signal(signal.SIGTERM)
    try:
        _, err = proc.communicate(timeout=HANG_GUARD)
    except subprocess.TimeoutExpired:
        proc.kill()
        pytest.fail("speccheck did not stop after SIGTERM", pytrace=False)
    err = err.decode("utf-8", "replace")
    assert "Traceback" not in err, err
    left = [p for p in os.listdir(here) if p.startswith(".report.html")]
    assert not left, f"temporary files left behind: {left}"
    assert report.read_text(encoding="utf-8") == "the previous report\n"
    assert proc.returncode != 0


# -- logarithmic units

@pytest.mark.parametrize("value, watts", [("30 dBm", 1.0), ("0 dBm", 1e-3), ("-10 dBm", 1e-4)])
def test_a_power_in_dbm_is_logarithmic_or_refused(here, value, watts):
    text = spec(f"""
        laser:
          wavelength: 800 nm
          average_power: {value}
        """)
    run = check_pair(here, text)
    line = line_of(text, "average_power")
    # a refusal must be about the unit: 0 dBm and -10 dBm are positive powers
    if [f for f in errors_at(run.findings("bad.yaml"), line) if f["rule"] != "non-positive-value"]:
        return
    got = cell(run, "bad.yaml", "laser", "average_power")
    assert got is not None and got["value"] == pytest.approx(watts, rel=1e-9), \
        f"{value} read as {got and got['value']} W, not {watts} W"


@pytest.mark.parametrize("value, factor", [("30 dB", 1000.0), ("20 dB", 100.0), ("3 dB", 10 ** 0.3)])
def test_a_gain_in_db_is_logarithmic_or_refused(here, value, factor):
    text = spec(_LASER) + f"  - {{name: amp, kind: amplifier, gain: {value}}}\n"
    run = check_pair(here, text)
    if errors_at(run.findings("bad.yaml"), line_of(text, "name: amp")):
        return
    before = cell(run, "bad.yaml", "laser", "pulse_energy")
    after = cell(run, "bad.yaml", "amp", "pulse_energy")
    assert after is not None and after["value"] == pytest.approx(before["value"] * factor, rel=1e-9), \
        f"gain {value} multiplied the energy by {after and after['value'] / before['value']}, not {factor}"


# -- angular frequencies

@pytest.mark.parametrize("key, value, hertz", [
    ("carrier_frequency", "2.4e15 rad/s", 2.4e15 / (2 * math.pi)),
    ("repetition_rate", "5e8 rad/s", 5e8 / (2 * math.pi)),
    ("spectral_bandwidth", "1e14 rad/s", 1e14 / (2 * math.pi)),
])
def test_an_angular_frequency_is_divided_by_two_pi_with_a_note_or_refused(here, key, value, hertz):
    text = spec(f"""
        laser:
          {key}: {value}
        """) if key == "carrier_frequency" else spec(f"""
        laser:
          wavelength: 800 nm
          {key}: {value}
        """)
    run = check_pair(here, text)
    line = line_of(text, key)
    if errors_at(run.findings("bad.yaml"), line):
        return
    got = cell(run, "bad.yaml", "laser", key)
    assert got is not None and got["value"] == pytest.approx(hertz, rel=1e-9), \
        f"{value} read as {got and got['value']} Hz, not {hertz:.6g} Hz"
    assert errors_at(run.findings("bad.yaml"), line, severity="note"), "converted without a note"


# -- non-ASCII digits

@pytest.mark.parametrize("value", ["١٥ nJ", "۱۵ nJ", "１５ nJ", "१५ nJ", "1٥ nJ", "𝟏𝟓 nJ", "15e١ nJ"])
def test_non_ascii_digits_are_refused(here, value):
    text = spec(f"""
        laser:
          wavelength: 800 nm
          pulse_energy: {value}
        """)
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, "pulse_energy"), column=col_of(text, "pulse_energy", value))


def test_non_ascii_digits_in_a_stage_parameter_are_refused(here):
    text = spec(_LASER) + "  - {name: lens, kind: focus, focal_length: ١٥٠ mm}\n"
    run = check_pair(here, text)
    expect_refused(run, "bad.yaml", line_of(text, "name: lens"))


# -- a bandwidth larger than its carrier frequency

@pytest.mark.parametrize("carrier, bandwidth", [
    ("wavelength: 800 nm", "spectral_bandwidth: 500 THz"),
    ("carrier_frequency: 375 THz", "spectral_bandwidth: 400 THz"),
    ("wavelength: 800 nm", "spectral_bandwidth: 20000 cm^-1"),
])
def test_a_bandwidth_larger_than_its_carrier_frequency_is_an_error(here, carrier, bandwidth):
    text = spec(f"""
        laser:
          {carrier}
          {bandwidth}
        """)
    run = check_pair(here, text)
    lines = {line_of(text, carrier), line_of(text, bandwidth)}
    found = [f for f in run.findings("bad.yaml") if f["severity"] == "error" and f["line"] in lines]
    assert found, f"no error at lines {sorted(lines)}: {[(f['rule'], f['line']) for f in run.findings('bad.yaml')]}"


# -- no internal exception names in messages

_ODD_UNITS = ["furlongs", "nJ/", "degC", "delta_degC", "dBm", "1/0", "nJ**nJ", "nJ^nJ", "m^(1/2)", "(nJ", "nJ)",
              "nJ nJ", "ua", "rad/s", "Np", "decade", "%%", "nJ/%", "e", "pi nJ", "nJ; J", "[length]", "__class__",
              "nJ.to('J')", "m²³", "MJ^-0", "J**1e9", "J^-1e9", "nJ = 5", "@ nJ", "ppb", "µ", "nJ/(s", "nJ^", "^2",
              "nJ**-", "1e5 nJ", "kelvin*degC", "nJ*/s", "/nJ", "J/0", "J^(2", "J^1.5.5", "J^99999", "Jm^^2"]


def _internal_names() -> re.Pattern:
    """Class names of the exceptions that units can raise inside: pint's own, Python's built-in
    errors and the tokenizer's."""
    import builtins
    import tokenize

    import pint.errors

    names = {n for module in (builtins, pint.errors) for n, v in vars(module).items()
             if isinstance(v, type) and issubclass(v, BaseException) and not issubclass(v, Warning)}
    names |= {tokenize.TokenError.__name__}
    return re.compile(r"\b(" + "|".join(sorted(names)) + r")\b")


def test_messages_never_show_internal_exception_names(here):
    names = []
    for i, unit in enumerate(_ODD_UNITS):
        names.append(f"unit-{i:02d}.yaml")
        (here / names[-1]).write_text(spec(f"""
            laser:
              wavelength: 800 nm
              pulse_energy: 5 {unit}
              average_power: ">= 2 {unit}"
            """), encoding="utf-8")
    run = check(*names)
    assert run.code in (1, 2)
    internal = _internal_names()
    leaks = [f"{entry['path']}:{f['line']}: {f['message']}" for entry in run.report["files"]
             for f in entry["findings"] if internal.search(f["message"])]
    leaks += [f"stderr: {s}" for s in run.err.splitlines() if internal.search(s)]
    assert not leaks, "messages name internal exceptions:\n" + "\n".join(leaks)
    assert check_pair(here, None, bad=names[0]).file(names[0]) is not None


# -- -o a special target: exit 2, the target unchanged

def _fifo(path: Path) -> Path:
    os.mkfifo(path)
    return path


_TARGETS = {
    "a FIFO": lambda d: _fifo(d / "out.fifo"),
    "a directory": lambda d: (d / "out-dir").mkdir() or (d / "out-dir"),
    "a symlink to a FIFO": lambda d: (_fifo(d / "pipe"), os.symlink("pipe", d / "link"), d / "link")[-1],
    "a null device node": lambda d: make_device(d / "null", 1, 3),
    "a symlink to a null device node": lambda d: (make_device(d / "null", 1, 3), os.symlink("null", d / "link"),
                                                  d / "link")[-1],
}


@pytest.mark.parametrize("what", list(_TARGETS))
def test_report_to_a_target_that_is_not_a_regular_file_is_refused(here, what):
    target = _TARGETS[what](here)
    before = snapshot(target)
    pointed = snapshot(target.resolve()) if target.is_symlink() else None
    done = subprocess_cli(here, "check", "--no-config", "-o", target.name, "clean.yaml")
    assert snapshot(target) == before, f"{what} was replaced or changed"
    if pointed is not None:
        assert snapshot(target.resolve()) == pointed, "the link's target was replaced or changed"
    assert done.returncode == 2, (done.returncode, _stderr(done))
    one_line(_stderr(done))


def test_report_to_dev_null_is_refused_and_dev_null_stays_a_device(here):
    null = Path("/dev/null")
    st = os.stat(null)
    if not (stat.S_ISCHR(st.st_mode) and st.st_rdev == os.makedev(1, 3)):
        pytest.skip("/dev/null is not the null character device here; not touching it")
    done = subprocess_cli(here, "check", "--no-config", "-o", "/dev/null", "clean.yaml")
    st_after = os.stat(null)
    assert stat.S_ISCHR(st_after.st_mode) and st_after.st_rdev == st.st_rdev
    assert done.returncode == 2, (done.returncode, _stderr(done))
    one_line(_stderr(done))


def test_report_through_a_symlink_to_a_regular_file_writes_through_and_keeps_the_link(here):
    real = here / "reports" / "latest.json"
    real.parent.mkdir()
    real.write_text("old\n", encoding="utf-8")
    os.symlink("reports/latest.json", here / "report.json")
    run = run_cli("check", "--no-config", "--format", "json", "-o", "report.json", "clean.yaml")
    assert run.code == 0, run.err
    assert (here / "report.json").is_symlink(), "the link was replaced by a file"
    assert os.readlink(here / "report.json") == "reports/latest.json"
    assert json.loads(real.read_text(encoding="utf-8"))["files"][0]["path"] == "clean.yaml"


@pytest.mark.parametrize("what", ["the measured data file", "the configuration file", "the named configuration"])
def test_report_over_a_file_the_run_reads_is_refused(here, what):
    shutil.copytree(EXAMPLES / "data", here / "data")
    shutil.copy(EXAMPLES / "fibre-oscillator-measured.yaml", here / "measured.yaml")
    if what == "the measured data file":
        target = here / "data" / "fibre-oscillator-spectrum.csv"
        args = ["check", "--no-config", "-o", "data/fibre-oscillator-spectrum.csv", "measured.yaml", "clean.yaml"]
    elif what == "the configuration file":
        target = here / "speccheck.toml"
        target.write_text('tolerance = "5%"\n', encoding="utf-8")
        args = ["check", "-o", "speccheck.toml", "measured.yaml", "clean.yaml"]
    else:
        target = here / "project.toml"
        target.write_text('tolerance = "5%"\n', encoding="utf-8")
        args = ["check", "--config", "project.toml", "-o", "project.toml", "measured.yaml", "clean.yaml"]
    before = target.read_bytes()
    run = run_cli(*args)
    assert target.read_bytes() == before, f"{what} was overwritten"
    assert run.code == 2, run.code
    one_line(run.err)


# -- a FIFO or a device named as a spec or a configuration

@pytest.mark.parametrize("what", ["a FIFO", "a device"])
def test_a_fifo_or_device_named_as_a_spec_is_refused_without_blocking(here, what):
    if what == "a FIFO":
        os.mkfifo(here / "pipe.yaml")
    else:
        make_device(here / "pipe.yaml", 1, 3)
    done = subprocess_cli(here, "check", "--no-config", "--format", "json", "pipe.yaml", "clean.yaml")
    report = json.loads(done.stdout)
    entries = {f["path"]: f for f in report["files"]}
    assert "clean.yaml" in entries, report
    bad = entries.get("pipe.yaml")
    assert bad is not None and any(f["rule"] == "unreadable-file" for f in bad["findings"]), bad
    assert done.returncode == 2


@pytest.mark.parametrize("what", ["a FIFO", "a device"])
def test_a_fifo_or_device_named_as_the_configuration_is_refused_without_blocking(here, what):
    if what == "a FIFO":
        os.mkfifo(here / "conf.toml")
    else:
        make_device(here / "conf.toml", 1, 3)
    done = subprocess_cli(here, "check", "--config", "conf.toml", "clean.yaml")
    assert done.returncode == 2, done.returncode
    assert "conf.toml" in one_line(_stderr(done))


# -- a 2 GB sparse file in a scanned folder

def test_a_two_gigabyte_sparse_file_in_a_scanned_folder_is_refused_in_constant_memory(here):
    folder = here / "specs"
    folder.mkdir()
    shutil.move(here / "clean.yaml", folder / "clean.yaml")
    with open(folder / "huge.yaml", "wb") as f:
        f.truncate(2 * 1024**3)  # sparse: no disk used
    done = subprocess_cli(here, "check", "--no-config", "--format", "json", "specs", memory=1024**3)
    report = json.loads(done.stdout)
    entries = {f["path"]: f for f in report["files"]}
    assert os.path.join("specs", "clean.yaml") in entries
    huge = entries.get(os.path.join("specs", "huge.yaml"))
    assert huge is not None and any(f["rule"] == "input-limit" for f in huge["findings"]), huge
    assert done.returncode in (1, 2)


# -- a folder symlink loop

@pytest.mark.parametrize("arg", ["specs", "specs/**/*.yaml"])
def test_a_folder_symlink_loop_neither_hangs_nor_reports_a_file_twice(here, arg):
    sub = here / "specs" / "sub"
    sub.mkdir(parents=True)
    shutil.move(here / "clean.yaml", sub / "clean.yaml")
    os.symlink("..", sub / "up")
    os.symlink(".", here / "specs" / "self")
    done = subprocess_cli(here, "check", "--no-config", "--format", "json", arg)
    paths = [f["path"] for f in json.loads(done.stdout)["files"]]
    real = [os.path.realpath(here / p) for p in paths]
    assert len(real) == len(set(real)), f"reported more than once: {paths}"
    assert os.path.realpath(sub / "clean.yaml") in real
    assert done.returncode == 0


# -- control characters never reach the human or HTML output raw

_RAW_CONTROLS = ("\x1b", "\x07", "\x9b")


def _control_case(folder: Path, where: str) -> str:
    if where == "title":
        text = spec('title: "red \\e[31m bell \\a csi \\x9b2J"\nlaser:\n  wavelength: 800 nm\n')
    elif where == "key":
        text = spec('laser:\n  wavelength: 800 nm\n  "pulse\\e[2J_energy\\a\\x9b": 1 nJ\n')
    elif where == "stage name":
        text = spec('laser:\n  wavelength: 800 nm\npath:\n  - {name: "lens\\e]0;owned\\a\\x9b", kind: optic}\n')
    elif where == "raw in the file":
        text = "spec_version: 1\ntitle: raw \x1b[31m \x07 here\nlaser:\n  wavelength: 800 nm\n"
    else:
        name = "spec-\x1b[31m-\x07-\x9b.yaml"
        (folder / name).write_text(CLEAN_TEXT, encoding="utf-8")
        return name
    (folder / "bad.yaml").write_text(text, encoding="utf-8")
    return "bad.yaml"


@pytest.mark.parametrize("fmt", ["human", "html"])
@pytest.mark.parametrize("where", ["title", "key", "stage name", "raw in the file", "file name"])
def test_control_characters_never_reach_human_or_html_output_raw(here, where, fmt):
    name = _control_case(here, where)
    run = run_cli("check", "--no-config", "--no-color", "--sheet", "--format", fmt, name, "clean.yaml")
    assert run.code in (0, 1, 2)
    raw = {repr(c): (run.out + run.err).count(c) for c in _RAW_CONTROLS if c in run.out + run.err}
    assert not raw, f"raw control characters in the {fmt} output: {raw}"
    assert "clean.yaml" in run.out


_WIDE = spec('title: "波長 800 nm の発振器 e\u0301"\nlaser:\n  wavelength: 800 nm\n  pulse_duration: 100 fs\n'
             'path:\n  - {name: "レンズ系統の長い名前です", kind: optic, transmission: 90%}\n'
             '  - {name: "e\u0301tage", kind: optic, transmission: 2}\n')


@pytest.mark.parametrize("where", ["title", "key", "stage name", "raw in the file", "file name", "wide"])
def test_human_output_in_colour_has_the_characters_of_the_plain_output(here, where):
    if where == "wide":
        (here / "bad.yaml").write_text(_WIDE, encoding="utf-8")
        name = "bad.yaml"
    else:
        name = _control_case(here, where)
    for extra in ((), ("--sheet",)):
        plain = run_cli("check", "--no-config", *extra, name, "clean.yaml")
        coloured = run_cli("check", "--no-config", "--color", *extra, name, "clean.yaml")
        assert plain.code == coloured.code
        assert re.sub("\x1b\\[[0-9;]*m", "", coloured.out) == plain.out
        assert all(f"{name}:" not in line or line.startswith(name) for line in plain.out.splitlines())
