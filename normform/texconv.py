"""TeX <-> Unicode for bibliographic text, through pylatexenc.

``to_unicode`` reads BibTeX field text (accents, ``\\&``, ``--``, math such as
``$\\pi$``); ``to_latex`` writes text so that ``to_unicode`` gives it back:
LaTeX specials are escaped, ligature pairs (``--``, ``''``) broken with ``{}``,
and with ``ascii=True`` every non-ASCII letter becomes a braced command.
"""

from __future__ import annotations

import re
import unicodedata
from functools import lru_cache

_CARET = "\ue000"  # private-use stand-in: pylatexenc drops the argument of \^{}
_NEEDS_TEX = re.compile(r"[\\{}$~%`'\-\u00a0]")
_SPACES = re.compile(r"[ \t\r\n\u00a0]+")
_ONLY_BRACES = re.compile(r"[\\$~%`']")  # absent: braces and dashes are all the TeX there is


@lru_cache(maxsize=1)
def _reader():
    from pylatexenc.latex2text import LatexNodes2Text
    return LatexNodes2Text(strict_latex_spaces=True)


@lru_cache(maxsize=1)
def _encoder():
    from pylatexenc.latexencode import UnicodeToLatexEncoder
    return UnicodeToLatexEncoder(replacement_latex_protection="braces-all",
                                 unknown_char_policy="keep", unknown_char_warning=False)


def to_unicode(tex: str) -> str:
    """Unicode text of a TeX fragment; runs of blanks (and ``~``) become one space."""
    if _NEEDS_TEX.search(tex) is None:
        return _SPACES.sub(" ", tex).strip()
    if _ONLY_BRACES.search(tex) is None:
        # Fast path with pylatexenc's result: groups vanish, -- and --- are dashes.
        text = tex.replace("---", "\u2014").replace("--", "\u2013").replace("{", "").replace("}", "")
        return _SPACES.sub(" ", text).strip()
    tex = tex.replace("\\^{}", _CARET).replace("\\textasciicircum{}", _CARET)
    text = _reader().latex_to_text(tex).replace(_CARET, "^")
    if not text.isascii():  # \v{a} gives a + combining caron; store the composed letter
        text = unicodedata.normalize("NFC", text)
    return _SPACES.sub(" ", text).strip()


_SPECIALS = {
    "\\": "\\textbackslash{}", "{": "\\{", "}": "\\}", "&": "\\&", "%": "\\%", "$": "\\$",
    "#": "\\#", "_": "\\_", "~": "\\textasciitilde{}", "^": "\\^{}",
}
_SPECIAL_RE = re.compile(r"[\\{}&%$#_~^]|--|''|``|,,|<<|>>|!`|\?`")


def _escape(match: re.Match[str]) -> str:
    s = match.group(0)
    return _SPECIALS.get(s) or s[0] + "{}" + s[1]


def to_latex(text: str, ascii: bool = False) -> str:
    """TeX source for ``text``; specials escaped, non-ASCII encoded when ``ascii``."""
    out = _SPECIAL_RE.sub(_escape, text)
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


__all__ = ["to_unicode", "to_latex"]
