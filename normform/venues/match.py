"""Match references against the collection's curated bibliography (its authority file).

:class:`AuthorityMatcher` indexes a library once; :meth:`AuthorityMatcher.match`
then finds the best record for one reference in three steps:

1. *blocking* - candidates share a rare normalized title word, or the first
   author's family name (with the year as a tie-breaker); no all-pairs work;
2. *scoring* - rapidfuzz similarity per field (title, authors, venue, volume,
   pages, year), averaged with fixed weights over the fields both sides have;
3. *deciding* - at or above ``threshold`` the curated record wins and the
   reference is enriched from it (DOI and other identifiers, full venue,
   pages, key); below it the reference is returned unchanged.  Year, volume and
   page disagreements of a match are reported field by field.

Small API (used by ``normform match`` and ``normform clean --against``)::

    matcher = AuthorityMatcher(records)              # or load_library(path)
    result = matcher.match(reference)                # -> MatchResult
    result.matched, result.score, result.record, result.reference, result.conflicts
"""

from __future__ import annotations

import heapq
import re
from collections import defaultdict
from dataclasses import dataclass, field
from functools import lru_cache
from pathlib import Path
from typing import Iterable, Sequence

from rapidfuzz import fuzz
from rapidfuzz.distance import OSA

from normform.model import Name, Provenance, Reference
from normform.venues.text import STOPWORDS, key

from normform.venues.settings import DEFAULT_THRESHOLD  # noqa: E402  (re-exported)

# Field weights: the title carries most of the identity of a work, authors
# next; venue/volume/pages/year mostly separate near-duplicates.
WEIGHTS = {"title": 0.50, "authors": 0.25, "year": 0.10, "venue": 0.07, "volume": 0.05, "pages": 0.03}

_MAX_BLOCK_WORDS = 6        # rarest title words (and prefixes) used for blocking
_MAX_CANDIDATES = 12        # scored per query after the cheap pre-ranking


@dataclass(frozen=True, slots=True)
class Conflict:
    """A field on which a matched reference and its library record disagree."""

    field: str          # "year", "volume", "pages"
    line: str           # the value in the reference being matched
    library: str        # the value in the curated record


@dataclass(frozen=True, slots=True)
class MatchResult:
    query: Reference
    record: Reference | None            # best candidate, even when below the threshold
    score: float                        # 0..1
    matched: bool                       # score >= threshold
    reference: Reference                # enriched when matched, else ``query`` itself
    conflicts: tuple[Conflict, ...] = ()
    field_scores: tuple[tuple[str, float], ...] = ()
    enriched: tuple[str, ...] = ()      # fields the library supplied or replaced
    candidates: int = 0                 # how many records passed blocking

    @property
    def notes(self) -> tuple[str, ...]:
        """Human-readable remarks for review reports."""
        out = []
        if self.record is None:
            out.append("no library record shares a title word or first author")
        elif not self.matched:
            out.append(f"best library record {self.record.key or '?'} scored {self.score:.2f}, below the threshold; nothing changed")
        else:
            out.append(f"matched library record {self.record.key or '?'} (score {self.score:.2f})")
            out += [f"{c.field} differs: line has {c.line!r}, library has {c.library!r}" for c in self.conflicts]
        return tuple(out)


# -- features ------------------------------------------------------------

def _family_key(name: Name) -> str:
    return key(name.family_full() if name.literal is None else name.literal)


def _pages_text(ref: Reference) -> tuple[str | None, str | None]:
    p = ref.pages
    if p is None:
        return None, None
    return (p.first or p.article), p.last


@lru_cache(maxsize=65536)
def _venue_key(name: str) -> str:
    """Key of the venue's full title when the shipped table knows it; else its own key."""
    from normform.venues.table import shipped_table

    found = shipped_table().venues_for(name)
    return key(found[0].full) if len(found) == 1 else key(name)


@dataclass(slots=True)
class _Features:
    title: str                      # key of the title ("" when none)
    title_words: tuple[str, ...]    # blocking words
    families: tuple[str, ...]
    year: int | None
    venue: str
    volume: str | None
    first_page: str | None
    raw: str                        # key of the raw line, for title-less queries
    raw_words: frozenset[str] = frozenset()     # words of the raw line
    surname: str = ""                           # last word of the first family name (blocking)
    numbers: frozenset[str] = frozenset()       # part numbers of the title
    raw_numbers: frozenset[str] = frozenset()   # numbers anywhere on the raw line


def _blocking_words(text_key: str) -> tuple[str, ...]:
    """Title words, plus a 5-letter prefix of long words (survives a late typo)."""
    seen: dict[str, None] = {}
    for w in text_key.split():
        if len(w) >= 3 and w not in STOPWORDS and not w.isdigit():
            seen.setdefault(w, None)
            if len(w) >= 7:
                seen.setdefault("~" + w[:5], None)
    return tuple(seen)


