"""``--format junit``: JUnit XML, the report format CI systems show as test results.

``<testsuites name="speccheck">`` holds one ``<testsuite>`` per file (its
name is the path).  Each rule with findings in the file is one
``<testcase classname=PATH name=RULE-ID>``; it fails (``<failure>``) when
its findings are at the failing level (``fail-on``: errors by default,
warnings too with ``--strict``) and passes otherwise, its findings listed in
``<system-out>``.  A file without findings has one passing testcase,
``no-findings``.  The laser-safety caution is not a test: it is a
``<property name="laser-safety" value=…>`` in the ``<properties>`` of each
file's suite it applies to.  Characters XML 1.0 cannot carry are replaced by U+FFFD.
"""

from __future__ import annotations

import re
import xml.etree.ElementTree as ET

from speccheck.formats.common import place
from speccheck.records.findings import CAUTIONS, SEVERITIES, FileResult, Finding

_NOT_XML = re.compile("[\x00-\x08\x0b\x0c\x0e-\x1f\ud800-\udfff\ufffe\uffff]")
CLEAN_CASE = "no-findings"


def _text(s: str) -> str:
    return _NOT_XML.sub("\ufffd", s)


def _line(f: Finding) -> str:
    return f"{place(f)}: {f.severity} [{f.rule}] {f.message}"


def document(results: list[FileResult], fail_on: str = "error") -> ET.Element:
    failing = set(SEVERITIES[:SEVERITIES.index(fail_on) + 1])
    root = ET.Element("testsuites", name="speccheck")
    total_tests = total_failures = 0
    for result in results:
        suite = ET.SubElement(root, "testsuite", name=_text(result.path))
        by_rule: dict[str, list[Finding]] = {}
        for f in result.findings:
            if f.rule in CAUTIONS:  # a caution is a property of the file's suite, never a test
                properties = suite.find("properties")
                if properties is None:
                    properties = ET.SubElement(suite, "properties")
                ET.SubElement(properties, "property", name=f.rule, value=_text(f.message))
                continue
            by_rule.setdefault(f.rule, []).append(f)
        failures = 0
        for rule_id, findings in by_rule.items():
            case = ET.SubElement(suite, "testcase", classname=_text(result.path), name=rule_id)
            body = _text("\n".join(_line(f) for f in findings))
            bad = [f for f in findings if f.severity in failing]
            if bad:
                failures += 1
                failure = ET.SubElement(case, "failure", type=bad[0].severity,
                                        message=_text(bad[0].message if len(findings) == 1
                                                      else f"{len(findings)} findings of {rule_id}"))
                failure.text = body
            else:
                ET.SubElement(case, "system-out").text = body
        if not by_rule:
            ET.SubElement(suite, "testcase", classname=_text(result.path), name=CLEAN_CASE)
        tests = max(len(by_rule), 1)
        suite.set("tests", str(tests))
        suite.set("failures", str(failures))
        suite.set("errors", "0")
        suite.set("skipped", "0")
        total_tests += tests
        total_failures += failures
    root.set("tests", str(total_tests))
    root.set("failures", str(total_failures))
    root.set("errors", "0")
    return root


def write(results: list[FileResult], out, options=None) -> None:
    fail_on = getattr(options, "fail_on", "error") or "error"
    root = document(results, fail_on)
    ET.indent(root)
    out.write('<?xml version="1.0" encoding="UTF-8"?>\n')
    out.write(ET.tostring(root, encoding="unicode"))
    out.write("\n")
