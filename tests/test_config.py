"""Project configuration: finding it, reading it, its mistakes, and applying it to findings."""

import dataclasses
import textwrap

import pytest

from speccheck.reading import config as cfg
from speccheck.records.findings import FileResult, Finding


def parse(text: str, **kw) -> cfg.Config:
    return cfg.parse(textwrap.dedent(text), **kw)


def error_of(text: str, **kw) -> str:
    with pytest.raises(cfg.ConfigError) as info:
        parse(text, **kw)
    return str(info.value)


# ------------------------------------------------------------------ reading
def test_every_key_of_speccheck_toml_is_read():
    c = parse("""
        tolerance = "3%"
        disable = ["strongly-chirped"]
        fail-on = "warning"
        include = ["specs/**/*.yaml"]
        exclude = ["drafts"]

        [severity]
        sub-cycle-pulse = "error"
    """)
    assert c.tolerance == pytest.approx(0.03)
    assert c.disable == {"strongly-chirped"}
    assert dict(c.severity) == {"sub-cycle-pulse": "error"}
    assert (c.include, c.exclude, c.fail_on) == (("specs/**/*.yaml",), ("drafts",), "warning")


def test_pyproject_keeps_the_keys_under_tool_speccheck():
    c = parse("""
        [project]
        name = "lab-specs"

        [tool.speccheck]
        tolerance = 0.02
        disable = ["assumed-shape"]

        [tool.speccheck.severity]
        unused-suppression = "error"
    """, pyproject=True)
    assert c.tolerance == pytest.approx(0.02) and c.disable == {"assumed-shape"}
    assert dict(c.severity) == {"unused-suppression": "error"}


def test_an_empty_configuration_is_the_default():
    assert parse("") == dataclasses.replace(cfg.DEFAULT, path="speccheck.toml")


# ------------------------------------------------------------------ mistakes
def test_an_unknown_key_is_named_with_the_closest_known_one_and_its_line():
    message = error_of('tolerance = "5%"\ntolerence = "3%"\n', path="speccheck.toml")
    assert message.startswith("speccheck.toml:2: tolerence: unknown key; did you mean 'tolerance'?")


def test_an_unknown_key_in_pyproject_names_the_table():
    message = error_of('[tool.speccheck]\nfail_on = "warning"\n', path="pyproject.toml", pyproject=True)
    assert message.startswith("pyproject.toml:2: tool.speccheck.fail_on: unknown key; did you mean 'fail-on'?")


def test_tool_speccheck_inside_speccheck_toml_is_explained():
    assert "keys stand at the top level" in error_of('[tool.speccheck]\ntolerance = "5%"\n')


def test_an_unknown_rule_id_is_reported_with_a_suggestion():
    assert "unknown rule 'strongly-chirp'; did you mean 'strongly-chirped'?" in error_of(
        'disable = ["strongly-chirp"]\n')
    message = error_of('[severity]\nsub-cycle = "error"\n')
    assert message.startswith("speccheck.toml:2: severity.sub-cycle: unknown rule; did you mean 'sub-cycle-pulse'?")


def test_a_bad_severity_level_is_reported():
    assert "level must be one of error, warning, note, got 'fatal'" in error_of(
        '[severity]\nsub-cycle-pulse = "fatal"\n')
    assert "list it in disable" in error_of('[severity]\nsub-cycle-pulse = "off"\n')
    assert "got a number" in error_of('[severity]\nsub-cycle-pulse = 3\n')


def test_values_of_the_wrong_type_are_reported():
    assert 'must be a list of strings, like disable = [\'strongly-chirped\']' in error_of(
        'disable = "strongly-chirped"\n')
    assert "must be a list of strings, got a number" in error_of("exclude = 3\n")
    assert "must be a table of rule = level" in error_of('severity = "error"\n')
    assert "fail-on: must be one of error, warning, note, got 'never'" in error_of('fail-on = "never"\n')
    assert "tolerance must be" in error_of('tolerance = "five percent"\n')
    assert "tolerance must be" in error_of("tolerance = true\n")


def test_invalid_toml_is_reported_with_its_position():
    assert "not valid TOML" in error_of('tolerance = "5%\n') and "line 1" in error_of('tolerance = "5%\n')


def test_rules_that_say_a_file_was_not_read_cannot_be_turned_off_or_down():
    assert "cannot be disabled" in error_of('disable = ["yaml-syntax"]\n')
    assert "cannot be changed" in error_of('[severity]\nunreadable-file = "note"\n')


def test_a_rule_both_disabled_and_given_a_level_is_a_contradiction():
    assert "not both" in error_of('disable = ["sub-cycle-pulse"]\n[severity]\nsub-cycle-pulse = "error"\n')


def test_patterns_must_stay_inside_the_configured_folder():
    assert "not absolute" in error_of('exclude = ["/etc"]\n')
    assert "'..'" in error_of('include = ["../other/*.yaml"]\n')
    assert "must not be empty" in error_of('exclude = [""]\n')


# ------------------------------------------------------------------ finding the file
def test_the_configuration_is_found_by_walking_up_to_the_git_root(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / "speccheck.toml").write_text('tolerance = "2%"\n')
    deep = tmp_path / "specs" / "lab"
    deep.mkdir(parents=True)
    assert cfg.find(deep) == tmp_path / "speccheck.toml"


