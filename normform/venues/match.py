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
    rejected: bool = False              # scored above the threshold, vetoed by ``conflicts``
    kept: tuple[Conflict, ...] = ()     # other fields the line has otherwise; the line's value kept

    @property
    def notes(self) -> tuple[str, ...]:
        """Human-readable remarks for review reports."""
        out = []
        if self.record is None:
            out.append("no library record shares a title word or first author")
        elif self.rejected:
            out.append(f"library record {self.record.key or '?'} scored {self.score:.2f} but was rejected: "
                       + ", ".join(f"{c.field} {c.line!r} vs {c.library!r}" for c in self.conflicts)
                       + "; nothing changed")
        elif not self.matched:
            out.append(f"best library record {self.record.key or '?'} scored {self.score:.2f}, below the threshold; nothing changed")
        else:
            out.append(f"matched library record {self.record.key or '?'} (score {self.score:.2f})")
            out += [f"{c.field} differs: line has {c.line!r}, library has {c.library!r}" for c in self.conflicts]
            out += [f"{c.field} differs: line has {c.line!r}, library has {c.library!r}; the line's value is kept"
                    for c in self.kept]
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
    initials: tuple[str, ...] = ()              # first given-name initial per author ("" when none)
    etal: bool = False                          # the line cuts its author list ("et al.")


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
        initials=tuple(_initial(n) for n in (ref.authors or ref.editors) if _family_key(n)),
        etal=bool(_ETAL.search(ref.provenance.raw)) if ref.provenance and ref.provenance.raw else False,
    )


_ETAL = re.compile(r"\bet\.?\s*al\b|\band others\b", re.I)


def _initial(name: Name) -> str:
    """Case-folded first letter of the given name ("" for none or a literal name)."""
    if name.literal is not None or not name.given:
        return ""
    g = key(name.given)
    return g[:1]


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
    if len(q.families) < len(r.families) and not q.etal:
        score *= 0.9   # the line names fewer authors and does not say "et al.": maybe another work
    qi, ri = (q.initials[0] if q.initials else ""), (r.initials[0] if r.initials else "")
    if qi and ri and qi != ri and q.families[0] == r.families[0]:
        score *= 0.8   # same family name, other first initial: another person
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
         "genre", "language", "note", "key", "title_protected", "report_number", "accessed", "version")

HARD_FIELDS = ("year", "volume", "pages")   # two disagreements among these veto a match


def hard_conflicts(query: Reference, record: Reference) -> tuple[Conflict, ...]:
    """Conflicts strong enough to tell two works apart: year off by more than one,
    another volume, another first page (a line citing one page of the work is no conflict)."""
    out = []
    if query.year is not None and record.year is not None and abs(query.year - record.year) > 1:
        out.append(Conflict("year", str(query.year), str(record.year)))
    if query.volume and record.volume and key(query.volume) != key(record.volume):
        out.append(Conflict("volume", query.volume, record.volume))
    qf, rf = _pages_text(query)[0], _pages_text(record)[0]
    if qf and rf and key(qf) != key(rf):
        qp, rp = query.pages, record.pages
        out.append(Conflict("pages", qp.range_text() or qf, rp.range_text() or rf))
    return tuple(out)


def _same_venue(mine: str, theirs: str) -> bool:
    """The line's venue is the record's venue in another spelling (an ISO 4 abbreviation of it)."""
    return _venue_pair(_venue_key(mine), _venue_key(theirs)) >= 0.95


def _shown(value) -> str:
    if isinstance(value, tuple):
        return "; ".join(_shown(v) for v in value)
    if isinstance(value, Name):
        return value.literal or " ".join(p for p in (value.given, value.family_full()) if p)
    if hasattr(value, "range_text"):
        return value.range_text() or ""
    if hasattr(value, "year") and not isinstance(value, Reference):
        return str(value.year) if value.year is not None else str(value)
    return str(value)


