"""``--format sarif``: a SARIF 2.1.0 log (OASIS Static Analysis Results Interchange Format).

One run, whose ``tool.driver`` (the project's ``informationUri``) carries the
whole rule catalogue (``rules.py``; each rule's ``name`` is its id in
PascalCase, the SARIF convention, beside its ``shortDescription``) and whose
results are the findings: level error / warning / note, the message, and the file as given on the command line as a relative URI
reference with the line and column of the finding (columns count Unicode
code points, as the YAML loader does).  The quantities, suspect, candidates
and likely cause of a finding go into the result's property bag.  Output is
deterministic.
"""

from __future__ import annotations

import json
from pathlib import PurePath
from urllib.parse import quote

from speccheck._version import PROJECT_URL, __version__
from speccheck.formats.common import remedy_dict
from speccheck.records.findings import FileResult, Finding
from speccheck.records.rules import RULES

SARIF_VERSION = "2.1.0"
SARIF_SCHEMA = "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json"


def uri(path: str) -> str:
    """A file path as a URI reference: '/'-separated, percent-encoded; absolute paths as file: URIs."""
    pure = PurePath(path)
    if pure.is_absolute():
        return pure.as_uri()
    return quote(pure.as_posix(), safe="/-._~!$&'()*+,;=@")


def _help(rule) -> str:
    text = rule.explanation
    if rule.failing:
        text += "\n\nFails:\n" + "\n".join(f"  {line}" for line in rule.failing.splitlines())
    if rule.passing:
        text += "\n\nPasses:\n" + "\n".join(f"  {line}" for line in rule.passing.splitlines())
    return text


def rule_name(rule_id: str) -> str:
    """A rule's SARIF ``name``: its id in PascalCase (``target-not-met`` → ``TargetNotMet``)."""
    return "".join(part[:1].upper() + part[1:] for part in rule_id.split("-"))


def _descriptor(rule) -> dict:
    return {
        "id": rule.id,
        "name": rule_name(rule.id),
        "shortDescription": {"text": rule.summary},
        "fullDescription": {"text": rule.explanation},
        "help": {"text": _help(rule)},
        "defaultConfiguration": {"level": rule.severity},
    }


def _result(f: Finding, index: dict[str, int]) -> dict:
    location: dict = {"physicalLocation": {"artifactLocation": {"uri": uri(f.path)}}}
    if f.origin:  # a value set on the command line: no line of the file
        location["message"] = {"text": f"set on the command line: {f.origin}"}
    if f.line:
        region = {"startLine": f.line}
        if f.column:
            region["startColumn"] = f.column
        location["physicalLocation"]["region"] = region
    out: dict = {"ruleId": f.rule}
    if f.rule in index:
        out["ruleIndex"] = index[f.rule]
    out.update({"level": f.severity, "message": {"text": f.message}, "locations": [location]})
    properties: dict = {}
    if f.quantities:
        properties["quantities"] = list(f.quantities)
    if f.suspect:
        properties["suspect"] = f.suspect
    if f.candidates:
        properties["candidates"] = list(f.candidates)
    if f.cause:
        properties["cause"] = f.cause
    if f.likely:
        properties["likely"] = True
    if f.origin:
        properties["origin"] = f.origin
    if f.remedies is not None:
        properties["remedies"] = [remedy_dict(x) for x in f.remedies]
    if properties:
        out["properties"] = properties
    return out


def document(results: list[FileResult]) -> dict:
    index = {rule_id: i for i, rule_id in enumerate(RULES)}
    return {
        "$schema": SARIF_SCHEMA,
        "version": SARIF_VERSION,
        "runs": [{
            "tool": {"driver": {
                "name": "speccheck",
                "informationUri": PROJECT_URL,
                "version": __version__,
                "semanticVersion": __version__,
                "rules": [_descriptor(r) for r in RULES.values()],
            }},
            "columnKind": "unicodeCodePoints",
            "artifacts": [{"location": {"uri": u}} for u in dict.fromkeys(uri(r.path) for r in results)],
            "results": [_result(f, index) for r in results for f in r.findings],
        }],
    }


def write(results: list[FileResult], out, options=None) -> None:
    json.dump(document(results), out, indent=2, ensure_ascii=False, allow_nan=False)
    out.write("\n")
