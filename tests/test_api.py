"""The Python API: speccheck.check / check_text give what `speccheck check` gives for the same inputs."""

import io
import json
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

import speccheck
from speccheck import api
from speccheck.cli import run

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "example_specs"
LIGHT = ["maker-sheet-one-wrong.yaml", "oscillator-consistent.yaml", "typos-and-units.yaml"]
MEASURED = "fibre-oscillator-measured.yaml"


def cli(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    code = run(["check", *argv], out, err)
    return code, out.getvalue(), err.getvalue()


def cli_json(*argv: str) -> tuple[int, dict]:
    code, out, _ = cli("--format", "json", *argv)
    return code, json.loads(out)


@pytest.fixture
def specs(tmp_path, monkeypatch):
    """A folder of example specs (one with its measured data), the current folder, no configuration."""
    for name in LIGHT + [MEASURED]:
        shutil.copy(EXAMPLES / name, tmp_path / name)
    shutil.copytree(EXAMPLES / "data", tmp_path / "data")
    monkeypatch.chdir(tmp_path)
    return tmp_path


def test_the_package_exports_the_api_without_importing_it_at_start():
    assert speccheck.check is api.check and speccheck.check_text is api.check_text and speccheck.Result is api.Result
    probe = subprocess.run([sys.executable, "-c", "import sys, speccheck.cli; print('speccheck.api' in sys.modules, "
                            "'speccheck.checking.document' in sys.modules)"], capture_output=True, text=True)
    # the command line imports the API module (it runs on it), but not the checker until a check runs
    assert probe.stdout.split() == ["True", "False"]


def test_to_dict_is_the_json_format_and_the_exit_code_the_command_lines(specs):
    result = speccheck.check(".", config=False)
    code, document = cli_json("--no-config", ".")
    assert result.to_dict() == document
    assert result.exit_code == code == 1  # maker-sheet-one-wrong and typos-and-units have errors
    assert [r.path for r in result.files] == [f["path"] for f in document["files"]]
    # the measured data were read beside the spec: the bandwidth comes from the file
    measured = next(r for r in result.files if r.path.endswith(MEASURED))
    assert measured.sheet["laser"]["spectral_bandwidth_wavelength"].status == "stated"
    assert any(p.endswith("fibre-oscillator-spectrum.csv") for p in result.data_files)


def test_the_json_of_the_installed_command_is_the_same(specs):
    done = subprocess.run([sys.executable, "-m", "speccheck", "check", "--no-config", "--format", "json",
                           "maker-sheet-one-wrong.yaml"], capture_output=True, text=True, cwd=specs)
    assert speccheck.check("maker-sheet-one-wrong.yaml", config=False).to_dict() == json.loads(done.stdout)


def test_findings_and_sheet_cells_carry_their_fields(specs):
    result = speccheck.check("maker-sheet-one-wrong.yaml", config=False)
    (conflict,) = [f for f in result.files[0].findings if f.rule == "relation-conflict"]
    assert (conflict.severity, conflict.line, conflict.column, conflict.suspect) == ("error", 11, 17,
                                                                                      "laser.pulse_energy")
    assert "laser.pulse_energy" in conflict.quantities and "20 nJ" in conflict.message
    cell = result.files[0].sheet["laser"]["pulse_energy"]
    assert (cell.status, cell.unit) == ("conflict", "J")
    assert cell.value == pytest.approx(20e-9) and cell.low < cell.value < cell.high


def test_exit_codes_follow_the_command_line(specs):
    assert speccheck.check("oscillator-consistent.yaml", config=False).exit_code == 0
    # the laser-safety caution never fails a run on its own, at any --fail-on
    assert speccheck.check("oscillator-consistent.yaml", config=False, fail_on="note").exit_code == \
        cli("--no-config", "--fail-on", "note", "oscillator-consistent.yaml")[0] == 0
    missing = speccheck.check("nowhere.yaml", config=False)
    assert missing.exit_code == cli("--no-config", "nowhere.yaml")[0] == 2
    assert [f.rule for f in missing.findings] == ["unreadable-file"]
    assert missing.messages == ("cannot read nowhere.yaml: No such file or directory",)
    unmatched = speccheck.check("nothing/*.yaml", config=False)
    assert unmatched.exit_code == 2 and "no spec file matches 'nothing/*.yaml'" in unmatched.messages
    with pytest.raises(ValueError):
        speccheck.check("", config=False)
    with pytest.raises(ValueError):
        speccheck.check("oscillator-consistent.yaml", config=False, fail_on="fatal")


def test_the_project_configuration_is_found_given_or_left_out(specs):
    (specs / "speccheck.toml").write_text('disable = ["relation-conflict"]\n', encoding="utf-8")
    rules = lambda r: {f.rule for f in r.findings}  # noqa: E731
    found = speccheck.check("maker-sheet-one-wrong.yaml")  # found from the current folder
    assert found.exit_code == 0 and found.files and "relation-conflict" not in rules(found)
    assert "relation-conflict" in rules(speccheck.check("maker-sheet-one-wrong.yaml", config=False))
    other = specs / "other.toml"
    other.write_text("fail-on = 'error'\n", encoding="utf-8")
    assert "relation-conflict" in rules(speccheck.check("maker-sheet-one-wrong.yaml", config=other))
    (specs / "speccheck.toml").write_text('disable = ["relation-conflikt"]\n', encoding="utf-8")
    broken = speccheck.check("maker-sheet-one-wrong.yaml")
    assert broken.exit_code == cli("maker-sheet-one-wrong.yaml")[0] == 2
    assert broken.files == () and "relation-conflikt" in broken.messages[0]
    with pytest.raises(TypeError):
        speccheck.check("maker-sheet-one-wrong.yaml", config=True)


def test_sets_as_a_mapping_pairs_or_texts_are_the_command_lines_set(specs):
    code, document = cli_json("--no-config", "--set", "laser.pulse_energy=20 µJ", "maker-sheet-one-wrong.yaml")
    for sets in ({"laser.pulse_energy": "20 µJ"}, [("laser.pulse_energy", "20 µJ")], ["laser.pulse_energy=20 µJ"]):
        result = speccheck.check("maker-sheet-one-wrong.yaml", config=False, sets=sets)
        assert result.to_dict() == document and result.exit_code == code
    assert "relation-conflict" not in {f["rule"] for f in document["files"][0]["findings"]}
    unknown = speccheck.check("maker-sheet-one-wrong.yaml", config=False, sets={"laser.pulse_energie": "2 mJ"})
    assert unknown.exit_code == 2 and unknown.messages[0].startswith("--set: maker-sheet-one-wrong.yaml: ")
    for bad in ({"pulse_energy": "2 mJ"}, ["laser.pulse_energy"], {"laser.pulse_energy": None}):
        with pytest.raises(ValueError):
            speccheck.check("maker-sheet-one-wrong.yaml", config=False, sets=bad)


def test_inline_suppressions_apply(specs):
    path = specs / "maker-sheet-one-wrong.yaml"
    lines = path.read_text(encoding="utf-8").splitlines()
    (i,) = [n for n, line in enumerate(lines) if line.strip().startswith("pulse_energy:")]
    lines[i] += "  # speccheck: allow relation-conflict -- the sheet as received"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    result = speccheck.check(str(path), config=False)
    assert "relation-conflict" not in {f.rule for f in result.findings} and result.exit_code == 0


def test_check_text_reads_measured_data_under_base(specs):
    text = (specs / MEASURED).read_text(encoding="utf-8")
    beside = speccheck.check(MEASURED, config=False)
    here = speccheck.check_text(text, path=MEASURED, base=specs, config=False)
    assert here.to_dict() == beside.to_dict() and here.exit_code == beside.exit_code
    elsewhere = speccheck.check_text(text, base=specs / "data", config=False)
    assert elsewhere.files[0].path == "<string>"
    unread = [f for f in elsewhere.findings if f.rule == "measured-data"]
    assert len(unread) == 2 and all("cannot read it" in f.message for f in unread)  # data/data/… is not there


def test_records_are_flat_with_the_same_keys(specs):
    shutil.copy(EXAMPLES / "proposal-focus-path.yaml", specs / "proposal-focus-path.yaml")  # targets with remedies
    result = speccheck.check(".", config=False)
    for kind, keys in (("findings", api.FINDING_KEYS), ("cells", api.CELL_KEYS), ("remedies", api.REMEDY_KEYS)):
        records = result.to_records(kind)
        assert records and all(tuple(r) == keys for r in records)
        assert all(v is None or isinstance(v, (str, int, float, bool)) for r in records for v in r.values())
    assert len(result.to_records()) == len(result.findings)
    assert len(result.to_records("cells")) == sum(len(c) for r in result.files for c in r.sheet.values())
    assert len(result.to_records("remedies")) == sum(len(f.remedies or ()) for f in result.findings)
    # a remedy no value reaches is no range: never an open one that a filter low <= x <= high would take
    for r in result.to_records("remedies"):
        assert (r["low"] is None and r["high"] is None) == (not r["reachable"])
    # the records carry what the JSON carries: candidates of an ambiguous conflict, each remedy's range
    doc = result.to_dict()
    listed = [f for d in doc["files"] for f in d["findings"]]
    assert [r["candidates"] for r in result.to_records()] == [", ".join(f.get("candidates", [])) for f in listed]
    assert [r["remedies"] for r in result.to_records()] == [len(f["remedies"]) if "remedies" in f else None
                                                            for f in listed]
    with pytest.raises(ValueError):
        result.to_records("rows")
    # an operating point's value taken from the laser block says so, as in JSON and CSV
    points = speccheck.check_text((EXAMPLES / "maker-sheet-operating-points.yaml").read_text(encoding="utf-8"))
    by_place = {(r["sheet_column"], r["quantity"]): r for r in points.to_records("cells")}
    assert by_place[("50 kHz", "pulse_duration")]["inherited"] and not by_place[("laser", "pulse_duration")]["inherited"]


def test_the_notebook_view_escapes_what_the_spec_says():
    text = "spec_version: 1\ntitle: <script>alert(1)</script>\nlaser:\n  average_power: 2\n"
    shown = speccheck.check_text(text, config=False)._repr_html_()
    assert "<script>" not in shown and "&lt;script&gt;" in shown
    assert "missing-unit" in shown and "exit code 1" in shown


def test_what_would_meet_a_target_reads_the_measured_data_beside_the_spec_too(specs):
    # the remedies re-check the spec with an input changed; those checks read the data files beside the
    # spec as the first one does, so the command line and check_text agree on them (a fuzzer case)
    text = (EXAMPLES / "amplifier-pump-probe-path.yaml").read_text(encoding="utf-8").replace(
        "laser:\n", "laser:\n  autocorrelation: {file: data/fibre-oscillator-autocorrelation.txt, delay_unit: ps}\n", 1)
    (specs / "pp.yaml").write_text(text, encoding="utf-8")
    code, document = cli_json("--no-config", "pp.yaml")
    result = speccheck.check_text(text, path="pp.yaml", base=specs, config=False)
    assert any("remedies" in f for f in document["files"][0]["findings"])
    assert result.to_dict() == document and result.exit_code == code


def test_a_remedy_no_value_reaches_has_no_range_in_the_records():
    # the pump-probe example's pulse duration cannot meet its target anywhere in the range searched
    result = speccheck.check_text((EXAMPLES / "amplifier-pump-probe-path.yaml").read_text(encoding="utf-8"),
                                  base=str(EXAMPLES), config=False)
    records = result.to_records("remedies")
    unreachable = [r for r in records if not r["reachable"]]
    assert unreachable and all(r["low"] is None and r["high"] is None for r in unreachable)
    assert all(r["low"] is not None and r["high"] is not None for r in records if r["reachable"])
