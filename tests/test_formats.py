"""Output formats for CI and spreadsheets: SARIF 2.1.0, JUnit XML, GitHub workflow commands, CSV."""

import csv
import importlib
import io
import json
import re
import tomllib
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest

from speccheck._version import __version__
from speccheck.records.findings import Cell, FileResult, Finding
from speccheck.formats import FORMATS, OutputOptions, writer
from speccheck.formats import github, sarif
from speccheck.records.rules import RULES

EXAMPLES = Path(__file__).resolve().parent.parent / "example_specs"


def render(name: str, results, **options) -> str:
    out = io.StringIO()
    writer(name)(results, out, OutputOptions(**options))
    return out.getvalue()


@pytest.fixture(scope="module")
def example_results(checker):
    names = ("maker-sheet-one-wrong.yaml", "oscillator-consistent.yaml", "maker-sheet-operating-points.yaml")
    return [checker.check_text((EXAMPLES / n).read_bytes(), f"example_specs/{n}") for n in names]


def hostile_finding(**kw) -> Finding:
    base = dict(rule="sub-cycle-pulse", severity="warning", message="100% wrong:\r\nline two, a\x00b",
                path="specs/odd, name:1.yaml", line=4, column=9)
    base.update(kw)
    return Finding(**base)


def test_every_format_is_registered_and_has_a_writer():
    assert {"human", "json", "review", "sarif", "junit", "github", "csv"} <= set(FORMATS)
    for module in FORMATS.values():
        assert callable(importlib.import_module(module).write)


# ------------------------------------------------------------------ SARIF
def sarif_of(results) -> dict:
    return json.loads(render("sarif", results))


def test_sarif_validates_against_the_sarif_2_1_0_schema(example_results):
    from jsonschema import Draft4Validator

    # the OASIS SARIF 2.1.0 schema (errata 01), copied into the tests: tests/schemas/README.md names its source
    schema = json.loads((Path(__file__).parent / "schemas" / "sarif-schema-2.1.0.json").read_text("utf-8"))
    assert schema["id"] == "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"
    Draft4Validator.check_schema(schema)
    unreadable = FileResult("missing.yaml", (Finding("unreadable-file", "error", "cannot read", "missing.yaml"),))
    for results in (example_results, [unreadable, FileResult("odd/a b.yaml", (hostile_finding(),))], []):
        errors = sorted(Draft4Validator(schema).iter_errors(sarif_of(results)), key=str)
        assert not errors, "\n".join(f"{list(e.absolute_path)}: {e.message}" for e in errors)


def test_sarif_has_the_tool_its_rules_and_one_result_per_finding(example_results):
    log = sarif_of(example_results)
    assert log["version"] == "2.1.0" and log["$schema"].endswith("sarif-schema-2.1.0.json")
    (run,) = log["runs"]
    driver = run["tool"]["driver"]
    assert driver["name"] == "speccheck" and driver["version"] == __version__
    assert [r["id"] for r in driver["rules"]] == list(RULES)
    project = tomllib.loads((EXAMPLES.parent / "pyproject.toml").read_text(encoding="utf-8"))["project"]
    assert driver["informationUri"] == project["urls"]["Homepage"]
    chirp = driver["rules"][list(RULES).index("strongly-chirped")]
    assert chirp["shortDescription"]["text"] == RULES["strongly-chirped"].summary
    assert chirp["fullDescription"]["text"] == RULES["strongly-chirped"].explanation
    assert "Fails:" in chirp["help"]["text"] and chirp["defaultConfiguration"]["level"] == "note"
    findings = [f for r in example_results for f in r.findings]
    assert len(run["results"]) == len(findings)
    conflict = next(f for f in findings if f.rule == "relation-conflict")
    first = run["results"][findings.index(conflict)]
    assert first["ruleId"] == "relation-conflict" and first["level"] == "error"
    assert driver["rules"][first["ruleIndex"]]["id"] == "relation-conflict"
    assert first["message"]["text"] == conflict.message
    where = first["locations"][0]["physicalLocation"]
    assert where["artifactLocation"]["uri"] == "example_specs/maker-sheet-one-wrong.yaml"
    assert where["region"] == {"startLine": 11, "startColumn": 17}
    assert first["properties"]["suspect"] == "laser.pulse_energy"


