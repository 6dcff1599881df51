"""Include and exclude patterns of the project configuration: globs over '/'-separated paths
relative to the configuration's folder, compiled to regular expressions."""

from __future__ import annotations

import re
from pathlib import PurePosixPath


def pattern_problem(pattern: str) -> str | None:
    if not pattern.strip():
        return "a pattern must not be empty"
    if pattern.startswith("/") or re.match(r"^[A-Za-z]:[\\/]", pattern):
        return "patterns are relative to the configuration file's folder, not absolute"
    if ".." in PurePosixPath(pattern).parts:
        return "patterns cannot reach outside the configuration file's folder ('..')"
    try:
        compile_pattern(pattern)
    except re.error as exc:  # "[]", "[!]", "[z-a]": a character class that is empty or backwards
        return f"not a valid glob pattern (its character class: {exc.msg})"
    return None


def _segment(part: str) -> str:
    out, i = [], 0
    while i < len(part):
        ch = part[i]
        if ch == "*":
            out.append("[^/]*")
        elif ch == "?":
            out.append("[^/]")
        elif ch == "[":
            end = part.find("]", i + 2 if part[i + 1:i + 2] in ("!", "^") else i + 1)
            if end < 0:
                out.append(re.escape(ch))
            else:
                body = part[i + 1:end]
                if body[:1] in ("!", "^"):
                    body = "^" + body[1:]
                out.append("[" + body.replace("\\", "\\\\") + "]")
                i = end
        else:
            out.append(re.escape(ch))
        i += 1
    return "".join(out)


def compile_pattern(pattern: str) -> re.Pattern:
    """A glob pattern as a regular expression over '/'-separated relative paths.

    ``*`` and ``?`` stay inside one path segment, ``**`` spans any number of
    segments (also none), ``[abc]`` / ``[!abc]`` are character classes.  A
    pattern without '/' matches a file or folder name at any depth.
    """
    pattern = pattern.replace("\\", "/").strip()
    while pattern.startswith("./"):
        pattern = pattern[2:]
    pattern = pattern.rstrip("/")
    parts = pattern.split("/")
    if len(parts) == 1 and parts[0] != "**":
        return re.compile(rf"(?:.*/)?{_segment(parts[0])}")
    out = []
    for i, part in enumerate(parts):
        last = i == len(parts) - 1
        if part == "**":
            out.append(".*" if last else "(?:[^/]+/)*")
        else:
            out.append(_segment(part) + ("" if last else "/"))
    return re.compile("".join(out))
