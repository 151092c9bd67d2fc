"""Load catalogue entry files (TOML / JSON) for the batch reader.

The entry format belongs to the lint area (``normform.lint``).  When its
loader is importable we use it, so both commands read entries the same way;
otherwise we read the file with :mod:`tomllib` / :mod:`json` and accept the
same shapes: one entry per file (a table with ``id``), or several under
``entries`` / ``entry``, or (JSON) a list of entries.
"""

from __future__ import annotations

import json
import tomllib
from pathlib import Path

from normform.errors import PositionedError


class EntryFileError(PositionedError):
    """An entry file that is not valid TOML/JSON."""


def _lint_parse():
    """The lint area's ``parse_entry(path, text) -> Entry`` (with value positions), if present."""
    try:
        from normform.lint.entry import EntrySyntaxError, parse_entry
    except ImportError:
        return None
    return parse_entry, EntrySyntaxError


def _entries_of(data) -> list[dict]:
    if isinstance(data, list):
        return [e for e in data if isinstance(e, dict)]
    if isinstance(data, dict):
        for key in ("entries", "entry"):
            if isinstance(data.get(key), list):
                return [e for e in data[key] if isinstance(e, dict)]
        return [data]
    return []


def _positions(source: str, entry: dict) -> dict:
    """Best-effort line numbers of each reference/formula string in the file."""
    out: dict = {}
    cursor = 0
    for section in ("references", "formulas"):
        values = entry.get(section) or []
        if not isinstance(values, list):
            continue
        for index, value in enumerate(values):
            text = value if isinstance(value, str) else (value.get("text") if isinstance(value, dict) else None)
            if not isinstance(text, str) or not text:
                continue
            at = source.find(text[:40], cursor)
            if at < 0:
                at = source.find(text[:40])
            if at >= 0:
                out[(section, index)] = source.count("\n", 0, at) + 1
                cursor = at
    return out


def load(path: Path) -> list[tuple[dict, int | None, dict]]:
    """``(entry, line of the entry, positions)`` for each entry in ``path``."""
    raw = path.read_bytes()
    source = raw.decode("utf-8", errors="replace")
    lint = _lint_parse()
    if lint is not None:
        parse_entry, syntax_error = lint
        try:
            entry = parse_entry(str(path), source)
        except syntax_error as exc:
            line, column = exc.line, exc.column
            if "end of document" in exc.message:   # tomllib names no position then: point at the end
                line = source.count("\n") + 1
                column = len(source.rsplit("\n", 1)[-1]) + 1
            raise EntryFileError(exc.message, line=line, column=column, source=source,
                                 path=str(path), expected=exc.expected) from None
        where = entry.where
        positions = {}
        for (section, index) in ((s, i) for s in ("references", "formulas")
                                 for i in range(len(entry.data.get(s) or []) if isinstance(entry.data.get(s), list) else 0)):
            span = where.span((section, index))
            if span is not None:
                positions[(section, index)] = where.line_col(span[0])[0]
        id_span = where.values.get(("id",))
        line = where.line_col(id_span[0])[0] if id_span else 1
        return [(entry.data, line, positions)]
    try:
        if path.suffix.lower() == ".toml":
            data = tomllib.loads(source)
        else:
            data = json.loads(source)
    except tomllib.TOMLDecodeError as exc:
        line = getattr(exc, "lineno", 1) or 1
        column = getattr(exc, "colno", 1) or 1
        raise EntryFileError(f"not valid TOML: {exc}", line=line, column=column,
                             source=source, path=str(path)) from None
    except json.JSONDecodeError as exc:
        raise EntryFileError(f"not valid JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                             source=source, path=str(path), expected=("a JSON object or list",)) from None
    out = []
    for entry in _entries_of(data):
        ident = entry.get("id")
        line = None
        if ident is not None:
            at = source.find(str(ident))
            line = source.count("\n", 0, at) + 1 if at >= 0 else None
        out.append((entry, line, _positions(source, entry)))
    return out
