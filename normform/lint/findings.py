"""What a rule reports: a finding at a place, optionally with a safe fix."""

from __future__ import annotations

from dataclasses import dataclass, field

SEVERITIES = ("note", "warning", "error")
RANK = {name: i for i, name in enumerate(SEVERITIES)}


@dataclass(frozen=True, slots=True)
class Edit:
    """Replace source characters ``[start, end)`` by ``text``."""

    start: int
    end: int
    text: str


@dataclass(frozen=True, slots=True)
class Fix:
    description: str
    edits: tuple[Edit, ...]


@dataclass(slots=True)
class Finding:
    """One problem in one file; lines and columns are 1-based code points."""

    slug: str
    severity: str
    message: str
    path: str
    line: int = 1
    column: int = 1
    end_line: int | None = None
    end_column: int | None = None
    entry_id: str | None = None
    value_path: tuple = ()
    fix: Fix | None = None
    category: str = ""
    related: list[tuple[str, int, int]] = field(default_factory=list)  # (path, line, col)

    def sort_key(self) -> tuple:
        return (self.path, self.line, self.column, self.slug)

    def to_dict(self) -> dict:
        out = {
            "path": self.path, "line": self.line, "column": self.column,
            "end_line": self.end_line, "end_column": self.end_column,
            "severity": self.severity, "rule": self.slug, "category": self.category,
            "message": self.message, "entry": self.entry_id,
            "value": "/".join(str(p) for p in self.value_path),
        }
        if self.fix is not None:
            out["fix"] = {"description": self.fix.description,
                          "edits": [{"start": e.start, "end": e.end, "text": e.text} for e in self.fix.edits]}
        if self.related:
            out["related"] = [{"path": p, "line": l, "column": c} for p, l, c in self.related]
        return out
