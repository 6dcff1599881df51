"""The command line over a repository: folders, globs, project configuration, suppressions,
CI formats, starter specs, and the pre-commit hook definition."""

import io
import json
import os
import subprocess
import sys
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
import yaml

from speccheck.cli import run
from speccheck.starter import KINDS

ROOT = Path(__file__).resolve().parent.parent

CONSISTENT = """\
spec_version: 1
laser:
  wavelength: 800 nm
  repetition_rate: 80 MHz
  average_power: 1.2 W
  pulse_energy: 15 nJ
"""
# 15.6 nJ is 4% above 1.2 W / 80 MHz: consistent at 5% tolerance, a conflict at 1%.
FOUR_PERCENT_OFF = CONSISTENT.replace("15 nJ", "15.6 nJ")
SUB_CYCLE = "spec_version: 1\nlaser:\n  wavelength: 800 nm\n  pulse_duration: 1.5 fs\n"  # a warning
SUPPRESSED = "spec_version: 1\nlaser:\n  m2: 0.8   # speccheck: allow m2-below-one -- clipped by the iris\n"


def cli(*argv):
    out, err = io.StringIO(), io.StringIO()
    code = run([str(a) for a in argv], stdout=out, stderr=err)
    return code, out.getvalue(), err.getvalue()


def files_of(out: str) -> list[str]:
    return [f["path"] for f in json.loads(out)["files"]]


def rules_in(out: str) -> list[tuple[str, str]]:
    """(rule, severity) of the errors and warnings of a JSON report (notes left out)."""
    return [(f["rule"], f["severity"]) for file in json.loads(out)["files"] for f in file["findings"]
            if f["severity"] != "note"]


def put(root: Path, name: str, text: str) -> None:
    path = root / name
    path.parent.mkdir(parents=True, exist_ok=True)
    path.write_text(text, encoding="utf-8")


@pytest.fixture
def repo(tmp_path, monkeypatch):
    """A small repository: nested spec folders, a hidden and an excluded folder, other YAML files.
    The current folder is its root."""

    def write(name: str, text: str) -> None:
        put(tmp_path, name, text)

    (tmp_path / ".git").mkdir()
    write("speccheck.toml", 'exclude = ["drafts"]\n')
    write("specs/b/oscillator.yaml", CONSISTENT)
    write("specs/a.yml", CONSISTENT)
    write("specs/b/c/deep.yaml", CONSISTENT)
    write("specs/b/suppressed.yaml", SUPPRESSED)
    write("specs/drafts/unfinished.yaml", "spec_version: 1\nlaser:\n  m2: 0.5\n")
    write("specs/.scratch/hidden.yaml", "spec_version: 1\nlaser:\n  m2: 0.5\n")
    write("specs/notes.txt", "not a spec")
    write(".github/workflows/ci.yml", "on: push\n")
    monkeypatch.chdir(tmp_path)
    return tmp_path


# ------------------------------------------------------------------ files, folders, globs
def test_a_folder_is_searched_in_sorted_order_without_hidden_or_excluded_folders(repo):
    code, out, _ = cli("check", "--format", "json", ".")
    assert code == 0
    assert files_of(out) == ["specs/a.yml", "specs/b/c/deep.yaml", "specs/b/oscillator.yaml",
                             "specs/b/suppressed.yaml"]


def test_a_quoted_glob_is_expanded_in_sorted_order(repo):
    code, out, _ = cli("check", "--format", "json", "specs/**/*.yaml")
    assert code == 0
    assert files_of(out) == ["specs/b/c/deep.yaml", "specs/b/oscillator.yaml", "specs/b/suppressed.yaml"]
    assert files_of(cli("check", "--format", "json", "specs/*.yml")[1]) == ["specs/a.yml"]


def test_a_glob_that_matches_nothing_is_reported_and_exits_2_after_checking_the_rest(repo):
    code, out, err = cli("check", "--format", "json", "nowhere/**/*.yaml", "specs/a.yml")
    assert code == 2
    assert "no spec file matches 'nowhere/**/*.yaml'" in err
    assert files_of(out) == ["specs/a.yml"]


def test_a_file_whose_name_looks_like_a_glob_is_taken_literally(repo):
    put(repo, "specs/[draft].yaml", CONSISTENT)
    assert files_of(cli("check", "--format", "json", "specs/[draft].yaml")[1]) == ["specs/[draft].yaml"]


def test_a_file_given_twice_is_checked_once(repo):
    out = cli("check", "--format", "json", "specs/a.yml", "specs", "./specs/a.yml")[1]
    assert files_of(out).count("specs/a.yml") == 1


