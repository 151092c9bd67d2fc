"""URLs, checked against the generic syntax of RFC 3986 (section 3 and appendix A).

Non-ASCII letters are accepted, as in IRIs (RFC 3987), because legacy lines carry them.
"""

from __future__ import annotations

import re

from normform.ids._common import InvalidIdentifier, passes

# RFC 3986: scheme = ALPHA *( ALPHA / DIGIT / "+" / "-" / "." )
_SCHEME_RE = re.compile(r"[A-Za-z][A-Za-z0-9+.\-]*")
# unreserved / reserved (gen-delims, sub-delims) / "%" (checked below as pct-encoded)
_ALLOWED = frozenset("ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789"
                     "-._~:/?#[]@!$&'()*+,;=%")
_HEX = frozenset("0123456789abcdefABCDEF")


def compact(s: str) -> str:
    """Strip blanks, angle brackets and a TeX ``\\url{...}`` wrapper."""
    text = s.strip()
    if text.startswith("\\url{") and text.endswith("}"):
        text = text[5:-1]
    if text.startswith("<") and text.endswith(">"):
        text = text[1:-1]
    if text.lower().startswith("url:"):
        text = text[4:]
    return text.strip()


def validate(s: str) -> str:
    value = compact(s)
    colon = value.find(":")
    if colon <= 0 or not _SCHEME_RE.fullmatch(value[:colon]):
        raise InvalidIdentifier("a URL starts with a scheme such as 'https:'", scheme="url",
                                raw=value, expected=("scheme ':'",))
    for i, ch in enumerate(value):
        if ch not in _ALLOWED and ord(ch) < 128:
            raise InvalidIdentifier(f"character {ch!r} is not allowed in a URL (RFC 3986)",
                                    scheme="url", raw=value, column=i + 1)
        if ch == "%" and not (len(value[i + 1:i + 3]) == 2 and set(value[i + 1:i + 3]) <= _HEX):
            raise InvalidIdentifier("'%' must be followed by two hex digits", scheme="url",
                                    raw=value, column=i + 1, expected=("%HH",))
    rest = value[colon + 1:]
    scheme = value[:colon].lower()
    if scheme in ("http", "https", "ftp"):
        if not rest.startswith("//") or len(rest) == 2 or rest[2] in "/?#":
            raise InvalidIdentifier(f"a {scheme} URL needs a host after '//'", scheme="url",
                                    raw=value, column=colon + 2, expected=("'//host'",))
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def format(s: str) -> str:  # noqa: A001
    return compact(s)


def link(s: str, config: dict | None = None) -> str:
    return compact(s)
