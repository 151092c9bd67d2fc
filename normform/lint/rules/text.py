"""Rules about the characters of plain-text values."""

from __future__ import annotations

import re
import unicodedata
from collections import Counter

from normform.lint.fields import BLOCK, CODE, FORMULA, LINE, WORD, strings
from normform.lint.findings import Fix
from normform.lint.registry import rule

# Invisible format characters that only cause trouble in catalogue text.
_INVISIBLE = set("\u200b\u200c\u200d\u2060\ufeff\u00ad\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


@rule("not-nfc", "text", "warning", "text is not in Unicode normal form C (NFC)", fixable=True)
def not_nfc(entry, ctx):
    for path, value, role in strings(entry):
        if value.isascii() or unicodedata.is_normalized("NFC", value):
            continue
        fixed = unicodedata.normalize("NFC", value)
        first = next((i for i in range(len(value))
                      if not unicodedata.is_normalized("NFC", value[: i + 2])), 0)
        fix = Fix("normalise to NFC", (entry.replace_value(path, fixed),))
        yield entry.finding(not_nfc.rule, "this text uses decomposed characters (e.g. a letter followed by "
                            "a combining accent); normalise it to NFC", path,
                            span=entry.string_span(path, first, first + 2), fix=fix)


def _bad_char(c: str, role: str) -> bool:
    if c in _INVISIBLE:
        return True
    if unicodedata.category(c) != "Cc":
        return False
    if role in (BLOCK, CODE):
        return c not in "\n\t\r"
    return True


@rule("control-character", "text", "error", "text holds control or invisible format characters", fixable=True)
def control_character(entry, ctx):
    for path, value, role in strings(entry):
        if value.isprintable() and not any(c in _INVISIBLE for c in value):
            continue
        bad = [i for i, c in enumerate(value) if _bad_char(c, role)]
        if not bad:
            continue
        keep = []
        for c in value:
            if not _bad_char(c, role):
                keep.append(c)
            elif c in "\n\t\r" and role != CODE:
                keep.append(" ")
        fixed = re.sub(r" {2,}", " ", "".join(keep)) if role in (LINE, WORD, FORMULA) else "".join(keep)
        fix = None if role == CODE else Fix("remove control characters", (entry.replace_value(path, fixed),))
        name = unicodedata.name(value[bad[0]], f"U+{ord(value[bad[0]]):04X}")
        yield entry.finding(control_character.rule, f"remove the control character {name} "
                            f"({len(bad)} in this value)", path, span=entry.string_span(path, bad[0]), fix=fix)


@rule("trailing-whitespace", "text", "note", "a value or a line of it starts or ends with spaces", fixable=True)
def trailing_whitespace(entry, ctx):
    for path, value, role in strings(entry):
        if role in (BLOCK, CODE):
            lines = value.split("\n")
            fixed = "\n".join(line.rstrip(" \t") for line in lines)
            if fixed == value:
                continue
            pos = next(m.start() for m in re.finditer(r"[ \t]+(?=\n|$)", value))
            fix = None if role == CODE else Fix("strip trailing spaces", (entry.replace_value(path, fixed),))
            yield entry.finding(trailing_whitespace.rule, "remove the spaces at the end of the line", path,
                                span=entry.string_span(path, pos), fix=fix)
        else:
            fixed = value.strip()
            if fixed == value or not fixed:
                continue
            pos = 0 if value[0].isspace() else len(fixed) + (len(value) - len(value.lstrip()))
            yield entry.finding(trailing_whitespace.rule, "remove the spaces around this value", path,
                                span=entry.string_span(path, pos),
                                fix=Fix("strip surrounding spaces", (entry.replace_value(path, fixed),)))


# A number range "12-34", not part of an identifier, a date or a longer number chain.
_RANGE = re.compile(r"(?<![\w./:\-–—])\d{1,6}( ?)([-–—])\1\d{1,6}(?![\w/:\-–—]|\.\d)")
_DASH_NAMES = {"-": "a hyphen '-'", "–": "an en dash '–'", "—": "an em dash '—'"}


@rule("mixed-dashes", "text", "note", "number ranges in the entry are written with different dashes")
def mixed_dashes(entry, ctx):
    seen = []
    masked: dict[tuple, list[tuple[int, int]]] = {}
    if "references" in entry.data:   # identifiers (ISSN 0015-0517, ISBNs) are not ranges
        from normform.lint.refs_facts import reference_ids

        for _ref, _ident, (path, start, end) in reference_ids(entry):
            masked.setdefault(path, []).append((start, end))
    for path, value, role in strings(entry):
        if role not in (LINE, BLOCK):
            continue
        spans = masked.get(path, ())
        for m in _RANGE.finditer(value):
            if not any(a <= m.start() < b for a, b in spans):
                seen.append((path, m.start(2), m.group(2)))
    styles = Counter(d for _, _, d in seen)
    if len(styles) < 2:
        return
    # the most used style wins; ties go to the one used first
    first_use = {d: i for i, (_, _, d) in reversed(list(enumerate(seen)))}
    main = max(styles, key=lambda d: (styles[d], -first_use[d]))
    for path, pos, dash in seen:
        if dash != main:
            yield entry.finding(mixed_dashes.rule, f"this range uses {_DASH_NAMES[dash]} but the entry's other "
                                f"ranges use {_DASH_NAMES[main]}; write all ranges one way", path,
                                span=entry.string_span(path, pos))


# TeX left in plain text: accent macros, letter macros, inline math.
_TEX = re.compile(
    r"\{\\[`'^\"~=.uvHcdbtkr]\s*\{?[A-Za-z]\}?\}"        # {\"o}  {\H{o}}
    r"|\\[`'^\"~=.](?:\{[A-Za-z]\}|[A-Za-z])"           # \"o  \'{e}
    r"|\\[uvHcdbtkr]\{[A-Za-z]\}"                       # \v{s}
    r"|\\(?:ss|ae|AE|oe|OE|aa|AA|o|O|l|L|i|j)\b(?:\{\})?"  # \ss \o
    r"|\$[^$\n]{1,80}\$"                                # $n \choose k$
    r"|\\[A-Za-z]{2,}(?:\{[^{}\n]*\})*"                 # \emph{...}, \binom{n}{k}
)


def _tex_to_text(fragment: str) -> str | None:
    from pylatexenc.latex2text import LatexNodes2Text

    text = LatexNodes2Text(math_mode="text").latex_to_text(fragment).strip()
    if not text or any(c in text for c in "\\{}$") or "\u00a0" in text:
        return None
    return unicodedata.normalize("NFC", text)


@rule("tex-in-text", "text", "warning", "TeX markup left in a plain-text value", fixable=True)
def tex_in_text(entry, ctx):
    for path, value, role in strings(entry):
        if role not in (LINE, BLOCK) or ("\\" not in value and "$" not in value):
            continue
        matches = list(_TEX.finditer(value))
        if not matches:
            continue
        pieces, last, ok = [], 0, True
        for m in matches:
            plain = _tex_to_text(m.group())
            if plain is None:
                ok = False
                break
            pieces += [value[last:m.start()], plain]
            last = m.end()
        fix = None
        if ok:
            fixed = "".join(pieces) + value[last:]
            fix = Fix("convert TeX to Unicode text", (entry.replace_value(path, fixed),))
        m = matches[0]
        yield entry.finding(tex_in_text.rule, f"write {m.group()!r} as plain Unicode text"
                            + (f" ({_tex_to_text(m.group())!r})" if ok else ""), path,
                            span=entry.string_span(path, m.start(), m.end()), fix=fix)
