"""Token features for the sequence labeler.

Per-token features depend only on the token text and are cached; the
context part (neighbours, position, bracket/quote state, what came before)
is cheap string work per position.  Feature extraction is the hot path of
the whole parser, so everything here is precompiled and allocation-light.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

from normform.refs import lexicon as lx
from normform.refs.tokens import Token

_YEAR = re.compile(r"(?:1[5-9]|20)\d\d\Z")
_ROMAN = re.compile(r"[ivxlcdm]+\Z|[IVXLCDM]+\Z")
_ORD = re.compile(r"\d+(?:st|nd|rd|th)\Z")


def _shape(text: str) -> str:
    out = []
    prev = ""
    for ch in text[:12]:
        if ch.isupper():
            c = "A"
        elif ch.islower():
            c = "a"
        elif ch.isdigit():
            c = "9"
        else:
            c = ch
        if c != prev:
            out.append(c)
            prev = c
    return "".join(out)


# Attributes the trained model knows; set by the labeler.  Unknown attributes
# carry no weight, so dropping them (once, inside the caches) changes no
# label and saves crfsuite the lookups.  Training leaves this None.
KNOWN: frozenset[str] | None = None


def set_known(attrs: frozenset[str] | None) -> None:
    global KNOWN, _GZ, _NX_KNOWN, _FI
    KNOWN = attrs
    _FI = ("fi+",) if attrs is None or "fi+" in attrs else ()
    _NX_KNOWN = tuple(tuple(a for a in v if attrs is None or a in attrs) for v in _NX)
    _GZ = {key: tuple(a for a in v if attrs is None or a in attrs) for key, v in _GZ_ALL.items()}
    token_features.cache_clear()
    _context_strings.cache_clear()
    _token_parts.cache_clear()


@lru_cache(maxsize=200_000)
def token_features(text: str, kind: str) -> tuple[str, ...]:
    f = _token_features(text, kind)
    if KNOWN is not None:
        # keep the shape at index 1 (neighbour features read it)
        f = f[:2] + tuple(a for a in f[2:] if a in KNOWN)
    return f


def _token_features(text: str, kind: str) -> tuple[str, ...]:
    low = text.lower()
    f = ["k=" + kind, "s=" + _shape(text)]
    if kind in ("word", "initial", "num", "tex"):
        f.append("w=" + low)
        if len(low) > 3:
            f.append("x3=" + low[-3:])
    else:
        f.append("w=" + (low if len(low) < 4 else kind))
    if kind == "num":
        n = len(text)
        f.append("nd=%d" % min(n, 6))
        if _YEAR.match(text):
            f.append("year")
        if n <= 3:
            f.append("small")
    elif kind == "word":
        if low in lx.GIVEN_NAMES:
            f.append("given")
        if low in lx.PARTICLES:
            f.append("particle")
        if low in lx.PLACES:
            f.append("place")
        if low in lx.MONTHS:
            f.append("month")
        if _ROMAN.match(text) and len(text) <= 6:
            f.append("roman")
        if _ORD.match(low):
            f.append("ordinal")
        if text in lx.SUFFIXES:
            f.append("suffix")
    dotted = low + "." if kind == "word" else low
    if low in lx.JOURNAL_WORDS or dotted in lx.JOURNAL_WORDS:
        f.append("jw")
    if low in lx.PUBLISHER_WORDS:
        f.append("pw")
    if low in lx.SERIES_WORDS:
        f.append("sw")
    if low in lx.GENRE_WORDS or dotted in lx.GENRE_WORDS:
        f.append("gw")
    if low in lx.CONNECTORS:
        f.append("cw")
    return tuple(f)


@lru_cache(maxsize=200_000)
def _context_strings(text: str, kind: str) -> tuple[tuple[str, str], str, tuple[str, str], str]:
    """What a token contributes to its neighbours' features (cached)."""
    low = text.lower()
    shape = "s=" + _shape(text) if kind != "url" else "s=url"
    prev, nxt = ("w-1=" + low, "s-1" + shape[1:]), ("w+1=" + low, "s+1" + shape[1:])
    w2p, w2n = "w-2=" + low, "w+2=" + low
    if KNOWN is not None:
        prev = tuple(a for a in prev if a in KNOWN)
        nxt = tuple(a for a in nxt if a in KNOWN)
        w2p = w2p if w2p in KNOWN else ""
        w2n = w2n if w2n in KNOWN else ""
    return prev, w2p, nxt, w2n


