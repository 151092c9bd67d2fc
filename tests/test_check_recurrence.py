"""The recurrence engine (normform.formula.recurrence) and order detection (terms.plan)."""

from __future__ import annotations

import sys
from fractions import Fraction

import pytest

from check_tables import BELL, CATALAN, FIBONACCI, LUCAS
from normform.formula import recurrence as R
from normform.formula.terms import parse, plan, terms


def rec(rule, **kw) -> R.Recurrence:
    return R.Recurrence(rule=rule, **kw)


def test_linear_second_order_fibonacci_and_lucas_common_knowledge():
    fib = rec(lambda n, a: a(n - 1) + a(n - 2), order=2, initial={0: 0, 1: 1})
    assert R.evaluate(fib, 0, 16) == FIBONACCI
    assert R.evaluate(fib, 0, 16, initial={0: 2, 1: 1}) == LUCAS
    assert R.evaluate(fib, 5, 3) == FIBONACCI[5:8]


def test_full_history_bell_dlmf_26_7():
    from math import comb
    bell = rec(lambda n, a: sum(comb(n - 1, k) * a(k) for k in range(n)), initial={0: 1})
    assert R.evaluate(bell, 0, len(BELL)) == BELL


def test_n_dependent_coefficients_catalan_dlmf_26_5():
    cat = rec(lambda n, a: Fraction(4 * n - 2, n + 1) * a(n - 1), order=1, initial={0: 1})
    assert R.evaluate(cat, 0, len(CATALAN)) == CATALAN


def test_iterative_not_recursive():
    # far deeper than the interpreter's recursion limit
    count = sys.getrecursionlimit() * 5
    counter = rec(lambda n, a: a(n - 1) + 1, order=1, initial={0: 0})
    assert R.evaluate(counter, 0, count)[-1] == count - 1
    assert terms(parse("a(n) = a(n-1) + 2, a(0) = 0"), 0, count)[-1] == 2 * (count - 1)


@pytest.mark.parametrize("rule, error", [
    (lambda n, a: a(n + 1), R.NonTerminating),
    (lambda n, a: a(n) + 1, R.CircularDefinition),
    (lambda n, a: a(n - 1), R.MissingInitialValue),
])
def test_bad_definitions_raise_typed_errors(rule, error):
    with pytest.raises(error):
        R.evaluate(rec(rule), 0, 5)


def test_errors_carry_the_terms_computed_before_them():
    half = rec(lambda n, a: Fraction(a(n - 1)) / (n - 3), initial={0: 6})
    with pytest.raises(R.RecurrenceError, match="division by zero") as info:
        R.evaluate(half, 0, 6)
    assert info.value.partial == [6, -3, 3]  # a(1) = 6/(1-3), a(2) = -3/(2-3), a(3) divides by 0


def test_limits_terms_bits_time():
    grow = rec(lambda n, a: a(n - 1) ** 2 + 1, initial={0: 2})
    with pytest.raises(R.LimitExceeded, match="bits"):
        R.evaluate(grow, 0, 40, limits=R.Limits(max_bits=1000))
    with pytest.raises(R.LimitExceeded, match="limit"):
        R.evaluate(grow, 0, 10 ** 6)
    slow = rec(lambda n, a: sum(range(20_000)) * 0 + a(n - 1), initial={0: 1})
    with pytest.raises(R.LimitExceeded, match="time budget"):
        R.evaluate(slow, 0, 9000, limits=R.Limits(seconds=0.05))


def test_leading_terms_as_initial_values():
    fib = rec(lambda n, a: a(n - 1) + a(n - 2), order=2)
    assert R.terms_with_leading(fib, 1, [1, 1, 2, 3, 5]) == (2, [1, 1, 2, 3, 5])
    # order unknown (full-history sum): at least one term is taken
    total = rec(lambda n, a: sum(a(k) for k in range(n)))
    assert R.terms_with_leading(total, 0, [1, 1, 2, 4, 8]) == (1, [1, 1, 2, 4, 8])


@pytest.mark.parametrize("text, order", [
    ("a(n) = a(n-1) + a(n-2)", 2),
    ("a(n) = 3a(n-1) - 3a(n-2) + a(n-3)", 3),
    ("a(n+1) = (n+1)*a(n) + 1", 1),
    ("a_{n+1} = 3a_n - 1", 1),
    ("(n+2)*a(n) = (2n+1)*a(n-1) + 3(n-1)*a(n-2)", 2),
    ("a(n) = (a(n-1)*a(n-3) + a(n-2)^2)/a(n-4)", 4),
    ("a(n) = sum_{k=0}^{n-1} a(k) a(n-1-k)", None),
    ("a(n) = a(floor(n/2)) + (n mod 2)", None),
])
def test_order_detection(text, order):
    p = plan(parse(text))
    assert p.kind == "recurrence" and p.recurrence.order == order


def test_initial_values_from_the_text_and_their_range_clause():
    p = plan(parse("a(n) = a(n-2) + a(n-3) for n >= 3, a(0) = a(1) = a(2) = 1"))
    assert dict(p.recurrence.initial) == {0: 1, 1: 1, 2: 1}
    # Padovan numbers (from memory): 1, 1, 1, 2, 2, 3, 4, 5, 7, 9, 12
    assert terms(parse("a(n) = a(n-2) + a(n-3) for n >= 3, a(0) = a(1) = a(2) = 1"), 0, 11) == \
        [1, 1, 1, 2, 2, 3, 4, 5, 7, 9, 12]
    with pytest.raises(R.MissingInitialValue, match="range clause"):
        terms(parse("a(n) = 2a(n-1) for n >= 3, a(0) = 1"), 0, 5)
