"""ISBN-10 and ISBN-13 (ISO 2108); check digits and hyphenation by python-stdnum."""

from __future__ import annotations

from stdnum import isbn as _isbn
from stdnum.exceptions import ValidationError

from normform.ids._common import InvalidIdentifier, strip_prefix, passes


def compact(s: str) -> str:
    """Digits (and a final X) only, ``ISBN`` prefix removed."""
    text = strip_prefix(s.strip(), ("isbn-13:", "isbn-10:", "isbn-13", "isbn-10", "isbn:", "isbn"))
    return _isbn.compact(text.strip()).upper()


def _expected_check(value: str) -> str | None:
    try:
        if len(value) == 10:
            return _isbn._calc_isbn10_check_digit(value[:9])
        if len(value) == 13:
            return _isbn.ean.calc_check_digit(value[:12])
    except Exception:  # non-digits: no check digit to suggest
        return None
    return None


def validate(s: str) -> str:
    value = compact(s)
    try:
        _isbn.validate(value)
    except ValidationError as exc:
        name = type(exc).__name__
        if name == "InvalidChecksum":
            want = _expected_check(value)
            hint = f" (expected {want})" if want else ""
            raise InvalidIdentifier(f"bad ISBN check digit {value[-1]}{hint}", scheme="isbn",
                                    raw=value, column=len(value)) from None
        if name == "InvalidLength":
            raise InvalidIdentifier(f"an ISBN has 10 or 13 digits, not {len(value)}",
                                    scheme="isbn", raw=value, expected=("10 digits", "13 digits")) from None
        if name == "InvalidComponent":
            raise InvalidIdentifier("an ISBN-13 starts with 978 or 979", scheme="isbn",
                                    raw=value, expected=("978", "979")) from None
        bad = next((i for i, ch in enumerate(value) if not ch.isdigit()), 0)
        raise InvalidIdentifier("ISBN may hold only digits (and a final X in ISBN-10)",
                                scheme="isbn", raw=value, column=bad + 1) from None
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def to_isbn13(s: str) -> str:
    """Compact ISBN-13 for a valid ISBN-10 or ISBN-13."""
    return compact(_isbn.to_isbn13(validate(s)))


def to_isbn10(s: str) -> str:
    """Compact ISBN-10 (only 978- ISBN-13s have one)."""
    try:
        return compact(_isbn.to_isbn10(validate(s)))
    except ValidationError as exc:
        raise InvalidIdentifier(f"no ISBN-10 for this ISBN-13: {exc}", scheme="isbn", raw=s) from None


def format(s: str) -> str:  # noqa: A001
    """Hyphenated form by the registration-group ranges python-stdnum ships."""
    value = compact(s)
    try:
        return _isbn.format(value)
    except Exception:
        return value


def link(s: str, config: dict | None = None) -> None:
    """No default resolver for ISBNs."""
    return None