_POS = tuple("pos=%d" % k for k in range(11))
_SL = tuple("sl=%d" % k for k in range(10))
_SI = tuple("si=%d" % k for k in range(10))
_PER = tuple("per=%d" % k for k in range(6))
_COM = tuple("com=%d" % k for k in range(7))

# "slow", period and comma buckets, in the model's attribute order
_MID = tuple(tuple(tuple((("slow",) if slow else ()) + (_PER[p], _COM[c]) for c in range(7)) for p in range(6))
             for slow in (False, True))
_FLAG_NAMES = ("BOS", "EOS", "inpar", "inq", "afteryear", "afterin", "spb", "spa")
_FLAGS = tuple(tuple(name for b, name in enumerate(_FLAG_NAMES) if mask >> b & 1) for mask in range(256))

_OPEN = "([{"
_CLOSE = ")]}"
_QUOTES = "\"“”«»„"


@lru_cache(maxsize=200_000)
def _token_parts(text: str, kind: str) -> tuple[tuple[str, ...], tuple[str, ...], str, tuple[str, ...], str,
                                                str | None]:
    """Everything a token contributes that depends only on (text, kind):
    its own features, what it gives its neighbours, its phrase key (one
    cache lookup)."""
    prev, w2p, nxt, w2n = _context_strings(text if len(text) < 20 else kind, kind)
    return token_features(text, kind), prev, w2p, nxt, w2n, _phrase_key(text, kind)


def _sentence_dot(tokens: list[Token], i: int) -> bool:
    """Does the period at ``i`` end a sentence-like block rather than an
    abbreviation ("Math.", "J.") or an initial?"""
    prev = tokens[i - 1]
    if prev.kind != "word":
        return prev.kind not in ("initial",)
    w = prev.text
    if (w.lower() + ".") in lx.JOURNAL_WORDS or (w.lower() + ".") in lx.CONNECTORS:
        return False
    if len(w) <= 4 and w[0].isupper() and i + 1 < len(tokens) and tokens[i + 1].kind == "word" \
            and tokens[i + 1].text[0].isupper():
        return False   # "Am. Math. Mon." style abbreviations
    return True


_SEGLEN_BUCKET = (0, 1, 2, 3, 4, 4, 5, 5, 5, 6)
_LOW_OK = frozenset(("and", "et", "al", "van", "der", "den", "de", "la", "le", "du", "des", "di", "da", "von",
                     "dos", "del", "ter", "ten", "zu", "y", "und"))
_SEG_PUNCT = frozenset(",;:()")
_WORDISH = frozenset(("word", "num", "initial"))


# What follows a segment's closing separator: a venue is the segment right
# before ", 12", ", vol.", ", pp." -- wherever the sentence period before it
# falls.  Index into _NX by _next_code.
_NX = ((), ("nx=num",), ("nx=year",), ("nx=vol",), ("nx=pp",), ("nx=no",))
_NX_KNOWN = _NX      # filtered by the model's attributes in set_known
_NX_WORDS = {"vol": 3, "volume": 3, "band": 3, "bd": 3, "v": 3, "tome": 3, "pages": 4, "pp": 4, "p": 4,
             "no": 5, "number": 5, "issue": 5, "nr": 5, "heft": 5}


def _next_code(tokens: list[Token], i: int) -> int:
    if i + 1 >= len(tokens):
        return 0
    tok = tokens[i + 1]
    if tok.kind == "num":
        return 2 if _YEAR.match(tok.text) else 1
    if tok.kind in ("word", "initial"):
        return _NX_WORDS.get(tok.text.lower().rstrip("."), 0)
    return 0


