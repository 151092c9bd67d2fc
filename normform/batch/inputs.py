"""Read batch inputs as one ordered stream of :class:`Item` s.

Three input shapes, chosen per file:

* plain text (any other suffix): one reference per line;
* JSON Lines (``.jsonl``/``.ndjson``): objects ``{"id", "text"}`` (one
  reference each) or catalogue entries (objects with ``references`` and/or
  ``formulas``);
* catalogue entry files (``.toml``/``.json``) and directories of them.

Nothing is lost: a line that is not valid UTF-8 is decoded with
replacement characters and flagged with its byte offset; a JSON Lines line
that is not JSON becomes a reference item of its raw text, flagged.  Blank
lines are the only thing not turned into items, and they are counted.
Files are read in binary and in order, so the stream is deterministic and a
resumed run can skip exactly the items already done.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Iterator

from normform.textlines import decode_line, physical_lines

TEXT, JSONL, ENTRY = "text", "jsonl", "entry"
ENTRY_SUFFIXES = (".toml", ".json")
JSONL_SUFFIXES = (".jsonl", ".ndjson")


@dataclass(frozen=True, slots=True)
class Item:
    """One unit of work: a reference line, or a formula of an entry."""

    what: str                      # "ref" or "formula"
    text: str
    file: str
    line: int | None               # 1-based physical line, when known
    entry: str | None = None       # catalogue entry id, for entry inputs
    index: int | None = None       # position inside the entry's list
    flags: tuple[tuple[str, object], ...] = ()   # ("invalid_utf8", byte offset), ...

    def flag(self, name: str):
        for key, value in self.flags:
            if key == name:
                return value
        return None


KEEP = 1000   # problems listed one by one; beyond that only counted


@dataclass
class ReadStats:
    """What the readers saw, for the lines-in == records-out check.

    The lists keep the first ``KEEP`` items (memory stays flat on a
    pathological input); every one is still flagged in its record.
    """

    lines: int = 0                 # physical lines of text / JSON Lines inputs
    blank: int = 0
    entry_files: int = 0
    invalid_utf8: list[tuple[str, int, int]] = field(default_factory=list)  # (file, line, byte offset)
    problems: list[str] = field(default_factory=list)
    unreadable: list[str] = field(default_factory=list)
    problem_count: int = 0

    def note(self, message: str) -> None:
        self.problem_count += 1
        if len(self.problems) < KEEP:
            self.problems.append(message)


class InputError(Exception):
    """An input that cannot be read at all (missing, unreadable entry file)."""


def input_kind(path: Path) -> str:
    suffix = path.suffix.lower()
    if path.is_dir() or suffix in ENTRY_SUFFIXES:
        return ENTRY
    if suffix in JSONL_SUFFIXES:
        return JSONL
    return TEXT


def expand(paths: list[str], exclude: Path | None = None) -> list[Path]:
    """Inputs with directories replaced by their entry files, sorted (stable order).

    Files under ``exclude`` (the output directory, when it lies inside an
    input directory) are skipped: its ``summary.json`` is not an entry.
    """
    out: list[Path] = []
    skip = exclude.resolve() if exclude is not None else None
    for name in paths:
        path = Path(name)
        if not path.exists():
            raise InputError(f"{name}: no such file or directory")
        if path.is_dir():
            # only an output directory *inside* this one is skipped (-o . around it is not)
            inner = skip if skip is not None and path.resolve() in skip.parents else None
            found = sorted(p for p in path.rglob("*") if p.is_file() and p.suffix.lower() in ENTRY_SUFFIXES
                           and not (inner is not None and inner in p.resolve().parents))
            out.extend(found)
        else:
            out.append(path)
    return out


def fingerprint(paths: list[Path]) -> list[list]:
    """Identity of the inputs, stored with a checkpoint so a resume reads the same data."""
    rows = []
    for path in paths:
        st = path.stat()
        rows.append([str(path), st.st_size, st.st_mtime_ns])
    return rows


def _decode(raw: bytes, file: str, lineno: int, offset: int, stats: ReadStats) -> tuple[str, tuple]:
    text, where = decode_line(raw, offset)
    if where is None:
        return text, ()
    if len(stats.invalid_utf8) < KEEP:
        stats.invalid_utf8.append((file, lineno, where))
    return text, (("invalid_utf8", where),)


def _physical_lines(path: Path) -> Iterator[tuple[int, int, bytes]]:
    """(1-based line number, byte offset of the line, bytes without EOL)."""
    with open(path, "rb") as handle:
        yield from physical_lines(handle)


def _counted_lines(path: Path, stats: ReadStats) -> Iterator[tuple[str, int, str, tuple]]:
    """(file name, line number, decoded text, flags) of each non-blank line; every line is counted."""
    name = str(path)
    for lineno, start, body in _physical_lines(path):
        stats.lines += 1
        if not body.strip():
            stats.blank += 1
            continue
        text, flags = _decode(body, name, lineno, start, stats)
        yield name, lineno, text, flags


def read_text(path: Path, stats: ReadStats) -> Iterator[Item]:
    for name, lineno, text, flags in _counted_lines(path, stats):
        yield Item("ref", text.strip(), name, lineno, flags=flags)


def read_jsonl(path: Path, stats: ReadStats) -> Iterator[Item]:
    for name, lineno, text, flags in _counted_lines(path, stats):
        try:
            obj = json.loads(text)
        except json.JSONDecodeError as exc:
            msg = f"{name}:{lineno}:{exc.colno}: not JSON ({exc.msg}); kept as a reference line"
            stats.note(msg)
            yield Item("ref", text.strip(), name, lineno,
                       flags=flags + (("bad_json", f"column {exc.colno}: {exc.msg}"),))
            continue
        if isinstance(obj, dict) and isinstance(obj.get("text"), str):
            ident = obj.get("id")
            yield Item("ref", obj["text"].strip(), name, lineno,
                       entry=None if ident is None else str(ident), flags=flags)
            if "references" in obj or "formulas" in obj:
                # both shapes in one object: keep both rather than drop the entry's lists
                stats.note(f"{name}:{lineno}:1: an object with \"text\" and entry lists; "
                           "read the text and the entry's references and formulas")
                yield from entry_items(obj, name, lineno, flags)
        elif isinstance(obj, dict) and ("references" in obj or "formulas" in obj):
            yield from entry_items(obj, name, lineno, flags)
        else:
            msg = f"{name}:{lineno}:1: expected an object with \"text\" or an entry; kept as a reference line"
            stats.note(msg)
            yield Item("ref", text.strip(), name, lineno,
                       flags=flags + (("bad_json", "expected {\"id\", \"text\"} or an entry"),))


def _text_of(value) -> str | None:
    """A reference/formula given as a string or a table with a text-like key."""
    if isinstance(value, str):
        return value
    if isinstance(value, dict):
        for key in ("text", "raw", "formula", "expr", "value"):
            if isinstance(value.get(key), str):
                return value[key]
    return None


def entry_items(entry: dict, file: str, line: int | None, flags: tuple = (),
                lines: dict | None = None) -> Iterator[Item]:
    """Items of one catalogue entry: its references, then its formulas.

    ``lines`` optionally maps ("references"|"formulas", index) to a line
    number inside the file, when the loader knows positions.
    """
    ident = entry.get("id")
    ident = None if ident is None else str(ident)
    for section, what in (("references", "ref"), ("formulas", "formula")):
        values = entry.get(section) or []
        if isinstance(values, (str, dict)):
            values = [values]
        for index, value in enumerate(values):
            text = _text_of(value)
            extra: tuple = ()
            if text is None and what == "ref" and isinstance(value, dict):
                # a structured reference: carried as sorted JSON, converted on the worker
                text = json.dumps(value, ensure_ascii=False, sort_keys=True, default=str)
                extra = (("structured", True),)
            elif text is None:
                text = json.dumps(value, ensure_ascii=False, sort_keys=True, default=str)
                extra = (("bad_entry_value", f"{section}[{index}] is not text"),)
            where = (lines or {}).get((section, index), line)
            yield Item(what, text.strip(), file, where, entry=ident, index=index, flags=flags + extra)


def _load_entry_file(path: Path) -> list[tuple[dict, int | None, dict]]:
    """(entry mapping, line, positions) for every entry in an entry file.

    Uses the lint area's loader when it is installed (it knows the entry
    schema and positions); otherwise reads TOML/JSON directly.
    """
    from normform.batch import entryfiles

    return entryfiles.load(path)


def read_entries(path: Path, stats: ReadStats) -> Iterator[Item]:
    stats.entry_files += 1
    name = str(path)
    from normform.batch.entryfiles import EntryFileError

    try:
        loaded = _load_entry_file(path)
    except EntryFileError as exc:
        # The file cannot be read as entries: report where, keep going.
        stats.note(exc.describe())
        stats.unreadable.append(name)
        return
    bad = _invalid_utf8_lines(path)
    for where_line, offset in bad:
        if len(stats.invalid_utf8) < KEEP:
            stats.invalid_utf8.append((name, where_line, offset))
    for entry, line, positions in loaded:
        for item in entry_items(entry, name, line, lines=positions):
            offset = _bad_offset_for(item, bad)
            yield item if offset is None else replace(item, flags=item.flags + (("invalid_utf8", offset),))


def _invalid_utf8_lines(path: Path) -> list[tuple[int, int]]:
    """(line, byte offset of the first bad byte) of every line of ``path`` that is not valid UTF-8."""
    out = []
    for lineno, start, body in _physical_lines(path):
        _, where = decode_line(body, start)
        if where is not None:
            out.append((lineno, where))
    return out


def _bad_offset_for(item: Item, bad: list[tuple[int, int]]) -> int | None:
    """The invalid-UTF-8 offset that concerns an entry item: on its line, or (a value spanning
    lines, or a line not known) the first bad line at or after it whose text was replaced."""
    if not bad:
        return None
    for line, offset in bad:
        if line == item.line:
            return offset
    if "\ufffd" in item.text:
        after = [offset for line, offset in bad if item.line is None or line >= item.line]
        return after[0] if after else bad[0][1]
    return None


def iter_items(paths: list[Path], stats: ReadStats) -> Iterator[Item]:
    """All items of all inputs, in input order."""
    for path in paths:
        kind = input_kind(path)
        if kind == TEXT:
            yield from read_text(path, stats)
        elif kind == JSONL:
            yield from read_jsonl(path, stats)
        else:
            yield from read_entries(path, stats)


def count_lines(paths: list[Path]) -> int | None:
    """Fast upper bound on the number of items (for the progress bar's total)."""
    total = 0
    for path in paths:
        if input_kind(path) == ENTRY:
            return None
        with open(path, "rb") as handle:
            last = b""
            while block := handle.read(1 << 20):
                total += block.count(b"\n")
                last = block
            if last and not last.endswith(b"\n"):
                total += 1
    return total


