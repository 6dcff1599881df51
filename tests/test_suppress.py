"""Inline suppressions: '# speccheck: allow <rule-id> -- <reason>' on the line of a value."""

import textwrap

import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from speccheck.reading import suppress
from speccheck.records.findings import Finding
from speccheck.records.rules import RULES


@pytest.fixture
def checked(checker):
    """checked(yaml_text) -> the errors and warnings left after the text's own suppressions,
    as (rule, line)."""

    def run(text: str):
        text = textwrap.dedent(text).lstrip("\n")
        result = checker.check_text(text, "spec.yaml")
        return [(f.rule, f.line) for f in suppress.apply(text, result.findings, "spec.yaml")
                if f.severity != "note"]

    return run


def test_a_suppression_with_a_reason_drops_the_finding_on_its_line(checked):
    assert checked("""
        spec_version: 1
        laser:
          m2: 0.8
    """) == [("m2-below-one", 3)]
    assert checked("""
        spec_version: 1
        laser:
          m2: 0.8   # speccheck: allow m2-below-one -- measured through a clipping aperture
    """) == []


def test_several_rule_ids_may_be_given_separated_by_commas(checked):
    assert checked("""
        spec_version: 1
        laser:
          wavelength: 800 nm
          pulse_duration: 1.5 fs  # speccheck: allow sub-cycle-pulse, m2-below-one -- few-cycle source
          m2: 0.8                 # speccheck: allow m2-below-one,sub-cycle-pulse -- as measured
    """) == [("unused-suppression", 4), ("unused-suppression", 5)]


def test_a_suppression_without_a_reason_still_suppresses_but_is_an_error(checked):
    findings = checked("""
        spec_version: 1
        laser:
          m2: 0.8   # speccheck: allow m2-below-one
    """)
    assert findings == [("suppression-without-reason", 3)]
    assert RULES["suppression-without-reason"].severity == "error"
    assert checked("""
        spec_version: 1
        laser:
          m2: 0.8   # speccheck: allow m2-below-one --
    """) == [("suppression-without-reason", 3)]


def test_an_unknown_rule_id_is_reported_with_the_closest_known_one(checker):
    text = "spec_version: 1\nlaser:\n  m2: 0.8  # speccheck: allow m2-below-on -- clipped beam\n"
    findings = [f for f in suppress.apply(text, checker.check_text(text, "s.yaml").findings, "s.yaml")
                if f.severity != "note"]
    assert [(f.rule, f.line) for f in findings] == [("m2-below-one", 3), ("invalid-suppression", 3)]
    assert "did you mean 'm2-below-one'?" in findings[1].message


def test_a_suppression_that_suppresses_nothing_is_a_warning(checked):
    assert checked("""
        spec_version: 1
        laser:
          wavelength: 800 nm   # speccheck: allow sub-cycle-pulse -- a few-cycle source
    """) == [("unused-suppression", 3)]
    assert RULES["unused-suppression"].severity == "warning"


def test_a_suppression_on_another_line_does_not_apply(checked):
    assert checked("""
        spec_version: 1
        laser:
          wavelength: 800 nm   # speccheck: allow m2-below-one -- wrong line
          m2: 0.8
    """) == [("unused-suppression", 3), ("m2-below-one", 4)]


def test_the_marker_inside_a_quoted_string_or_a_block_scalar_is_text_not_a_comment():
    text = textwrap.dedent("""\
        title: "Bench 3 # speccheck: allow m2-below-one -- not a comment"
        other: 'it''s # speccheck: allow m2-below-one -- no'
        notes: |
          text # speccheck: allow m2-below-one -- inside a block scalar
        plain: a#speccheck: allow m2-below-one -- no white space before the hash
        real: 1   # speccheck: allow m2-below-one -- this one
    """)
    assert [(line, col) for line, col, _ in suppress.directives(text)] == [(6, 11)]


def test_the_marker_may_follow_other_comment_text():
    text = "m2: 0.8  # clipped # speccheck: allow m2-below-one -- see log\n"
    (found,) = suppress.directives(text)
    assert found[:2] == (1, 20)


def test_a_comment_that_mentions_speccheck_but_is_not_a_directive_is_left_alone():
    assert suppress.directives("m2: 0.8  # checked with speccheck, all fine\n") == []


def test_another_word_than_allow_is_an_invalid_suppression():
    _, problems = suppress.parse("m2: 0.8  # speccheck: ignore m2-below-one -- why\n", "s.yaml")
    assert [(p.rule, p.line) for p in problems] == [("invalid-suppression", 1)]
    assert "unknown directive 'ignore'" in problems[0].message