def _segments(tokens: list[Token]) -> tuple[list[int], list[bool], list[int], list[bool], list[int]]:
    """Per token: length bucket of its segment (words between , ; : or a
    sentence period), whether the segment holds a lower-case word (names
    almost never do, titles almost always), the segment's index, and whether
    the token is a sentence period (computed once, reused by the caller)."""
    n = len(tokens)
    seg_len = [0] * n
    seg_low = [False] * n
    seg_idx = [0] * n
    seg_nx = [0] * n
    sdot = [False] * n
    start = 0
    idx = 0
    words = 0
    low = False
    for i in range(n + 1):
        boundary = i == n
        if not boundary:
            tok = tokens[i]
            k = tok.kind
            if k == "punct":
                t = tok.text
                if t in _SEG_PUNCT:
                    boundary = True
                elif t == "." and i > 0 and _sentence_dot(tokens, i):
                    boundary = sdot[i] = True
            elif k in _WORDISH:
                words += 1
                if k == "word" and tok.text[0].islower() and tok.text not in _LOW_OK:
                    low = True
        if boundary:
            b = _SEGLEN_BUCKET[words] if words < 10 else 7
            end = i + 1 if i < n else n
            seg_len[start:end] = [b] * (end - start)
            if low:
                seg_low[start:end] = [True] * (end - start)
            if idx:
                seg_idx[start:end] = [idx if idx < 8 else 8] * (end - start)
            if i < n and tokens[i].text != ".":
                code = _next_code(tokens, i)
                if code:
                    seg_nx[start:i] = [code] * (i - start)
            start = i + 1
            if words:
                idx += 1
            words = 0
            low = False
    return seg_len, seg_low, seg_idx, sdot, seg_nx


# ------------------------------------------------------------ phrase gazetteer
# Known multi-word venue names (journals with their abbreviations, book series,
# publishers) matched as the longest phrase starting at a capitalised token.
# A matched token gets "gz=B:<kind>" (first), "gz=I:<kind>" (inside) or
# "gz=E:<kind>" (last), the next content token "gz=A": this tells the labeler
# where a comma-rich or period-rich venue name starts and ends.  Periods and
# dashes are transparent ("Math." = "Math", "Springer-Verlag" = "Springer
# Verlag"); a comma must be where the name has one, so "Springer, New York"
# (publisher, place) is not the publisher "Springer New York".  Case and
# accents are folded.

_TRANSPARENT = frozenset((".", "-", "–", "—", "--", "---"))


@lru_cache(maxsize=200_000)
def _phrase_key(text: str, kind: str) -> str | None:
    """The token as the phrase matcher sees it; None = skipped."""
    if kind == "initial":
        text = text[0]
    elif text in _TRANSPARENT:
        return None
    s = unicodedata.normalize("NFKD", text.lower())
    return "".join(ch for ch in s if not unicodedata.combining(ch))


def _build_trie() -> dict:
    from normform.refs.tokens import tokenize
    phrases: list[tuple[str, str]] = []
    for full, abbr in lx.JOURNALS:
        phrases += [("j", full), ("j", abbr)]
    for kind, full, other in lx.venue_rows():
        k = "s" if kind == "series" else "j"
        phrases += [(k, full)] + [(k, o) for o in other]
    phrases += [("s", s) for s in lx.SERIES]
    phrases += [("p", pub) for pub, _ in lx.PUBLISHERS]
    root: dict = {}
    for kind, phrase in phrases:
        keys = [k for k in (_phrase_key(t.text, t.kind) for t in tokenize(phrase)) if k is not None]
        if len(keys) < 2:
            continue     # one-word names ("Topology", "Order") are ordinary words too
        node = root
        for k in keys:
            node = node.setdefault(k, {})
        # a phrase that is both a journal and a series name keeps the first kind
        node.setdefault("", kind)
    return root


_TRIE: dict | None = None
_GZ_ALL = {(pos, kind): ("gz=%s:%s" % (pos, kind),) for pos in "BIE" for kind in "jsp"}
_GZ_ALL["A", ""] = ("gz=A",)
_GZ = _GZ_ALL      # filtered by the model's attributes in set_known


def _phrases(tokens: list[Token], keys: list[str | None]) -> list[tuple[str, ...]] | None:
    """Per token, its phrase attributes (None when nothing matched)."""
    global _TRIE
    root = _TRIE
    if root is None:
        root = _TRIE = _build_trie()
    n = len(tokens)
    out: list[tuple[str, ...]] | None = None
    i = 0
    while i < n:
        k = keys[i]
        node = root.get(k) if k is not None else None
        if node is None or not tokens[i].text[:1].isupper():
            i += 1
            continue
        best = -1
        kind = ""
        j = i + 1
        while j < n:
            k = keys[j]
            if k is None:
                j += 1
                continue
            node = node.get(k)
            if node is None:
                break
            if "" in node:
                best, kind = j, node[""]
            j += 1
        if best < 0:
            i += 1
            continue
        if out is None:
            out = [()] * n
        out[i] = _GZ["B", kind]
        inner = _GZ["I", kind]
        for m in range(i + 1, best):
            out[m] = inner
        out[best] = _GZ["E", kind]
        m = best + 1
        while m < n and (keys[m] is None or keys[m] == ","):
            m += 1
        if m < n:
            out[m] = out[m] + _GZ["A", ""]
        i = best + 1
    return out