def features(ref: Reference) -> _Features:
    title = key(ref.title) if ref.title else ""
    raw = key(ref.provenance.raw) if ref.provenance and ref.provenance.raw else ""
    first, _ = _pages_text(ref)
    families = tuple(f for f in (_family_key(n) for n in (ref.authors or ref.editors)) if f)
    return _Features(
        title=title,
        # the raw line's words block too: a parser may have cut or misplaced the title
        title_words=_blocking_words(f"{title} {raw}" if raw else title),
        families=families,
        year=ref.year,
        venue=_venue_key(ref.container_title) if ref.container_title else "",
        volume=key(ref.volume) if ref.volume else None,
        first_page=key(first) if first else None,
        raw=raw,
        numbers=_numbers(title),
        raw_numbers=_numbers(raw),
        raw_words=frozenset(raw.split()),
        surname=families[0].rsplit(" ", 1)[-1] if families else "",
    )


# -- scores --------------------------------------------------------------

_NUMERAL = re.compile(r"^(\d+|[ivx]{1,4})$")


def _numbers(title_key: str) -> frozenset[str]:
    """Volume-like tokens of a title: "Chapters 4-6", "Geometry II"."""
    return frozenset(w for w in title_key.split() if _NUMERAL.match(w))


def _title_score(q: _Features, r: _Features) -> float | None:
    if not r.title:
        return None
    best: float | None = None
    if q.title:
        a, b = q.title, r.title
        s = max(fuzz.ratio(a, b), fuzz.token_sort_ratio(a, b))
        short, long_ = (a, b) if len(a) <= len(b) else (b, a)
        # a subtitle dropped on one side: the shorter title is a clean prefix
        if short.count(" ") >= 2 and long_.startswith(short[: max(len(short) - 2, 1)]):
            s = max(s, 92.0)
        best = s / 100.0
    if (q.raw and (best is None or best < 0.97) and len(r.title) >= (6 if not q.title else 12)
            and len(q.raw) > len(r.title)):
        # A parser may cut a title short or run it into the venue; the library
        # title should still occur, nearly verbatim, somewhere in the raw line.
        s = fuzz.partial_ratio(r.title, q.raw, score_cutoff=50) / 100.0 * 0.97
        if q.title and len(q.title) > 1.3 * len(r.title):
            s *= 0.9    # the line's own title is longer: the library title may be a part of it
        nr = r.numbers
        if nr and not nr <= q.raw_numbers:
            s *= 0.7    # the library title's part numbers are not on the line
        best = s if best is None else max(best, s)
    if best is not None and q.title:
        nq, nr = q.numbers, r.numbers
        if nq and nr and nq != nr:
            best *= 0.7     # another volume or part of the same work
    return best


def _family_similarity(a: str, b: str) -> float:
    """1.0 for the same family name; OSA similarity (a swap is one edit) otherwise."""
    if a == b:
        return 1.0
    if min(len(a), len(b)) < 4:
        return 0.0
    if a.endswith(" " + b) or b.endswith(" " + a):
        return 1.0          # "Ojeda Martinez" against "Martinez"
    return OSA.normalized_similarity(a, b)


def _authors_score(q: _Features, r: _Features) -> float | None:
    if not r.families:
        return None
    if not q.families:
        on_line = _authors_on_line(q, r)
        return on_line if on_line > 0 else None
    credit = 0.0
    for f in q.families:
        if f in r.families:
            credit += 1.0
            continue
        s = max(_family_similarity(f, g) for g in r.families)
        credit += 1.0 if s >= 0.75 else 0.5 * s
    # A parser may take title words for names, a renderer may cut the list to
    # "et al.": count against the shorter list.
    score = min(1.0, credit / min(len(q.families), len(r.families)))
    if q.families[0] != r.families[0] and _family_similarity(q.families[0], r.families[0]) < 0.75:
        score *= 0.8   # first authors differ: another order, or a different work
    return max(score, _authors_on_line(q, r))


def _authors_on_line(q: _Features, r: _Features) -> float:
    """Share of the record's first three family names found among the raw line's words."""
    if not q.raw_words or not r.families:
        return 0.0
    names = r.families[:3]
    found = sum(1 for f in names if all(w in q.raw_words for w in f.split()))
    return 0.95 * found / len(names)


def _venue_score(q: _Features, r: _Features) -> float | None:
    if not q.venue or not r.venue:
        return None
    return _venue_pair(q.venue, r.venue)


@lru_cache(maxsize=65536)
def _venue_pair(a: str, b: str) -> float:
    # few distinct venue spellings in a collection: cache the pair
    if a == b:
        return 1.0
    from normform.venues.style import fits

    if fits(a, b) or fits(b, a):
        return 0.95
    return fuzz.ratio(a, b) / 100.0