def test_a_named_file_the_configuration_leaves_out_is_skipped_with_a_note(repo):
    code, out, err = cli("check", "--format", "json", "specs/drafts/unfinished.yaml", "specs/a.yml")
    assert code == 0 and files_of(out) == ["specs/a.yml"]
    assert "skipped specs/drafts/unfinished.yaml" in err and "speccheck.toml" in err


def test_include_patterns_keep_other_yaml_files_of_the_repository_out(repo):
    put(repo, "speccheck.toml", 'include = ["specs/**/*.yaml", "specs/**/*.yml"]\nexclude = ["drafts"]\n')
    code, out, _ = cli("check", "--format", "json", ".github/workflows/ci.yml", "specs/a.yml")
    assert code == 0 and files_of(out) == ["specs/a.yml"]


def test_one_unreadable_file_does_not_stop_the_others(repo):
    code, out, err = cli("check", "--format", "json", "specs/missing.yaml", "specs/a.yml")
    assert code == 2 and "cannot read specs/missing.yaml" in err
    assert files_of(out) == ["specs/missing.yaml", "specs/a.yml"]


# ------------------------------------------------------------------ project configuration
def test_the_configured_tolerance_is_the_default_tolerance(repo):
    put(repo, "specs/off.yaml", FOUR_PERCENT_OFF)
    assert cli("check", "specs/off.yaml")[0] == 0
    put(repo, "speccheck.toml", 'tolerance = "1%"\n')
    code, out, _ = cli("check", "--format", "json", "specs/off.yaml")
    assert code == 1 and ("relation-conflict", "error") in rules_in(out)


def test_a_spec_s_own_tolerance_still_wins_over_the_configuration(repo):
    put(repo, "specs/off.yaml", "defaults:\n  tolerance: 5%\n" + FOUR_PERCENT_OFF)
    put(repo, "speccheck.toml", 'tolerance = "1%"\n')
    assert cli("check", "specs/off.yaml")[0] == 0


def test_disabled_rules_are_not_reported_and_severities_are_overridden(repo):
    put(repo, "specs/w.yaml", SUB_CYCLE)
    assert rules_in(cli("check", "--format", "json", "specs/w.yaml")[1]) == [("sub-cycle-pulse", "warning")]
    put(repo, "speccheck.toml", '[severity]\nsub-cycle-pulse = "error"\n')
    code, out, _ = cli("check", "--format", "json", "specs/w.yaml")
    assert code == 1 and rules_in(out) == [("sub-cycle-pulse", "error")]
    put(repo, "speccheck.toml", 'disable = ["sub-cycle-pulse"]\n')
    code, out, _ = cli("check", "--format", "json", "specs/w.yaml")
    assert code == 0 and rules_in(out) == []


def test_fail_on_sets_the_level_that_makes_the_exit_code_1(repo):
    put(repo, "specs/w.yaml", SUB_CYCLE)
    assert cli("check", "specs/w.yaml")[0] == 0
    assert cli("check", "--strict", "specs/w.yaml")[0] == 1
    assert cli("check", "--fail-on", "warning", "specs/w.yaml")[0] == 1
    put(repo, "speccheck.toml", 'fail-on = "warning"\n')
    assert cli("check", "specs/w.yaml")[0] == 1
    assert cli("check", "--fail-on", "error", "specs/w.yaml")[0] == 0


def test_pyproject_tool_speccheck_is_used_when_there_is_no_speccheck_toml(repo):
    (repo / "speccheck.toml").unlink()
    put(repo, "pyproject.toml", '[project]\nname = "lab"\n\n[tool.speccheck]\nexclude = ["b"]\n')
    assert files_of(cli("check", "--format", "json", "specs")[1]) == ["specs/a.yml", "specs/drafts/unfinished.yaml"]


def test_a_mistake_in_the_configuration_names_file_and_key_and_exits_2(repo):
    put(repo, "speccheck.toml", 'exclude = ["drafts"]\ndisable = ["strongly-chirp"]\n')
    code, out, err = cli("check", "specs")
    assert code == 2 and out == ""
    assert err == ("speccheck: speccheck.toml:2: disable: unknown rule 'strongly-chirp'; did you mean "
                   "'strongly-chirped'? (`speccheck rules` lists them)\n")


