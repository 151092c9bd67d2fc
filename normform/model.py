"""The structured reference model every parser produces and every exporter reads.

All nodes are frozen, slotted dataclasses: equality and hashing are
structural, so two references parsed from different spellings compare equal
exactly when every modelled field agrees.  Collections are tuples (never
lists or dicts) to keep instances hashable.
"""

from __future__ import annotations

import dataclasses
import re
from dataclasses import dataclass
from enum import Enum
from typing import Iterable

_ISO_DATE = re.compile(r"(\d{4})(?:-(\d{2}))?(?:-(\d{2}))?")


class Kind(str, Enum):
    """What sort of work a reference points to."""

    ARTICLE = "article"              # journal article
    BOOK = "book"                    # monograph, edited volume, proceedings volume
    CHAPTER = "chapter"              # chapter or contribution in an edited book
    PAPER = "paper"                  # paper in conference proceedings
    THESIS = "thesis"                # PhD, master's, habilitation (genre says which)
    REPORT = "report"                # technical report, preprint, lecture notes
    WEBPAGE = "webpage"
    SOFTWARE = "software"            # software or data set
    UNPUBLISHED = "unpublished"      # personal communication, in preparation, to appear
    OTHER = "other"


@dataclass(frozen=True, slots=True)
class Span:
    """Half-open character offsets ``[start, end)`` into the raw text."""

    start: int
    end: int

    def __post_init__(self) -> None:
        if self.start < 0 or self.end < self.start:
            raise ValueError(f"bad span {self.start}..{self.end}")


@dataclass(frozen=True, slots=True)
class Name:
    """A personal name split into its parts, or a literal (corporate) name.

    ``particle`` is the non-dropping particle that sorts with the family name
    ("van der" in "van der Waerden"); ``dropping_particle`` is the one that
    does not ("de" in "Charles de Gaulle" in some conventions).
    """

    family: str | None = None
    given: str | None = None
    particle: str | None = None
    dropping_particle: str | None = None
    suffix: str | None = None
    literal: str | None = None

    @property
    def is_literal(self) -> bool:
        return self.literal is not None

    def family_full(self) -> str:
        """Family name with its non-dropping particle, e.g. ``van der Waerden``."""
        if self.literal is not None:
            return self.literal
        return " ".join(p for p in (self.particle, self.family) if p)

    def display(self) -> str:
        """Given-first display form: ``B. L. van der Waerden Jr.``."""
        if self.literal is not None:
            return self.literal
        parts = [self.given, self.dropping_particle, self.particle, self.family]
        text = " ".join(p for p in parts if p)
        return f"{text}, {self.suffix}" if self.suffix else text


@dataclass(frozen=True, slots=True)
class Date:
    """A publication date as precise as the source allows."""

    year: int | None = None
    month: int | None = None         # 1..12
    day: int | None = None
    season: str | None = None        # "Spring", "Winter", ...
    circa: bool = False
    literal: str | None = None       # "to appear", "in press", "n.d."

    @classmethod
    def from_iso(cls, text: str | None) -> "Date | None":
        """An ISO 8601 calendar date ``YYYY[-MM[-DD]]``; other text is kept as a literal date."""
        if not text or not text.strip():
            return None
        m = _ISO_DATE.fullmatch(text.strip())
        if not m:
            return cls(literal=text)
        return cls(year=int(m.group(1)), month=int(m.group(2)) if m.group(2) else None,
                   day=int(m.group(3)) if m.group(3) else None)


@dataclass(frozen=True, slots=True)
class Pages:
    """Page information: a range, an article number, or a book's page count."""

    first: str | None = None         # strings: pages may be roman or "S12"
    last: str | None = None
    article: str | None = None       # "Art. 12", "Paper No. 13.2.4", "e1234"
    count: str | None = None         # "xii+253"

    def range_text(self) -> str | None:
        if self.first and self.last:
            return f"{self.first}-{self.last}"
        return self.first or self.article


@dataclass(frozen=True, slots=True)
class Identifier:
    """A typed identifier: scheme is one of ``normform.ids.SCHEMES``.

    ``value`` is the compact form; ``valid`` is False when syntax or a check
    digit failed (the value is kept so nothing is silently dropped);
    ``detail`` holds scheme-specific extras such as an MR review code.
    """

    scheme: str
    value: str
    valid: bool = True
    detail: str | None = None


@dataclass(frozen=True, slots=True)
class FieldInfo:
    """Where one field came from in the raw text and how sure we are."""

    field: str
    confidence: float
    span: Span | None = None


@dataclass(frozen=True, slots=True)
class Provenance:
    """The raw input and per-field evidence for a parsed record."""

    raw: str | None = None
    fields: tuple[FieldInfo, ...] = ()
    confidence: float | None = None  # record-level, 0..1
    origin: str | None = None        # "file:line" or an entry id, set by batch jobs

    def info(self, name: str) -> FieldInfo | None:
        for item in self.fields:
            if item.field == name:
                return item
        return None

    def confidence_of(self, name: str) -> float | None:
        item = self.info(name)
        return None if item is None else item.confidence


@dataclass(frozen=True, slots=True)
class Reference:
    """One bibliographic record."""

    kind: Kind = Kind.OTHER
    authors: tuple[Name, ...] = ()
    editors: tuple[Name, ...] = ()
    translators: tuple[Name, ...] = ()
    title: str | None = None
    container_title: str | None = None   # journal, book title of a chapter, proceedings
    series: str | None = None            # collection title
    series_number: str | None = None
    volume: str | None = None
    issue: str | None = None
    pages: Pages | None = None
    date: Date | None = None
    publisher: str | None = None
    place: str | None = None
    edition: str | None = None
    genre: str | None = None             # "PhD thesis", "Technical report"
    language: str | None = None
    identifiers: tuple[Identifier, ...] = ()
    note: str | None = None
    key: str | None = None               # citation key / record id, when the source has one
    # The work's own number, as typed without "No.": a report's or preprint's
    # number ("TR-2007-13", "12"); CSL "number" of a report.
    report_number: str | None = None
    accessed: Date | None = None         # when a web page or online copy was consulted
    version: str | None = None           # software or data-set version, without "version"/"v" ("2.1")
    # Substrings of the title whose capitalization must survive restyling
    # (BibTeX protective braces, acronyms).
    title_protected: tuple[str, ...] = ()
    # Source fields the model has no slot for, kept so round trips lose nothing.
    extra: tuple[tuple[str, str], ...] = ()
    provenance: Provenance | None = None

    # -- convenience -----------------------------------------------------
    def ident(self, scheme: str) -> Identifier | None:
        """First identifier of ``scheme`` (``doi``, ``arxiv``, ``mr`` ...)."""
        for item in self.identifiers:
            if item.scheme == scheme:
                return item
        return None

    def idents(self, scheme: str) -> tuple[Identifier, ...]:
        return tuple(i for i in self.identifiers if i.scheme == scheme)

    @property
    def year(self) -> int | None:
        return self.date.year if self.date else None

    @property
    def confidence(self) -> float | None:
        return self.provenance.confidence if self.provenance else None

    def replace(self, **changes) -> "Reference":
        return dataclasses.replace(self, **changes)

    def extra_value(self, name: str) -> str | None:
        for k, v in self.extra:
            if k == name:
                return v
        return None


def names(items: Iterable[Name]) -> tuple[Name, ...]:
    return tuple(items)


__all__ = [
    "Kind", "Span", "Name", "Date", "Pages", "Identifier", "FieldInfo",
    "Provenance", "Reference", "names",
]
