"""``--format github``: GitHub Actions workflow commands, one annotation per finding.

    ::error file=specs/a.yaml,line=10,col=17,title=relation-conflict::laser.pulse_energy is stated as …

Levels: error → ``error``, warning → ``warning``, note → ``notice``; errors
first, then warnings, then the laser-safety caution (one notice for the run,
naming the files it applies to), then notes.  GitHub shows only
``SHOWN_PER_KIND`` annotations of each kind per step: where the findings would
overflow that, the first ones of each kind are written and a closing notice
says how many are not shown and how to get the full report.  The message is
escaped as the workflow-command syntax requires (``%``, CR, LF); property
values also escape ``:`` and ``,``.
"""

from __future__ import annotations

from speccheck.formats.common import CAUTION_TEXT, caution_part, cautioned
from speccheck.records.findings import CAUTIONS, SEVERITIES, FileResult, Finding

COMMANDS = {"error": "error", "warning": "warning", "note": "notice"}
SHOWN_PER_KIND = 10  # GitHub shows at most this many error, warning and notice annotations per step


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


def _caution(caution) -> str:
    """The one notice of the run's laser-safety caution: the files it applies to, and what a file's
    own caution adds (an MPE's indicative optical density)."""
    text = f"{CAUTION_TEXT} Applies to: {', '.join(path for path, _ in caution)}."
    for path, f in caution:
        part = caution_part(f)
        if part:
            text += f" {path}: {part}"
    return f"::notice title={caution[0][1].rule}::{escape_data(text)}"


def write(results: list[FileResult], out, options=None) -> None:
    findings = [f for r in results for f in r.findings if f.rule not in CAUTIONS]
    caution = cautioned(results)
    by_level = {s: [f for f in findings if f.severity == s] for s in SEVERITIES}  # in the files' order
    room = {s: SHOWN_PER_KIND for s in SEVERITIES}
    if caution:
        room["note"] -= 1
    if any(len(by_level[s]) > room[s] for s in SEVERITIES):
        room["note"] -= 1  # the closing notice that says what is not shown
    shown = {s: by_level[s][:max(room[s], 0)] for s in SEVERITIES}
    for s in ("error", "warning"):
        for f in shown[s]:
            out.write(command(f) + "\n")
    if caution:
        out.write(_caution(caution) + "\n")
    for f in shown["note"]:
        out.write(command(f) + "\n")
    hidden = {s: len(by_level[s]) - len(shown[s]) for s in SEVERITIES}
    if any(hidden.values()):
        out.write(f"::notice title=speccheck::{escape_data(not_shown(hidden))}\n")


def not_shown(hidden: dict[str, int]) -> str:
    """The closing notice: how many findings the annotations leave out, and where to read them all."""
    total = sum(hidden.values())
    parts = ", ".join(f"{n} {s}{'' if n == 1 else 's'}" for s, n in hidden.items() if n)
    return (f"{total} more finding{'' if total == 1 else 's'} not shown as annotations ({parts}): GitHub "
            f"shows {SHOWN_PER_KIND} annotations of each kind per step. For the full report, run speccheck "
            "check --format human, or write --format json -o speccheck.json (or junit, sarif) and keep it "
            "as an artifact.")
