"""Exporters by format name, for every command that writes references."""

from __future__ import annotations

from normform.export.base import Exporter

FORMATS = ("bibtex", "csl-json", "text")


def get_exporter(name: str, *, style: str | None = None, latex: bool = False,
                 provenance: bool = True) -> Exporter:
    """``bibtex`` (``latex=True`` for ASCII TeX), ``csl-json``, or ``text`` (house style, or ``style``)."""
    if name == "bibtex":
        from normform.export.bibtex import BibtexExporter
        return BibtexExporter(unicode=not latex, provenance=provenance)
    if name in ("csl-json", "csljson", "json"):
        from normform.export.csljson import CslJsonExporter
        return CslJsonExporter()
    if name == "text":
        if style and style != "house":
            from normform.export.citeproc import CitationStyle
            return CitationStyle(style)
        from normform.export.text import HouseStyle
        return HouseStyle()
    raise KeyError(f"unknown format {name!r}; choose from {', '.join(FORMATS)}")


__all__ = ["FORMATS", "get_exporter"]
