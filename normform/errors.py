"""Errors that point at a place in the input.

Every parser in normform raises (or records) a :class:`PositionedError`, so a
user always learns *where* (line, column; 1-based) and *what was expected*.
"""

from __future__ import annotations


class PositionedError(ValueError):
    """An input error at ``line``:``column`` (both 1-based).

    ``source`` is the full offending text (or the offending line), used to
    draw a caret excerpt; ``expected`` lists what would have been accepted;
    ``path`` names the file when there is one.
    """

    def __init__(self, message: str, *, line: int = 1, column: int = 1,
                 source: str | None = None, expected: tuple[str, ...] | list[str] = (),
                 path: str | None = None, offending: str | None = None) -> None:
        self.message = message
        self.line = line
        self.column = column
        self.source = source
        self.expected = tuple(expected)
        self.path = path
        self.offending = offending
        super().__init__(self.describe())

    def location(self) -> str:
        head = f"{self.path}:" if self.path else ""
        return f"{head}{self.line}:{self.column}"

    def excerpt(self) -> str:
        """The offending line with a caret under the column."""
        if self.source is None:
            return ""
        lines = self.source.splitlines() or [""]
        text = lines[min(self.line, len(lines)) - 1]
        return f"{text}\n{' ' * max(self.column - 1, 0)}^"

    def describe(self) -> str:
        parts = [f"{self.location()}: {self.message}"]
        if self.expected:
            parts.append("expected " + ", ".join(self.expected))
        return "; ".join(parts)

    def to_dict(self) -> dict:
        return {"line": self.line, "column": self.column, "message": self.describe()}


class UsageError(Exception):
    """Bad command-line arguments; the CLI reports it with exit code 2.

    Defined here rather than in ``normform.cli`` so that ``python -m
    normform.cli`` (where cli is ``__main__``) still catches it.
    """
