"""Well-formedness of each output format, shared by the fuzzing and the regression tests.

``output_problem(fmt, text)`` says what is wrong with a report of that format,
or returns None when it is well formed.  It checks the shape a consumer needs,
not the content: JSON with a ``files`` list, SARIF with a ``runs`` list, JUnit
XML that parses, CSV whose rows all have one length, GitHub workflow commands
one per line, an HTML page that html.parser reads whole.
"""

from __future__ import annotations

import csv
import html.parser
import io
import json
import re
import xml.etree.ElementTree as ET

FORMATS = ("json", "csv", "github", "junit", "sarif", "review", "human", "html")  # cheapest first


class _Page(html.parser.HTMLParser):
    def __init__(self):
        super().__init__(convert_charrefs=True)
        self.tags: list[str] = []

    def handle_starttag(self, tag, attrs):
        self.tags.append(tag)


def output_problem(fmt: str, out) -> str | None:
    if not isinstance(out, str):
        return "output is not text"
    try:
        if fmt == "json":
            doc = json.loads(out)
            if not isinstance(doc, dict) or not isinstance(doc.get("files"), list):
                return "no 'files' list"
        elif fmt == "sarif":
            doc = json.loads(out)
            if not isinstance(doc, dict) or not isinstance(doc.get("runs"), list):
                return "no 'runs' list"
        elif fmt == "junit":
            ET.fromstring(out)
        elif fmt == "csv":
            rows = list(csv.reader(io.StringIO(out, newline=""), strict=True))
            if len({len(r) for r in rows}) > 1:
                return "rows of different lengths"
        elif fmt == "github":
            # the runner splits its input at CR, LF and CRLF only
            lines = re.split(r"\r\n|\r|\n", out)
            if lines and lines[-1] == "":
                lines.pop()
            if any(not s.startswith("::") for s in lines):
                return "a line that is not a workflow command"
        elif fmt == "html":
            head = out[:200].lower()
            if not (head.startswith("<!doctype html") or head.startswith("<html")):
                return "does not start with <!DOCTYPE html> or <html"
            page = _Page()
            page.feed(out)
            page.close()
            if "html" not in page.tags or not out.rstrip().lower().endswith("</html>"):
                return "not a whole page"
    except (ValueError, ET.ParseError, csv.Error) as exc:
        return type(exc).__name__
    return None
