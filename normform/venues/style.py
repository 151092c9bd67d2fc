"""House style for venue names: abbreviate to ISO 4 or expand to the full title.

Order of authority, highest first:

1. the collection's own table (``--table FILE`` or ``[tool.normform.venues]``);
2. the shipped table ``normform/data/venues.tsv``;
3. the collection itself: full titles that occur in the records being
   rewritten (an abbreviation that fits exactly one of them expands to it);
4. the ISO 4 engine (abbreviation only; expansion is never invented).

An expansion that fits several full titles is reported as ambiguous with its
candidates and the name is left as written.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from typing import Iterable

from normform.venues.iso4 import Iso4Engine
from normform.venues.table import Venue, VenueTable, shipped_table
from normform.venues.text import fold, key, significant

# How a name was (or was not) rewritten; the report groups by these.
HOUSE = "house table"
TABLE = "shipped table"
COLLECTION = "collection"
ENGINE = "iso4 engine"
FORMER = "former title"
SAME = "unchanged"
AMBIGUOUS = "ambiguous"
UNKNOWN = "unknown"

_ABBREVIATED_WORD = re.compile(r"\b\w+\.(?=\s|$|,|\))")
# Not a venue at all: an identifier or address that landed in the venue field.
_NOT_A_VENUE = re.compile(r"arxiv|\bdoi\b|https?://|www\.|\b10\.\d{4,9}/", re.I)
_ANNOTATION = re.compile(r"\s*\[[^\]]*\]\s*$")
# A trailing annotation ("[electronic only]") or series mark ("(2)", "(N.S.)").
_TRAILER = re.compile(r"\s*(\[[^\]]*\]|\((\d+|N\.\s?S\.|[A-Z][a-z]*\.?)\))\s*$")


@dataclass(frozen=True, slots=True)
class Rewrite:
    """What happened to one venue name."""

    original: str
    result: str                        # the name to write (== original unless rewritten)
    how: str                           # one of the constants above
    candidates: tuple[str, ...] = ()   # for AMBIGUOUS: the full titles that fit

    @property
    def changed(self) -> bool:
        return self.result != self.original


def looks_abbreviated(name: str) -> bool:
    """True when at least a third of the title's words end in a full stop.

    ``J. Algebra`` and ``Tohoku Math. J. (2)`` are abbreviated; ``Bulletin des
    Sciences Mathématiques. Deuxième Série`` is a full title with a sentence
    stop, and so is ``Journal of Algebra.`` (a long last word's stop is a
    sentence end).
    """
    text = name.rstrip()
    last = text.rsplit(None, 1)[-1] if text else ""
    if last.endswith(".") and len(last) > 8:
        text = text[:-1]
    dotted = len(_ABBREVIATED_WORD.findall(text))
    return dotted > 0 and 3 * dotted >= max(len(significant(text)), 1)


def _fits(abbr_word: str, full_word: str) -> bool:
    """ISO 4 keeps a word's first letter and drops letters, never adds any."""
    if not abbr_word or abbr_word[0] != full_word[0] or len(abbr_word) > len(full_word):
        return False
    it = iter(full_word)
    return all(c in it for c in abbr_word)


def fits(abbreviation: str, full: str) -> bool:
    """Could ``abbreviation`` be an abbreviation of ``full``? (word by word, in order)."""
    a, f = significant(abbreviation), significant(full)
    return len(a) == len(f) and all(_fits(x, y) for x, y in zip(a, f))