def test_config_names_a_file_and_no_config_ignores_any(repo, tmp_path_factory):
    elsewhere = tmp_path_factory.mktemp("elsewhere") / "strict.toml"
    elsewhere.write_text('fail-on = "warning"\n')
    put(repo, "specs/w.yaml", SUB_CYCLE)
    assert cli("check", "--config", elsewhere, "specs/w.yaml")[0] == 1
    put(repo, "speccheck.toml", "this is not toml\n")
    assert cli("check", "specs/w.yaml")[0] == 2
    assert cli("check", "--no-config", "specs/w.yaml")[0] == 0
    code, _, err = cli("check", "--config", repo / "nope.toml", "specs/w.yaml")
    assert code == 2 and "nope.toml: cannot read the configuration" in err
    assert cli("check", "--config", elsewhere, "--no-config", "specs/w.yaml")[0] == 2  # usage error


def test_the_configuration_is_found_from_a_subfolder_by_the_installed_command(repo):
    put(repo, "speccheck.toml", 'tolerance = "1%"\n')
    put(repo, "specs/off.yaml", FOUR_PERCENT_OFF)
    env = dict(os.environ, PYTHONPATH=str(ROOT))
    proc = subprocess.run([sys.executable, "-m", "speccheck", "check", "--format", "github", "off.yaml"],
                          cwd=repo / "specs", capture_output=True, text=True, env=env, timeout=120)
    assert proc.returncode == 1, proc.stderr
    assert "\n::error file=off.yaml,line=" in "\n" + proc.stdout
    assert "Traceback" not in proc.stderr


# ------------------------------------------------------------------ suppressions end to end
def test_an_inline_suppression_keeps_a_repository_green(repo):
    code, out, _ = cli("check", "--format", "json", "specs/b/suppressed.yaml")
    assert code == 0 and rules_in(out) == []


def test_a_stale_suppression_is_reported_and_can_be_made_an_error(repo):
    put(repo, "specs/stale.yaml", "spec_version: 1\nlaser:\n  m2: 1.1  # speccheck: allow m2-below-one -- old\n")
    code, out, _ = cli("check", "--format", "json", "specs/stale.yaml")
    assert code == 0 and rules_in(out) == [("unused-suppression", "warning")]
    put(repo, "speccheck.toml", '[severity]\nunused-suppression = "error"\n')
    assert cli("check", "specs/stale.yaml")[0] == 1


# ------------------------------------------------------------------ formats through the command line
def test_every_ci_format_can_be_chosen_and_written_to_a_file(repo):
    put(repo, "specs/w.yaml", SUB_CYCLE)
    for fmt in ("sarif", "junit", "github", "csv"):
        code, out, _ = cli("check", "--format", fmt, "-o", f"report.{fmt}", "specs")
        assert code == 0 and out == ""
        assert (repo / f"report.{fmt}").stat().st_size > 0
    results = json.loads((repo / "report.sarif").read_text())["runs"][0]["results"]
    assert "sub-cycle-pulse" in [r["ruleId"] for r in results]
    suites = ET.parse(repo / "report.junit").getroot().findall("testsuite")
    assert len(suites) == 5
    commands = (repo / "report.github").read_text().splitlines()
    assert any(c.startswith("::warning file=specs/w.yaml,line=4,col=19,title=sub-cycle-pulse::") for c in commands)
    assert (repo / "report.csv").read_text().startswith("file,quantity,unit,laser")


def test_junit_failures_follow_the_failing_level(repo):
    put(repo, "specs/w.yaml", SUB_CYCLE)
    strict = ET.fromstring(cli("check", "--format", "junit", "--strict", "specs/w.yaml")[1])
    assert strict.get("failures") == "1"
    assert ET.fromstring(cli("check", "--format", "junit", "specs/w.yaml")[1]).get("failures") == "0"


def test_the_report_never_replaces_a_spec_being_checked(repo):
    before = (repo / "specs/a.yml").read_bytes()
    code, _, err = cli("check", "--format", "json", "-o", "specs/a.yml", "specs")
    assert code == 2 and "input files are never written" in err
    assert (repo / "specs/a.yml").read_bytes() == before


def test_a_report_into_a_missing_folder_is_a_message_not_a_traceback(repo):
    code, _, err = cli("check", "-o", "no/such/folder/r.json", "--format", "json", "specs/a.yml")
    assert code == 2 and "cannot write no/such/folder/r.json" in err


# ------------------------------------------------------------------ new, schema, explain
@pytest.mark.parametrize("kind", KINDS)
def test_every_starter_spec_passes_the_check_without_an_error_or_a_warning(repo, kind):
    code, _, err = cli("new", "--kind", kind, "-o", f"{kind}.yaml")
    assert code == 0 and f"wrote {kind}.yaml" in err
    code, out, _ = cli("check", "--format", "json", "--strict", f"{kind}.yaml")
    assert code == 0, rules_in(out)
    counts = json.loads(out)["counts"]
    assert (counts["error"], counts["warning"]) == (0, 0)
    text = (repo / f"{kind}.yaml").read_text()
    assert text.startswith("# A speccheck spec") and "(example)" in text


