"""BibTeX exporter: stable keys, stable field order, protected capitals.

Unicode output by default; ``unicode=False`` writes every non-ASCII letter
as a TeX command (``{\\"o}``).  Identifiers go in the conventional fields:
``doi``, ``eprint``/``archiveprefix``/``primaryclass``, ``mrnumber``, ``zbl``,
``isbn``, ``issn``, ``url``.  A report's number is ``number`` of ``@techreport``
(elsewhere our own ``reportnumber``); the accessed date is biblatex ``urldate``
(ISO date; classic BibTeX styles ignore it), a version biblatex ``version``.
Provenance (raw text, confidences) is kept in
``normform-*`` fields so that a BibTeX round trip loses nothing.
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass
from typing import Iterable

from normform import capitals
from normform.export.base import Exporter, KeyMaker
from normform.ids import isbn as _isbn, issn as _issn
from normform.model import Date, Kind, Reference
from normform.names import format_names
from normform.readers.bibtex import MASTERS, VERBATIM
from normform.texconv import protect_literal_braces, to_latex

ENTRY_TYPE = {
    Kind.ARTICLE: "article", Kind.BOOK: "book", Kind.CHAPTER: "incollection",
    Kind.PAPER: "inproceedings", Kind.THESIS: "phdthesis", Kind.REPORT: "techreport",
    Kind.WEBPAGE: "online", Kind.SOFTWARE: "software", Kind.UNPUBLISHED: "unpublished",
    Kind.OTHER: "misc",
}
MONTH_MACROS = ("jan", "feb", "mar", "apr", "may", "jun", "jul", "aug", "sep", "oct", "nov", "dec")


@dataclass(frozen=True, slots=True)
class Field:
    name: str
    value: str          # TeX source, without the outer braces
    macro: bool = False  # written bare (month macros)

    def render(self) -> str:
        return f"{self.name} = {self.value}" if self.macro else f"{self.name} = {{{self.value}}}"


def encode_verbatim(text: str, ascii: bool = False) -> str:
    """JSON-style escaping that survives BibTeX's brace counting and blank folding."""
    out = json.dumps(text, ensure_ascii=ascii)[1:-1]
    out = out.replace("{", "\\u007b").replace("}", "\\u007d")
    out = re.sub(r"[^\S ]", lambda m: f"\\u{ord(m.group()):04x}", out)  # blanks BibTeX would fold
    return re.sub(r" (?= )|^ | $", r"\\u0020", out)


def urldate(date: Date) -> str:
    """biblatex ``urldate``: ISO ``YYYY-MM-DD`` (or shorter); a date ISO cannot say
    (a literal, a season, circa) is written as its text and read back as a literal."""
    parts = [date.year, date.month, date.day]
    while parts and parts[-1] is None:
        parts.pop()
    if parts and None not in parts and not (date.season or date.circa or date.literal):
        return "-".join([f"{parts[0]:04d}"] + [f"{p:02d}" for p in parts[1:]])
    bits = [date.season, ("c. " if date.circa else "") + str(date.year) if date.year else None, date.literal]
    return " ".join(b for b in bits if b) or "n.d."


