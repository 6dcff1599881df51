"""The command line end to end: exit codes, formats, colour, subcommands."""

import io
import json
import os
import re
import subprocess
import sys
from pathlib import Path

import pytest

from speccheck.cli import run

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"


def cli(*argv, env=None):
    out, err = io.StringIO(), io.StringIO()
    code = run(list(argv), stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def test_a_consistent_spec_exits_0(tmp_path):
    code, out, _ = cli("check", str(EXAMPLES / "oscillator-consistent.yaml"))
    assert code == 0
    assert "0 errors" in out and "pulse_energy" in out


def test_an_error_exits_1_and_prints_file_line_col(tmp_path):
    path = EXAMPLES / "maker-sheet-one-wrong.yaml"
    code, out, _ = cli("check", "--no-sheet", str(path))
    assert code == 1
    assert f"{path}:11:17: error [relation-conflict]" in out.replace("\n", " ")


def test_a_missing_file_exits_2_and_the_others_are_still_checked(tmp_path):
    code, out, err = cli("check", str(tmp_path / "nope.yaml"), str(EXAMPLES / "oscillator-consistent.yaml"))
    assert code == 2
    assert "cannot read" in err and str(EXAMPLES / "oscillator-consistent.yaml") in out and "in 2 files" in out


def test_usage_errors_exit_2():
    assert cli("check")[0] == 2
    assert cli("frobnicate")[0] == 2
    assert cli("explain", "no-such-rule")[0] == 2


def test_strict_makes_warnings_fail(tmp_path):
    spec = tmp_path / "w.yaml"
    spec.write_text("spec_version: 1\nlaser:\n  wavelength: 800 nm\n  pulse_duration: 1.5 fs\n")
    assert cli("check", str(spec))[0] == 0
    assert cli("check", "--strict", str(spec))[0] == 1


def test_json_has_the_contract_shape():
    code, out, _ = cli("check", "--format", "json", str(EXAMPLES / "maker-sheet-one-wrong.yaml"))
    doc = json.loads(out)
    assert code == 1 and doc["version"] == 1
    assert doc["counts"] == {"error": 1, "warning": 0, "note": 1}  # the note: the laser-safety caution
    (file,) = doc["files"]
    (finding,) = [f for f in file["findings"] if f["rule"] != "laser-safety"]
    assert {"rule", "severity", "message", "line", "column", "quantities", "suspect"} <= set(finding)
    assert finding["suspect"] == "laser.pulse_energy" and finding["line"] == 11
    energy = file["sheet"]["laser"]["pulse_energy"]
    assert energy["status"] == "conflict" and energy["unit"] == "J"
    assert energy["value"] == pytest.approx(20e-9)
    peak = file["sheet"]["laser"]["peak_power"]
    assert peak["status"] == "stated" and peak["low"] == pytest.approx(59e6 * 0.90)  # a peak power to 10%


def test_json_is_byte_identical_across_runs():
    args = ("check", "--format", "json", str(EXAMPLES))
    assert cli(*args)[1] == cli(*args)[1]


def test_a_folder_is_searched_in_a_stable_order(tmp_path):
    (tmp_path / "b").mkdir()
    (tmp_path / ".hidden").mkdir()
    for name in ("b/z.yaml", "a.yml", ".hidden/x.yaml"):
        (tmp_path / name).write_text("spec_version: 1\nlaser: {}\n")
    (tmp_path / "notes.txt").write_text("not a spec")
    doc = json.loads(cli("check", "--format", "json", str(tmp_path))[1])
    assert [Path(f["path"]).relative_to(tmp_path).as_posix() for f in doc["files"]] == ["a.yml", "b/z.yaml"]


def test_output_file_is_written_and_inputs_are_untouched(tmp_path):
    spec = EXAMPLES / "typos-and-units.yaml"
    before = (spec.read_bytes(), spec.stat().st_mtime_ns)
    target = tmp_path / "report.json"
    code, out, _ = cli("check", "--format", "json", "-o", str(target), str(spec))
    assert code == 1 and out == ""
    assert json.loads(target.read_text())["counts"]["error"] == 4
    assert (spec.read_bytes(), spec.stat().st_mtime_ns) == before
    assert [p.name for p in tmp_path.iterdir()] == ["report.json"]  # no temporary left behind


def test_plain_output_has_no_colour_codes_unless_asked():
    path = str(EXAMPLES / "maker-sheet-one-wrong.yaml")
    assert "\x1b[" not in cli("check", path)[1]
    assert "\x1b[" in cli("check", "--color", path)[1]
    assert "\x1b[" not in cli("check", "--color", "--no-color", path)[1]


def test_no_color_environment_variable_is_honoured(monkeypatch):
    monkeypatch.setenv("NO_COLOR", "1")
    assert "\x1b[" not in cli("check", "--color", str(EXAMPLES / "maker-sheet-one-wrong.yaml"))[1]


def test_rules_explain_relations_and_schema_subcommands():
    code, out, _ = cli("rules")
    assert code == 0 and "relation-conflict" in out and "below-transform-limit" in out
    code, out, _ = cli("explain", "below-transform-limit")
    assert code == 0 and "0.441" in out and "Fails:" in out and "Passes:" in out
    code, out, _ = cli("relations")
    assert code == 0 and "E_p = P_avg / f_rep" in out
    code, out, _ = cli("schema")
    assert code == 0 and json.loads(out)["$schema"].endswith("2020-12/schema")


def test_python_dash_m_speccheck_works():
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run([sys.executable, "-m", "speccheck", "check", "--format", "json",
                           str(EXAMPLES / "oscillator-consistent.yaml")],
                          capture_output=True, text=True, env=env, timeout=120)
    assert proc.returncode == 0, proc.stderr
    assert json.loads(proc.stdout)["counts"]["error"] == 0
    assert "Traceback" not in proc.stderr


def test_review_says_what_is_consistent_impossible_and_implied():
    code, out, _ = cli("check", "--review", str(EXAMPLES / "maker-sheet-one-wrong.yaml"))
    text = " ".join(out.split())
    assert code == 1
    assert "Consistent: wavelength 1030 nm, repetition_rate 1 MHz" in text  # all but the suspect
    assert "pulse_energy 20 nJ," not in text.split("Impossible")[0]
    assert "Impossible or contradictory: line 11:" in text
    code, out, _ = cli("check", "--review", str(EXAMPLES / "oscillator-consistent.yaml"))
    text = " ".join(out.split())
    # By hand: 2 × 530 kW / (π (0.1 cm)²) = 3.37e7 W/cm².
    # (its bandwidth is stated in nm: the same bandwidth in THz is not said again)
    assert "Implied: time bandwidth product 0.3513; peak intensity 3.37" in text
    assert "THz" not in text
    assert "No claim contradicts another." in text


def test_input_limits_can_be_set_on_the_command_line(tmp_path):
    spec = tmp_path / "deep.yaml"
    spec.write_text("spec_version: 1\nlaser: {}\ntitle: " + "[" * 10 + "]" * 10 + "\n")
    code, out, _ = cli("check", "--format", "json", "--max-depth", "5", str(spec))
    assert code == 1 and "input-limit" in [f["rule"] for f in json.loads(out)["files"][0]["findings"]]
    code, out, _ = cli("check", "--format", "json", "--max-file-size", "20", str(spec))
    assert "more than the limit of 20" in json.loads(out)["files"][0]["findings"][0]["message"]
    assert cli("check", "--max-nodes", "0", str(spec))[0] == 2  # a usage error


def test_no_command_or_format_changes_an_input_file(tmp_path):
    import shutil

    from speccheck.formats import FORMATS

    specs = tmp_path / "specs"
    shutil.copytree(EXAMPLES, specs, copy_function=shutil.copy2)  # keeps the mtimes

    def snapshot():
        return {p.relative_to(specs): (p.read_bytes(), p.stat().st_mtime_ns)
                for p in sorted(specs.rglob("*")) if p.is_file()}

    before = snapshot()
    out_dir = tmp_path / "out"
    out_dir.mkdir()
    for fmt in FORMATS:
        assert cli("check", "--format", fmt, "-o", str(out_dir / f"report.{fmt}"), str(specs))[0] in (0, 1)
    assert cli("check", "--review", str(specs))[0] in (0, 1)
    for argv in (("rules",), ("explain", "relation-conflict"), ("relations",), ("schema",),
                 ("new", "-o", str(out_dir / "new.yaml"))):
        assert cli(*argv)[0] == 0
    assert snapshot() == before  # same files, same bytes, same modification times, nothing added


def test_the_json_writer_gives_the_document_exactly(checker):
    # The writer streams the sheet as text; it must say what document() says, number for number.
    from speccheck.formats import json_format

    results = [checker.check_text(p.read_bytes(), p.name) for p in sorted(EXAMPLES.glob("*.yaml"))]
    out = io.StringIO()
    json_format.write(results, out)
    assert json.loads(out.getvalue()) == json.loads(json.dumps(json_format.document(results)))


def test_review_of_a_path_speaks_of_its_end_not_of_every_stage():
    code, out, _ = cli("check", "--review", str(EXAMPLES / "proposal-focus-path.yaml"))
    implied = " ".join(line for line in out.splitlines() if line.strip().startswith("Implied:"))
    assert "at the end of the path ('lens')" in implied
    assert "'periscope'" not in implied  # (a remedy may name a stage: that is what it would take there)
    assert "operating point" not in out


def test_a_folder_without_specs_says_so_and_fails_as_a_glob_that_matches_nothing_does(tmp_path):
    # a mistyped or emptied folder in CI must not pass as "0 errors"
    code, out, err = cli("check", str(tmp_path))
    assert code == 2 and "no spec files" in err and "0 files" in out
    code, _, err = cli("check", str(tmp_path / "*.yaml"))
    assert code == 2 and "no spec file matches" in err


def test_files_the_project_leaves_out_are_not_a_failure_to_find(tmp_path, monkeypatch):
    # a hook hands over only the YAML files the project's exclude leaves out: nothing to check, exit 0
    (tmp_path / "pyproject.toml").write_text('[tool.speccheck]\nexclude = ["ci/*"]\n', encoding="utf-8")
    (tmp_path / "ci").mkdir()
    (tmp_path / "ci" / "workflow.yaml").write_text("on: push\n", encoding="utf-8")
    monkeypatch.chdir(tmp_path)
    code, _, err = cli("check", "ci/workflow.yaml")
    assert code == 0 and "skipped" in err


def test_jobs_gives_the_same_report_as_one_process(tmp_path):
    import io
    import shutil
    from pathlib import Path

    from speccheck.cli import run

    examples = Path(__file__).resolve().parent.parent / "example_specs"
    for f in sorted(examples.glob("*.yaml"))[:6]:
        shutil.copy(f, tmp_path / f.name)
    outs = []
    for extra in ([], ["--jobs", "2"]):
        out, err = io.StringIO(), io.StringIO()
        code = run(["check", "--no-config", "--format", "json", *extra, str(tmp_path)], out, err)
        outs.append((code, out.getvalue()))
    assert outs[0] == outs[1]
    assert outs[0][1].count('"path"') >= 6


# ------------------------------------------------------------------ how the human output reads
def sheet_rows(out: str) -> list[str]:
    return [line for line in out.splitlines() if line.startswith(("wavelength ", "pulse_energy "))]


def test_the_sheet_is_shown_by_default_only_when_one_file_is_checked():
    one, two = str(EXAMPLES / "maker-sheet-one-wrong.yaml"), str(EXAMPLES / "oscillator-consistent.yaml")
    assert sheet_rows(cli("check", one)[1])
    assert not sheet_rows(cli("check", "--no-sheet", one)[1])
    out = cli("check", one, two)[1]
    assert not sheet_rows(out) and f"{one}:11:17: error [relation-conflict]" in out
    assert out.rstrip().endswith("1 error, 0 warnings, 0 notes, 1 caution in 2 files")


def test_sheet_shows_every_files_sheet_after_all_the_findings():
    one, two = str(EXAMPLES / "maker-sheet-one-wrong.yaml"), str(EXAMPLES / "oscillator-consistent.yaml")
    lines = cli("check", "--sheet", one, two)[1].splitlines()
    rows = [i for i, line in enumerate(lines) if line.startswith("wavelength ")]
    assert len(rows) == 2  # a sheet for each file
    finding = max(i for i, line in enumerate(lines) if line.startswith(f"{one}:"))
    assert finding < rows[0]
    assert lines[rows[1] - 2].startswith(two)  # each sheet under its file's name


def test_sheet_and_no_sheet_exclude_each_other(capsys):
    code, _, _ = cli("check", "--sheet", "--no-sheet", str(EXAMPLES / "oscillator-consistent.yaml"))
    assert code == 2 and "not allowed with argument" in capsys.readouterr().err  # argparse's own message


class Terminal(io.StringIO):
    def isatty(self):
        return True


def test_on_a_terminal_findings_wrap_at_its_width_and_in_a_pipe_they_do_not(monkeypatch):
    import shutil

    monkeypatch.delenv("NO_COLOR", raising=False)
    monkeypatch.setattr(shutil, "get_terminal_size", lambda *a, **k: os.terminal_size((72, 24)))
    path = str(EXAMPLES / "maker-sheet-one-wrong.yaml")
    out = Terminal()
    assert run(["check", "--no-sheet", path], stdout=out, stderr=io.StringIO()) == 1
    lines = re.sub(r"\x1b\[[0-9;]*m", "", out.getvalue()).splitlines()
    assert "\x1b[" in out.getvalue() and max(map(len, lines)) <= 72 and len(lines) > 12
    piped = cli("check", "--no-sheet", path)[1].splitlines()
    (finding,) = [line for line in piped if line.startswith(f"{path}:11:17:")]
    assert finding.endswith("kHz for MHz).")  # the whole finding on its line
    out = Terminal()
    run(["check", "--no-sheet", "--no-color", path], stdout=out, stderr=io.StringIO())
    assert out.getvalue().splitlines() == piped  # no colour: the plain writer, even on a terminal


def test_plain_human_output_does_not_import_rich():
    one, two = str(EXAMPLES / "maker-sheet-one-wrong.yaml"), str(EXAMPLES / "maker-sheet-operating-points.yaml")
    probe = ("import io, sys\nfrom speccheck.cli import run\n"
             f"for argv in (['check', {one!r}], ['check', {two!r}], ['check', {one!r}, {two!r}], "
             f"['check', '--color', {one!r}]):\n"
             "    out = io.StringIO()\n"
             "    run(argv, out, io.StringIO())\n"
             "    print('rich' in sys.modules, 'pulse_energy' in out.getvalue())\n")
    proc = subprocess.run([sys.executable, "-c", probe], capture_output=True, text=True, timeout=300,
                          env=dict(os.environ, PYTHONPATH=str(ROOT)))
    assert proc.stdout.split() == ["False", "True"] * 3 + ["True", "True"], proc.stderr


def test_review_puts_targets_not_met_apart_from_impossible_claims():
    code, out, _ = cli("check", "--review", str(EXAMPLES / "proposal-focus-path.yaml"))
    assert "Targets not met:" in out and "Impossible or contradictory" not in out
    assert "No claim contradicts another." in out  # a target not met is not a contradiction among the claims


def test_review_says_the_bandwidth_once_in_the_form_the_sheet_states_it():
    # the pump-probe laser states its bandwidth in nm: the review's implied bandwidth is in nm, only
    # where it changes (the harmonic's 10.61 nm: 30 nm × √... of the doubled pulse), never again in THz
    code, out, _ = cli("check", "--review", str(EXAMPLES / "amplifier-pump-probe-path.yaml"))
    implied = [line for line in out.splitlines() if line.strip().startswith("Implied:")]
    bandwidth = [line for line in implied if "spectral bandwidth" in line]
    assert len(bandwidth) == 1 and "nm at 'pump_lens'" in bandwidth[0] and "THz" not in bandwidth[0]
    assert "30 nm" not in bandwidth[0]  # the laser's own 30 nm, carried unchanged, is not news