def test_words_without_the_dashes_are_not_taken_for_rule_ids():
    _, problems = suppress.parse("m2: 0.8  # speccheck: allow m2-below-one because clipped\n", "s.yaml")
    assert [p.rule for p in problems] == ["invalid-suppression", "suppression-without-reason"]
    assert "separated by commas" in problems[0].message


def test_rules_that_say_a_file_was_not_read_cannot_be_suppressed():
    suppressions, problems = suppress.parse(
        "a: 1  # speccheck: allow yaml-syntax, unused-suppression -- please\n", "s.yaml")
    assert suppressions == []
    assert [p.rule for p in problems] == ["invalid-suppression", "invalid-suppression"]


def test_a_file_that_was_not_read_keeps_its_findings_unchanged():
    broken = Finding("yaml-syntax", "error", "YAML syntax error", "s.yaml", 1, 1)
    findings = (broken,)
    text = "laser: {wavelength: 800 nm  # speccheck: allow yaml-syntax -- no\n"
    assert suppress.apply(text, findings, "s.yaml") is findings


def test_applying_suppressions_returns_new_findings_and_leaves_the_old_untouched(checker):
    text = "spec_version: 1\nlaser:\n  m2: 0.8  # speccheck: allow m2-below-one -- clipped\n"
    original = checker.check_text(text, "s.yaml").findings
    copy = tuple(original)
    left = suppress.apply(text, original, "s.yaml")
    assert "m2-below-one" in [f.rule for f in original] and "m2-below-one" not in [f.rule for f in left]
    assert original == copy


def test_line_numbers_match_with_windows_line_endings(checker):
    text = "spec_version: 1\r\nlaser:\r\n  m2: 0.8  # speccheck: allow m2-below-one -- clipped\r\n"
    left = suppress.apply(text, checker.check_text(text, "s.yaml").findings, "s.yaml")
    assert [f for f in left if f.severity != "note"] == []


def test_bytes_are_read_as_utf8_like_the_loader_reads_them(checker):
    text = "\ufeffspec_version: 1\nlaser:\n  m2: 0.8  # speccheck: allow m2-below-one -- Ø 2 mm\n".encode()
    left = suppress.apply(text, checker.check_text(text, "s.yaml").findings, "s.yaml")
    assert [f for f in left if f.severity != "note"] == []


def test_a_spec_whose_yaml_breaks_after_the_comment_still_finds_it():
    text = "m2: 0.8  # speccheck: allow m2-below-one -- ok\nlaser: {wavelength: 800 nm\n"
    assert [(line, col) for line, col, _ in suppress.directives(text)] == [(1, 10)]


def test_every_suppression_rule_is_in_the_catalogue():
    assert suppress.SUPPRESSION_RULES <= set(RULES)


_PIECES = ["# speccheck: allow ", "m2-below-one", ", ", " -- ", "reason", "\n", "\r\n", "'", '"', "|\n  ",
           "key: ", "- ", "[", "{", "#", " ", "\t", "\\", "é", "\x85", "\u2028", "speccheck:", "allow"]


@settings(max_examples=300, deadline=None)
@given(st.lists(st.sampled_from(_PIECES) | st.text(max_size=5), max_size=40))
def test_any_text_gives_findings_and_never_an_exception(pieces):
    text = "".join(pieces)
    some = (Finding("m2-below-one", "error", "m", "s.yaml", 1, 1),)
    out = suppress.apply(text, some, "s.yaml")
    assert all(f.rule in RULES for f in out)
    assert all(f.line is None or f.line >= 1 for f in out)


@pytest.mark.parametrize("rule, energy", [
    ("relation-conflict", "25 µJ"),  # 2 W at 80 MHz is 25 nJ: a conflict, reported at the energy
    ("typical-values-disagree", "26 nJ"),  # within the tolerances, but the typical values differ by 4%
])
def test_a_finding_is_suppressed_from_the_line_of_any_value_it_concerns(tmp_path, rule, energy):
    import io
    import json

    from speccheck.cli import run

    spec = tmp_path / "s.yaml"
    spec.write_text("spec_version: 1\nlaser:\n  repetition_rate: 80 MHz\n"
                    f"  average_power: 2 W  # speccheck: allow {rule} -- the meter reads low\n"
                    f"  pulse_energy: {energy}\n", encoding="utf-8")
    out = io.StringIO()
    run(["check", "--no-config", "--format", "json", str(spec)], out, io.StringIO())
    rules = [f["rule"] for f in json.loads(out.getvalue())["files"][0]["findings"]]
    assert rule not in rules  # reported at line 5 (the energy), suppressed at line 4
    assert "unused-suppression" not in rules  # and the suppression counts as used
