"""Split a reference line into tokens with exact character offsets.

Identifiers (URLs, DOIs, arXiv ids, MR/Zbl numbers, ISBNs) become single
tokens so the labeler sees them whole; TeX control words (``\\em``) and
accent commands stay separate so a field's raw text can be run through
pylatexenc afterwards.  Every pattern is linear: no nested quantifiers.
"""

from __future__ import annotations

import re
from functools import lru_cache
from typing import NamedTuple

from normform.model import Identifier

# Longest token we bother to look at; longer runs are cut (keeps regexes linear
# and the labeler fast on junk).
MAX_TOKENS = 400

# TeX accents inside a word (``Erd\\H{o}s``, ``Qu\\"{o}llmann``, ``{\\'E}mile``,
# ``\\ss``) belong to the word: split there, a name falls apart.  Such a word
# token carries its Unicode spelling (see _tex_word); its offsets stay those of
# the typed text.
_ACCENT = (r"\\[`'^\"~=.](?:\{\\?[A-Za-z]\}|\\?[A-Za-z])"
           r"|\\[uvHckbdrt](?:\{\\?[A-Za-z]\}| \\?[A-Za-z])"
           r"|\\(?:ss|ae|AE|oe|OE|aa|AA|o|O|l|L|i|j)(?![A-Za-z])(?:\{\}| (?=[^\W\d_]))?")
_WORD = r"(?:[^\W\d_]++|" + _ACCENT + r"|\{(?:" + _ACCENT + r")\})++"

_TOKEN_RE = re.compile(
    r"(?P<initial>(?:[^\W\d_]|" + _ACCENT + r"|\{(?:" + _ACCENT + r")\})\.)"
    r"|(?P<word>" + _WORD + r"(?:['’](?:" + _WORD + r"))*+)"
    r"|(?P<tex>\\[A-Za-z]+\*?|\\[^A-Za-z\s])"
    r"|(?P<num>\d+)"
    r"|(?P<dash>-{1,3}|[–—])"
    r"|(?P<punct>\S)"
)

# Cheap pre-check: find_all is only worth calling when an anchor is present.
_ID_HINT = re.compile(r"10\.\d|://|www\.|ar[Xx]iv|MR|Zbl|ZBL|zbl|JFM|ISBN|ISSN|isbn|issn|hdl:|/\d{7}|\d{4}\.\d{4}|[Dd][Oo][Ii]")


class Token(NamedTuple):
    # a NamedTuple: the tokenizer makes millions of these, and tuples are cheap
    text: str
    start: int
    end: int
    kind: str          # id scheme, "tex", "initial", "word", "num", "dash", "punct"
    ident: Identifier | None = None


@lru_cache(maxsize=4096)
def _tex_word(tex: str) -> str:
    from normform.texconv import to_unicode
    return to_unicode(tex) or tex


def _plain(text: str, lo: int, hi: int, out: list[Token], limit: int) -> None:
    room = limit - len(out)
    if room <= 0:
        return
    append = out.append
    make = Token._make   # tuple.__new__ directly: skips the NamedTuple __new__ wrapper
    for m in _TOKEN_RE.finditer(text, lo, hi):
        s, e = m.span()
        t = m.group()
        kind = m.lastgroup
        if "\\" in t and kind != "tex" and len(t) < 80:   # a longer "word" is junk: leave it raw
            t = _tex_word(t)
        append(make((t, s, e, kind, None)))
        room -= 1
        if not room:
            return


def tokenize(text: str, limit: int = MAX_TOKENS) -> list[Token]:
    """Tokens of ``text`` (at most ``limit``); identifiers found by
    :func:`normform.ids.find_all` are single tokens carrying their Identifier."""
    out: list[Token] = []
    pos = 0
    if _ID_HINT.search(text):
        from normform.ids import find_all
        for ident, span in find_all(text):
            if span.start < pos:
                continue
            _plain(text, pos, span.start, out, limit)
            if len(out) >= limit:
                return out
            out.append(Token(text[span.start:span.end], span.start, span.end, ident.scheme, ident))
            pos = span.end
    _plain(text, pos, len(text), out, limit)
    return out