def _after_inverted_name(tokens: list[Token], i: int) -> bool:
    """Is token ``i`` a capitalised word right after "Family, I. J." (an
    inverted name whose initials end with no separator)?  In an inverted
    list the next name would follow ",", ";", "&" or "and", so such a word
    starts the title ("Fenwick, K. Nib Theory.").  "J. Smith, K. Sperner"
    does not count: there the word before the comma follows an initial."""
    tok = tokens[i]
    if tok.kind != "word" or not tok.text[:1].isupper():
        return False
    j = i - 1
    while j > 0 and (tokens[j].kind == "initial" or tokens[j].kind == "dash"):
        j -= 1
    if j < 1 or tokens[j].text != "," or tokens[j - 1].kind != "word":
        return False
    if j < 2:
        return True
    before = tokens[j - 2]
    # "van der Marrow, B." (a particle) yes; "J. Smith, K." / "John Smith, K." no
    return before.kind == "punct" or before.kind == "word" and before.text[:1].islower()


_FI = ("fi+",)


def sequence_features(tokens: list[Token], text: str) -> list[list[str]]:
    """Feature lists, one per token (the crfsuite ItemSequence input).

    The attributes and their order are fixed (the model was trained on
    them); this loop only avoids repeated work: one cache lookup per token,
    sentence periods found once, constant strings preallocated."""
    n = len(tokens)
    out: list[list[str]] = []
    if not n:
        return out
    parts = [_token_parts(t.text, t.kind) for t in tokens]
    gz = _phrases(tokens, [p[5] for p in parts])
    depth = 0
    in_quote = False
    periods = 0      # sentence-like separators seen so far (". " after a non-initial)
    commas = 0
    seen_year = False
    seen_in = False
    seg_len, seg_low, seg_idx, sdot, seg_nx = _segments(tokens)
    nx = _NX if KNOWN is None else _NX_KNOWN
    tlen = len(text)
    last = n - 1
    append = out.append
    year_match = _YEAR.match
    for i in range(n):
        tok = tokens[i]
        st, en = tok.start, tok.end
        # the flags, as one bit mask into a table of preallocated tuples
        bits = (i == 0) | (i == last) << 1 | (depth > 0) << 2 | in_quote << 3 | seen_year << 4 \
            | seen_in << 5 | (st > 0 and text[st - 1] == " ") << 6 | (en < tlen and text[en] == " ") << 7
        f = [*parts[i][0], _POS[i * 10 // n], _SL[seg_len[i]], _SI[seg_idx[i]],
             *_MID[seg_low[i]][periods if periods < 5 else 5][commas if commas < 6 else 6], *_FLAGS[bits]]
        if gz is not None and gz[i]:
            f += gz[i]
        if seg_nx[i]:
            f += nx[seg_nx[i]]
        if i > 2 and tokens[i - 1].kind == "initial" and _after_inverted_name(tokens, i):
            f += _FI
        if i > 0:
            f += parts[i - 1][1]
            if i > 1:
                w = parts[i - 2][2]
                if w:
                    f.append(w)
        else:
            f.append("w-1=^")
        if i < last:
            f += parts[i + 1][3]
            if i + 1 < last:
                w = parts[i + 2][4]
                if w:
                    f.append(w)
        else:
            f.append("w+1=$")
        append(f)
        # update state after the token
        t = tok.text
        kind = tok.kind
        if kind == "punct":
            if t in _OPEN:
                depth += 1
            elif t in _CLOSE and depth:
                depth -= 1
            elif t in _QUOTES:
                if t == "“":
                    in_quote = True
                elif t == "”":
                    in_quote = False
                else:
                    in_quote = not in_quote
            elif t == ",":
                commas += 1
            elif t == ":" or sdot[i]:
                periods += 1
        elif kind == "num" and year_match(t):
            seen_year = True
        elif t == "In" or t == "in" and i > 0 and tokens[i - 1].text in ".,":
            seen_in = True
    return out
