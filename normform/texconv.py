"""TeX <-> Unicode for bibliographic text, through pylatexenc.

``to_unicode`` reads BibTeX field text (accents, ``\\&``, ``--``, math such as
``$\\pi$``); ``to_latex`` writes text so that ``to_unicode`` gives it back:
LaTeX specials are escaped, ligature pairs (``--``, ``''``) broken with ``{}``,
and with ``ascii=True`` every non-ASCII letter becomes a braced command.

Inline math in the model's text fields is kept as TeX between dollars (``On $q$-analogues``):
:func:`math_spans` finds it, ``to_unicode(tex, keep_math=True)`` keeps it as typed instead of
reading ``$\\pi$`` as "π", and ``to_latex(text, keep_math=True)`` writes it verbatim in a group
(``{$q$}``) while a dollar outside math is still escaped (``costs \\$5``).
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

_CARET = "\ue000"  # private-use stand-in: pylatexenc drops the argument of \^{}
_LBRACE, _RBRACE = "\ue003", "\ue004"   # stand-ins for \textbraceleft{} and \textbraceright{}
_NEEDS_TEX = re.compile(r"[\\{}$~%`'\-\u00a0]")
_SPACES = re.compile(r"[ \t\r\n\u00a0]+")
_ONLY_BRACES = re.compile(r"[\\$~%`']")  # absent: braces and dashes are all the TeX there is


# Inline math: a span that TeX reads as math and that BibTeX can carry verbatim.
#   opener   an unescaped "$" (backslash escapes are consumed left to right, so "\$" is text
#            and "\\$" opens) that is not part of a run "$$" (display math; not a title's),
#            followed by a non-blank;
#   body     TeX tokens on one line: a character other than $ \ { } % # & (those only as escapes
#            such as "\%", which LaTeX would otherwise read as a comment, parameter or alignment),
#            a backslash escape, or a group "{...}" / "\{...\}" nested at most three deep: braces are
#            balanced as BibTeX counts them (it counts escaped braces too);
#   closer   "$" after a non-blank, not followed by a digit or another "$";
#   length   at most MATH_MAX characters, dollars included (checked after the match).
# The edge rules are pandoc's (Pandoc User's Guide, 8.13.1 "Extension: tex_math_dollars"), so
# "from $5 to $10" and "$20,000 and $30,000" stay text; as in TeX the closer is the first
# unescaped dollar, so "$5 and $x$" is text then math.  Every alternative starts with a
# different character and every repeat is possessive, so each character is scanned a bounded
# number of times (linear, no catastrophic backtracking).
MATH_MAX = 200
_MATH_TOKEN = r"[^$\\{}%#&\n]|\\[^{}\n]"
_MATH_GROUP = ""
for _ in range(3):
    _inner = "(?:" + _MATH_TOKEN + _MATH_GROUP + ")*+"
    _MATH_GROUP = r"|\{" + _inner + r"\}|\\\{" + _inner + r"\\\}"
_MATH = r"\$(?!\s)(?:" + _MATH_TOKEN + _MATH_GROUP + r")*+(?<!\s)\$(?![\d$])"
_MATH_SCAN = re.compile(r"\\[\s\S]|\$\$++|(" + _MATH + ")")
_MARK = "\ue001"  # private-use stand-in for a math span while the text around it is read


def math_spans(text: str) -> list[tuple[int, int]]:
    """(start, end) of each inline math span ``$...$`` of ``text``, in order (see above)."""
    if "$" not in text:
        return []
    return [m.span(1) for m in _MATH_SCAN.finditer(text)
            if m.start(1) >= 0 and m.end(1) - m.start(1) <= MATH_MAX]


def written_math(text: str, ascii: bool = False) -> list[tuple[int, int]]:
    """The math spans that ``to_latex(text, ascii, keep_math=True)`` writes verbatim: all of
    them, or with ``ascii`` those without a non-ASCII character (the others go as text)."""
    spans = math_spans(text)
    return [(a, b) for a, b in spans if text[a:b].isascii()] if ascii else spans


@lru_cache(maxsize=1)
def _reader():
    from pylatexenc.latex2text import LatexNodes2Text
    return LatexNodes2Text(strict_latex_spaces=True)


@lru_cache(maxsize=1)
def _encoder():
    from pylatexenc.latexencode import UnicodeToLatexEncoder
    return UnicodeToLatexEncoder(replacement_latex_protection="braces-all",
                                 unknown_char_policy="keep", unknown_char_warning=False)


def to_unicode(tex: str, keep_math: bool = False) -> str:
    """Unicode text of a TeX fragment; runs of blanks (and ``~``) become one space.

    With ``keep_math`` an inline math span stays ``$...$`` as written (blank runs in it
    become one space).  Should the text around a span stop it being one (``\\textbackslash{}$x$``
    reads as ``\\$x$``, an escaped dollar), the fragment is read as without ``keep_math``.
    """
    if keep_math and "$" in tex and _MARK not in tex:
        spans = math_spans(tex)
        if spans:
            rest, pos = [], 0
            for a, b in spans:
                rest.append(tex[pos:a])
                pos = b
            rest.append(tex[pos:])
            parts = to_unicode(_MARK.join(rest)).split(_MARK)
            if len(parts) == len(spans) + 1:
                out, kept, pos = [parts[0]], [], len(parts[0])
                for (a, b), part in zip(spans, parts[1:]):
                    math = _SPACES.sub(" ", tex[a:b])
                    kept.append((pos, pos + len(math)))
                    out += [math, part]
                    pos += len(math) + len(part)
                text = "".join(out)
                # escaped dollars may add spans (\$x\$ reads as $x$); the kept ones must stay
                if set(kept) <= set(math_spans(text)):
                    return text
    if _NEEDS_TEX.search(tex) is None:
        return _SPACES.sub(" ", tex).strip()
    if _ONLY_BRACES.search(tex) is None:
        # Fast path with pylatexenc's result: groups vanish, -- and --- are dashes.
        text = tex.replace("---", "\u2014").replace("--", "\u2013").replace("{", "").replace("}", "")
        return _SPACES.sub(" ", text).strip()
    tex = tex.replace("\\^{}", _CARET).replace("\\textasciicircum{}", _CARET)
    lone = "\\textbrace" in tex   # pylatexenc drops these (how to_latex writes a lone brace)
    if lone:
        tex = tex.replace("\\textbraceleft{}", _LBRACE).replace("\\textbraceright{}", _RBRACE)
    text = _reader().latex_to_text(tex).replace(_CARET, "^")
    if lone:
        text = text.replace(_LBRACE, "{").replace(_RBRACE, "}")
    if not text.isascii():  # \v{a} gives a + combining caron; store the composed letter
        text = unicodedata.normalize("NFC", text)
    return _SPACES.sub(" ", text).strip()


_SPECIALS = {
    "\\": "\\textbackslash{}", "{": "\\{", "}": "\\}", "&": "\\&", "%": "\\%", "$": "\\$",
    "#": "\\#", "_": "\\_", "~": "\\textasciitilde{}", "^": "\\^{}",
}
# a ligature pair is broken after each character followed by its twin, so "---" is "-{}-{}-"
_SPECIAL_RE = re.compile(r"[\\{}&%$#_~^]|([-'`,<>])(?=\1)|[!?]`")


# BibTeX counts braces even after a backslash, so a lone "\{" leaves the field open and
# the rest of the file unreadable: when a text's braces do not pair up, they are written
# as commands with balanced groups instead
_LONE_BRACES = {**_SPECIALS, "{": "\\textbraceleft{}", "}": "\\textbraceright{}"}


def _escaper(specials: dict[str, str]):
    def escape(match: re.Match[str]) -> str:
        s = match.group(0)
        if match.group(1):
            return s + "{}"
        return specials.get(s) or s[0] + "{}" + s[1]
    return escape


_escape, _escape_lone_braces = _escaper(_SPECIALS), _escaper(_LONE_BRACES)


def _braces_balance(text: str) -> bool:
    """Do the braces of ``text`` pair up as BibTeX counts them (never more closed than opened)?"""
    depth = 0
    for ch in text:
        if ch == "{":
            depth += 1
        elif ch == "}":
            depth -= 1
            if depth < 0:
                return False
    return depth == 0


def to_latex(text: str, ascii: bool = False, keep_math: bool = False) -> str:
    """TeX source for ``text``; specials escaped, non-ASCII encoded when ``ascii``.

    With ``keep_math`` each inline math span is written as is in a group (``{$q$}``: the
    group keeps BibTeX styles from changing its case); with ``ascii`` a span holding a
    non-ASCII character is written as text instead (its dollars escaped), so that the
    output stays ASCII and still reads back to ``text``.
    """
    if keep_math and "$" in text:
        math = written_math(text, ascii)
        if math:
            out, pos = [], 0
            for a, b in math:
                out += [to_latex(text[pos:a], ascii), "{" + text[a:b] + "}"]
                pos = b
            out.append(to_latex(text[pos:], ascii))
            return "".join(out)
    lone = ("{" in text or "}" in text) and not _braces_balance(text)
    out = _SPECIAL_RE.sub(_escape_lone_braces if lone else _escape, text)
    if ascii and not out.isascii():
        out = "".join(ch if ch.isascii() else _char_to_latex(ch) for ch in out)
    return out


@lru_cache(maxsize=4096)
def _char_to_latex(ch: str) -> str:
    """TeX for one character, or the character itself when TeX would not read it back."""
    tex = _encoder().unicode_to_latex(ch)
    if not tex.isascii():  # pylatexenc has no entry: try base letter + accent command
        parts = unicodedata.normalize("NFD", ch)
        if len(parts) == 2 and parts[0].isascii() and parts[1] in _ACCENTS:
            tex = "{\\" + _ACCENTS[parts[1]] + "{" + parts[0] + "}}"
    return tex if tex.isascii() and to_unicode(tex) == ch else ch


# Combining marks and the TeX accent commands that put them on a letter.
_ACCENTS = {"\u0300": "`", "\u0301": "'", "\u0302": "^", "\u0303": "~", "\u0304": "=", "\u0306": "u",
            "\u0307": ".", "\u0308": '"', "\u030a": "r", "\u030b": "H", "\u030c": "v", "\u0323": "d",
            "\u0327": "c", "\u0328": "k"}


def protect_literal_braces(text: str) -> str:
    """Escape only braces and backslashes: for verbatim fields such as URLs."""
    return text.replace("\\", "\\textbackslash{}").replace("{", "\\{").replace("}", "\\}")


__all__ = ["to_unicode", "to_latex", "math_spans", "written_math", "MATH_MAX"]
