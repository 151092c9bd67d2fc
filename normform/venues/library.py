"""Read and write curated libraries through the foundation readers and exporters.

BibTeX (``.bib``) goes through :mod:`normform.readers.bibtex`; CSL-JSON (a JSON
array, one object, or JSON Lines) through :mod:`normform.readers.csljson`.
"""

from __future__ import annotations

import json
from pathlib import Path

from normform.model import Reference
from normform.venues.errors import LibraryError


def is_bibtex(path: str | Path) -> bool:
    return Path(path).suffix.lower() in (".bib", ".bibtex")


def csl_objects(text: str, path: str) -> list[dict]:
    """CSL-JSON items from a JSON array, a single object, or JSON Lines."""
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
                raise LibraryError(f"not a JSON object: {exc.msg}", line=number, column=exc.colno,
                                   source=text, path=path, expected=("one CSL-JSON object per line",)) from None
    for n, item in enumerate(items, start=1):
        if not isinstance(item, dict):
            raise LibraryError(f"item {n} is not a CSL-JSON object", line=1, column=1, path=path)
    return items


def from_csl(item: dict) -> Reference:
    try:
        from normform.readers.csljson import from_csl as convert
    except ImportError as exc:  # the foundation module is being written
        raise LibraryError("reading CSL-JSON needs normform.readers.csljson", line=1, column=1) from exc
    return convert(item)


def read_library(path: str | Path) -> list[Reference]:
    """All records of a curated BibTeX or CSL-JSON file (malformed entries raise)."""
    p = Path(path)
    try:
        text = p.read_text("utf-8")
    except OSError as exc:
        raise LibraryError(f"cannot read library: {exc.strerror}", path=str(p)) from None
    if is_bibtex(p):
        from normform.readers.bibtex import read_bibtex

        result = read_bibtex(text, str(p))
        if result.errors:
            raise result.errors[0]
        return list(result.records)
    return [from_csl(item) for item in csl_objects(text, str(p))]


def to_csl(ref: Reference) -> dict:
    """One record as a CSL-JSON object (the foundation exporter)."""
    from normform.export.registry import get_exporter

    return get_exporter("csl-json").record(ref)


def to_bibtex(refs: list[Reference]) -> str:
    """Records as BibTeX text (the foundation exporter)."""
    from normform.export.registry import get_exporter

    return get_exporter("bibtex").dumps(refs)
