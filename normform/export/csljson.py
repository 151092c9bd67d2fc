"""CSL-JSON exporter (CSL 1.0.2 data model: item types and variable names of the specification).

CSL ``number`` is a report's number for reports and the article number
otherwise; the other one of the two, when present, goes to ``custom``
(``article_number`` of a report, ``report_number`` of a non-report), so
reading back is exact.  ``version`` and ``accessed`` are CSL variables.

What CSL has no variable for goes under ``custom``: ``arxiv``, ``mr``, ``zbl``
(and ``arxiv_class``, ``mr_review``, ``handle``), the raw text ``raw``, the
record ``confidence``, per-field ``field_confidence`` and ``field_spans``,
``origin``, ``title_protected`` and source fields without a slot (``extra``).
"""

from __future__ import annotations

import json
from typing import Iterable

from normform.export.base import Exporter, KeyMaker
from normform.ids import isbn as _isbn, issn as _issn
from normform.model import Date, Kind, Name, Reference

CSL_TYPE = {
    Kind.ARTICLE: "article-journal", Kind.BOOK: "book", Kind.CHAPTER: "chapter",
    Kind.PAPER: "paper-conference", Kind.THESIS: "thesis", Kind.REPORT: "report",
    Kind.WEBPAGE: "webpage", Kind.SOFTWARE: "software", Kind.UNPUBLISHED: "manuscript",
    Kind.OTHER: "document",
}


def csl_name(name: Name) -> dict:
    if name.literal is not None:
        return {"literal": name.literal}
    out: dict = {}
    for key, value in (("family", name.family), ("given", name.given),
                       ("non-dropping-particle", name.particle),
                       ("dropping-particle", name.dropping_particle), ("suffix", name.suffix)):
        if value is not None:
            out[key] = value
    return out


def csl_date(date: Date) -> dict:
    out: dict = {}
    parts = [p for p in (date.year, date.month, date.day)]
    while parts and parts[-1] is None:
        parts.pop()
    if parts and None not in parts:
        out["date-parts"] = [parts]
    elif parts:  # a month without a year cannot be date-parts: keep it as text
        out["raw"] = "-".join("" if p is None else str(p) for p in parts)
    if date.season:
        out["season"] = date.season
    if date.circa:
        out["circa"] = True
    if date.literal:
        out["literal"] = date.literal
    return out


# (CSL variable, scheme, separator, how a value is shown), in output order
_ITEM_IDS = (
    ("DOI", "doi", " ", lambda i: i.value),
    ("ISBN", "isbn", ", ", lambda i: _isbn.format(i.value) if i.valid else i.value),
    ("ISSN", "issn", ", ", lambda i: _issn.format(i.value) if i.valid else i.value),
    ("URL", "url", " ", lambda i: i.value),
)
_CUSTOM_IDS = ("arxiv", "mr", "zbl", "handle")   # custom key = scheme


class CslJsonExporter(Exporter):
    name = "csl-json"
    suffix = ".json"

    def record(self, ref: Reference, key: str | None = None) -> dict:
        item: dict = {"id": key or ref.key or KeyMaker().make(ref), "type": CSL_TYPE[ref.kind]}
        custom: dict = {}
        for role, people in (("author", ref.authors), ("editor", ref.editors), ("translator", ref.translators)):
            if people:
                item[role] = [csl_name(n) for n in people]

        def put(var: str, value: str | None) -> None:
            if value is not None:
                item[var] = value

        put("title", ref.title)
        put("container-title", ref.container_title)
        put("collection-title", ref.series)
        put("collection-number", ref.series_number)
        put("volume", ref.volume)
        put("issue", ref.issue)
        if ref.pages:
            p = ref.pages
            if p.first is not None or p.last is not None:
                item["page"] = f"{p.first or ''}-{p.last}" if p.last is not None else p.first
            if ref.kind is Kind.REPORT:   # a report's "number" is its report number (below)
                if p.article is not None:
                    custom["article_number"] = p.article
            else:
                put("number", p.article)
            put("number-of-pages", p.count)
        if ref.report_number is not None:
            if ref.kind is Kind.REPORT:
                item["number"] = ref.report_number
            else:   # elsewhere CSL "number" holds the article number
                custom["report_number"] = ref.report_number
        put("version", ref.version)
        if ref.date:
            item["issued"] = csl_date(ref.date)
        if ref.accessed:
            item["accessed"] = csl_date(ref.accessed)
        put("publisher", ref.publisher)
        put("publisher-place", ref.place)
        put("edition", ref.edition)
        put("genre", ref.genre)
        put("language", ref.language)
        put("note", ref.note)
        self._identifiers(ref, item, custom)
        if ref.title_protected:
            custom["title_protected"] = list(ref.title_protected)
        if ref.extra:
            custom["extra"] = [[k, v] for k, v in ref.extra]
        prov = ref.provenance
        if prov is not None:
            if prov.raw is not None:
                custom["raw"] = prov.raw
            if prov.confidence is not None:
                custom["confidence"] = prov.confidence
            if prov.fields:
                custom["field_confidence"] = {i.field: i.confidence for i in prov.fields}
                spans = {i.field: [i.span.start, i.span.end] for i in prov.fields if i.span}
                if spans:
                    custom["field_spans"] = spans
            if prov.origin is not None:
                custom["origin"] = prov.origin
            if not (prov.raw or prov.confidence is not None or prov.fields or prov.origin):
                custom["provenance"] = True  # an empty Provenance, kept distinct from none
        if custom:
            item["custom"] = custom
        return item

    def _identifiers(self, ref: Reference, item: dict, custom: dict) -> None:
        if not ref.identifiers:
            return
        by_scheme: dict[str, list] = {}   # one pass instead of one ref.idents() per scheme
        for ident in ref.identifiers:
            by_scheme.setdefault(ident.scheme, []).append(ident)
        for var, scheme, sep, show in _ITEM_IDS:
            found = by_scheme.get(scheme)
            if found:
                item[var] = sep.join(show(i) for i in found)
        for key in _CUSTOM_IDS:
            found = by_scheme.get(key)
            if found:
                custom[key] = ", ".join(i.value for i in found)
        arx = by_scheme.get("arxiv")
        if arx and arx[0].detail:
            custom["arxiv_class"] = arx[0].detail
        reviews = [i.detail or "" for i in by_scheme.get("mr", ())]
        if any(reviews):
            custom["mr_review"] = ", ".join(reviews)

    def items(self, refs: Iterable[Reference]) -> list[dict]:
        keys = KeyMaker()
        return [self.record(ref, keys.make(ref)) for ref in refs]

    def dumps(self, refs: Iterable[Reference]) -> str:
        return json.dumps(self.items(refs), ensure_ascii=False, indent=2) + "\n"


__all__ = ["CslJsonExporter", "CSL_TYPE", "csl_name", "csl_date"]
