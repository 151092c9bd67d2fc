"""BibTeX exporter: stable keys, stable field order, protected capitals.

Unicode output by default; ``unicode=False`` writes every non-ASCII letter
as a TeX command (``{\\"o}``).  Identifiers go in the conventional fields:
``doi``, ``eprint``/``archiveprefix``/``primaryclass``, ``mrnumber``, ``zbl``,
``isbn``, ``issn``, ``url``.  A report's number is ``number`` of ``@techreport``
(elsewhere our own ``reportnumber``); the accessed date is biblatex ``urldate``
(ISO date; classic BibTeX styles ignore it), a version biblatex ``version``.
Provenance (raw text, confidences) is kept in
``normform-*`` fields so that a BibTeX round trip loses nothing.
Inline math (``$q$``, :func:`normform.texconv.math_spans`) is written as is, in a group
that protects its case (``{$q$}``); a dollar outside math is escaped (``\\$``).
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass
from functools import lru_cache
from typing import Iterable

from normform import capitals
from normform.export.base import Exporter, KeyMaker
from normform.ids import isbn as _isbn, issn as _issn
from normform.model import Date, Kind, Reference
from normform.names import format_names
from normform.readers.bibtex import MASTERS, VERBATIM
from normform.texconv import protect_literal_braces, to_latex, written_math

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


_JSON_STR = json.encoder.encode_basestring             # json.dumps(str) ...
_JSON_STR_ASCII = json.encoder.encode_basestring_ascii  # ... and with ensure_ascii
_FOLDED_BLANK = re.compile(r"[^\S ]")
_EDGE_OR_DOUBLE_SPACE = re.compile(r" (?= )|^ | $")


def encode_verbatim(text: str, ascii: bool = False) -> str:
    """JSON-style escaping that survives BibTeX's brace counting and blank folding."""
    out = (_JSON_STR_ASCII if ascii else _JSON_STR)(text)[1:-1]
    if "{" in out or "}" in out:
        out = out.replace("{", "\\u007b").replace("}", "\\u007d")
    if not out.isascii():   # JSON escaped every ASCII blank but the space already
        out = _FOLDED_BLANK.sub(lambda m: f"\\u{ord(m.group()):04x}", out)  # blanks BibTeX would fold
    if "  " in out or out.startswith(" ") or out.endswith(" "):
        out = _EDGE_OR_DOUBLE_SPACE.sub(r"\\u0020", out)
    return out


# Memoised per distinct string: venues, publishers, places, names and titles
# repeat across a collection.  (Bounded; a batch worker empties them when
# its memory budget is reached.)
@lru_cache(maxsize=1 << 16)
def _tex(text: str, ascii: bool) -> str:
    return to_latex(text, ascii, keep_math=True)


@lru_cache(maxsize=1 << 16)
def _escaped(text: str, ascii: bool) -> str:
    return to_latex(text, ascii)


def _with_math(title: str, start: int, end: int, math: list[tuple[int, int]], ascii: bool, group: bool) -> str:
    """TeX for ``title[start:end]``: its math spans (found in the whole title) as is, in a
    group of their own when ``group``, the text between them escaped."""
    out, pos = [], start
    for a, b in math:
        if start <= a and b <= end:
            out += [_escaped(title[pos:a], ascii), "{" + title[a:b] + "}" if group else title[a:b]]
            pos = b
    out.append(_escaped(title[pos:end], ascii))
    return "".join(out)