def test_sarif_rules_have_a_friendly_name_in_pascal_case_beside_the_short_description(example_results):
    rules = {r["id"]: r for r in sarif_of(example_results)["runs"][0]["tool"]["driver"]["rules"]}
    assert rules["target-not-met"]["name"] == "TargetNotMet"
    assert rules["m2-below-one"]["name"] == "M2BelowOne"
    assert rules["laser-safety"]["name"] == "LaserSafety"
    names = [r["name"] for r in rules.values()]
    assert len(set(names)) == len(names) and all(n[:1].isupper() and n.isalnum() for n in names)
    assert all(r["shortDescription"]["text"] == RULES[i].summary for i, r in rules.items())


def test_sarif_keeps_the_laser_safety_caution_with_each_file(example_results):
    results = sarif_of(example_results)["runs"][0]["results"]
    cautioned = [r["locations"][0]["physicalLocation"]["artifactLocation"]["uri"]
                 for r in results if r["ruleId"] == "laser-safety"]
    assert cautioned == [r.path for r in example_results]


def test_sarif_uris_are_relative_references_with_special_characters_encoded():
    assert sarif.uri("specs/a b#1.yaml") == "specs/a%20b%231.yaml"
    assert sarif.uri("/srv/specs/a.yaml") == "file:///srv/specs/a.yaml"


def test_sarif_levels_follow_the_severities_and_a_finding_without_a_line_has_no_region():
    results = [FileResult("a.yaml", (Finding("assumed-shape", "note", "n", "a.yaml", 2, 3),
                                     Finding("unreadable-file", "error", "cannot read", "a.yaml")))]
    note, unread = sarif_of(results)["runs"][0]["results"]
    assert note["level"] == "note"
    assert "region" not in unread["locations"][0]["physicalLocation"]


# ------------------------------------------------------------------ JUnit
def junit_of(results, fail_on="error") -> ET.Element:
    return ET.fromstring(render("junit", results, fail_on=fail_on).encode("utf-8"))


def test_junit_has_a_testsuite_per_file_and_a_testcase_per_file_and_rule(example_results):
    clean_file = FileResult("specs/clean.yaml", ())
    root = junit_of(example_results + [clean_file])
    suites = root.findall("testsuite")
    assert [s.get("name") for s in suites] == [r.path for r in example_results] + ["specs/clean.yaml"]
    wrong, _, points, clean = suites
    (case,) = [c for c in wrong.findall("testcase") if c.get("name") == "relation-conflict"]
    assert (case.get("classname"), case.get("name")) == ("example_specs/maker-sheet-one-wrong.yaml",
                                                         "relation-conflict")
    failure = case.find("failure")
    assert failure.get("type") == "error" and "laser.pulse_energy" in failure.get("message")
    assert "maker-sheet-one-wrong.yaml:11:17: error [relation-conflict]" in failure.text
    (ok,) = clean.findall("testcase")
    assert ok.get("name") == "no-findings" and ok.find("failure") is None
    assert sorted(c.get("name") for c in points.findall("testcase")) == sorted(
        {f.rule for f in example_results[2].findings} - {"laser-safety"})
    assert root.get("tests") == str(sum(len(s.findall("testcase")) for s in suites))
    assert root.get("failures") == str(sum(int(s.get("failures")) for s in suites))


def test_junit_gives_the_laser_safety_caution_as_a_property_of_each_file_suite_not_a_testcase(example_results):
    root = junit_of(example_results, fail_on="note")
    for suite, result in zip(root.findall("testsuite"), example_results):
        (prop,) = suite.findall("properties/property")
        caution = next(f for f in result.findings if f.rule == "laser-safety")
        assert (prop.get("name"), prop.get("value")) == ("laser-safety", caution.message)
        assert list(suite)[0].tag == "properties"  # before the testcases, as the JUnit schema has it
    assert "laser-safety" not in {c.get("name") for c in root.iter("testcase")}
    # a file whose only finding is the caution passes, even when notes fail the run
    (ok,) = root.findall("testsuite")[1].findall("testcase")
    assert ok.get("name") == "no-findings" and ok.find("failure") is None


def test_junit_warnings_fail_only_at_the_warning_level_and_are_listed_otherwise():
    results = [FileResult("w.yaml", (hostile_finding(path="w.yaml"),))]
    case = junit_of(results).find("testsuite/testcase")
    assert case.find("failure") is None and "100% wrong" in case.find("system-out").text
    case = junit_of(results, fail_on="warning").find("testsuite/testcase")
    assert case.find("failure").get("type") == "warning"


