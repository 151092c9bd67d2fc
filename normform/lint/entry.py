"""One catalogue entry file: its text, its values, and where each value sits."""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path as FsPath

from normform.errors import PositionedError
from normform.lint.findings import Edit, Finding, Fix
from normform.lint.positions import Located, ScanError, locate_json, locate_toml

ENTRY_SUFFIXES = (".toml", ".json")
NOT_ENTRIES = {"pyproject.toml", "normform.toml", "package.json"}   # configuration, never entries
_TOML_AT = re.compile(r"\s*\(at line (\d+), column (\d+)\)$")


class EntrySyntaxError(PositionedError):
    """The file is not valid TOML / JSON."""


@dataclass
class Entry:
    path: str
    text: str
    kind: str                     # "toml" | "json"
    data: dict
    where: Located
    cache: dict = field(default_factory=dict)   # per-entry facts shared by rules

    @property
    def id(self) -> str | None:
        value = self.data.get("id")
        return value if isinstance(value, str) else None

    # -- positions ----------------------------------------------------------
    def finding(self, rule, message: str, path: tuple = (), *, fix: Fix | None = None,
                span: tuple[int, int] | None = None, key: bool = False) -> Finding:
        """A finding of ``rule`` at the value (or key) at ``path``, or at ``span``."""
        if span is None:
            span = (self.where.key_span(path) if key else self.where.span(path)) or (0, 0)
        line, col = self.where.line_col(span[0])
        end_line, end_col = self.where.line_col(span[1])
        return Finding(rule.slug, rule.severity, message, self.path, line, col, end_line, end_col,
                       entry_id=self.id, value_path=tuple(path), fix=fix, category=rule.category)

    def string_span(self, path: tuple, start: int, end: int | None = None) -> tuple[int, int]:
        """Source span of characters ``[start, end)`` of the string at ``path``."""
        a = self.where.string_offset(path, start)
        b = self.where.string_offset(path, end) if end is not None and end > start else a + 1
        return a, max(b, a + 1)

    # -- edits --------------------------------------------------------------
    def replace_value(self, path: tuple, value) -> Edit:
        """An edit that writes ``value`` in place of the value at ``path``."""
        start, end = self.where.values[tuple(path)]
        if isinstance(value, bool) or not isinstance(value, (str, int)):
            raise TypeError("only strings and integers are rewritten")
        if isinstance(value, int):
            return Edit(start, end, str(value))
        if self.kind == "json":
            import json

            return Edit(start, end, json.dumps(value, ensure_ascii=False))
        old = self.text[start:end]
        return Edit(start, end, toml_string(value, prefer_literal=old.startswith("'")))


    def insert_top_level_after(self, after: str, key: str, value: int) -> Edit:
        """An edit that adds ``key = value`` right after the top-level value ``after``."""
        end = self.where.values[(after,)][1]
        if self.kind == "json":
            import json

            return Edit(end, end, f", {json.dumps(key)}: {value}")
        return Edit(end, end, f"\n{key} = {value}")


def toml_string(value: str, prefer_literal: bool = False) -> str:
    """``value`` as a TOML string literal, keeping the author's quoting when possible."""
    controls = any((ord(c) < 32 and c not in "\t\n") or ord(c) == 127 for c in value)
    if prefer_literal and not controls:
        if "\n" not in value and "'" not in value:
            return f"'{value}'"
        if "\n" in value and "'''" not in value and not value.endswith("'"):
            return f"'''\n{value}'''"
    out = []
    multi = "\n" in value
    for c in value:
        if c == "\\":
            out.append("\\\\")
        elif c == '"':
            out.append('\\"')
        elif c == "\n" and multi:
            out.append("\n")
        elif c == "\t":
            out.append("\\t" if not multi else "\t")
        elif ord(c) < 32 or ord(c) == 127:
            out.append({"\n": "\\n", "\r": "\\r", "\b": "\\b", "\f": "\\f"}.get(c, f"\\u{ord(c):04X}"))
        else:
            out.append(c)
    body = "".join(out)
    return f'"""\n{body}"""' if multi else f'"{body}"'


_DIGIT_RUN = re.compile(r"[0-9][0-9_]*", re.ASCII)


