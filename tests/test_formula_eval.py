"""Exact evaluation: the dev cases' sympy values, named numbers, exactness, limits, and
random expressions against sympy."""

from __future__ import annotations

from fractions import Fraction

import pytest
from hypothesis import HealthCheck, assume, given, settings
from hypothesis import strategies as st

from formula_support import VALID, same_value
from normform import parse_formula
from normform.formula import functions as F
from normform.formula.errors import EvaluationError
from normform.formula.evaluate import Approx

EVALUABLE = [c for c in VALID if c["kind"] in ("closed-form", "expression", "identity", "asymptotic")]


@pytest.mark.parametrize("case", EVALUABLE, ids=lambda c: c["id"])
def test_dev_values_match_sympy(case):
    # Source: shared/eval/formulas-dev.jsonl, `expect` computed with sympy 1.14 from `sympy`.
    f = parse_formula(case["text"])
    sides = [-1] if case["kind"] != "identity" else [0, -1]
    evaluated = 0
    for side in sides:
        for point, want in zip(case["vars"], case["expect"]):
            try:
                got = f.evaluate_at(point, side=side)
            except EvaluationError as exc:
                # only an infinite sum may be left unevaluated (its other side is checked)
                assert "infinite" in str(exc), (case["id"], point, exc)
                continue
            evaluated += 1
            assert same_value(got, want), (case["id"], side, point, got, want)
    assert evaluated >= len(case["expect"])


def test_exact_where_the_maths_allows():
    assert parse_formula("(phi^n - (-1/phi)^n)/sqrt(5)").evaluate(n=60) == 1548008755920  # F(60), from memory
    assert parse_formula("floor(n*sqrt(2))").evaluate(n=10**6) == 1414213  # floor(10^6 * 1.41421356...)
    assert parse_formula("sin(pi/6)").evaluate() == Fraction(1, 2)
    assert parse_formula("cos(2*pi/3)").evaluate() == Fraction(-1, 2)
    assert parse_formula("log(n)/log(2)").evaluate(n=1024) == 10
    assert parse_formula("sqrt(12)*sqrt(3)").evaluate() == 6
    assert parse_formula("8^(2/3)").evaluate() == 4
    v = parse_formula("n^(3/2)").evaluate(n=2)
    assert isinstance(v, Approx) and v.exact == "2*sqrt(2)"
    assert str(parse_formula("pi").evaluate_at({}, digits=30)) == "3.14159265358979323846264338328"  # DLMF 3.12.1
    assert str(parse_formula("e").evaluate_at({}, digits=20)) == "2.7182818284590452354"  # DLMF 4.2.21
    assert str(parse_formula("gamma").evaluate_at({}, digits=20)) == "0.57721566490153286061"  # DLMF 5.2.3
    assert str(parse_formula("zeta(3)").evaluate_at({}, digits=20)) == "1.2020569031595942854"  # DLMF 25.6, from memory
    assert parse_formula("1 + 3 + 5 + ... + (2n-1)").evaluate(n=7) == 49
    assert parse_formula("sum(d|n, d)").evaluate(n=12) == 28
    assert parse_formula("n mod 3").evaluate(n=-1) == 2  # floored mod, common practice
    assert parse_formula("0^0").evaluate() == 1


def test_named_numbers_against_tables():
    # DLMF Table 26.8.2 (Stirling numbers of the second kind), row n = 6: 1 31 90 65 15 1
    assert [F.stirling2(6, k) for k in range(1, 7)] == [1, 31, 90, 65, 15, 1]
    # DLMF Table 26.8.1 (signed Stirling numbers of the first kind), row n = 5
    assert [F.stirling1(5, k) for k in range(1, 6)] == [24, -50, 35, -10, 1]
    # Bell numbers, DLMF 26.7: 1, 1, 2, 5, 15, 52, 203, 877
    assert [F.bell(n) for n in range(8)] == [1, 1, 2, 5, 15, 52, 203, 877]
    # Catalan numbers, DLMF 26.5: 1, 1, 2, 5, 14, 42, 132
    assert [F.catalan(n) for n in range(7)] == [1, 1, 2, 5, 14, 42, 132]
    # Fibonacci / Lucas (common knowledge)
    assert [F.fibonacci(n) for n in range(-3, 9)] == [2, -1, 1, 0, 1, 1, 2, 3, 5, 8, 13, 21]
    assert [F.lucas(n) for n in range(7)] == [2, 1, 3, 4, 7, 11, 18]
    # Abramowitz & Stegun Table 24.1 (binomial coefficients), row n = 7
    assert [F.binomial(7, k) for k in range(8)] == [1, 7, 21, 35, 35, 21, 7, 1]
    assert F.binomial(Fraction(1, 2), 2) == Fraction(-1, 8)  # generalized binomial, common practice
    assert [F.partitions(n) for n in range(10)] == [1, 1, 2, 3, 5, 7, 11, 15, 22, 30]  # DLMF 26.9
    assert F.harmonic(4) == Fraction(25, 12) and F.totient(36) == 12 and F.moebius(30) == -1
    assert F.bernoulli(12) == Fraction(-691, 2730)  # DLMF Table 24.2.1
    assert [F.motzkin(n) for n in range(7)] == [1, 1, 2, 4, 9, 21, 51]  # from memory