def test_junit_stays_well_formed_with_characters_xml_cannot_carry():
    # control characters from a spec are shown as visible escapes in every format
    results = [FileResult("a<&>\x01.yaml", (hostile_finding(path="a<&>\x01.yaml", severity="error"),))]
    root = junit_of(results)
    assert root.find("testsuite").get("name") == "a<&>\\x01.yaml"
    assert "a\\x00b" in root.find("testsuite/testcase/failure").text


# ------------------------------------------------------------------ GitHub workflow commands
def test_github_writes_one_command_per_finding_with_the_level_of_its_severity(example_results):
    lines = render("github", example_results).splitlines()
    cautions = sum(1 for r in example_results for f in r.findings if f.rule == "laser-safety")
    assert cautions == 3 and len(lines) == sum(len(r.findings) for r in example_results) - cautions + 1
    assert any(line.startswith("::error file=example_specs/maker-sheet-one-wrong.yaml,line=11,col=17,"
                               "title=relation-conflict::laser.pulse_energy is stated as 20 nJ") for line in lines)
    note = github.command(Finding("assumed-shape", "note", "Gaussian assumed", "a.yaml", 3, 5))
    assert note == "::notice file=a.yaml,line=3,col=5,title=assumed-shape::Gaussian assumed"


def test_github_gives_errors_first_and_the_laser_safety_caution_once_naming_its_files(example_results):
    lines = render("github", example_results).splitlines()
    levels = [line[2:line.index(" ")] for line in lines]
    assert levels == sorted(levels, key=["error", "warning", "notice"].index) and levels[0] == "error"
    (caution,) = [line for line in lines if "title=laser-safety" in line]
    assert caution.startswith("::notice title=laser-safety::laser safety: this beam can injure eyes")
    assert "IEC 60825-1" in caution and "does not classify lasers" in caution
    assert caution.endswith("Applies to: " + ", ".join(r.path for r in example_results) + ".")
    assert lines.index(caution) == levels.index("notice")  # the first notice


def many_findings(errors: int, warnings: int, notes: int, caution: bool = True) -> list[FileResult]:
    out = []
    for i in range(max(errors, warnings, notes, 1)):
        path = f"specs/s{i:02}.yaml"
        findings = [Finding("relation-conflict", "error", f"conflict {i}", path, 3, 1)] if i < errors else []
        findings += [Finding("sub-cycle-pulse", "warning", f"short {i}", path, 4, 1)] if i < warnings else []
        findings += [Finding("assumed-shape", "note", f"shape {i}", path, 5, 1)] if i < notes else []
        findings += [Finding("laser-safety", "note", "laser safety: …", path, 2, 1)] if caution else []
        out.append(FileResult(path, tuple(findings)))
    return out


def test_github_ends_with_a_notice_of_what_its_limit_of_10_per_kind_would_hide():
    lines = render("github", many_findings(errors=12, warnings=3, notes=15)).splitlines()
    kinds = [line[2:line.index(" ")] for line in lines]
    assert kinds.count("error") == 10 and kinds.count("warning") == 3 and kinds.count("notice") == 10
    # the notices: the caution, 8 notes, and the closing one (2 errors and 7 notes not shown)
    assert sum("title=assumed-shape" in line for line in lines) == 8
    closing = lines[-1]
    assert closing.startswith("::notice title=speccheck::9 more findings not shown as annotations "
                              "(2 errors, 7 notes): GitHub shows 10 annotations of each kind per step")
    assert "--format human" in closing and "--format json -o speccheck.json" in closing


@pytest.mark.parametrize("errors, warnings, notes, caution", [(10, 10, 9, True), (10, 0, 10, False), (0, 0, 0, True)])
def test_github_has_no_closing_notice_when_every_finding_is_shown(errors, warnings, notes, caution):
    lines = render("github", many_findings(errors, warnings, notes, caution)).splitlines()
    assert len(lines) == errors + warnings + notes + caution and "title=speccheck::" not in "".join(lines)


def test_github_escapes_what_the_workflow_command_syntax_requires():
    line = github.command(hostile_finding())
    assert line == ("::warning file=specs/odd%2C name%3A1.yaml,line=4,col=9,title=sub-cycle-pulse::"
                    "100%25 wrong:%0D%0Aline two, a\x00b")
    assert "\n" not in line and "\r" not in line


