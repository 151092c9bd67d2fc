"""Normalized keys used to block candidate duplicates before fuzzy matching.

Two citations of one work usually agree on the first author's family name
and the year even when everything else is typed differently; titles agree
up to case, accents, TeX braces and punctuation.  These functions reduce
each of those to a plain ASCII key.
"""

from __future__ import annotations

import hashlib
import re
import unicodedata

_NON_ALNUM = re.compile(r"[^0-9a-z]+")
_STOP = frozenset("a an the of on in and for to with from by la le les der die das und de des du".split())


_NON_ASCII = re.compile(r"[^\x00-\x7f]+")


def _without_marks(run: re.Match) -> str:
    return "".join(ch for ch in run.group() if not unicodedata.combining(ch))


def fold(text: str) -> str:
    """Lower-case ASCII letters and digits separated by single spaces."""
    if text.isascii():
        return _NON_ALNUM.sub(" ", text.lower()).strip()
    text = unicodedata.normalize("NFKD", text)
    # drop the combining marks; only the non-ASCII runs need looking at, char by char
    text = _NON_ASCII.sub(_without_marks, text)
    text = text.lower().replace("ß", "ss")
    return _NON_ALNUM.sub(" ", text).strip()


def title_key(title: str | None) -> str:
    return fold(title) if title else ""


def title_prefix(title: str | None, words: int = 3) -> str:
    """The first few significant words: a second, author-free blocking key."""
    if not title:
        return ""
    return prefix_of_key(title_key(title), words)


def prefix_of_key(key: str, words: int = 3) -> str:
    """:func:`title_prefix` from an already computed :func:`title_key`."""
    tokens = [t for t in key.split() if t not in _STOP]
    return " ".join(tokens[:words])


def author_key(ref) -> str:
    """Folded family name of the first author (or editor)."""
    people = ref.authors or ref.editors
    if not people:
        return ""
    first = people[0]
    name = first.family or first.literal or ""
    return fold(name).replace(" ", "")


# Identifiers that name one work (an ISSN names a journal, an ISBN one edition).
WORK_IDS = ("doi", "arxiv", "mr", "zbl")
_ARXIV_VERSION = re.compile(r"v\d+$")


def identifier_keys(ref) -> list[str]:
    out = set()
    for ident in ref.identifiers:
        if ident.valid and ident.scheme in WORK_IDS and ident.value:
            value = ident.value.lower()
            if ident.scheme == "arxiv":
                value = _ARXIV_VERSION.sub("", value)
            out.add(f"{ident.scheme}:{value}")
    return sorted(out)


def locator(ref) -> str:
    """``volume|first page`` (folded; either may be empty): where in its venue a work is.

    A second signal for the duplicate rule that lets a long, near-identical
    title outweigh different authors (see :mod:`normform.batch.clusters`).
    """
    volume = fold(ref.volume) if ref.volume else ""
    pages = ref.pages
    first = (pages.first or pages.article or "") if pages is not None else ""
    first = fold(first) if first else ""
    return f"{volume}|{first}" if volume or first else ""


def text_key(text: str, ref) -> str:
    """Hash of the folded line, for lines with some substance (not "ibid.", "----")."""
    folded = fold(text)
    if len(folded) < 20 or not (ref.authors or ref.editors or ref.title):
        return ""
    return hashlib.blake2b(folded.encode(), digest_size=8).hexdigest()
