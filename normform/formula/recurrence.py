"""Iterative evaluation of recurrences ``a(n) = F(n, a)``.

The rule ``F`` is any callable ``rule(n, lookup)`` where ``lookup(m)`` returns
the already computed ``a(m)``.  Terms are computed in increasing ``n`` and
stored, so the work is one rule call per term and nothing recurses: a rule
that asks for ``a(m)`` with ``m >= n`` cannot be satisfied in that order and
is reported as circular (``m == n``) or non-terminating (``m > n``) instead of
looping.  This covers linear and non-linear rules, ``n``-dependent
coefficients, full-history sums (``sum_{k<n} a(k)``) and indices such as
``a(floor(n/2))``.

Initial values come from the formula, from the caller, or — in a check —
from the leading listed terms (:func:`terms_with_leading`).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, field
from fractions import Fraction
from typing import Callable, Mapping, Sequence

Number = int | Fraction
Lookup = Callable[[int], Number]
Rule = Callable[[int, Lookup], Number]

MAX_TERMS = 10_000
MAX_BITS = 20_000  # per term, numerator or denominator


class RecurrenceError(ValueError):
    """A recurrence that cannot be evaluated; ``reason`` is plain words."""

    def __init__(self, reason: str, *, index: int | None = None) -> None:
        self.reason = reason
        self.index = index
        self.partial: list = []  # terms from ``first`` computed before the error
        super().__init__(reason)


class MissingInitialValue(RecurrenceError):
    """``a(index)`` is needed but neither given nor computable."""


class CircularDefinition(RecurrenceError):
    """``a(n)`` is defined through itself."""


class NonTerminating(RecurrenceError):
    """``a(n)`` needs a later term ``a(m)``, ``m > n``: no bottom-up order ends."""


class LimitExceeded(RecurrenceError):
    """Too many terms, too large a term or the time budget is spent."""


@dataclass(frozen=True)
class Recurrence:
    """``a(n) = rule(n, a)`` for ``n >= start`` (or wherever no initial value is given).

    ``order`` is the largest constant backward offset (``a(n-2)`` -> 2) when
    every reference has that shape, else ``None`` (full history, ``a(n/2)``).
    ``initial`` holds the given values ``{index: value}``.
    """

    rule: Rule
    order: int | None = None
    start: int | None = None
    initial: Mapping[int, Number] = field(default_factory=dict)
    name: str = "a"
    applies: Callable[[int], bool] | None = None  # the rule's own range clause ("for n >= 3")


@dataclass(frozen=True)
class Limits:
    max_terms: int = MAX_TERMS
    max_bits: int = MAX_BITS
    seconds: float = 2.0


def _bits(value: Number) -> int:
    if isinstance(value, int):
        return value.bit_length()
    return max(value.numerator.bit_length(), value.denominator.bit_length())


def _normal(value: Number) -> Number:
    """Exact results as ``int`` when integral, else ``Fraction``; others refused."""
    if isinstance(value, bool):
        return int(value)
    if isinstance(value, int):
        return value
    if isinstance(value, Fraction):
        return value.numerator if value.denominator == 1 else value
    raise RecurrenceError(f"the rule gave the value {value}, which is not an exact rational number")


def evaluate(rec: Recurrence, first: int, count: int, initial: Mapping[int, Number] | None = None,
             limits: Limits = Limits()) -> list[Number]:
    """``[a(first), ..., a(first + count - 1)]``.

    ``initial`` (caller's values) overrides the formula's own.  The
    computation starts at the smallest index among the initial values and
    ``first``.
    """
    if count < 0:
        raise RecurrenceError("a negative number of terms was requested")
    if count > limits.max_terms:
        raise LimitExceeded(f"{count} terms requested; the limit is {limits.max_terms}")
    given: dict[int, Number] = {int(k): _normal(v) for k, v in rec.initial.items()}
    if initial:
        given.update({int(k): _normal(v) for k, v in initial.items()})
    lo = min([first, *given])
    last = first + count - 1
    if last - lo + 1 > limits.max_terms:
        raise LimitExceeded(f"the initial values start at index {lo}, {last - lo + 1} terms would be needed; "
                            f"the limit is {limits.max_terms}")
    deadline = time.monotonic() + limits.seconds
    values: list[Number] = []  # values[i] = a(lo + i); the term being computed is a(lo + len(values))
    name = rec.name

    def lookup(m: int) -> Number:
        current = lo + len(values)
        if type(m) is not int:
            m = _as_index(m, current, name)
        i = m - lo
        if 0 <= i < len(values):
            return values[i]
        if m == current:
            raise CircularDefinition(f"{name}({m}) is defined through itself", index=m)
        if m > current:
            raise NonTerminating(f"{name}({current}) needs the later term {name}({m}); "
                                 "the definition does not terminate", index=current)
        raise MissingInitialValue(f"{name}({m}) is needed (for {name}({current})) but no initial value "
                                  "is given for it", index=m)

    start, applies, rule = rec.start, rec.applies, rec.rule
    max_bits = limits.max_bits
    try:
        for n in range(lo, last + 1):
            if n in given:
                values.append(given[n])
                continue
            if start is not None and n < start:
                raise MissingInitialValue(f"{name}({n}) is needed but the rule only holds for n >= {start} "
                                          "and no initial value is given for it", index=n)
            if applies is not None and not applies(n):
                raise MissingInitialValue(f"{name}({n}) is needed but the rule's range clause excludes it "
                                          "and no initial value is given for it", index=n)
            try:
                value = _normal(rule(n, lookup))
            except ZeroDivisionError:
                raise RecurrenceError(f"division by zero while computing {name}({n})", index=n) from None
            if _bits(value) > max_bits:
                raise LimitExceeded(f"{name}({n}) has more than {max_bits} bits; stopped", index=n)
            if (n & 7) == 0 and time.monotonic() > deadline:
                raise LimitExceeded(f"time budget of {limits.seconds:g} s spent at {name}({n})", index=n)
            values.append(value)
    except RecurrenceError as exc:
        exc.partial = values[first - lo:]
        raise
    return values[first - lo:]


def _as_index(m: object, current: int, name: str) -> int:
    if isinstance(m, Fraction) and m.denominator == 1:
        return m.numerator
    if isinstance(m, int):
        return int(m)
    raise RecurrenceError(f"{name}(...) was asked for at the non-integer index {m} "
                          f"(while computing {name}({current}))", index=current)


def terms_with_leading(rec: Recurrence, first: int, listed: Sequence[Number],
                       limits: Limits = Limits()) -> tuple[int, list[Number]]:
    """Evaluate using as few leading ``listed`` terms as initial values as needed.

    Returns ``(k, values)``: the first ``k`` listed terms were taken as initial
    values (``a(first)..a(first+k-1)``) and ``values`` are all ``len(listed)``
    terms, of which only ``values[k:]`` are a real test of the rule.
    When the order is known, exactly ``order`` terms are tried first; when it
    is not (full-history sums, ``a(n/2)``), at least one term is taken, since
    an empty sum would otherwise silently define ``a(first) = 0``.
    """
    tried: list[int] = []
    if rec.order is not None:
        tried.append(min(rec.order, len(listed)))
    smallest = 0 if rec.order is not None else 1
    tried += [k for k in range(smallest, len(listed) + 1) if k not in tried]
    last_error: RecurrenceError | None = None
    for k in tried:
        leading = {first + i: listed[i] for i in range(k)}
        try:
            return k, evaluate(rec, first, len(listed), initial=leading, limits=limits)
        except MissingInitialValue as exc:
            last_error = exc
            continue
    assert last_error is not None
    raise last_error
