"""Truncated power series (normform.formula.series) against handbook tables and sympy."""

from __future__ import annotations

import random
from fractions import Fraction
from math import factorial

import pytest

from normform.formula import series as S
from normform.formula.series import Series, SeriesError

N = 16
x = Series.variable(N)


def ints(s: Series) -> list[int]:
    assert all(c.denominator == 1 for c in s.coeffs), s.coeffs
    return [int(c) for c in s.coeffs]


from check_tables import BELL, BINOMIAL_ROWS, CATALAN, FIBONACCI, LUCAS, STIRLING1, STIRLING2

def test_catalan_dlmf_26_5():
    # DLMF 26.5.2: sum C(n) x^n = (1 - sqrt(1 - 4x)) / (2x); dividing by x costs one coefficient
    g = (1 - S.sqrt(1 - 4 * x)) / (2 * x)
    assert ints(g) == CATALAN[: N - 1]


def test_bell_dlmf_26_7():
    # DLMF 26.7.4: sum B(n) x^n / n! = exp(exp(x) - 1)
    assert S.exp(S.exp(x) - 1).egf_terms() == BELL


@pytest.mark.parametrize("k", range(1, 11))
def test_stirling_second_kind_dlmf_26_8_2(k):
    # DLMF 26.8.10: sum_n S(n,k) x^n/n! = (e^x - 1)^k / k!
    column = ((S.exp(x) - 1) ** k / factorial(k)).egf_terms()
    assert [column[n] for n in range(k, 11)] == [STIRLING2[n - 1][k - 1] for n in range(k, 11)]


@pytest.mark.parametrize("k", range(1, 11))
def test_stirling_first_kind_dlmf_26_8_1(k):
    # DLMF 26.8.8: sum_n s(n,k) x^n/n! = (ln(1+x))^k / k!
    column = (S.log(1 + x) ** k / factorial(k)).egf_terms()
    assert [column[n] for n in range(k, 11)] == [STIRLING1[n - 1][k - 1] for n in range(k, 11)]


@pytest.mark.parametrize("n", range(0, 11))
def test_binomial_rows_abramowitz_stegun_24_1(n):
    # A&S 24.1.1: (1+x)^n = sum binomial(n,k) x^k
    assert ints((1 + x) ** n)[: n + 1] == BINOMIAL_ROWS[n]


def test_central_binomials_from_rational_power():
    # 1/sqrt(1-4x) = sum binomial(2n,n) x^n (A&S 24.1 / common knowledge); C(30,15) = 155117520
    big = Series.variable(31)
    central = ints((1 - 4 * big) ** Fraction(-1, 2))
    # binomial(2n, n) for n = 0..5 are the middle entries of the even rows of A&S Table 24.1
    assert central[:6] == [BINOMIAL_ROWS[2 * n][n] for n in range(6)]
    # binomial(30, 15) = 155117520 (A&S Table 24.1, from memory)
    assert central[15] == 155117520


def test_fibonacci_lucas_common_knowledge():
    assert ints(x / (1 - x - x ** 2)) == FIBONACCI
    assert ints((2 - x) / (1 - x - x ** 2)) == LUCAS


def test_partitions_infinite_product():
    # DLMF 27.14.2 (Euler): prod_{k>=1} 1/(1-x^k) = sum p(n) x^n; p(0..15) from DLMF Table 27.14.1 (from memory)
    p = [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42, 56, 77, 101, 135, 176]
    assert ints(S.infinite(lambda k: 1 / (1 - Series.monomial(1, k, N)), 1, N, neutral=1)) == p


def test_sum_of_squares_indicator_infinite_sum():
    got = ints(S.infinite(lambda k: Series.monomial(1, k * k, N), 0, N, neutral=0))
    assert got == [1 if round(i ** 0.5) ** 2 == i else 0 for i in range(N)]


def test_trig_and_hyperbolic():
    # sec x + tan x: Euler zigzag numbers (common knowledge: 1, 1, 1, 2, 5, 16, 61, 272, 1385, 7936)
    assert (S.sec(x) + S.tan(x)).egf_terms()[:10] == [1, 1, 1, 2, 5, 16, 61, 272, 1385, 7936]
    assert S.cosh(x).egf_terms() == [1 - n % 2 for n in range(N)]
    # sin^2 + cos^2 = 1, cosh^2 - sinh^2 = 1, atan(tan x) = x, asin(sin x) = x
    assert ints(S.sin(x) ** 2 + S.cos(x) ** 2) == [1] + [0] * (N - 1)
    assert ints(S.cosh(x) ** 2 - S.sinh(x) ** 2) == [1] + [0] * (N - 1)
    assert ints(S.atan(S.tan(x))) == ints(x)
    assert ints(S.asin(S.sin(x))) == ints(x)
    assert ints(S.log(S.exp(x + x ** 2))) == ints(x + x ** 2)