def test_the_walk_stops_at_the_git_root(tmp_path):
    (tmp_path / "speccheck.toml").write_text('tolerance = "2%"\n')
    repo = tmp_path / "repo"
    (repo / ".git").mkdir(parents=True)
    assert cfg.find(repo) is None


def test_speccheck_toml_wins_over_pyproject_in_the_same_folder(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / "pyproject.toml").write_text('[tool.speccheck]\ntolerance = "1%"\n')
    (tmp_path / "speccheck.toml").write_text('tolerance = "2%"\n')
    assert cfg.find(tmp_path).name == "speccheck.toml"


def test_a_pyproject_without_tool_speccheck_is_passed_over(tmp_path):
    (tmp_path / ".git").mkdir()
    (tmp_path / "pyproject.toml").write_text('[tool.speccheck]\ntolerance = "1%"\n')
    sub = tmp_path / "sub"
    sub.mkdir()
    (sub / "pyproject.toml").write_text('[project]\nname = "x"\n')
    assert cfg.find(sub) == tmp_path / "pyproject.toml"
    assert cfg.load(cfg.find(sub)).tolerance == pytest.approx(0.01)


def test_a_configuration_that_is_not_utf8_is_reported(tmp_path):
    path = tmp_path / "speccheck.toml"
    path.write_bytes(b'tolerance = "5\xff"\n')
    with pytest.raises(cfg.ConfigError, match="not UTF-8"):
        cfg.load(path)


# ------------------------------------------------------------------ applying to findings
def finding(rule, severity="error", line=1):
    return Finding(rule, severity, "message", "a.yaml", line, 1)


def test_disabled_rules_are_dropped_and_severities_replaced_in_new_findings():
    old = (finding("strongly-chirped", "note"), finding("sub-cycle-pulse", "warning", 2),
           finding("relation-conflict", "error", 3))
    result = FileResult("a.yaml", old)
    c = parse('disable = ["strongly-chirped"]\n[severity]\nsub-cycle-pulse = "error"\n')
    (new,) = cfg.apply([result], c)
    assert [(f.rule, f.severity) for f in new.findings] == [("sub-cycle-pulse", "error"),
                                                           ("relation-conflict", "error")]
    assert result.findings == old and old[1].severity == "warning"  # the originals are untouched
    assert new.findings[1] is old[2]


def test_a_result_that_nothing_changes_is_passed_through():
    result = FileResult("a.yaml", (finding("relation-conflict"),))
    assert cfg.apply([result], cfg.DEFAULT)[0] is result


def test_fail_on_counts_the_level_and_everything_more_severe():
    results = [FileResult("a.yaml", (finding("sub-cycle-pulse", "warning"),))]
    assert not cfg.failing(results, "error")
    assert cfg.failing(results, "warning") and cfg.failing(results, "note")


# ------------------------------------------------------------------ include / exclude patterns
@pytest.mark.parametrize("pattern, path, matches", [
    ("specs/**/*.yaml", "specs/a.yaml", True),
    ("specs/**/*.yaml", "specs/lab/b/c.yaml", True),
    ("specs/**/*.yaml", "other/specs/a.yaml", False),
    ("specs/*.yaml", "specs/lab/a.yaml", False),
    ("drafts", "drafts", True),
    ("drafts", "lab/drafts", True),
    ("*.draft.yaml", "lab/x.draft.yaml", True),
    ("lab/?.yaml", "lab/a.yaml", True),
    ("lab/?.yaml", "lab/ab.yaml", False),
    ("lab/[!x].yaml", "lab/a.yaml", True),
    ("lab/[!x].yaml", "lab/x.yaml", False),
    ("./vendor/", "vendor", True),
    ("**", "any/thing.yaml", True),
])
def test_glob_patterns_match_relative_paths(pattern, path, matches):
    assert bool(cfg.compile_pattern(pattern).fullmatch(path)) is matches


def test_an_excluded_folder_excludes_everything_under_it(tmp_path):
    selector = cfg.Selector(cfg.Config(root=str(tmp_path), exclude=("drafts", "vendor/**")))
    assert selector.excluded(str(tmp_path / "drafts"))
    assert not selector.selected(str(tmp_path / "specs" / "drafts" / "a.yaml"))
    assert not selector.selected(str(tmp_path / "vendor" / "x" / "a.yaml"))
    assert selector.selected(str(tmp_path / "specs" / "a.yaml"))


def test_include_patterns_restrict_the_files_inside_the_configured_folder(tmp_path):
    selector = cfg.Selector(cfg.Config(root=str(tmp_path), include=("specs/**/*.yaml",)))
    assert selector.selected(str(tmp_path / "specs" / "lab" / "a.yaml"))
    assert not selector.selected(str(tmp_path / "mkdocs.yml"))
    assert selector.selected("/elsewhere/entirely.yaml")  # outside the folder: patterns do not apply


def test_the_readme_example_configuration_is_valid():
    from pathlib import Path

    readme = (Path(__file__).resolve().parent.parent / "README.md").read_text(encoding="utf-8")
    example = readme.split("**Project configuration.**", 1)[1].split("```toml\n", 1)[1].split("```", 1)[0]
    c = cfg.parse(example)
    assert c.disable == {"strongly-chirped"} and c.fail_on == "warning"
    assert dict(c.severity) == {"sub-cycle-pulse": "error"}
