"""Capitalization hints for titles: which substrings must keep their capitals.

BibTeX styles may lower-case a title; braces protect the parts that must not
change (acronyms, proper nouns).  A title's hints are the union of explicit
ones (braces in a source file) and automatic ones:

* a word with a capital after its first letter (``GL``, ``McKay``, ``LaTeX``);
* in a sentence-case title, a capitalized word that does not open the title
  or a subtitle (``Riemann`` in "On the Riemann hypothesis").

Hints are kept as the title substrings they cover, in title order; this
canonical form is what readers store in ``Reference.title_protected``.

Inline math (``$Q$``, see :func:`normform.texconv.math_spans`) is never split: its letters
count for no hint, a hint inside it is dropped (the writer's own ``{$Q$}`` group protects
it) and one reaching into it is widened to cover it.
"""

from __future__ import annotations

import re
from functools import lru_cache

from normform.texconv import math_spans

_WORD = re.compile(r"[^\s]+")
_EDGE = "\"'“”‘’.,;:!?"
_PAIRS = (("(", ")"), ("[", "]"))
# a word whose first and last characters are none of these has no edge to strip
_OPENERS = frozenset(_EDGE + "([")
_CLOSERS = frozenset(_EDGE + ")]")
_MATH_MASK = "\ue002"  # stands for each character of a math span: no blank, no letter, no edge
_SMALL = frozenset("a an and as at but by for from in into nor of on or over per the to upon via vs with".split())


def _cores(title: str) -> list[tuple[int, int, str, bool]]:
    """(start, end, word, opens_a_sentence) for each word without edge punctuation."""
    out = []
    opens = True
    for m in _WORD.finditer(title):
        token = m.group(0)
        left, right = 0, len(token)
        # most words have nothing to strip: skip the loop (same result)
        changed = token[0] in _OPENERS or token[-1] in _CLOSERS
        while changed and right > left:
            changed = False
            core = token[left:right]
            if core[0] in _EDGE:
                left, changed = left + 1, True
            elif core[-1] in _EDGE:
                right, changed = right - 1, True
            else:
                for op, cl in _PAIRS:
                    if core[-1] == cl and core.count(cl) > core.count(op):
                        right, changed = right - 1, True
                        break
                    if core[0] == op and core.count(op) > core.count(cl):
                        left, changed = left + 1, True
                        break
        if right > left:
            out.append((m.start() + left, m.start() + right, token[left:right], opens))
        opens = token.endswith((":", ".", "?", "!", "—")) or token in ("—", "-", "–")
    return out


def _no_upper(text: str) -> bool:
    """No upper-case letter in ``text`` (``islower`` answers most words at C speed)."""
    return text.islower() or not any(ch.isupper() for ch in text)


def _sentence_case(words: list[tuple[int, int, str, bool]]) -> bool:
    rest = [w for _, _, w, opens in words if not opens and w[:1].isalpha() and _no_upper(w[1:])
            and w.lower() not in _SMALL]
    if not rest:
        return True
    capitalized = sum(1 for w in rest if w[0].isupper())
    return capitalized * 2 <= len(rest)


def _masked(title: str, math: list[tuple[int, int]]) -> str:
    """``title`` with each math span's characters masked, so that a span is one word without letters."""
    if not math:
        return title
    out, pos = [], 0
    for a, b in math:
        out += [title[pos:a], _MATH_MASK * (b - a)]
        pos = b
    out.append(title[pos:])
    return "".join(out)


def _fit(spans: list[tuple[int, int]], math: list[tuple[int, int]]) -> list[tuple[int, int]]:
    """Intervals that leave math whole: one inside a span is dropped, one reaching into it widened."""
    if not math:
        return spans
    out = []
    for start, end in spans:
        for a, b in math:
            if start < b and a < end:
                if a <= start and end <= b:
                    break
                start, end = min(start, a), max(end, b)
        else:
            out.append((start, end))
    return _merge(out)


def auto_intervals(title: str) -> list[tuple[int, int]]:
    words = _cores(_masked(title, math_spans(title)))
    sentence = _sentence_case(words)
    out = []
    for start, end, word, opens in words:
        letters = word if word.isalpha() else "".join(ch for ch in word if ch.isalpha())
        if not letters:
            continue
        mixed = not _no_upper(letters[1:])
        proper = sentence and not opens and letters[0].isupper()
        if mixed or proper:
            out.append((start, end))
    return out


def _occurrences(title: str, hint: str) -> list[tuple[int, int]]:
    out, pos = [], 0
    while hint:
        pos = title.find(hint, pos)
        if pos < 0:
            break
        out.append((pos, pos + len(hint)))
        pos += len(hint)
    return out


def _merge(spans: list[tuple[int, int]]) -> list[tuple[int, int]]:
    spans = sorted(spans)
    merged: list[list[int]] = []
    for start, end in spans:
        if merged and start < merged[-1][1]:
            merged[-1][1] = max(merged[-1][1], end)
        else:
            merged.append([start, end])
    return [(a, b) for a, b in merged]


def intervals(title: str, hints: tuple[str, ...] | list[str] = ()) -> list[tuple[int, int]]:
    """Merged, sorted intervals of the title to protect: explicit hints plus automatic ones.

    Every occurrence of a protected text is protected (a second "Lie" as well as the
    first), so that reading the braces back gives the same hints.
    """
    if isinstance(hints, tuple):
        return list(_intervals(title, hints))
    return list(_intervals(title, tuple(hints)))


@lru_cache(maxsize=1 << 15)
def _intervals(title: str, hints: tuple[str, ...]) -> tuple[tuple[int, int], ...]:
    # memoised: a collection cites the same titles again and again
    return tuple(_compute_intervals(title, hints))


def _compute_intervals(title: str, hints: tuple[str, ...]) -> list[tuple[int, int]]:
    auto = auto_intervals(title)
    math = math_spans(title)
    first = _fit(_merge(auto + [span for hint in hints for span in _occurrences(title, hint)]), math)
    texts = dict.fromkeys(title[a:b] for a, b in first)
    return _fit(_merge(auto + [span for text in texts for span in _occurrences(title, text)]), math)


def canonical_hints(title: str | None, hints: tuple[str, ...] | list[str] = ()) -> tuple[str, ...]:
    """The canonical ``title_protected`` value for a title and its explicit hints."""
    if not title:
        return ()
    out: list[str] = []
    for a, b in intervals(title, hints):
        text = title[a:b]
        if text not in out:
            out.append(text)
    return tuple(out)


__all__ = ["auto_intervals", "intervals", "canonical_hints"]