class BibtexExporter(Exporter):
    name = "bibtex"
    suffix = ".bib"

    def __init__(self, unicode: bool = True, provenance: bool = True) -> None:
        self.ascii = not unicode
        self.provenance = provenance

    # -- pieces --------------------------------------------------------------
    def tex(self, text: str) -> str:
        return to_latex(text, self.ascii)

    def title(self, title: str, hints: tuple[str, ...]) -> str:
        out, pos = [], 0
        for start, end in capitals.intervals(title, hints):
            out.append(self.tex(title[pos:start]))
            inner = self.tex(title[start:end])
            # A group opening with a command is a BibTeX "special character", not a
            # protection: an empty group in front keeps it a protection.
            out.append("{" + ("{}" if inner.startswith("\\") else "") + inner + "}")
            pos = end
        out.append(self.tex(title[pos:]))
        return "".join(out)

    def entry_type(self, ref: Reference) -> str:
        wanted = ref.extra_value("entrytype")
        if wanted:
            return wanted
        if ref.kind is Kind.THESIS and ref.genre == MASTERS:
            return "mastersthesis"
        return ENTRY_TYPE[ref.kind]

    def fields(self, ref: Reference) -> list[Field]:
        """The fields of ``ref`` in the stable order, as TeX."""
        out: list[Field] = []

        def add(name: str, value: str | None, tex: bool = True) -> None:
            if value:
                out.append(Field(name, self.tex(value) if tex else value))

        for role, people in (("author", ref.authors), ("editor", ref.editors), ("translator", ref.translators)):
            if people:
                out.append(Field(role, format_names(people, self.ascii)))
        if ref.title:
            out.append(Field("title", self.title(ref.title, ref.title_protected)))
        article = ref.kind is Kind.ARTICLE
        add("journal" if article else "booktitle", ref.container_title)
        add("series", ref.series)
        add("volume", ref.volume)
        if article:
            add("number", ref.issue)
            add("seriesnumber", ref.series_number)
        elif ref.kind is Kind.REPORT:   # @techreport "number" is the report's own number
            add("number", ref.report_number)
            add("seriesnumber", ref.series_number)
            add("issue", ref.issue)
        else:
            add("number", ref.series_number)
            add("issue", ref.issue)
        if ref.kind is not Kind.REPORT:
            add("reportnumber", ref.report_number)   # our own field: no standard one outside reports
        if ref.pages:
            p = ref.pages
            if p.first or p.last:
                rng = f"{self.tex(p.first or '')}--{self.tex(p.last)}" if p.last else self.tex(p.first or "")
                out.append(Field("pages", rng))
            add("eid", p.article)
            add("pagetotal", p.count)
        add("edition", ref.edition)
        add("version", ref.version)
        if ref.genre and not (ref.kind is Kind.THESIS and ref.genre == MASTERS):
            add("type", ref.genre)
        where = {Kind.THESIS: "school", Kind.REPORT: "institution"}.get(ref.kind, "publisher")
        add(where, ref.publisher)
        add("address", ref.place)
        d = ref.date
        if d:
            if d.year is not None:
                add("year", f"c. {d.year}" if d.circa else str(d.year))
            elif d.literal:
                add("year", d.literal)
            if d.month:
                out.append(Field("month", MONTH_MACROS[d.month - 1], macro=True))
            elif d.season:
                add("month", d.season)
            if d.day:
                add("day", str(d.day))
            if d.literal and d.year is not None:
                add("pubstate", d.literal)
        if ref.accessed:
            add("urldate", urldate(ref.accessed))
        add("language", ref.language)
        add("note", ref.note)
        self._identifiers(ref, out)
        skip = {"entrytype"}
        for name, value in ref.extra:
            if name in skip:
                continue
            out.append(Field(name, protect_literal_braces(value) if name in VERBATIM else self.tex(value)))
        if self.provenance and ref.provenance is not None:
            prov = ref.provenance
            if prov.raw is not None:
                out.append(Field("normform-raw", encode_verbatim(prov.raw, self.ascii)))
            if prov.confidence is not None:
                out.append(Field("normform-confidence", repr(prov.confidence)))
            if prov.fields:
                spec = "; ".join(f"{i.field}={i.confidence!r}" + (f"@{i.span.start}-{i.span.end}" if i.span else "")
                                 for i in prov.fields)
                out.append(Field("normform-fields", encode_verbatim(spec, self.ascii)))
            if prov.origin:
                out.append(Field("normform-origin", self.tex(prov.origin)))
        return out

    def _identifiers(self, ref: Reference, out: list[Field]) -> None:
        def values(scheme: str) -> list:
            return list(ref.idents(scheme))

        if dois := values("doi"):
            out.append(Field("doi", protect_literal_braces(" ".join(i.value for i in dois))))
        if arx := values("arxiv"):
            out.append(Field("eprint", " ".join(i.value for i in arx)))
            out.append(Field("archiveprefix", "arXiv"))
            if arx[0].detail:
                out.append(Field("primaryclass", self.tex(arx[0].detail)))
        if isbns := values("isbn"):
            out.append(Field("isbn", ", ".join(_isbn.format(i.value) if i.valid else self.tex(i.value)
                                               for i in isbns)))
        if issns := values("issn"):
            out.append(Field("issn", ", ".join(_issn.format(i.value) if i.valid else self.tex(i.value)
                                               for i in issns)))
        if mrs := values("mr"):
            out.append(Field("mrnumber", ", ".join(
                self.tex(i.value + (f" ({i.detail})" if i.detail else "")) for i in mrs)))
        if zbls := values("zbl"):
            out.append(Field("zbl", ", ".join(self.tex(i.value) for i in zbls)))
        if hdls := values("handle"):
            out.append(Field("hdl", protect_literal_braces(" ".join(i.value for i in hdls))))
        if urls := values("url"):
            out.append(Field("url", protect_literal_braces(" ".join(i.value for i in urls))))

    # -- whole entries -----------------------------------------------------------
    def entry(self, ref: Reference, key: str | None = None) -> str:
        key = key or ref.key or KeyMaker().make(ref)
        body = ",\n".join("  " + f.render() for f in self.fields(ref))
        return f"@{self.entry_type(ref)}{{{key},\n{body}\n}}\n" if body else f"@{self.entry_type(ref)}{{{key}}}\n"

    record = entry

    def dumps(self, refs: Iterable[Reference], preamble: Iterable[str] = ()) -> str:
        """A whole file; ``preamble`` holds ``@preamble`` texts (TeX) to write first."""
        keys = KeyMaker()
        head = [f'@preamble{{"{text}"}}\n' for text in preamble]
        return "\n".join(head + [self.entry(ref, keys.make(ref)) for ref in refs])


__all__ = ["BibtexExporter", "Field", "ENTRY_TYPE", "encode_verbatim"]