def test_github_leaves_out_line_and_column_when_a_finding_has_none():
    assert github.command(Finding("unreadable-file", "error", "cannot read", "a.yaml")) == \
        "::error file=a.yaml,title=unreadable-file::cannot read"


# ------------------------------------------------------------------ CSV
def csv_of(results) -> list[dict]:
    return list(csv.DictReader(io.StringIO(render("csv", results), newline="")))


def test_csv_has_one_row_per_file_and_quantity_and_one_column_per_sheet_column(example_results):
    rows = csv_of(example_results)
    header = list(rows[0])
    assert header[:4] == ["file", "quantity", "unit", "laser"]
    assert {"50 kHz", "2 MHz", "laser status", "2 MHz status"} <= set(header)
    energy = next(r for r in rows if r["file"].endswith("one-wrong.yaml") and r["quantity"] == "pulse_energy")
    assert energy["unit"] == "J" and float(energy["laser"]) == pytest.approx(20e-9)
    assert energy["laser status"] == "conflict" and energy["50 kHz"] == ""
    rate = next(r for r in rows if r["file"].endswith("operating-points.yaml") and r["quantity"] == "repetition_rate")
    assert float(rate["2 MHz"]) == pytest.approx(2e6) and rate["2 MHz status"] == "stated"
    per_file = {r.path: len({q for cells in r.sheet.values() for q in cells}) for r in example_results}
    assert len(rows) == sum(per_file.values())


def test_csv_is_rfc_4180_and_protects_text_a_spreadsheet_would_run():
    cell = Cell("stated", 1.0, 1.0, 1.0, "W")
    results = [FileResult("=cmd.yaml", (), {"laser": {"average_power": cell}, "+1, \"odd\"": {"average_power": cell}})]
    text = render("csv", results)
    assert text.endswith("\r\n")
    rows = list(csv.reader(io.StringIO(text, newline="")))
    assert rows[0][3:5] == ["laser", "'+1, \"odd\""]
    assert rows[1][:4] == ["'=cmd.yaml", "average_power", "W", "1"]


def test_a_file_without_a_sheet_has_no_rows_in_the_csv():
    assert csv_of([FileResult("bad.yaml", (Finding("yaml-syntax", "error", "x", "bad.yaml", 1, 1),))]) == []


# ------------------------------------------------------------------ human
ANSI = re.compile(r"\x1b\[[0-9;]*m")


def test_human_in_colour_shows_the_same_characters_as_the_plain_writer(example_results, units):
    for sheet in (True, False):
        plain = render("human", example_results, units=units, show_sheet=sheet)
        coloured = render("human", example_results, units=units, show_sheet=sheet, color=True)
        assert "\x1b[" in coloured and "\x1b[" not in plain
        assert ANSI.sub("", coloured) == plain


def test_human_without_a_terminal_writes_each_finding_whole_on_one_line(example_results, units):
    for color in (False, True):  # --color into a pipe: styled, still not wrapped
        lines = ANSI.sub("", render("human", example_results, units=units, color=color)).splitlines()
        for f in (f for r in example_results for f in r.findings if f.rule != "laser-safety"):
            assert f"{f.path}:{f.line}:{f.column}: {f.severity} [{f.rule}] {f.message}" in lines
        assert max(map(len, lines)) > 300  # the caution: one line, however long


def test_human_on_a_terminal_wraps_findings_at_its_width_and_keeps_the_sheet_unwrapped(example_results, units):
    text = ANSI.sub("", render("human", example_results[:1], units=units, color=True, width=60))
    lines = text.splitlines()
    conflict = next(f for f in example_results[0].findings if f.rule == "relation-conflict")
    start = next(i for i, line in enumerate(lines) if line.startswith(f"{conflict.path}:11:17: error"))
    assert all(len(line) <= 60 for line in lines[start:start + 4])
    assert " ".join(" ".join(lines[start:start + 8]).split()).startswith(
        " ".join(f"{conflict.path}:11:17: error [relation-conflict] {conflict.message}".split())[:200])
    (row,) = [line for line in lines if line.startswith("pulse_energy ")]
    assert "≠ implied" in row and row.endswith("conflict") and len(row) > 60  # one row, not wrapped
