"""Terms as decimal text, within the documented size of a term (20,000 bits).

Python refuses ``int`` <-> ``str`` conversion beyond
``sys.get_int_max_str_digits()`` (4,300 digits by default): the conversion is
quadratic, and the limit keeps untrusted text from costing unbounded time.
A listed term may have up to :data:`MAX_BITS` bits (about 6,021 digits), so
the code that reads or prints terms raises the limit to that bound, and only
inside :func:`term_digits_allowed`, never to "unlimited" and never for good.
Anything longer is refused with the term's position and the bound.
"""

from __future__ import annotations

import math
import re
import sys
import threading
from contextlib import contextmanager
from fractions import Fraction
from typing import Iterator

from normform.formula.recurrence import MAX_BITS

Number = int | Fraction


def max_digits(bits: int = MAX_BITS) -> int:
    """Decimal digits of the largest number of ``bits`` bits (20,000 bits: 6,021 digits)."""
    return max(1, math.floor(bits * math.log10(2)) + 1)


TERM_DIGITS = max_digits(MAX_BITS)
_SHORT = 600            # below the smallest limit Python allows (640): always safe to convert

_lock = threading.Lock()
_depth = 0
_saved: int | None = None


@contextmanager
def term_digits_allowed(digits: int = TERM_DIGITS) -> Iterator[None]:
    """Inside the block, ``int`` <-> ``str`` conversions of up to ``digits`` digits work.

    The interpreter-wide limit is raised only when it is lower (``0``, no
    limit, is left alone), and put back when the outermost block ends.
    """
    global _depth, _saved
    getter = getattr(sys, "get_int_max_str_digits", None)
    if getter is None:      # an interpreter without the limit
        yield
        return
    with _lock:
        current = getter()
        if _depth == 0:
            _saved = current
        _depth += 1
        if current != 0 and current < digits:
            sys.set_int_max_str_digits(digits)
    try:
        yield
    finally:
        with _lock:
            _depth -= 1
            if _depth == 0 and _saved is not None:
                sys.set_int_max_str_digits(_saved)
                _saved = None


class TermTooLarge(ValueError):
    """A term beyond the size a term may have."""


def _too_large(what: str, digits: int, bits: int) -> TermTooLarge:
    return TermTooLarge(f"{what} has {digits:,} digits; a term may have at most {bits:,} bits "
                        f"(about {max_digits(bits):,} digits)")


_LONG = re.compile(r"([+-]?)([0-9]+)(?:/([0-9]+))?", re.ASCII)
_EXPONENT = re.compile(r"[eE]([+-]?[0-9_]+)$", re.ASCII)


def parse_term(text: str, what: str = "the term", max_bits: int = MAX_BITS) -> Number:
    """``text`` (an integer, ``p/q`` or a decimal) as an exact number.

    Numerator and denominator may have as many digits as a number of
    ``max(max_bits, MAX_BITS)`` bits (6,021 for 20,000 bits).  Raises
    ``ValueError`` for text that is not a number and :class:`TermTooLarge` (a
    ``ValueError`` too), naming ``what`` and the bound, for a longer one.
    Whether a term of that many digits is too large for a check is the
    check's business (it stops at its own bit limit).
    """
    bits = max(max_bits, MAX_BITS)
    most = max_digits(bits)
    s = text.strip()
    if len(s) <= _SHORT:
        exponent = _EXPONENT.search(s)
        if exponent is not None and abs(int(exponent.group(1))) > most + _SHORT:
            raise _too_large(what, abs(int(exponent.group(1))), bits)   # 1e999999999: never expanded
        value = Fraction(s)
        bound = 10 ** most
        if abs(value.numerator) >= bound or value.denominator >= bound:
            raise TermTooLarge(f"{what} has more than {most:,} digits; a term may have at most {bits:,} bits "
                               f"(about {most:,} digits)")
    else:
        m = _LONG.fullmatch(s)
        if m is None:
            raise ValueError(f"{what} is not an integer or p/q")
        longest = max(len(m.group(2)), len(m.group(3) or ""))
        if longest > most:
            raise _too_large(what, longest, bits)
        with term_digits_allowed(most):
            num = int(m.group(2))
            den = int(m.group(3)) if m.group(3) else 1
        value = Fraction(-num if m.group(1) == "-" else num, den)
    return value.numerator if value.denominator == 1 else value


def term_text(value: object) -> str:
    """``str(value)`` that also works for numbers of up to four times :data:`MAX_BITS` bits."""
    try:
        return str(value)
    except ValueError:
        pass
    if isinstance(value, Fraction):
        return f"{term_text(value.numerator)}/{term_text(value.denominator)}"
    if isinstance(value, int) and not isinstance(value, bool):
        digits = max_digits(abs(value).bit_length())
        if digits <= 4 * TERM_DIGITS:      # still cheap; larger values are never terms
            with term_digits_allowed(max(digits, TERM_DIGITS)):
                return str(value)
        raise TermTooLarge(f"an integer of {abs(value).bit_length():,} bits is too large to write out")
    raise ValueError(f"cannot write {type(value).__name__} as text")
