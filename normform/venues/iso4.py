"""ISO 4 abbreviation of titles the table does not list.

The word work (ISSN List of Title Word Abbreviations, stopwords, articles,
single-word titles) is done by the general-purpose library ``pyiso4``.  Two
kinds of its known failures are corrected here:

* word corrections *learned from the shipped table*: where the table's
  abbreviation (stated from the published lists) and pyiso4's output align word
  for word but differ (pyiso4 writes ``Discret.`` and ``J. Algebr.``; the
  registered forms are ``Discrete Math.`` and ``J. Algebra``), the table's form
  of that title word wins in every other title too, provided the table never
  contradicts itself about the word;
* punctuation: pyiso4 turns the full stop of ``Theory. Series B`` into a comma;
  ISO 4 drops such punctuation before a part designation (``Ser. B``).

Part designations (``Series A``) are kept (``Ser. A``), as ISO 4 asks.
"""

from __future__ import annotations

import re
from collections import defaultdict
from functools import lru_cache
from typing import Iterable

from normform.venues.text import fold, significant, significant_pairs

_COMMA_PART = re.compile(r",\s+(?=(Ser|Sect|Sec|Pt|Part)\.?\b)")
_SPACES = re.compile(r"\s+")


@lru_cache(maxsize=1)
def _pyiso4():
    from pyiso4.ltwa import Abbreviate  # ~0.5 s: loads the 56,000-word LTWA

    return Abbreviate.create()


def raw_abbreviation(title: str) -> str:
    """pyiso4's abbreviation, part designations kept, nothing corrected.

    pyiso4 0.1.x raises IndexError on some titles (``Information and
    Control``); those are abbreviated word by word with its own word lookup.
    """
    engine = _pyiso4()
    try:
        return engine(title, remove_part=False)
    except IndexError:
        pass
    from pyiso4.ltwa import Pattern
    from pyiso4.normalize_string import Level, normalize

    kept = [original for _, original in significant_pairs(title)]
    if len(kept) <= 1:
        return " ".join(kept)
    out = []
    for word in kept:
        try:
            abbr, _ = engine.abbreviate(Pattern.normalize(word), word, normalize(word, Level.SOFT))
        except IndexError:
            abbr = word
        out.append(abbr)
    return " ".join(out)


def _bare(token: str) -> str:
    return fold(token).strip(".,:;()")


def align(title: str, abbreviation: str) -> list[tuple[str, str]] | None:
    """Pair each significant word of ``title`` with its token in ``abbreviation``.

    None when the counts differ (a dropped or merged word): such titles give
    no evidence about single words.
    """
    source = significant(title)
    tokens = [t for t in _SPACES.split(abbreviation.replace("-", " ")) if _bare(t)]
    if len(source) != len(tokens):
        return None
    return list(zip(source, tokens))


def _match_case(target: str, like: str) -> str:
    if like[:1].isupper():
        return target[:1].upper() + target[1:]
    if like[:1].islower():
        return target[:1].lower() + target[1:]
    return target


class Iso4Engine:
    """pyiso4 plus word corrections learned from known (title, abbreviation) pairs."""

    def __init__(self, known: Iterable[tuple[str, str]] = ()) -> None:
        self.corrections: dict[str, str] = {}
        self.contradicted: set[str] = set()
        self.learn(known)

    def learn(self, known: Iterable[tuple[str, str]]) -> None:
        """Learn word corrections; a word whose evidence disagrees is left to pyiso4."""
        votes: dict[str, set[str]] = defaultdict(set)
        for title, official in known:
            raw = self._punctuation(raw_abbreviation(title))
            if len(significant(title)) < 2:
                continue  # single-word titles stay whole: no word evidence
            pairs_raw = align(title, raw)
            pairs_off = align(title, official)
            if pairs_raw is None or pairs_off is None:
                continue
            for (word, got), (_, want) in zip(pairs_raw, pairs_off):
                votes[word].add(want.strip(",:;"))
        for word, targets in votes.items():
            if len({t.lower() for t in targets}) == 1:
                self.corrections[word] = next(iter(targets))
            else:
                self.contradicted.add(word)

    @staticmethod
    def _punctuation(text: str) -> str:
        return _COMMA_PART.sub(" ", text).strip()

    def abbreviate(self, title: str) -> str:
        """ISO 4 abbreviation of ``title`` (capitalization as in the title)."""
        title = _SPACES.sub(" ", title).strip()
        if not title:
            return title
        raw = self._punctuation(raw_abbreviation(title))
        last = title.split()[-1]
        if len(title.split()) > 1 and len(last) == 1 and last.isupper() and raw.split()[-1] != last:
            raw = f"{raw} {last}"   # pyiso4 drops a final part letter that spells a stopword ("E")
        pairs = align(title, raw)
        if not pairs or len(pairs) < 2:
            return raw      # single-word titles stay whole (ISO 4)
        written = [original for _, original in significant_pairs(title)]
        out: list[str] = []
        for (word, token), original in zip(pairs, written):
            fixed = self.corrections.get(word)
            if fixed is None or fixed.lower() == token.strip(",:;").lower():
                # pyiso4 sometimes loses the case of the title word (``C. r. Math.``)
                out.append(_match_case(token, original) if token[1:] == token[1:].lower() else token)
                continue
            trail = token[len(token.rstrip(",:;")):]
            out.append((fixed if fixed[1:] != fixed[1:].lower() else _match_case(fixed, token)) + trail)
        # rebuild with the raw output's spacing and hyphens
        pieces = re.split(r"(\s+|-)", raw)
        k = 0
        for i, piece in enumerate(pieces):
            if piece and not piece.isspace() and piece != "-" and _bare(piece):
                pieces[i] = out[k]
                k += 1
        return "".join(pieces)
