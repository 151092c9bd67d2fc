"""Handle System identifiers (RFC 3650/3651): ``prefix/suffix``, prefix digits and dots."""

from __future__ import annotations

import re
from urllib.parse import quote, unquote

from normform.ids._common import InvalidIdentifier, link_from_config, strip_prefix, passes

_RE = re.compile(r"\d+(?:\.\d+)*+/\S+")
_PREFIXES = ("https://hdl.handle.net/", "http://hdl.handle.net/", "hdl.handle.net/", "hdl:", "handle:")
RESOLVER = "https://hdl.handle.net/"


def compact(s: str) -> str:
    text = s.strip()
    was_url = "hdl.handle.net/" in text.lower()
    text = strip_prefix(text, _PREFIXES).strip()
    return unquote(text) if was_url else text


def validate(s: str) -> str:
    value = compact(s)
    if "/" not in value:
        raise InvalidIdentifier("a handle has a '/' between prefix and suffix", scheme="handle",
                                raw=value, column=len(value) + 1, expected=("'/'",))
    if not _RE.fullmatch(value):
        bad = next((i for i, ch in enumerate(value) if ch.isspace()), None)
        if bad is None:
            bad = next((i for i, ch in enumerate(value) if not (ch.isdigit() or ch == ".")), 0)
            message = "a handle prefix is digits separated by dots"
        else:
            message = "a handle contains no blanks"
        raise InvalidIdentifier(message, scheme="handle", raw=value, column=bad + 1)
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def format(s: str) -> str:  # noqa: A001
    return compact(s)


def link(s: str, config: dict | None = None) -> str:
    value = compact(s)
    return link_from_config("handle", value, config) or RESOLVER + quote(value, safe="/:;.-_~")
