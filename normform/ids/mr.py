"""MR numbers of the Mathematical Reviews database.

An MR number is up to 7 digits, shown zero-padded to 7 with an ``MR`` prefix
(``MR0045386``); the compact form is the 7-digit string.  A review may also
carry a review code, either ``YYYYi:NNNNN`` (``2006j:05214``, year, issue
letter, number) or the older ``VV #NNNN`` (``58 #1234``); that code is
returned separately by :func:`split` and kept in ``Identifier.detail``.
An entry cited only by its review code keeps that code as its value.

No link template ships: users set ``[tool.normform.links] mr = "...{id}..."``.
"""

from __future__ import annotations

import re

from normform.ids._common import InvalidIdentifier, link_from_config, passes

_NUMBER_RE = re.compile(r"\d{1,8}")
REVIEW_RE = re.compile(r"(\d{2}|\d{4})([a-l]?)\s*:\s*(\d{1,6}[a-z]?)|(\d{1,3})\s*#\s*(\d{1,6}[a-z]?)")
_SPLIT_RE = re.compile(r"(?i)^(?:mr\s*#?\s*)?(\d{1,8})?\s*(?:\((.*)\))?$")


def _clean_review(code: str) -> str:
    m = REVIEW_RE.fullmatch(code.strip())
    if m is None:
        return code.strip()
    if m.group(1):
        return f"{m.group(1)}{m.group(2)}:{m.group(3)}"
    return f"{m.group(4)} #{m.group(5)}"


def split(s: str) -> tuple[str, str | None]:
    """``"MR1234567 (2006j:05214)"`` -> ``("1234567", "2006j:05214")``."""
    text = s.strip()
    core = re.sub(r"(?i)^mr\s*#?\s*", "", text)
    if REVIEW_RE.fullmatch(core):
        return _clean_review(core), None
    m = _SPLIT_RE.match(text)
    if m is None or m.group(1) is None:
        return core, None
    number = m.group(1)
    number = number.zfill(7) if len(number) <= 7 else number
    review = _clean_review(m.group(2)) if m.group(2) else None
    return number, review


def compact(s: str) -> str:
    return split(s)[0]


def is_review_code(value: str) -> bool:
    return REVIEW_RE.fullmatch(value) is not None


def validate(s: str) -> str:
    value, review = split(s)
    if is_review_code(value):
        return value
    if not value:
        raise InvalidIdentifier("empty MR number", scheme="mr", raw=s)
    if not _NUMBER_RE.fullmatch(value):
        bad = next((i for i, ch in enumerate(value) if not ch.isdigit()), 0)
        raise InvalidIdentifier("an MR number is digits only", scheme="mr", raw=value,
                                column=bad + 1, expected=("digits", "review code YYYYi:NNNNN"))
    if int(value) == 0:
        raise InvalidIdentifier("MR number 0 does not exist", scheme="mr", raw=value)
    if review is not None and not is_review_code(review):
        raise InvalidIdentifier(f"bad review code {review!r}", scheme="mr", raw=s,
                                expected=("YYYYi:NNNNN", "VV #NNNN"))
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def format(s: str) -> str:  # noqa: A001
    value = compact(s)
    return value if is_review_code(value) else "MR" + value


def link(s: str, config: dict | None = None) -> str | None:
    """Only from the user's template; review codes have no link."""
    value = compact(s)
    if is_review_code(value):
        return None
    return link_from_config("mr", value, config)
