"""DOI — Digital Object Identifier (syntax of the DOI Handbook, section 2).

A DOI is ``10.<registrant>/<suffix>``: the directory indicator ``10``, a
registrant code of digits that may be subdivided by dots, a slash and a
suffix of any printable characters.  DOIs compare case-insensitively
(ASCII); :func:`compact` keeps the case as written, :func:`key` folds it.
"""

from __future__ import annotations

import re
from urllib.parse import quote, unquote

from normform.ids._common import InvalidIdentifier, link_from_config, strip_prefix, passes

_PREFIXES = (
    "https://doi.org/", "http://doi.org/", "https://dx.doi.org/", "http://dx.doi.org/",
    "doi.org/", "dx.doi.org/", "info:doi/", "doi:", "doi ",
)
_PREFIX_RE = re.compile(r"10\.\d+(?:\.\d+)*+/")
RESOLVER = "https://doi.org/"


def compact(s: str) -> str:
    """Strip blanks, ``doi:`` and resolver URLs (undoing percent-encoding there)."""
    text = s.strip()
    low = text.lower()
    was_url = low.startswith(("http", "doi.org", "dx.doi.org"))
    text = strip_prefix(text, _PREFIXES).strip()
    return unquote(text) if was_url else text


def validate(s: str) -> str:
    value = compact(s)
    if not value:
        raise InvalidIdentifier("empty DOI", scheme="doi", raw=s)
    if not value.startswith("10."):
        raise InvalidIdentifier("a DOI starts with the directory indicator '10.'", scheme="doi",
                                raw=value, expected=("'10.'",))
    m = _PREFIX_RE.match(value)
    if m is None:
        slash = value.find("/")
        if slash < 0:
            raise InvalidIdentifier("DOI has no '/' between prefix and suffix", scheme="doi",
                                    raw=value, column=len(value) + 1, expected=("'/'",))
        bad = next((i for i, ch in enumerate(value[3:slash], 3) if not (ch.isdigit() or ch == ".")), 3)
        raise InvalidIdentifier("DOI registrant code must be digits separated by dots",
                                scheme="doi", raw=value, column=bad + 1, expected=("digit", "'.'"))
    suffix = value[m.end():]
    if not suffix:
        raise InvalidIdentifier("DOI suffix is empty", scheme="doi", raw=value,
                                column=len(value) + 1, expected=("suffix",))
    for i, ch in enumerate(value):
        if ch.isspace() or not ch.isprintable():
            raise InvalidIdentifier("DOI contains a blank or control character", scheme="doi",
                                    raw=value, column=i + 1)
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def key(s: str) -> str:
    """Comparison key: DOIs are case-insensitive for ASCII letters."""
    return compact(s).lower()


def format(s: str) -> str:  # noqa: A001 - the stdnum-style name
    return compact(s)


def link(s: str, config: dict | None = None) -> str:
    value = compact(s)
    # '/' stays readable; characters with URL meaning are escaped (DOI Handbook, "encoding").
    return link_from_config("doi", value, config) or RESOLVER + quote(value, safe="/:;()[]-._~!$&'*+,=@")