@dataclass
class VenueStyle:
    """Abbreviate or expand venue names by the order of authority above."""

    house: VenueTable | None = None
    table: VenueTable | None = None
    engine: Iso4Engine | None = None
    _collection: dict[str, str] = field(default_factory=dict)   # key(full) -> full as written
    _abbr_cache: dict[str, str] = field(default_factory=dict)    # full -> its abbreviation

    def __post_init__(self) -> None:
        if self.table is None:
            self.table = shipped_table()

    # -- the engine is built lazily: loading the LTWA costs ~0.5 s ----------
    def _engine(self) -> Iso4Engine:
        if self.engine is None:
            known = [(v.full, v.abbreviation) for v in self.table if v.source == "memory"]
            self.engine = Iso4Engine(known)
        return self.engine

    def learn_collection(self, names: Iterable[str]) -> None:
        """Remember the full titles a collection uses, for expansion step 3."""
        for name in names:
            if name and not looks_abbreviated(name) and len(significant(name)) > 1:
                self._collection.setdefault(key(name), name)

    # -- lookups ------------------------------------------------------------
    def _table_venues(self, name: str) -> tuple[list[Venue], str] | None:
        found = self._table_venues_exact(name)
        if found is None:
            bare = _TRAILER.sub("", name)
            if bare != name and bare:
                found = self._table_venues_exact(bare)
        return found

    def _table_venues_exact(self, name: str) -> tuple[list[Venue], str] | None:
        if self.house is not None:
            found = self.house.venues_for(name)
            if found:
                return found, HOUSE
        found = self.table.venues_for(name)
        if not found:
            return None
        if self.house is not None:
            # the shipped table recognised a spelling; the house row for that
            # venue's full title still decides the form
            ours = [h for v in found for h in self.house.venues_for(v.full)]
            if ours:
                return ours, HOUSE
        return found, TABLE

    def _former(self, name: str) -> bool:
        return any(h.role == "former" for h in self.table.lookup(name))

    # -- public API ---------------------------------------------------------
    def abbreviate(self, name: str) -> Rewrite:
        """The ISO 4 (or house) abbreviation of ``name``."""
        if _NOT_A_VENUE.search(name):
            return Rewrite(name, name, SAME)
        hit = self._table_venues(name)
        if hit:
            venues, how = hit
            forms = {v.abbreviation for v in venues}
            if len(forms) == 1:
                return Rewrite(name, forms.pop(), how)
            return Rewrite(name, name, AMBIGUOUS, tuple(sorted(v.full for v in venues)))
        if looks_abbreviated(name):
            # Re-abbreviating an abbreviation garbles it; go through its full title.
            full = self.expand(name)
            if full.how in (AMBIGUOUS, UNKNOWN, SAME) or full.result == name:
                return Rewrite(name, name, full.how, full.candidates)
            again = self.abbreviate(full.result)
            return Rewrite(name, again.result, full.how)
        if self._former(name):
            return Rewrite(name, self._engine().abbreviate(name), FORMER)
        if len(significant(name)) == 0:
            return Rewrite(name, name, UNKNOWN)
        # an "[electronic only]"-style annotation is not part of the title
        plain = _ANNOTATION.sub("", name) or name
        return Rewrite(name, self._engine().abbreviate(plain), ENGINE)

    def expand(self, name: str) -> Rewrite:
        """The full title of ``name`` when exactly one title fits; else unchanged."""
        if _NOT_A_VENUE.search(name):
            return Rewrite(name, name, SAME)
        hit = self._table_venues(name)
        if hit:
            venues, how = hit
            fulls = {v.full for v in venues}
            if len(fulls) == 1:
                return Rewrite(name, fulls.pop(), how)
            return Rewrite(name, name, AMBIGUOUS, tuple(sorted(fulls)))
        if any(h.role == "former" for h in self.table.lookup(name)):
            return Rewrite(name, name, FORMER)
        if not looks_abbreviated(name):
            return Rewrite(name, name, SAME)
        k = fold(name)
        # Titles of the collection whose abbreviation is this one, or that it fits.
        from_collection = {full for full in self._collection.values()
                           if key(self.abbreviate_plain(full)) == key(name) or fits(k, full)}
        if len(from_collection) == 1:
            return Rewrite(name, from_collection.pop(), COLLECTION)
        if len(from_collection) > 1:
            return Rewrite(name, name, AMBIGUOUS, tuple(sorted(from_collection)))
        # Step 2b: a spelling the table does not list but whose words fit one row.
        fulls = {title for t in (self.house, self.table) if t is not None
                 for v in t for title in (v.full, *v.former) if fits(k, title)}
        if len(fulls) == 1:
            return Rewrite(name, fulls.pop(), TABLE)
        if len(fulls) > 1:
            return Rewrite(name, name, AMBIGUOUS, tuple(sorted(fulls)))
        return Rewrite(name, name, UNKNOWN)

    def abbreviate_plain(self, full: str) -> str:
        """Abbreviation of a full title by table or engine, cached per title."""
        cached = self._abbr_cache.get(full)
        if cached is None:
            hit = self._table_venues(full)
            cached = (hit[0][0].abbreviation if hit and len(hit[0]) == 1
                      else self._engine().abbreviate(full))
            self._abbr_cache[full] = cached
        return cached

    def rewrite(self, name: str, to: str) -> Rewrite:
        """``to`` is ``"abbreviated"`` or ``"full"``."""
        if to == "abbreviated":
            return self.abbreviate(name)
        if to == "full":
            return self.expand(name)
        raise ValueError(f"unknown venue form {to!r}; expected 'abbreviated' or 'full'")
