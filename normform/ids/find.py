"""Find identifiers anywhere in a free-form reference line.

Every pattern starts at a literal anchor (a keyword, ``10.``, ``://``) behind
a boundary, and uses possessive repeats, so each character is scanned a
bounded number of times: the search is linear in the line length even on
adversarial input (no catastrophic backtracking).  Trailing punctuation and
unbalanced closing brackets are trimmed from open-ended tokens (DOIs, URLs)
— common practice, since a reference line ends its fields with ``.`` or ``,``.
"""

from __future__ import annotations

import re

from normform.ids import arxiv as _arxiv
from normform.ids import make
from normform.model import Identifier, Span

_TOKEN = r"[^\s\"<>{}|\\^`]++"
_ARX_NEW = r"\d{4}\.\d{4,5}(?:v\d+)?+(?!\d)"
_ARX_OLD = r"[a-z]++(?:-[a-z]++)?+(?:\.[A-Za-z]{2})?/\d{7}(?:v\d+)?+(?!\d)"
_ARX_CLASS = r"(?:\s*+\[([A-Za-z-]++(?:\.[A-Za-z-]++)?+)\])?"
_ARCHIVES = "|".join(sorted(_arxiv.ARCHIVES, key=len, reverse=True))
_REVIEW = r"\d{2,4}[a-l]?\s*+:\s*+\d{1,6}[a-z]?|\d{1,3}\s*+\#\s*+\d{1,6}[a-z]?"

# (scheme, pattern, group holding the identifier, group holding the detail)
_PATTERNS: list[tuple[str, re.Pattern[str], int, int | None]] = [
    ("url", re.compile(r"(?<![\w@/])(?:(?:https?|ftp)://|www\.)" + _TOKEN, re.I), 0, None),
    ("doi", re.compile(r"(?:(?<![\w/])(?:dx\.)?doi\.org/|(?<![\w])doi\s*+:?\s*+|(?<![\w./-]))"
                       r"(10\.\d{4,9}(?:\.\d+)*+/" + _TOKEN + ")", re.I), 1, None),
    ("arxiv", re.compile(r"(?<![\w])(?i:arxiv)(?:\s*+:\s*+|\s++|\.org/(?:abs|pdf)/)"
                         r"(" + _ARX_NEW + "|" + _ARX_OLD + ")" + _ARX_CLASS), 1, 2),
    ("arxiv", re.compile(r"(?<![\w/.-])((?:" + _ARCHIVES + r")(?:\.[A-Z]{2})?/\d{7}(?:v\d+)?+)(?!\d)"
                         + _ARX_CLASS), 1, 2),
    # A bare new-style number only with a version or a subject class: without
    # them it cannot be told from other dotted numbers.
    ("arxiv", re.compile(r"(?<![\w.])(\d{4}\.\d{4,5}v\d+)(?!\d)" + _ARX_CLASS), 1, 2),
    ("arxiv", re.compile(r"(?<![\w.])(\d{4}\.\d{4,5})\s*+\[([a-z-]++\.[A-Za-z]{2})\]"), 1, 2),
    # "CoRR abs/1207.6692": arXiv's listing in the computing research repository (common practice).
    ("arxiv", re.compile(r"(?<![\w])CoRR,?\s*+abs/(" + _ARX_NEW + "|" + _ARX_OLD + ")"), 1, None),
    ("mr", re.compile(r"(?<![\w])MR\s*+#?\s*+(?:(\d{4}[a-l]?\s*+:\s*+\d{1,6}[a-z]?|\d{1,3}\s*+\#\s*+\d{1,6}[a-z]?)"
                      r"|(\d{1,8})(?![\d:])(?:\s*+\(\s*+(" + _REVIEW + r")\s*+\))?)"), 0, None),
    ("zbl", re.compile(r"(?<![\w])(?i:zbl)\.?\s*+:?\s*+(?:pre\s*+)?(\d{3,4}\.\d{5}|0\d{7})(?!\d)"), 1, None),
    ("zbl", re.compile(r"(?<![\w])(JFM\s*+:?\s*+\d{1,2}\.\d{4}\.\d{2})(?!\d)"), 1, None),
    ("issn", re.compile(r"(?<![\w])(?:e-?)?ISSN\s*+:?\s*+(\d{4}\s?[-\u2010\u2011\u2013]?\s?\d{3}[\dXx])(?![\dXx])",
                        re.I), 1, None),
    ("handle", re.compile(r"(?<![\w])hdl\s*+:\s*+(\d+(?:\.\d+)*+/" + _TOKEN + ")", re.I), 1, None),
]
_ISBN_KW = re.compile(r"(?<![\w])ISBN(?:-1[03])?\s*+:?\s*+", re.I)
_ISBN_MORE = re.compile(r"\s*+[,;/]\s*+(?=\d)")

_TRAIL = frozenset(".,;:!?'\"\u201d\u2019")
_CLOSE = {")": "(", "]": "[", "}": "{"}
_PRIORITY = {"doi": 0, "arxiv": 0, "handle": 0, "mr": 1, "zbl": 1, "isbn": 1, "issn": 1, "url": 2}


def _trim_end(text: str, start: int, end: int) -> int:
    """End of the token once trailing punctuation and unbalanced closers are cut."""
    counts = {ch: 0 for ch in "()[]{}"}
    for ch in text[start:end]:
        if ch in counts:
            counts[ch] += 1
    while end > start:
        ch = text[end - 1]
        if ch in _TRAIL:
            end -= 1
        elif ch in _CLOSE and counts[ch] > counts[_CLOSE[ch]]:
            counts[ch] -= 1
            end -= 1
        else:
            break
    return end


