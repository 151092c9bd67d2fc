"""Common base of the exporters: one printer class per format walking the model."""

from __future__ import annotations

import re
import unicodedata
from typing import Iterable

from normform.model import Reference

_SMALL = frozenset("a an and at for from in of on the to with la le les der die das el los un une ein eine "
                   "über sur".split())


class Exporter:
    """Turns references into one output format.

    Subclasses implement :meth:`record` (one reference -> the format's native
    value) and :meth:`dumps` (a list -> text).
    """

    name: str = ""
    suffix: str = ".txt"

    def record(self, ref: Reference):  # pragma: no cover - abstract
        raise NotImplementedError

    def dumps(self, refs: Iterable[Reference]) -> str:  # pragma: no cover - abstract
        raise NotImplementedError


def _ascii_word(text: str) -> str:
    plain = unicodedata.normalize("NFKD", text)
    return re.sub(r"[^a-z0-9]", "", plain.encode("ascii", "ignore").decode().lower())


def base_key(ref: Reference) -> str:
    """``family`` + ``year`` + first significant title word, ASCII lower case."""
    people = ref.authors or ref.editors
    family = ""
    if people:
        first = people[0]
        family = _ascii_word(first.family or (first.literal or "").split(" ")[-1] if not first.literal
                             else next((w for w in first.literal.split() if w.lower() not in _SMALL),
                                       first.literal))
    year = str(ref.date.year) if ref.date and ref.date.year else ""
    word = ""
    for token in (ref.title or "").split():
        if token.lower().strip(".,:;") in _SMALL:
            continue
        word = _ascii_word(token)
        if word:
            break
    key = f"{family or 'anon'}{year}{word}"
    return key


class KeyMaker:
    """Unique keys within one file: the second ``quill2001riemann`` becomes ``...b``."""

    def __init__(self) -> None:
        self.used: set[str] = set()

    def make(self, ref: Reference, wanted: str | None = None) -> str:
        key = wanted or ref.key or base_key(ref)
        candidate, n = key, 1
        while candidate.lower() in self.used:
            n += 1
            candidate = key + (chr(ord("a") + n - 1) if n <= 26 else str(n))
        self.used.add(candidate.lower())
        return candidate