def score_pair(q: _Features, r: _Features, beat: float = 0.0) -> tuple[float, tuple[tuple[str, float], ...]]:
    """Weighted average over the fields both sides carry, and the per-field scores.

    A pair whose title alone shows it cannot score above ``beat`` is cut short
    (score 0): the matcher passes its best score so far.
    """
    parts: list[tuple[str, float]] = []
    t = _title_score(q, r)
    if t is not None:
        parts.append(("title", t))
        if WEIGHTS["title"] * t + (1.0 - WEIGHTS["title"]) < beat:
            return 0.0, tuple(parts)
    a = _authors_score(q, r)
    if a is not None:
        parts.append(("authors", a))
    if q.year is not None and r.year is not None:
        d = abs(q.year - r.year)
        parts.append(("year", 1.0 if d == 0 else 0.5 if d == 1 else 0.0))
    v = _venue_score(q, r)
    if v is not None:
        parts.append(("venue", v))
    if q.volume and r.volume:
        parts.append(("volume", 1.0 if q.volume == r.volume else 0.0))
    if q.first_page and r.first_page:
        parts.append(("pages", 1.0 if q.first_page == r.first_page else 0.0))
    if t is None and a is None:
        return 0.0, tuple(parts)      # venue and numbers alone never identify a work
    total = sum(WEIGHTS[n] for n, _ in parts)
    value = sum(WEIGHTS[n] * s for n, s in parts) / total
    if t is None or a is None:
        value *= 0.9                  # one of the two identifying fields is missing
    return value, tuple(parts)


# -- enrichment ------------------------------------------------------------

def _conflicts(query: Reference, record: Reference) -> tuple[Conflict, ...]:
    out = []
    if query.year is not None and record.year is not None and query.year != record.year:
        out.append(Conflict("year", str(query.year), str(record.year)))
    if query.volume and record.volume and key(query.volume) != key(record.volume):
        out.append(Conflict("volume", query.volume, record.volume))
    qp, rp = query.pages, record.pages
    if qp and rp:
        qa, ra = qp.range_text(), rp.range_text()
        if qa and ra and key(qa) != key(ra):
            out.append(Conflict("pages", qa, ra))
    return tuple(out)


_COPY = ("kind", "authors", "editors", "translators", "title", "container_title", "series",
         "series_number", "volume", "issue", "pages", "date", "publisher", "place", "edition",
         "genre", "language", "note", "key", "title_protected")


def enrich(query: Reference, record: Reference, score: float = 1.0) -> tuple[Reference, tuple[str, ...]]:
    """The curated record wins field by field; the line fills what the record lacks.

    Identifiers are the union (the record's first); the raw line and origin
    stay the line's, so a batch report can still point at it, and the
    record-level confidence becomes the match ``score``.
    """
    changes: dict = {}
    supplied: list[str] = []
    for name in _COPY:
        mine, theirs = getattr(query, name), getattr(record, name)
        if theirs in (None, (), "") or theirs == mine:
            continue
        if name == "kind" and mine != type(mine).OTHER and theirs == type(theirs).OTHER:
            continue
        changes[name] = theirs
        supplied.append(name)
    ids = list(record.identifiers)
    have = {(i.scheme, i.value.lower()) for i in ids}
    for ident in query.identifiers:
        if (ident.scheme, ident.value.lower()) not in have:
            ids.append(ident)
    if tuple(ids) != query.identifiers:
        changes["identifiers"] = tuple(ids)
        supplied.append("identifiers")
    extra = dict(query.extra)
    for k, v in record.extra:
        extra.setdefault(k, v)
    if tuple(extra.items()) != query.extra:
        changes["extra"] = tuple(extra.items())
    if changes and query.provenance is not None and record.provenance is None:
        # the fields now come from the curated record: the parser's per-field
        # confidences no longer describe them; keep the raw line and its origin
        p = query.provenance
        changes["provenance"] = Provenance(raw=p.raw, fields=(), confidence=score, origin=p.origin)
    return (query.replace(**changes) if changes else query), tuple(supplied)


# -- the matcher -------------------------------------------------------------

