"""The default format for people: the laser-safety caution once, the sheet, the findings, a summary.

    caution [laser-safety] laser safety: this beam can injure eyes … Applies to: a.yaml, b.yaml.

    a.yaml — Title
    <the sheet: by default only when one file is checked>
    a.yaml:10:17: error [relation-conflict] laser.pulse_energy is stated as 20 nJ, …

    1 error, 0 warnings, 0 notes, 1 caution in 2 files

One finding per line: without colour (a pipe, a file, ``--no-color``) nothing is wrapped, so
``grep`` and editors' problem matchers see whole findings, and rich is not imported.  In colour
(``terminal.py``) the same characters get their styles, and findings wrap at ``options.width``
(the terminal's width; None: no wrapping).  With several files the findings come first and the
sheets, where asked for (``--sheet``), after them.
"""

from __future__ import annotations

from speccheck.formats.common import CAUTION_TEXT, caution_part, cautioned, place
from speccheck.formats.sheet_text import Shower, sheet_lines
from speccheck.records.findings import CAUTIONS, SEVERITIES, FileResult

SEVERITY_STYLE = {"error": "bold red", "warning": "yellow", "note": "cyan", "caution": "bold magenta"}
SHEET_WIDTH = 100  # a grid without a terminal is split into chunks of columns that fit this many


class Plain:
    """Lines without styles, each written whole: the same characters as in colour."""

    def __init__(self, out) -> None:
        self.out = out

    def line(self, segments, wrap: bool = True) -> None:
        self.out.write("".join(text for text, _ in segments) + "\n")


def __getattr__(name: str):
    if name == "QuietConsole":  # the review format's console lives with rich, in terminal.py
        from speccheck.formats.terminal import QuietConsole

        return QuietConsole
    raise AttributeError(f"module {__name__!r} has no attribute {name!r}")


def _header(sink, result: FileResult) -> None:
    sink.line([(result.path, "bold"), (f" — {result.title}" if result.title else "", "")])
    for setting in result.settings:
        sink.line([(f"  with --set {setting} (the file is unchanged)", "bold")])


def _findings(sink, result: FileResult) -> None:
    for f in result.findings:
        severity, message = f.severity, f.message
        if f.rule in CAUTIONS:  # said once at the top; only what this file adds (an MPE's figure) stays
            severity, message = "caution", caution_part(f)
            if not message:
                continue
        sink.line([(place(f) + ": ", "bold"), (severity, SEVERITY_STYLE[severity]), (f" [{f.rule}] ", "dim"),
                   (message, "")])


def _sheet(sink, result: FileResult, show, width: int) -> None:
    for line in sheet_lines(result.sheet, show, width):
        sink.line(line, wrap=False)


def _has_findings(result: FileResult) -> bool:
    return any(f.rule not in CAUTIONS or caution_part(f) for f in result.findings)


def write(results: list[FileResult], out, options) -> None:
    color = bool(options and options.color)
    width = options.width if options else None
    if color:
        from speccheck.formats.terminal import Styled

        sink = Styled(out, width)
    else:
        sink = Plain(out)
    show = Shower(options.units if options else None)
    chosen = options.show_sheet if options else None
    sheets = len(results) == 1 if chosen is None else chosen  # by default only for a single file
    sheet_width = width or SHEET_WIDTH
    caution = cautioned(results)
    if caution:
        sink.line([("caution", SEVERITY_STYLE["caution"]), (" [laser-safety] ", "dim"),
                   (f"{CAUTION_TEXT} Applies to: {', '.join(path for path, _ in caution)}.", "")])
        sink.line([])
    if len(results) == 1:
        (result,) = results
        _header(sink, result)
        if sheets:
            _sheet(sink, result, show, sheet_width)
        _findings(sink, result)
        sink.line([])
    else:
        for result in results:  # findings first; a file with nothing to say is only counted
            if _has_findings(result) or result.settings:
                _header(sink, result)
                _findings(sink, result)
                sink.line([])
        for result in results if sheets else ():
            if result.sheet:
                _header(sink, result)
                _sheet(sink, result, show, sheet_width)
                sink.line([])
    counts = {s: sum(1 for r in results for f in r.findings if f.severity == s and f.rule not in CAUTIONS)
              for s in SEVERITIES}
    segments = []
    for s in SEVERITIES:
        segments += [(f"{counts[s]} {s}{'' if counts[s] == 1 else 's'}", SEVERITY_STYLE[s] if counts[s] else ""),
                     (", ", "")]
    segments.pop()
    if caution:  # one caution however many files it applies to
        segments += [(", ", ""), ("1 caution", SEVERITY_STYLE["caution"])]
    n = len(results)
    segments.append((f" in {n} file{'' if n == 1 else 's'}", ""))
    sink.line(segments)
