"""Public API: parse free-form reference lines into :class:`Reference` records.

``parse_reference`` never raises on bad input: empty lines, binary junk and
100 kB lines all give one record with the raw text kept and a low
confidence, so line N out always belongs to line N in.
"""

from __future__ import annotations

import re
import unicodedata
from typing import Iterable, Iterator

from normform.model import Provenance, Reference
from normform.refs.tokens import MAX_TOKENS, tokenize

# Control characters other than tab become spaces; that keeps offsets equal.
# Two exceptions, which drop characters (spans then refer to the cleaned
# text, as for NFC): terminal colour codes (ESC [ ... m) copied from a
# console go whole, and a control character between two letters is a
# transmission error inside a word ("Feather\x01stone"), not a word break.
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f-\x9f\ufffd]")
_TERMINAL_CODE = re.compile(r"\x1b\[[0-?]{0,32}[ -/]{0,8}[@-~]")
_IN_WORD_CONTROL = re.compile(r"(?<=[^\W\d_])[\x00-\x08\x0b-\x1f\x7f-\x9f]++(?=[^\W\d_])")
_PREFIX_LABEL = re.compile(r"\s*(?:\[[^\]\s]{1,12}\]|\d{1,4}[.)]|\(\d{1,4}\))\s+")


_NORMAL_CHARS = re.compile(r"[\w\s.,;:()\[\]{}\-–—'\"“”‘’/&$\\^*+=?!@#%~`<>|′]+")


def _empty(raw: str) -> Reference:
    return Reference(provenance=Provenance(raw=raw, fields=(), confidence=0.0))


def parse_reference(text: str) -> Reference:
    """One reference line -> a Reference with per-field provenance and confidence."""
    from normform.refs import kinds, relabel, validate
    from normform.refs.assemble import assemble
    from normform.refs.labeler import label

    if not isinstance(text, str):
        text = text.decode("utf-8", "replace") if isinstance(text, (bytes, bytearray)) else str(text)
    raw = text
    work = text.rstrip("\r\n")
    if _CONTROL.search(work):
        work = _CONTROL.sub(" ", _IN_WORD_CONTROL.sub("", _TERMINAL_CODE.sub("", work)))
    if not work.strip():
        return _empty(raw)
    # an enumeration label ("[12]", "3.") is not part of the reference
    m = _PREFIX_LABEL.match(work)
    if m and m.end() < len(work):
        work = " " * m.end() + work[m.end():]
    if not unicodedata.is_normalized("NFC", work):
        # NFC can change lengths; spans then refer to the normalized text
        work = unicodedata.normalize("NFC", work)
    tokens = tokenize(work, MAX_TOKENS + 1)
    truncated = len(tokens) > MAX_TOKENS
    if truncated:
        tokens = tokens[:MAX_TOKENS]
    if not tokens:
        return _empty(raw)
    labels, marg, prob = label(tokens, work)
    labels, marg = list(labels), list(marg)
    relabel.repair(work, tokens, labels, marg)   # shapes the labeler splits wrongly
    ref = assemble(work, tokens, labels, marg, prob, truncated=truncated)
    ref = _implied_ids(ref)
    ref = validate.review(kinds.details(ref, work), work, tokens)   # invalid ids, odd years, kind details
    if ref.provenance is not None and ref.provenance.raw != raw:
        ref = ref.replace(provenance=Provenance(raw=raw, fields=ref.provenance.fields,
                                                confidence=ref.provenance.confidence))
    if _junk_ratio(work) > 0.3:
        ref = ref.replace(provenance=Provenance(raw=raw, fields=ref.provenance.fields,
                                                confidence=min(ref.provenance.confidence or 0, 0.1)))
    return ref


def _implied_ids(ref: Reference) -> Reference:
    """An arXiv DOI (``10.48550/arXiv.2101.00001``) names the arXiv preprint
    too (arXiv's DOI scheme): record the arXiv id beside it, once."""
    dois = ref.idents("doi")
    if not dois or ref.ident("arxiv"):
        return ref
    from normform.ids import arxiv, make
    for d in dois:
        found = arxiv.from_doi(d.value)
        if found:
            return ref.replace(identifiers=ref.identifiers + (make("arxiv", found),))
    return ref


def _junk_ratio(text: str) -> float:
    """Share of characters that are neither letters, digits, spaces nor
    common punctuation: high for binary junk."""
    if not text:
        return 1.0
    head = text[:2000]
    return len(_NORMAL_CHARS.sub("", head)) / len(head)


def parse_references(lines: Iterable[str]) -> Iterator[Reference]:
    """One Reference per input line, in order (a generator: memory stays flat).

    ``lines`` is any iterable of lines (an open file, a list); a single string
    is taken as a block of text and split into its lines, not its characters.
    """
    if isinstance(lines, str):
        lines = lines.splitlines()
    for line in lines:
        yield parse_reference(line.rstrip("\r\n") if isinstance(line, str) else line)


__all__ = ["parse_reference", "parse_references"]