def _scan_isbn(text: str, pos: int) -> tuple[str, int] | None:
    """Digits of an ISBN starting at ``pos``: prefer a valid 13, then a valid 10."""
    from normform.ids import isbn
    digits: list[str] = []
    ends: dict[int, int] = {}
    i, n, sep = pos, len(text), False
    while i < n and i - pos < 26 and len(digits) < 13:
        ch = text[i]
        if ch.isdigit() or (ch in "Xx" and len(digits) == 9):
            digits.append(ch.upper())
            i += 1
            sep = False
            ends[len(digits)] = i
            if ch in "Xx":
                break
        elif ch in " -\u2010\u2011\u2013" and digits and not sep:
            sep = True
            i += 1
        else:
            break
    if not digits:
        return None
    for size in (13, 10):
        if size in ends and isbn.is_valid("".join(digits[:size])):
            return "".join(digits[:size]), ends[size]
    for size in (13, 10):
        if size in ends and (size == 10 or "".join(digits[:3]) in ("978", "979")):
            return "".join(digits[:size]), ends[size]
    return "".join(digits), ends[len(digits)]


def _from_url(url: str) -> tuple[str, str, str | None]:
    """Classify a URL: resolver links become the identifier they point to."""
    from normform.ids import doi, handle
    low = url.lower()
    if "doi.org/10." in low:
        return "doi", doi.compact(url[low.index("10.", low.index("doi.org/")):]), None
    if "arxiv.org/abs/" in low or "arxiv.org/pdf/" in low:
        value = _arxiv.compact(url[low.index("arxiv.org/"):])
        if _arxiv.is_valid(value):
            return "arxiv", value, None
    if "hdl.handle.net/" in low:
        return "handle", handle.compact(url), None
    return "url", url, None


# A gate for each pattern: literals it cannot match without (checked on the
# lower-cased line) or a cheap regex it cannot match without.  Skipping
# patterns whose gate is shut is much cheaper than running them.  With re.I a
# few non-ASCII letters (U+0130, U+0131, U+017F, U+212A) match ASCII ones, so
# lines holding them open every literal gate.
_BARE_NEW_ID = re.compile(r"\d{4}\.\d{4}")   # both bare new-style arXiv patterns need it
_ANCHORS: tuple[tuple[str, ...] | re.Pattern[str], ...] = (
    ("://", "www."), re.compile(r"10\.\d{4}"), ("arxiv",), re.compile(r"/\d{7}"),
    _BARE_NEW_ID, _BARE_NEW_ID, ("corr",), ("mr",), ("zbl",), ("jfm",),
    ("issn",), ("hdl",),
)
assert len(_ANCHORS) == len(_PATTERNS)
_FOLDS_TO_ASCII = re.compile("[\u0130\u0131\u017f\u212a]")


def _open(gate: tuple[str, ...] | re.Pattern[str], text: str, low: str | None) -> bool:
    if isinstance(gate, re.Pattern):
        return gate.search(text) is not None
    return low is None or any(a in low for a in gate)


def find_all(text: str) -> list[tuple[Identifier, Span]]:
    found: list[tuple[int, int, int, Identifier]] = []
    low = None if _FOLDS_TO_ASCII.search(text) else text.lower()
    opened: dict = {}   # a gate shared by two patterns is checked once
    for (scheme, pattern, group, detail_group), gate in zip(_PATTERNS, _ANCHORS):
        ok = opened.get(gate)
        if ok is None:
            ok = opened[gate] = _open(gate, text, low)
        if not ok:
            continue
        for m in pattern.finditer(text):
            start, end = m.start(), m.end()
            detail = m.group(detail_group) if detail_group else None
            if scheme in ("url", "doi", "handle"):
                end = _trim_end(text, m.start(group), end)
                if end <= m.start(group):
                    continue
                raw = text[m.start(group):end]
            else:
                raw = m.group(group)
            kind = scheme
            if scheme == "url":
                kind, raw, detail = _from_url(raw)
            if scheme == "mr":
                review = m.group(1)
                ident = make("mr", review) if review else make("mr", m.group(2), detail=m.group(3) and
                                                               _review(m.group(3)))
            else:
                ident = make(kind, raw, detail=detail)
            found.append((start, end, _PRIORITY[kind], ident))
    for m in (_ISBN_KW.finditer(text) if low is None or "isbn" in low else ()):
        start, pos, first = m.start(), m.end(), True
        while (got := _scan_isbn(text, pos)) is not None:
            if not first and len(got[0]) not in (10, 13):
                break  # "ISBN ..., 1994": a year, not a second ISBN
            first = False
            found.append((start, got[1], _PRIORITY["isbn"], make("isbn", got[0])))
            # "ISBN 978-..., 978-..." lists several numbers after one keyword.
            more = _ISBN_MORE.match(text, got[1])
            if more is None:
                break
            start, pos = more.end(), more.end()
    # Keep the earliest, longest, most specific mention where mentions overlap.
    found.sort(key=lambda item: (item[0], -item[1], item[2]))
    out: list[tuple[Identifier, Span]] = []
    last_end = -1
    for start, end, _, ident in found:
        if start >= last_end:
            out.append((ident, Span(start, end)))
            last_end = end
    return out


def _review(code: str) -> str:
    from normform.ids import mr
    return mr._clean_review(code)
