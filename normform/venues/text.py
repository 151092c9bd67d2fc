"""Text keys for comparing venue names and titles across spellings.

Legacy lines differ in accents, case, punctuation, ``&`` versus ``and`` and
TeX leftovers; every lookup in this package goes through :func:`key`, so two
spellings meet exactly when their keys are equal.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

_SPACE = re.compile(r"\s+")
_NON_WORD = re.compile(r"[^0-9a-z]+")
_TEX_CMD = re.compile(r"\\[A-Za-z]+\s*|[{}\\]")

# Words ISO 4 drops (articles, conjunctions, prepositions) in the languages the
# shipped table covers; used only for keys and blocking, never for output.
STOPWORDS = frozenset(
    "a an the and or of on in for to at by with from into as "
    "und der die das des dem den fur für zur zum im am von "
    "de la le les du des et en l d di del della delle e y da dei per "
    "i och og its".split()
)


def fold(text: str) -> str:
    """Lower-case, accent-free, ``&``→``and``, TeX braces and commands removed."""
    text = _TEX_CMD.sub("", text)
    text = unicodedata.normalize("NFKD", text)
    text = "".join(c for c in text if not unicodedata.combining(c))
    text = text.replace("ß", "ss").replace("ø", "o").replace("Ø", "O").replace("ł", "l")
    text = text.replace("æ", "ae").replace("œ", "oe")
    return text.replace("&", " and ").lower()


@lru_cache(maxsize=65536)
def words(text: str) -> tuple[str, ...]:
    """The folded words of ``text``, punctuation dropped."""
    return tuple(w for w in _NON_WORD.split(fold(text)) if w)


@lru_cache(maxsize=65536)
def key(text: str) -> str:
    """Equality key: folded words joined by single spaces, a leading "The" dropped."""
    w = words(text)
    if len(w) > 1 and w[0] == "the":
        w = w[1:]
    return " ".join(w)


# A letter after these is a part designation ("Series A"), not an article.
_PART_WORDS = frozenset("series ser section sect sec part pt serie teil".split())


_UNICODE_SPLIT = re.compile(r"[\W_]+")


@lru_cache(maxsize=65536)
def significant_pairs(text: str) -> tuple[tuple[str, str], ...]:
    """``(folded, as written)`` for each word an ISO 4 abbreviation keeps."""
    out: list[tuple[str, str]] = []
    for piece in _UNICODE_SPLIT.split(_TEX_CMD.sub("", text)):
        for w in _NON_WORD.split(fold(piece)):
            if not w:
                continue
            # a capital letter after the first word is a part designation
            # ("Physical Review E"), even where it spells a stopword
            letter = len(piece) == 1 and piece.isupper() and bool(out)
            if w in STOPWORDS and not letter and not (out and out[-1][0] in _PART_WORDS):
                continue
            out.append((w, piece))
    return tuple(out)


def significant(text: str) -> tuple[str, ...]:
    """Folded words without stopwords (what an ISO 4 abbreviation keeps)."""
    return tuple(w for w, _ in significant_pairs(text))


def squeeze(text: str) -> str:
    """Collapse runs of whitespace and strip the ends."""
    return _SPACE.sub(" ", text).strip()
