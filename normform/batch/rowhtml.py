"""HTML fragments for one report row, built on the worker.

The original line and the cleaned house-style line are compared token by
token (words, single punctuation marks, runs of space) with
:class:`difflib.SequenceMatcher`; what the cleaning removed or changed is
wrapped in ``<del>`` on the original side, what it added or changed in
``<ins>`` on the cleaned side.  The token alignment is rapidfuzz's Indel
opcodes (C++; difflib gave the same highlighting at several times the cost).
"""

from __future__ import annotations

import re
from html import escape

from rapidfuzz.distance import Indel

_TOKEN = re.compile(r"\w+|\s+|[^\w\s]", re.UNICODE)


_HTML_SPECIAL = re.compile(r"[&<>\"'\x00-\x08\x0b-\x1f\x7f]")
# C0 controls and DEL: a parse error in HTML (NUL is even replaced), and invisible
# where shown -- but a stray control byte in a legacy line is what a reviewer must see.
_CONTROL = re.compile(r"[\x00-\x08\x0b-\x1f\x7f]")


def _picture(match: re.Match) -> str:
    code = ord(match.group())
    return chr(0x2421) if code == 0x7F else chr(0x2400 + code)   # Unicode "Control Pictures"


def visible(text: str) -> str:
    """HTML-escaped text with control characters shown as their control pictures (NUL as U+2400)."""
    return _CONTROL.sub(_picture, escape(text))


def _plain(text: str) -> str:
    return text


def diff_html(original: str, cleaned: str) -> tuple[str, str]:
    a, b = _TOKEN.findall(original), _TOKEN.findall(cleaned)
    # escape only a side that has something to escape (most lines have none)
    esc_a = visible if _HTML_SPECIAL.search(original) else _plain
    esc_b = visible if _HTML_SPECIAL.search(cleaned) else _plain
    left: list[str] = []
    right: list[str] = []
    for op, i1, i2, j1, j2 in Indel.opcodes(a, b):
        if op == "equal":   # the same tokens on both sides
            same = "".join(a[i1:i2])
            old = esc_a(same)
            left.append(old)
            right.append(old if esc_a is esc_b else esc_b(same))
            continue
        old, new = esc_a("".join(a[i1:i2])), esc_b("".join(b[j1:j2]))
        if old:
            left.append(f"<del>{old}</del>")
        if new:
            right.append(f"<ins>{new}</ins>")
    return "".join(left), "".join(right)


def _short(origin: str) -> str:
    """``dir/sub/file.txt:12 (Q1)`` -> ``file.txt:12 (Q1)``; the full origin is the link title."""
    return origin.rsplit("/", 1)[-1]


def record_row(seq: int, rid: str, item, house: str, kind: str, confidence: float | None,
               reasons: list[str], bad_ids: bool, origin: str) -> str:
    left, right = diff_html(item.text, house)
    conf = "–" if confidence is None else f"{confidence:.2f}"
    why = "".join(f"<li>{visible(r)}</li>" for r in reasons)
    review = "1" if reasons else "0"
    return (f'<tr id="r{seq}" data-review="{review}" data-kind="{escape(kind)}" '
            f'data-badid="{int(bad_ids)}">'
            f'<td class="n"><a href="#r{seq}" title="{visible(origin)}">{visible(_short(origin))}</a></td>'
            f'<td class="orig">{left}</td><td class="clean">{right}</td>'
            f'<td class="kind">{escape(kind)}</td><td class="conf">{conf}</td>'
            f'<td class="why"><ul>{why}</ul></td></tr>\n')


def _well_formed(mathml: str) -> str | None:
    """None when ``mathml`` parses as XML, else the parser's message."""
    from lxml import etree

    try:
        etree.fromstring(mathml.encode("utf-8"))
    except etree.XMLSyntaxError as exc:
        return str(exc)
    return None


def formula_row(item, mathml: str | None, ascii_form: str | None, error: str | None) -> str:
    where = escape(f"{item.entry or ''} {_short(item.file)}:{item.line or ''}".strip())
    if error is None and mathml is not None:
        bad = _well_formed(mathml)
        if bad:
            error, mathml = f"renderer produced malformed MathML: {bad}", None
    if error is not None:
        return (f'<tr class="bad"><td class="n">{where}</td><td class="orig">{visible(item.text)}</td>'
                f'<td class="math" colspan="2"><span class="err">{escape(error)}</span></td></tr>\n')
    return (f'<tr><td class="n">{where}</td><td class="orig">{visible(item.text)}</td>'
            f'<td class="math">{mathml}</td><td class="ascii"><code>{escape(ascii_form or "")}</code></td></tr>\n')
