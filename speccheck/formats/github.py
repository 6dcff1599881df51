"""``--format github``: GitHub Actions workflow commands, one annotation per finding.

    ::error file=specs/a.yaml,line=10,col=17,title=relation-conflict::laser.pulse_energy is stated as …

Levels: error → ``error``, warning → ``warning``, note → ``notice``.  The
message is escaped as the workflow-command syntax requires (``%``, CR, LF);
property values also escape ``:`` and ``,``.
"""

from __future__ import annotations

from speccheck.records.findings import FileResult, Finding

COMMANDS = {"error": "error", "warning": "warning", "note": "notice"}


def escape_data(text: str) -> str:
    return text.replace("%", "%25").replace("\r", "%0D").replace("\n", "%0A")


def escape_property(text: str) -> str:
    return escape_data(text).replace(":", "%3A").replace(",", "%2C")


def command(f: Finding) -> str:
    props = [("file", f.path)]
    if f.line:
        props.append(("line", str(f.line)))
        if f.column:
            props.append(("col", str(f.column)))
    props.append(("title", f.rule))
    joined = ",".join(f"{key}={escape_property(value)}" for key, value in props)
    message = f"{f.origin}: {f.message}" if f.origin else f.message  # a value set on the command line
    return f"::{COMMANDS[f.severity]} {joined}::{escape_data(message)}"


def write(results: list[FileResult], out, options=None) -> None:
    for result in results:
        for f in result.findings:
            out.write(command(f) + "\n")