@dataclass
class AuthorityMatcher:
    """An index over a curated library; :meth:`match` one reference at a time."""

    records: Sequence[Reference]
    threshold: float = DEFAULT_THRESHOLD
    _feat: list[_Features] = field(init=False, repr=False)
    _by_word: dict[str, list[int]] = field(init=False, repr=False)
    _by_family: dict[str, list[int]] = field(init=False, repr=False)

    def __post_init__(self) -> None:
        self.records = list(self.records)
        self._feat = [features(r) for r in self.records]
        self._by_word = defaultdict(list)
        self._by_family = defaultdict(list)
        self._by_family_year = defaultdict(list)
        for i, f in enumerate(self._feat):
            for w in f.title_words:
                self._by_word[w].append(i)
            if f.surname:
                self._by_family[f.surname].append(i)
                if f.year is not None:
                    self._by_family_year[(f.surname, f.year)].append(i)
        # A word or surname in more than this many records ("theory", "Smith")
        # does not block on its own: its postings would cost more than they tell.
        self._common = max(50, len(self.records) // 500)
        self._sets: dict[tuple[str, str], frozenset[int]] = {}

    @classmethod
    def from_file(cls, path: str | Path, threshold: float = DEFAULT_THRESHOLD) -> "AuthorityMatcher":
        from normform.venues.library import read_library

        return cls(read_library(path), threshold=threshold)

    def __len__(self) -> int:
        return len(self.records)

    def _posting_set(self, what: tuple[str, str]) -> frozenset[int]:
        cached = self._sets.get(what)
        if cached is None:
            kind, name = what
            cached = frozenset((self._by_word if kind == "w" else self._by_family).get(name, ()))
            self._sets[what] = cached
        return cached

    def candidates(self, q: _Features) -> list[int]:
        """Record indexes that pass blocking, best pre-ranked first."""
        votes: dict[int, float] = defaultdict(float)
        usable = sorted((len(self._by_word.get(w, ())), w) for w in q.title_words)
        used = 0
        common: list[str] = []
        for df, w in usable:
            if df == 0:
                continue
            if df > self._common:
                common.append(w)
                continue
            for i in self._by_word[w]:
                votes[i] += 1.0
            used += 1
            if used == _MAX_BLOCK_WORDS:
                break
        if used < 2 and common:
            # Few rare words: two common words (or a common word and the
            # surname) together are rare enough.
            sets = [self._posting_set(("w", w)) for w in common[:3]]
            if q.surname:
                sets.append(self._posting_set(("f", q.surname)))
            for x in range(len(sets)):
                for y in range(x + 1, len(sets)):
                    both = sets[x] & sets[y]
                    if len(both) <= 4 * self._common:
                        for i in both:
                            votes[i] += 2.0
        if q.surname:
            surname = q.surname
            posting = self._by_family.get(surname, ())
            if len(posting) <= self._common:
                for i in posting:
                    votes[i] += 1.5 + (1.0 if q.year is not None and self._feat[i].year == q.year else 0.0)
            elif q.year is not None:
                for i in self._by_family_year.get((surname, q.year), ()):
                    votes[i] += 2.5
        if not votes:
            return []
        if q.surname and len(votes) > _MAX_CANDIDATES:
            # break ties among title-word candidates by surname and year
            surname = q.surname
            feat = self._feat
            for i in votes:
                f = feat[i]
                if f.surname == surname:
                    votes[i] += 1.5
                if q.year is not None and f.year == q.year:
                    votes[i] += 0.5
        return [i for i, _ in heapq.nlargest(_MAX_CANDIDATES, votes.items(), key=lambda kv: kv[1])]

    def match(self, ref: Reference) -> MatchResult:
        q = features(ref)
        cands = self.candidates(q)
        best, best_score, best_parts = None, 0.0, ()
        for i in cands:
            s, parts = score_pair(q, self._feat[i], best_score)
            if s > best_score:
                best, best_score, best_parts = i, s, parts
        if best is None:
            return MatchResult(ref, None, 0.0, False, ref, candidates=len(cands))
        record = self.records[best]
        matched = best_score >= self.threshold
        if not matched:
            return MatchResult(ref, record, best_score, False, ref, field_scores=best_parts,
                               candidates=len(cands))
        enriched, supplied = enrich(ref, record, best_score)
        return MatchResult(ref, record, best_score, True, enriched, _conflicts(ref, record),
                           best_parts, supplied, len(cands))

    def match_all(self, refs: Iterable[Reference]) -> Iterable[MatchResult]:
        for ref in refs:
            yield self.match(ref)


# -- module-level conveniences (the batch step calls these) -----------------

def load_library(path: str | Path, threshold: float = DEFAULT_THRESHOLD) -> AuthorityMatcher:
    """An :class:`AuthorityMatcher` over a BibTeX or CSL-JSON library file."""
    return AuthorityMatcher.from_file(path, threshold=threshold)


def match(ref: Reference, matcher: AuthorityMatcher) -> MatchResult:
    """``matcher.match(ref)``, as a function."""
    return matcher.match(ref)


__all__ = ["AuthorityMatcher", "MatchResult", "Conflict", "load_library", "match", "enrich",
           "DEFAULT_THRESHOLD", "WEIGHTS"]
