"""Plain text: the catalogue's compact house style, or any CSL style by name.

House style (designed for one-line catalogue references; examples in
docs/io.md):

    A. Quill and B. L. van der Feather, On the Riemann hypothesis, Quillfeather Soc. Bull. 12:3 (2001), 1-20. doi:10.1000/182; MR1234567

* authors as initials and family name, joined with commas and a final "and";
  editors of an edited book are followed by "(ed.)" / "(eds.)";
* article: ``Journal Volume:Issue (Year), first-last`` (or ``Art. N``);
* book: ``Series Number, Publisher, Place, Year`` with ``ed. N``;
* chapter / paper: ``in: Container, Publisher, Year, pp. first-last``;
* thesis / report: genre with the report's number (``Report No. 12``), institution, year;
* a version after the title (``version 2.1``); an accessed date last, after the URL
  (``accessed 3 May 2020``);
* identifiers last, in a fixed order: doi, arXiv (with class), MR, Zbl, ISBN, handle, URL
  (a URL only when there is no DOI or arXiv id).
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import Iterable

from normform.export.base import Exporter
from normform.ids import arxiv, isbn, mr, zbl
from normform.model import Date, Kind, Name, Reference


def initials(given: str, caps_are_initials: bool = False) -> str:
    """``Ada Lovelace`` -> ``A. L.``; ``Jean-Pierre`` -> ``J.-P.``; initials are kept,
    run-together ones spaced (``A.B.`` -> ``A. B.``).  With ``caps_are_initials`` a word
    of two or three capitals is a run of initials (``AB`` -> ``A. B.``, the
    ``Family AB`` shape of author-initials styles) rather than a name typed in capitals."""
    out = []
    for word in given.split():
        if caps_are_initials and 2 <= len(word) <= 3 and word.isalpha() and word.isupper():
            out.append(" ".join(ch + "." for ch in word))
            continue
        if "-" not in word and "." in word.rstrip("."):
            # "A.B." / "A.B": one initial per dotted piece
            out.append(" ".join(p[0] + "." for p in word.split(".") if p and p[0].isalpha()))
            continue
        parts = word.split("-")
        out.append("-".join(p[0] + "." if p and p[0].isalpha() else p for p in parts))
    return " ".join(out)


@lru_cache(maxsize=1 << 16)   # memo per distinct name: authors recur across a collection
def short_name(name: Name) -> str:
    if name.literal is not None:
        return name.literal
    # "Quill AB": capitals after a family name not itself in capitals are initials ("QUILL, ADA" is a name)
    caps = bool(name.family) and not name.family.isupper()
    head = " ".join(p for p in (initials(name.given, caps) if name.given else None, name.dropping_particle,
                                name.particle, name.family) if p)
    return f"{head}, {name.suffix}" if name.suffix else head


_OTHERS = Name(literal="others")


def name_list(names: tuple[Name, ...]) -> str:
    shown = [short_name(n) for n in names]
    if len(shown) > 1 and names[-1] == _OTHERS:  # BibTeX "and others"
        return ", ".join(shown[:-1]) + " et al."
    if len(shown) <= 1:
        return "".join(shown)
    return ", ".join(shown[:-1]) + " and " + shown[-1]


_DIGITS = re.compile(r"\d+")
_SAYS_EDITION = re.compile(r"\bed\b|edn\b|edition|aufl|éd", re.IGNORECASE)
_SAYS_VERSION = re.compile(r"(?i)v(?:er(?:sion)?)?\b|v\d")


def _edition(edition: str) -> str:
    """``2`` -> ``ed. 2``; a bare ordinal (``2nd``, ``second``) gets ``ed.`` after it so
    it does not read as a stray word; text that already says edition is kept."""
    if _DIGITS.fullmatch(edition):
        return f"ed. {edition}"
    if _SAYS_EDITION.search(edition):
        return edition
    return f"{edition} ed."


MONTH_NAMES = ("January", "February", "March", "April", "May", "June", "July", "August", "September",
               "October", "November", "December")


def date_text(date: Date) -> str:
    """``3 May 2020``, ``May 2020``, ``2020``, ``Spring 2020``, ``c. 2020`` or the literal."""
    bits = [str(date.day) if date.day and date.month else None,
            MONTH_NAMES[date.month - 1] if date.month and 1 <= date.month <= 12 else None,
            date.season, (f"c. {date.year}" if date.circa else str(date.year)) if date.year else None]
    text = " ".join(b for b in bits if b)
    return " ".join(b for b in (text, date.literal) if b) or "n.d."


def number_text(number: str) -> str:
    """``12`` -> ``No. 12``; a number with its own letters (``TR-2007-13``) is shown as is."""
    return f"No. {number}" if number[:1].isdigit() else number


def version_text(version: str) -> str:
    """``2.1`` -> ``version 2.1``; text that already says version is kept."""
    return version if _SAYS_VERSION.match(version) else f"version {version}"


def _range(first: str | None, last: str | None) -> str | None:
    if first and last:
        return f"{first}-{last}"
    return first or last


class HouseStyle(Exporter):
    name = "text"
    suffix = ".txt"

    def parts(self, ref: Reference) -> list[str]:
        out: list[str] = []
        if ref.authors:
            out.append(name_list(ref.authors))
        elif ref.editors and ref.kind in (Kind.BOOK, Kind.OTHER):
            out.append(name_list(ref.editors) + (" (eds.)" if len(ref.editors) > 1 else " (ed.)"))
        if ref.title:
            out.append(ref.title)
        if ref.version:
            out.append(version_text(ref.version))
        d = ref.date
        year = None
        if d:
            year = (f"c. {d.year}" if d.circa else str(d.year)) if d.year else d.literal
        p = ref.pages
        pages = _range(p.first, p.last) if p else None
        if ref.kind is Kind.ARTICLE:
            if ref.report_number:
                out.append(number_text(ref.report_number))
            venue = ref.container_title or ""
            if ref.volume:
                venue += f" {ref.volume}" + (f":{ref.issue}" if ref.issue else "")
            elif ref.issue:
                venue += f" no. {ref.issue}"
            if year:  # "(1999)" after a venue; a bare year when the venue is unknown
                venue = f"{venue} ({year})" if venue.strip() else year
            if venue.strip():
                out.append(venue.strip())
            if pages:
                out.append(pages)
            elif p and p.article:
                out.append(f"Art. {p.article}")
        else:
            if ref.kind in (Kind.CHAPTER, Kind.PAPER) and ref.container_title:
                container = f"in: {ref.container_title}"
                if ref.authors and ref.editors:
                    container += f" ({name_list(ref.editors)}, {'eds.' if len(ref.editors) > 1 else 'ed.'})"
                out.append(container)
            if ref.edition:
                out.append(_edition(ref.edition))
            if ref.series:
                out.append(ref.series + (f" {ref.series_number}" if ref.series_number else "")
                           + (f", vol. {ref.volume}" if ref.volume else ""))
            elif ref.volume:
                out.append(f"vol. {ref.volume}")
            label = ref.genre or ("thesis" if ref.kind is Kind.THESIS else None)
            if ref.report_number:
                label = " ".join(p for p in (label or ("Report" if ref.kind is Kind.REPORT else None),
                                             number_text(ref.report_number)) if p)
            if label:
                out.append(label)
            for piece in (ref.publisher, ref.place, year):
                if piece:
                    out.append(piece)
            if pages:
                out.append(f"pp. {pages}" if ref.kind in (Kind.CHAPTER, Kind.PAPER) else pages)
            if p and p.count:
                out.append(f"{p.count} pp.")
        return out

    def identifiers(self, ref: Reference) -> list[str]:
        out: list[str] = []
        if not ref.identifiers:
            return out
        by_scheme: dict[str, list] = {}   # one pass instead of one ref.idents() per scheme
        for ident in ref.identifiers:
            by_scheme.setdefault(ident.scheme, []).append(ident)
        get = by_scheme.get
        for i in get("doi", ()):
            out.append("doi:" + i.value)
        for i in get("arxiv", ()):
            out.append(arxiv.format(i.value) + (f" [{i.detail}]" if i.detail else ""))
        for i in get("mr", ()):
            out.append(mr.format(i.value))
        for i in get("zbl", ()):
            out.append(zbl.format(i.value))
        if "doi" not in by_scheme:
            for i in get("isbn", ()):
                out.append("ISBN " + (isbn.format(i.value) if i.valid else i.value))
        for i in get("handle", ()):
            out.append("hdl:" + i.value)
        if not ("doi" in by_scheme or "arxiv" in by_scheme):
            out += [i.value for i in get("url", ())]
        return out

    def format(self, ref: Reference) -> str:
        body = ", ".join(self.parts(ref))
        text = body.rstrip(".") + "." if body else ""
        idents = self.identifiers(ref)
        # a status such as "in preparation" may sit in both the date and the note: say it once
        if ref.note and not (ref.date and ref.date.year is None and ref.date.literal
                             and ref.date.literal.strip(". ").lower() == ref.note.strip(". ").lower()):
            text += f" {ref.note.rstrip('.')}."
        if idents:
            text += " " + "; ".join(idents)
        if ref.accessed:   # after the identifiers (the URL is the last of them)
            when = date_text(ref.accessed)
            text = f"{text}, accessed {when}." if idents else f"{text} Accessed {when}."
        return text.strip()

    record = format

    def dumps(self, refs: Iterable[Reference]) -> str:
        return "".join(self.format(ref) + "\n" for ref in refs)


__all__ = ["HouseStyle", "initials", "short_name", "name_list"]