def test_composition():
    # exp(x/(1-x)) as a composition equals exp applied to the series x/(1-x)
    assert S.exp(x).compose(x / (1 - x)) == S.exp(x / (1 - x))
    with pytest.raises(SeriesError):
        S.exp(x).compose(1 + x)


@pytest.mark.parametrize("make, words", [
    (lambda: 1 / x, "Laurent"),
    (lambda: x.inverse(), "zero constant term"),
    (lambda: (1 + x) / x, "Laurent"),
    (lambda: S.sqrt(2 + x), "not rational"),
    (lambda: S.sqrt(x), "not a power series"),
    (lambda: S.exp(1 + x), "not rational"),
    (lambda: S.log(2 + x), "not rational"),
    (lambda: x / Series.constant(0, N), "division by zero"),
    (lambda: x ** -1, "Laurent"),
])
def test_undefined_operations_raise_plain_errors(make, words):
    with pytest.raises(SeriesError, match=words):
        make()


def test_rational_power_with_leading_power_of_x():
    # sqrt(x^2 (1+x))^2 = x^2 (1+x)
    s = S.sqrt(x ** 2 * (1 + x))
    assert (s * s).truncate(N - 1) == (x ** 2 * (1 + x)).truncate(N - 1)
    assert ((1 + x) ** Fraction(1, 3)) ** 3 == 1 + x


# -- independent reference: sympy's series() on random rational functions -------------

sympy = pytest.importorskip("sympy")


def _random_poly(rng: random.Random, degree: int, const_nonzero: bool) -> list[int]:
    coeffs = [rng.randint(-5, 5) for _ in range(degree + 1)]
    if const_nonzero and coeffs[0] == 0:
        coeffs[0] = rng.choice([-3, -2, -1, 1, 2, 3])
    return coeffs


@pytest.mark.parametrize("seed", range(12))
def test_random_rational_gf_against_sympy_series(seed):
    rng = random.Random(seed)
    num = _random_poly(rng, rng.randint(0, 6), False)
    den = _random_poly(rng, rng.randint(1, 6), True)
    order = 12
    X = sympy.Symbol("x")
    expr = sum(c * X ** i for i, c in enumerate(num)) / sum(c * X ** i for i, c in enumerate(den))
    ref = sympy.series(expr, X, 0, order).removeO()
    want = [Fraction(int(sympy.fraction(ref.coeff(X, i))[0]), int(sympy.fraction(ref.coeff(X, i))[1]))
            if i else Fraction(str(ref.subs(X, 0))) for i in range(order)]
    xs = Series.variable(order)
    ours = sum((c * xs ** i for i, c in enumerate(num)), Series.constant(0, order)) / \
        sum((c * xs ** i for i, c in enumerate(den)), Series.constant(0, order))
    assert list(ours.coeffs) == want


@pytest.mark.parametrize("seed", range(6))
def test_random_sqrt_and_exp_against_sympy_series(seed):
    rng = random.Random(1000 + seed)
    p = [1] + [rng.randint(-4, 4) for _ in range(3)]
    q = [0] + [rng.randint(-3, 3) for _ in range(3)]
    order = 10
    X = sympy.Symbol("x")
    P = sum(c * X ** i for i, c in enumerate(p))
    Q = sum(c * X ** i for i, c in enumerate(q))
    ref = sympy.series(sympy.sqrt(P) + sympy.exp(Q), X, 0, order).removeO()
    want = [Fraction(str(sympy.nsimplify(ref.coeff(X, i)) if i else ref.subs(X, 0))) for i in range(order)]
    xs = Series.variable(order)
    Ps = sum((c * xs ** i for i, c in enumerate(p)), Series.constant(0, order))
    Qs = sum((c * xs ** i for i, c in enumerate(q)), Series.constant(0, order))
    assert list((S.sqrt(Ps) + S.exp(Qs)).coeffs) == want