def enrich_report(query: Reference, record: Reference, score: float = 1.0
                  ) -> tuple[Reference, tuple[str, ...], tuple[Conflict, ...]]:
    """Fill from the curated record only what the line lacks; report what it holds otherwise.

    A field the parsed line already has is never replaced, with one exception
    that is reported in the supplied list: a venue the line gives as an
    abbreviation of the record's venue takes the record's full title.  Every
    other disagreement comes back as a :class:`Conflict` (the line's value is
    kept).  Identifiers are the union (the record's first); the raw line and
    origin stay the line's; the record-level confidence becomes ``score``.
    """
    changes: dict = {}
    supplied: list[str] = []
    kept: list[Conflict] = []
    for name in _COPY:
        mine, theirs = getattr(query, name), getattr(record, name)
        if theirs in (None, (), "") or theirs == mine:
            continue
        if name == "kind":
            if mine == type(mine).OTHER and theirs != type(theirs).OTHER:
                changes[name] = theirs
                supplied.append(name)
            continue
        if mine in (None, (), ""):
            changes[name] = theirs
            supplied.append(name)
            continue
        if name == "container_title" and _same_venue(mine, theirs):
            changes[name] = theirs
            supplied.append(name)
            continue
        if name == "key" or name == "title_protected":
            continue        # the line's own citation key and markup stay; not data
        if name in ("title", "container_title", "publisher", "place", "series", "note") and key(mine) == key(theirs):
            continue        # the same words, another case or accent: not worth a report
        kept.append(Conflict("year" if name == "date" else name, _shown(mine), _shown(theirs)))
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
        p = query.provenance
        changes["provenance"] = Provenance(raw=p.raw, fields=p.fields, confidence=round(score, 4),
                                           origin=p.origin)
    return (query.replace(**changes) if changes else query), tuple(supplied), tuple(kept)


def enrich(query: Reference, record: Reference, score: float = 1.0) -> tuple[Reference, tuple[str, ...]]:
    """:func:`enrich_report` without the conflicts (the batch step's interface)."""
    ref, supplied, _ = enrich_report(query, record, score)
    return ref, supplied


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
    def from_file(cls, path: str | Path, threshold: float = DEFAULT_THRESHOLD,
                  on_error=None) -> "AuthorityMatcher":
        """Index a library file; malformed entries go to ``on_error`` and are skipped
        (see :func:`normform.venues.library.read_library`; without it the first raises)."""
        from normform.venues.library import read_library

        return cls(read_library(path, on_error), threshold=threshold)

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
        rejected: MatchResult | None = None
        vetoed: set[int] = set()
        while True:
            best, best_score, best_parts = None, 0.0, ()
            for i in cands:
                if i in vetoed:
                    continue
                s, parts = score_pair(q, self._feat[i], best_score)
                if s > best_score:
                    best, best_score, best_parts = i, s, parts
            if best is None or best_score < self.threshold:
                break
            hard = hard_conflicts(ref, self.records[best])
            if len(hard) < 2:
                break
            # Two works that disagree on two of year, volume and first page are
            # not one work, however alike their titles: reject, try the next.
            vetoed.add(best)
            if rejected is None:
                rejected = MatchResult(ref, self.records[best], best_score, False, ref, hard, best_parts,
                                       candidates=len(cands), rejected=True)
        if best is None or best_score < self.threshold:
            if rejected is not None:
                return rejected
            if best is None:
                return MatchResult(ref, None, 0.0, False, ref, candidates=len(cands))
            return MatchResult(ref, self.records[best], best_score, False, ref, field_scores=best_parts,
                               candidates=len(cands))
        record = self.records[best]
        enriched, supplied, kept = enrich_report(ref, record, best_score)
        return MatchResult(ref, record, best_score, True, enriched, _conflicts(ref, record),
                           best_parts, supplied, len(cands), kept=tuple(
                               k for k in kept if k.field not in HARD_FIELDS))

    def match_all(self, refs: Iterable[Reference]) -> Iterable[MatchResult]:
        for ref in refs:
            yield self.match(ref)


# -- module-level conveniences (the batch step calls these) -----------------

def load_library(path: str | Path, threshold: float = DEFAULT_THRESHOLD, on_error=None) -> AuthorityMatcher:
    """An :class:`AuthorityMatcher` over a BibTeX or CSL-JSON library file."""
    return AuthorityMatcher.from_file(path, threshold=threshold, on_error=on_error)


def match(ref: Reference, matcher: AuthorityMatcher) -> MatchResult:
    """``matcher.match(ref)``, as a function."""
    return matcher.match(ref)


__all__ = ["AuthorityMatcher", "MatchResult", "Conflict", "load_library", "match", "enrich", "enrich_report",
           "hard_conflicts",
           "DEFAULT_THRESHOLD", "WEIGHTS"]