def test_sympy_agrees_on_named_numbers():
    import sympy
    from sympy.functions.combinatorial.numbers import stirling

    for n in range(12):
        assert F.bell(n) == sympy.bell(n)
        assert F.catalan(n) == sympy.catalan(n)
        assert F.harmonic(n) == sympy.harmonic(n)
        for k in range(n + 1):
            assert F.stirling2(n, k) == stirling(n, k)
            assert F.stirling1(n, k) == stirling(n, k, kind=1, signed=True)


@pytest.mark.parametrize("text", ["2^2^2^2^2^2", "(10^10)!", "sum(k=1..10^9, k)", "fibonacci(10^12)",
                                  "a(n-1)", "1/0", "sqrt(-1)", "floor(x)", "sum(k=1..inf, 1/k^2)", "i^2"])
def test_bad_or_huge_evaluations_fail_cleanly(text):
    with pytest.raises(EvaluationError):
        parse_formula(text).evaluate()


def test_stated_range_is_checked():
    f = parse_formula("a(n) = (2n-1)!! for n >= 0")
    assert f.evaluate(n=3) == 15
    with pytest.raises(EvaluationError, match="range"):
        f.evaluate(n=-2)


# ---------------------------------------------------------------- random vs sympy
# Each strategy item is (our text, the same expression built directly in sympy), so sympy
# never sees our parser's output: the comparison is independent.

def _leaf():
    import sympy

    n, k = sympy.symbols("n k")
    return st.one_of(
        st.integers(0, 12).map(lambda i: (str(i), sympy.Integer(i))),
        st.sampled_from([("n", n), ("k", k)]),
    )


def _grow(children):
    import sympy

    def binop(pair):
        (a, sa), (b, sb), op = pair
        if op == "+":
            return f"({a}) + ({b})", sa + sb
        if op == "-":
            return f"({a}) - ({b})", sa - sb
        if op == "*":
            return f"({a})({b})", sa * sb  # implicit product
        if op == "·":
            return f"({a})·({b})", sa * sb
        return f"({a})/(({b})^2 + 1)", sa / (sb ** 2 + 1)  # a denominator that is never 0

    def power(pair):
        (a, sa), e = pair
        return f"({a})^{e}", sa ** e

    def call(pair):
        (a, sa), kind = pair
        if kind == "floor":
            return f"floor({a})", sympy.floor(sa)
        if kind == "neg":
            return f"-({a})", -sa
        return f"abs({a})", sympy.Abs(sa)

    return st.one_of(
        st.tuples(children, children, st.sampled_from("+-*·/")).map(binop),
        st.tuples(children, st.integers(0, 3)).map(power),
        st.tuples(children, st.sampled_from(["floor", "neg", "abs"])).map(call),
        st.tuples(st.integers(0, 8), st.integers(0, 8)).map(
            lambda p: (f"binomial({p[0]}, {p[1]})", sympy.binomial(p[0], p[1]))),
        st.integers(0, 7).map(lambda i: (f"{i}!", sympy.factorial(i))),
    )


EXPRESSIONS = st.recursive(_leaf(), _grow, max_leaves=8)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(EXPRESSIONS, st.integers(-6, 6), st.integers(-6, 6))
def test_random_expressions_agree_with_sympy(pair, n, k):
    import sympy

    text, expr = pair
    value = expr.subs({sympy.Symbol("n"): n, sympy.Symbol("k"): k})
    assume(value.is_finite and value.is_rational)
    ours = parse_formula(text).evaluate(n=n, k=k)
    assert Fraction(ours) == Fraction(int(value.p), int(value.q)), text
