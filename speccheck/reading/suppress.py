"""Inline suppressions: a YAML comment on the line of a value.

    pulse_energy: 20 nJ   # speccheck: allow relation-conflict -- the sheet as received; asked the maker

A comment ``# speccheck: allow <rule-id>[, <rule-id> ...] -- <reason>`` drops
the findings of those rules whose line is the comment's line.  The reason is
required: a suppression without one still suppresses, but is itself an error
(``suppression-without-reason``).  An unknown rule id or a comment that does
not follow the syntax is ``invalid-suppression``; a suppression that matches
no finding is ``unused-suppression``.  Findings that say a file was not read
(``config.FIXED_RULES``) and the suppression rules themselves cannot be
suppressed.

Everything here is a pure function of the spec's text and its findings.  A
``#`` starts a comment, as in YAML, only at the start of a line or after
white space, and never inside a quoted or block scalar: the positions of the
scalars come from PyYAML's scanner, so ``title: "a # speccheck: allow x"`` is
text, not a suppression.
"""

from __future__ import annotations

import bisect
import difflib
import re
from dataclasses import dataclass

import yaml

from speccheck.reading.config import ALWAYS_SHOWN, FIXED_RULES
from speccheck.records.findings import Finding
from speccheck.records.rules import RULES, rule

try:
    from yaml import CSafeLoader as _Loader
except ImportError:  # pragma: no cover - depends on the PyYAML build
    from yaml import SafeLoader as _Loader

SUPPRESSION_RULES = frozenset({"suppression-without-reason", "invalid-suppression", "unused-suppression"})
UNSUPPRESSIBLE = FIXED_RULES | SUPPRESSION_RULES | ALWAYS_SHOWN
SYNTAX = "# speccheck: allow <rule-id> -- <reason>"
MAX_CHARS = 10 * 1024 * 1024  # larger texts are not read by the loader either

_LINE_BREAK = re.compile(r"\r\n|[\r\n\x85\u2028\u2029]")  # the line breaks PyYAML counts
_MARKER = re.compile(r"#\s*speccheck\s*:")
_CANDIDATE = re.compile(r"(?:(?<=[ \t])|^)#")
_RULE_ID = re.compile(r"[a-z0-9]+(?:-[a-z0-9]+)*")


@dataclass(frozen=True)
class Suppression:
    line: int  # 1-based
    column: int  # 1-based, of the '#' that starts the directive
    rules: tuple[str, ...]  # the known, suppressible rule ids it names
    reason: str


def _lines(text: str) -> list[str]:
    return _LINE_BREAK.split(text)


def _scalar_spans(text: str) -> tuple[list[tuple[tuple[int, int], tuple[int, int]]], tuple[int, int] | None]:
    """Spans (0-based (line, col), end exclusive) of every scalar, and where scanning stopped on an error."""
    spans = []
    try:
        for token in yaml.scan(text, Loader=_Loader):
            if isinstance(token, yaml.ScalarToken):
                start = (token.start_mark.line, token.start_mark.column)
                if token.style in ("|", ">"):  # a comment may follow the indicator on its own line
                    start = (token.start_mark.line + 1, 0)
                spans.append((start, (token.end_mark.line, token.end_mark.column)))
    except yaml.YAMLError as exc:
        mark = getattr(exc, "problem_mark", None)
        return spans, ((mark.line, mark.column) if mark else (0, 0))
    return spans, None


def directives(text: str) -> list[tuple[int, int, str]]:
    """``(line, column, text after 'speccheck:')`` of every speccheck comment (1-based positions)."""
    lines = _lines(text)
    wanted = [(i, line) for i, line in enumerate(lines) if _MARKER.search(line)]
    if not wanted:
        return []
    spans, stopped = _scalar_spans(text)
    starts = [start for start, _ in spans]  # in order, and scalars never overlap

    def in_scalar(pos: tuple[int, int]) -> bool:
        i = bisect.bisect_right(starts, pos) - 1
        return i >= 0 and pos < spans[i][1]

    out = []
    for i, line in wanted:
        for candidate in _CANDIDATE.finditer(line):
            pos = (i, candidate.start())
            if stopped is None or pos < stopped:
                if in_scalar(pos):
                    continue
            marker = _MARKER.search(line, candidate.start())  # the comment runs to the end of the line
            if marker:
                out.append((i + 1, marker.start() + 1, line[marker.end():]))
            break  # only the first '#' outside a scalar starts the comment
    return out


