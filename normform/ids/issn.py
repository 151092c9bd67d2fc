"""ISSN (ISO 3297); check digit by python-stdnum."""

from __future__ import annotations

from stdnum import issn as _issn
from stdnum.exceptions import ValidationError

from normform.ids._common import InvalidIdentifier, link_from_config, strip_prefix, passes

RESOLVER = "https://portal.issn.org/resource/ISSN/"  # the ISSN International Centre's portal (common practice)


def compact(s: str) -> str:
    text = strip_prefix(s.strip(), ("issn:", "issn", "eissn:", "e-issn:"))
    return _issn.compact(text.strip()).upper()


def validate(s: str) -> str:
    value = compact(s)
    try:
        _issn.validate(value)
    except ValidationError as exc:
        name = type(exc).__name__
        if name == "InvalidChecksum":
            want = _issn.calc_check_digit(value[:7])
            raise InvalidIdentifier(f"bad ISSN check digit {value[-1]} (expected {want})",
                                    scheme="issn", raw=value, column=8) from None
        if name == "InvalidLength":
            raise InvalidIdentifier(f"an ISSN has 8 characters, not {len(value)}", scheme="issn",
                                    raw=value, expected=("NNNN-NNNC",)) from None
        bad = next((i for i, ch in enumerate(value) if not ch.isdigit()), 0)
        raise InvalidIdentifier("ISSN may hold only digits (and a final X)", scheme="issn",
                                raw=value, column=bad + 1) from None
    return value


def is_valid(s: str) -> bool:
    return passes(validate, s)


def format(s: str) -> str:  # noqa: A001
    value = compact(s)
    return _issn.format(value) if len(value) == 8 else value


def link(s: str, config: dict | None = None) -> str:
    value = format(s)
    return link_from_config("issn", value, config) or RESOLVER + value