def test_new_refuses_to_replace_a_file_unless_forced(repo):
    (repo / "mine.yaml").write_text("my own work\n")
    code, _, err = cli("new", "-o", "mine.yaml")
    assert code == 2 and "exists; use --force" in err
    assert (repo / "mine.yaml").read_text() == "my own work\n"
    assert cli("new", "--force", "--kind", "fibre", "-o", "mine.yaml")[0] == 0
    assert "Erbium fibre oscillator" in (repo / "mine.yaml").read_text()


def test_new_prints_to_standard_output_and_can_add_the_editor_modeline(repo):
    code, out, _ = cli("new", "--kind", "proposal", "--schema", "schemas/spec-v1.schema.json")
    assert code == 0
    assert out.splitlines()[0] == "# yaml-language-server: $schema=schemas/spec-v1.schema.json"
    assert yaml.safe_load(out)["spec_version"] == 1


def test_new_gives_a_new_file_the_usual_permissions(repo):
    cli("new", "-o", "fresh.yaml")
    umask = os.umask(0)
    os.umask(umask)
    assert (repo / "fresh.yaml").stat().st_mode & 0o777 == 0o666 & ~umask


def test_new_with_an_unknown_kind_is_a_usage_error(repo):
    assert cli("new", "--kind", "laser-pointer")[0] == 2


def test_schema_prints_the_json_schema_of_the_spec_format():
    code, out, _ = cli("schema")
    schema = json.loads(out)
    assert code == 0 and "laser" in schema["properties"] and schema["$schema"].endswith("2020-12/schema")


def test_explain_prints_the_source_a_rule_names():
    code, out, _ = cli("explain", "m2-below-one")
    assert code == 0 and "\nSource: ISO 11146" in out
    assert "\nSource: Fourier transform limit; pulse-shape tables" in cli("explain", "below-transform-limit")[1]
    assert "\nSource: common practice\n" in cli("explain", "strongly-chirped")[1]
    assert "Source: each relation's own" in cli("explain", "relation-conflict")[1]


def test_explain_and_rules_know_the_suppression_rules():
    rules = cli("rules")[1]
    for rule_id in ("suppression-without-reason", "invalid-suppression", "unused-suppression"):
        assert rule_id in rules
        code, out, _ = cli("explain", rule_id)
        assert code == 0 and "Fails:" in out and "Source:" not in out


# ------------------------------------------------------------------ pre-commit
def test_the_pre_commit_hook_runs_speccheck_check_on_yaml_files():
    import re

    (hook,) = yaml.safe_load((ROOT / ".pre-commit-hooks.yaml").read_text())
    assert hook["id"] == "speccheck" and hook["entry"] == "speccheck check" and hook["language"] == "python"
    assert hook["types"] == ["yaml"] and "files" not in hook  # pre-commit's own type: *.yaml and *.yml
    assert hook["args"] == ["--no-sheet"] and hook["require_serial"] is True
    hidden = re.compile(hook["exclude"])
    assert hidden.search(".pre-commit-config.yaml") and hidden.search(".github/workflows/ci.yml")
    assert not hidden.search("specs/a.yaml")


def test_the_pre_commit_hooks_run_gives_findings_one_summary_and_the_caution_once(monkeypatch):
    monkeypatch.chdir(ROOT)  # pre-commit runs from the repository's root with relative paths
    (hook,) = yaml.safe_load((ROOT / ".pre-commit-hooks.yaml").read_text())
    names = ["maker-sheet-one-wrong.yaml", "oscillator-consistent.yaml", "maker-sheet-operating-points.yaml"]
    argv = hook["entry"].split()[1:] + hook["args"] + [f"example_specs/{n}" for n in names]
    code, out, _ = cli(*argv)  # one serial run over every file pre-commit passes
    assert code == 1
    assert out.count("IEC 60825-1") == 1 and out.count(" in 3 files") == 1
    assert not [line for line in out.splitlines() if line.startswith(("wavelength ", "pulse_energy "))]
    assert "example_specs/maker-sheet-one-wrong.yaml:11:17: error [relation-conflict]" in out


def test_readme_shows_the_ci_step_and_the_pre_commit_snippet():
    readme = (ROOT / "README.md").read_text(encoding="utf-8")
    section = readme.split("## Use in CI and pre-commit", 1)[1]
    assert "speccheck check --format junit -o speccheck.xml specs/" in section
    assert "id: speccheck" in section