def _finding(rule_id: str, message: str, path: str, line: int, column: int) -> Finding:
    return Finding(rule_id, rule(rule_id).severity, message, path, line, column)


def parse(text: str, path: str) -> tuple[list[Suppression], list[Finding]]:
    """The suppressions a spec's text makes, and the findings about malformed ones."""
    suppressions: list[Suppression] = []
    problems: list[Finding] = []
    for line, column, body in directives(text):
        verb = re.match(r"\s*(\S*)", body).group(1)
        if verb != "allow":
            what = f"unknown directive {verb!r}" if verb else "a directive is missing"
            problems.append(_finding("invalid-suppression", f"{what} after 'speccheck:'; write {SYNTAX!r}",
                                     path, line, column))
            continue
        rest = body[body.index("allow") + len("allow"):]
        ids_text, dashes, reason = rest.partition("--")
        reason = reason.strip()
        ids = [item.strip() for item in ids_text.split(",") if item.strip()]
        if not ids:
            problems.append(_finding("invalid-suppression", f"no rule id after 'allow'; write {SYNTAX!r}",
                                     path, line, column))
            continue
        known = []
        for item in ids:
            if not _RULE_ID.fullmatch(item):
                hint = (" (rule ids are separated by commas, and the reason follows ' -- ')"
                        if " " in item else "")
                problems.append(_finding("invalid-suppression", f"{item!r} is not a rule id{hint}; "
                                         f"write {SYNTAX!r}", path, line, column))
            elif item not in RULES:
                guess = difflib.get_close_matches(item, list(RULES), n=1)
                hint = f"; did you mean {guess[0]!r}?" if guess else "; `speccheck rules` lists them"
                problems.append(_finding("invalid-suppression", f"unknown rule {item!r}{hint}",
                                         path, line, column))
            elif item in UNSUPPRESSIBLE:
                why = ("it says the file was not read" if item in FIXED_RULES
                       else "the laser-safety caution is always shown" if item in ALWAYS_SHOWN
                       else "it is about suppressions themselves")
                problems.append(_finding("invalid-suppression", f"rule {item!r} cannot be suppressed: {why}",
                                         path, line, column))
            elif item not in known:
                known.append(item)
        if not reason:
            problems.append(_finding("suppression-without-reason",
                                     f"the suppression of {', '.join(ids)} gives no reason; add one after "
                                     f"' -- ' ({SYNTAX})", path, line, column))
        if known:
            suppressions.append(Suppression(line, column, tuple(known), reason))
    return suppressions, problems


def apply(text: str | bytes, findings: tuple[Finding, ...], path: str,
          max_chars: int = MAX_CHARS) -> tuple[Finding, ...]:
    """The findings left after the spec's own suppressions, plus findings about the suppressions.

    A text that was not read (a finding of ``FIXED_RULES``), cannot be decoded or
    is too large is left alone: its findings come back unchanged.
    """
    if isinstance(text, bytes):
        if b"speccheck" not in text:
            return findings
        try:
            text = text.decode("utf-8-sig")
        except UnicodeDecodeError:
            return findings
    if "speccheck" not in text or len(text) > max_chars or any(f.rule in FIXED_RULES for f in findings):
        return findings
    suppressions, problems = parse(text, path)
    if not suppressions and not problems:
        return findings
    by_line: dict[int, list[Suppression]] = {}
    for s in suppressions:
        by_line.setdefault(s.line, []).append(s)
    used: set[tuple[int, str]] = set()
    kept = []
    for f in findings:
        lines = ((f.line,) if f.line else ()) + f.related_lines  # its own line, then its values' lines
        hit = next((s for line in lines for s in by_line.get(line, ()) if f.rule in s.rules), None)
        if hit is None or f.rule in UNSUPPRESSIBLE:
            kept.append(f)
        else:
            used.add((hit.line, f.rule))
    for s in suppressions:
        unused = [r for r in s.rules if (s.line, r) not in used]
        if unused:
            problems.append(_finding("unused-suppression",
                                     f"the suppression of {', '.join(unused)} matches no finding about this line; "
                                     "remove it", path, s.line, s.column))
    return tuple(sorted(kept + problems, key=Finding.sort_key))