@lru_cache(maxsize=1 << 15)
def _title_tex(title: str, hints: tuple[str, ...], ascii: bool) -> str:
    math = written_math(title, ascii)   # capitals.intervals never splits one
    out, pos = [], 0
    for start, end in capitals.intervals(title, hints):
        out.append(_with_math(title, pos, start, math, ascii, True))
        inner = _with_math(title, start, end, math, ascii, False)
        # A group opening with a command is a BibTeX "special character", not a
        # protection: an empty group in front keeps it a protection.
        out.append("{" + ("{}" if inner.startswith("\\") else "") + inner + "}")
        pos = end
    out.append(_with_math(title, pos, len(title), math, ascii, True))
    return "".join(out)


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
        return _tex(text, self.ascii)

    def title(self, title: str, hints: tuple[str, ...]) -> str:
        return _title_tex(title, tuple(hints), self.ascii)

    def entry_type(self, ref: Reference) -> str:
        wanted = ref.extra_value("entrytype")
        if wanted:
            return wanted
        if ref.kind is Kind.THESIS and ref.genre == MASTERS:
            return "mastersthesis"
        return ENTRY_TYPE[ref.kind]

    def fields(self, ref: Reference) -> list[Field]:
        """The fields of ``ref`` in the stable order, as TeX."""
        return [Field(*spec) for spec in self._specs(ref)]

    def _specs(self, ref: Reference) -> list[tuple]:
        """(name, TeX value[, macro]) of each field: :meth:`fields` without the objects."""
        out: list[tuple] = []
        ascii = self.ascii
        tex = self.tex

        def add(name: str, value: str | None) -> None:
            if value:
                out.append((name, tex(value)))

        for role, people in (("author", ref.authors), ("editor", ref.editors), ("translator", ref.translators)):
            if people:
                out.append((role, format_names(people, ascii)))
        if ref.title:
            out.append(("title", _title_tex(ref.title, tuple(ref.title_protected), ascii)))
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
                rng = f"{tex(p.first or '')}--{tex(p.last)}" if p.last else tex(p.first or "")
                out.append(("pages", rng))
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
                out.append(("month", MONTH_MACROS[d.month - 1], True))
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
            out.append((name, protect_literal_braces(value) if name in VERBATIM else tex(value)))
        if self.provenance and ref.provenance is not None:
            prov = ref.provenance
            if prov.raw is not None:
                out.append(("normform-raw", encode_verbatim(prov.raw, self.ascii)))
            if prov.confidence is not None:
                out.append(("normform-confidence", repr(prov.confidence)))
            if prov.fields:
                spec = "; ".join(f"{i.field}={i.confidence!r}" + (f"@{i.span.start}-{i.span.end}" if i.span else "")
                                 for i in prov.fields)
                out.append(("normform-fields", encode_verbatim(spec, self.ascii)))
            if prov.origin:
                out.append(("normform-origin", tex(prov.origin)))
        return out

    def _identifiers(self, ref: Reference, out: list[tuple]) -> None:
        by_scheme: dict[str, list] = {}
        for ident in ref.identifiers:
            by_scheme.setdefault(ident.scheme, []).append(ident)
        values = by_scheme.get
        tex = self.tex

        if dois := values("doi"):
            out.append(("doi", protect_literal_braces(" ".join(i.value for i in dois))))
        if arx := values("arxiv"):
            out.append(("eprint", " ".join(i.value for i in arx)))
            out.append(("archiveprefix", "arXiv"))
            if arx[0].detail:
                out.append(("primaryclass", tex(arx[0].detail)))
        if isbns := values("isbn"):
            out.append(("isbn", ", ".join(_isbn.format(i.value) if i.valid else tex(i.value)
                                               for i in isbns)))
        if issns := values("issn"):
            out.append(("issn", ", ".join(_issn.format(i.value) if i.valid else tex(i.value)
                                               for i in issns)))
        if mrs := values("mr"):
            out.append(("mrnumber", ", ".join(
                tex(i.value + (f" ({i.detail})" if i.detail else "")) for i in mrs)))
        if zbls := values("zbl"):
            out.append(("zbl", ", ".join(tex(i.value) for i in zbls)))
        if hdls := values("handle"):
            out.append(("hdl", protect_literal_braces(" ".join(i.value for i in hdls))))
        if urls := values("url"):
            out.append(("url", protect_literal_braces(" ".join(i.value for i in urls))))

    # -- whole entries -----------------------------------------------------------
    def entry(self, ref: Reference, key: str | None = None) -> str:
        key = key or ref.key or KeyMaker().make(ref)
        # Field.render, inlined
        body = ",\n".join([f"  {spec[0]} = {spec[1]}" if len(spec) > 2 else f"  {spec[0]} = {{{spec[1]}}}"
                            for spec in self._specs(ref)])
        return f"@{self.entry_type(ref)}{{{key},\n{body}\n}}\n" if body else f"@{self.entry_type(ref)}{{{key}}}\n"

    record = entry

    def dumps(self, refs: Iterable[Reference], preamble: Iterable[str] = ()) -> str:
        """A whole file; ``preamble`` holds ``@preamble`` texts (TeX) to write first."""
        keys = KeyMaker()
        head = [f'@preamble{{"{text}"}}\n' for text in preamble]
        return "\n".join(head + [self.entry(ref, keys.make(ref)) for ref in refs])


__all__ = ["BibtexExporter", "Field", "ENTRY_TYPE", "encode_verbatim"]
