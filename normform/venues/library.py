"""Read and write curated libraries through the foundation readers and exporters.

BibTeX (``.bib``) goes through :mod:`normform.readers.bibtex`; CSL-JSON (a JSON
array, one object, or JSON Lines) through :mod:`normform.readers.csljson`.
"""

from __future__ import annotations

import json
from pathlib import Path
from typing import Callable

from normform.model import Reference
from normform.venues.errors import LibraryError


def is_bibtex(path: str | Path) -> bool:
    return Path(path).suffix.lower() in (".bib", ".bibtex")


OnError = Callable[[LibraryError], None]


def _raise(exc: LibraryError) -> None:
    raise exc


def csl_objects(text: str, path: str, on_error: OnError | None = None) -> list[dict]:
    """CSL-JSON items from a JSON array, a single object, or JSON Lines.

    A malformed line or item goes to ``on_error`` and is skipped (without a
    handler the first one raises).  A JSON array that does not parse at all
    always raises: nothing after the error can be read.
    """
    report = on_error or _raise
    stripped = text.lstrip()
    if stripped.startswith("["):
        try:
            data = json.loads(text)
        except json.JSONDecodeError as exc:
            raise LibraryError(f"not JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                               source=text, path=path) from None
        items = data
    else:
        items = []
        for number, line in enumerate(text.splitlines(), start=1):
            if not line.strip():
                continue
            try:
                items.append(json.loads(line))
            except json.JSONDecodeError as exc:
                report(LibraryError(f"not a JSON object: {exc.msg}; the line is skipped", line=number,
                                    column=exc.colno, source=text, path=path,
                                    expected=("one CSL-JSON object per line",)))
    good = []
    for n, item in enumerate(items, start=1):
        if not isinstance(item, dict):
            report(LibraryError(f"item {n} is not a CSL-JSON object; it is skipped", line=1, column=1, path=path))
            continue
        good.append(item)
    return good


def from_csl(item: dict) -> Reference:
    try:
        from normform.readers.csljson import from_csl as convert
    except ImportError as exc:  # the foundation module is being written
        raise LibraryError("reading CSL-JSON needs normform.readers.csljson", line=1, column=1) from exc
    return convert(item)


def read_library(path: str | Path, on_error: OnError | None = None) -> list[Reference]:
    """All readable records of a curated BibTeX or CSL-JSON file.

    Each malformed entry is passed to ``on_error`` (a positioned
    :class:`LibraryError`) and skipped; without a handler the first one raises.
    A file that cannot be read at all always raises.
    """
    report = on_error or _raise
    p = Path(path)
    try:
        text = p.read_text("utf-8")
    except OSError as exc:
        raise LibraryError(f"cannot read library: {exc.strerror}", path=str(p)) from None
    if is_bibtex(p):
        from normform.readers.bibtex import read_bibtex

        result = read_bibtex(text, str(p))
        for exc in result.errors:
            report(LibraryError(exc.message, line=exc.line, column=exc.column, source=text,
                                expected=exc.expected, path=str(p)))
        return list(result.records)
    records = []
    for item in csl_objects(text, str(p), on_error):
        try:
            records.append(from_csl(item))
        except (ValueError, TypeError, KeyError) as exc:
            report(LibraryError(f"CSL-JSON item {item.get('id', '?')!r} skipped: {exc}", line=1, column=1,
                                path=str(p)))
    return records


def to_csl(ref: Reference) -> dict:
    """One record as a CSL-JSON object (the foundation exporter)."""
    from normform.export.registry import get_exporter

    return get_exporter("csl-json").record(ref)


def to_bibtex(refs: list[Reference]) -> str:
    """Records as BibTeX text (the foundation exporter)."""
    from normform.export.registry import get_exporter

    return get_exporter("bibtex").dumps(refs)