def _too_long_integer(path: str, text: str, kind: str) -> EntrySyntaxError | None:
    """The error for the first integer longer than a term may be (Python would refuse to read it)."""
    from normform.formula.digits import MAX_BITS, TERM_DIGITS

    runs = [m for m in _DIGIT_RUN.finditer(text) if len(m.group()) - m.group().count("_") > TERM_DIGITS]
    if not runs:
        return None
    found, what = runs[0], "an integer"
    for m in runs[:5]:      # a long run of digits inside a string is not it: find the value
        try:   # read the file again with that integer shortened: which value starts there?
            short = text[:m.start()] + "0" + text[m.end():]
            spans = (locate_json if kind == "json" else locate_toml)(short).values
        except Exception:  # the position alone still says where
            continue
        where = next((p for p, span in spans.items() if span[0] == m.start()), None)
        if where is None:
            continue
        found = m
        if len(where) == 2 and where[0] == "terms" and isinstance(where[1], int):
            what = f"term {where[1] + 1} (terms[{where[1]}])"
        else:
            what = "the integer at " + ".".join(str(k) for k in where)
        break
    digits = len(found.group()) - found.group().count("_")
    line = text.count("\n", 0, found.start()) + 1
    column = found.start() - (text.rfind("\n", 0, found.start()) + 1) + 1
    return EntrySyntaxError(f"{what} has {digits:,} digits; a term may have at most {MAX_BITS:,} bits "
                            f"(about {TERM_DIGITS:,} digits)", line=line, column=column, source=text, path=path)


def parse_entry(path: str, text: str) -> Entry:
    """Parse ``text`` (TOML, or JSON for ``*.json``); raises :class:`EntrySyntaxError`.

    Integers of up to the size of a term (20,000 bits, 6,021 digits) are read,
    though Python's default conversion limit stops at 4,300 digits; a longer
    one is an :class:`EntrySyntaxError` at its position.
    """
    from normform.formula.digits import term_digits_allowed

    with term_digits_allowed():
        return _parse_entry(path, text)


def _parse_entry(path: str, text: str) -> Entry:
    kind = "json" if path.lower().endswith(".json") else "toml"
    if kind == "json":
        import json

        try:
            data = json.loads(text)
        except json.JSONDecodeError as exc:
            raise EntrySyntaxError(f"not valid JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                                   source=text, path=path) from None
        except ValueError:   # an integer beyond the conversion limit
            raise (_too_long_integer(path, text, kind)
                   or EntrySyntaxError("not valid JSON: an integer is too long", source=text, path=path)) from None
        if not isinstance(data, dict):
            raise EntrySyntaxError("an entry must be a JSON object", source=text, path=path,
                                   expected=("{",))
        locate = locate_json
    else:
        import tomllib

        try:
            data = tomllib.loads(text)
        except tomllib.TOMLDecodeError as exc:
            message = str(exc)
            line = column = 1
            m = _TOML_AT.search(message)
            if m:
                line, column = int(m.group(1)), int(m.group(2))
                message = message[:m.start()]
            raise EntrySyntaxError(f"not valid TOML: {message}", line=line, column=column,
                                   source=text, path=path) from None
        except ValueError:   # an integer beyond the conversion limit
            raise (_too_long_integer(path, text, kind)
                   or EntrySyntaxError("an integer is too long", source=text, path=path)) from None
        locate = locate_toml
    try:
        where = locate(text)
    except ScanError:  # never expected on valid input; positions fall back to the file start
        where = Located(text, kind)
    return Entry(path, text, kind, data, where)


def read_entry(path: str) -> Entry:
    """Read and parse one file; ``OSError`` / ``UnicodeDecodeError`` propagate to the caller."""
    raw = FsPath(path).read_bytes()
    try:
        text = raw.decode("utf-8")
    except UnicodeDecodeError as exc:
        before = raw[: exc.start].decode("utf-8", errors="replace")
        line = before.count("\n") + 1
        column = len(before) - (before.rfind("\n") + 1) + 1
        raise EntrySyntaxError(f"the file is not UTF-8 (byte 0x{raw[exc.start]:02x})", line=line, column=column,
                               source=raw.decode("utf-8", errors="replace"), path=path,
                               expected=("UTF-8 text",)) from None
    return parse_entry(path, text)


def entry_files(paths: list[str]) -> list[str]:
    """Entry files named by ``paths`` (directories are searched recursively)."""
    out: list[str] = []
    for p in paths:
        fp = FsPath(p)
        if fp.is_dir():
            for child in sorted(fp.rglob("*")):
                if (child.suffix.lower() in ENTRY_SUFFIXES and child.is_file()
                        and child.name not in NOT_ENTRIES
                        and not any(part.startswith(".") for part in child.relative_to(fp).parts)):
                    out.append(str(child))
        else:
            out.append(str(fp))
    return out
