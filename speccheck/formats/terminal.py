"""Coloured output through rich: imported only when the output is in colour.

``Styled`` shows the lines the human format builds (``(text, style)`` segments) with their
styles; findings wrap at ``width`` (the terminal's) or not at all, lines of the sheet never wrap.
Without colour the human format writes the same characters without rich (``human.Plain``).
"""

from __future__ import annotations

from rich.console import Console
from rich.text import Text


class QuietConsole(Console):
    """rich's console, but a reader that stops early (``| head``) raises ``BrokenPipeError`` to the
    caller, which decides the exit code, instead of rich's own exit with code 1."""

    def on_broken_pipe(self) -> None:
        raise BrokenPipeError


class Styled:
    """Lines of styled segments on a colour console."""

    def __init__(self, out, width: int | None) -> None:
        self.width = width
        self.console = QuietConsole(file=out, color_system="auto", force_terminal=True, highlight=False,
                                    emoji=False, width=width)

    def line(self, segments, wrap: bool = True) -> None:
        text = Text()
        for part, style in segments:
            text.append(part, style=style or None)
        self.console.print(text, soft_wrap=not (wrap and self.width))
