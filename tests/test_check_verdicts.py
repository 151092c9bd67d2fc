"""check_formula verdicts: named numbers against handbook tables, disagreements, bad input, limits."""

from __future__ import annotations

import time
from fractions import Fraction

import pytest

from check_tables import BELL, BINOMIAL_ROWS, CATALAN, FIBONACCI, LUCAS, STIRLING1, STIRLING2
from normform.formula.check import Verdict, check_formula
from normform.formula.recurrence import Limits
from normform.formula.terms import parse, series, terms


def column(table: list[list[int]], k: int) -> list[int]:
    """Column k of a DLMF Stirling table as the terms n = k..10."""
    return [table[n - 1][k - 1] for n in range(k, len(table) + 1)]


# -- named numbers and formulas against DLMF / A&S tables ---------------------------

@pytest.mark.parametrize("text", ["Catalan(n)", "C(n)", "binomial(2n,n)/(n+1)",
                                  "a(n) = (4n-2)*a(n-1)/(n+1), a(0) = 1",
                                  "a(n) = sum_{k=0}^{n-1} a(k) a(n-1-k), a(0) = 1",
                                  "G.f.: (1 - sqrt(1-4x))/(2x)"])
def test_catalan_dlmf_26_5(text):
    v = check_formula(text, CATALAN, 0)
    assert v.status == "agrees" and v.compared == len(CATALAN), v.describe()


@pytest.mark.parametrize("text", ["Bell(n)", "a(n) = Sum_{k=0..n} S2(n,k)", "E.g.f.: exp(exp(x)-1)",
                                  "a(n) = Sum_{k=0..n-1} binomial(n-1,k)*a(k), a(0) = 1"])
def test_bell_dlmf_26_7(text):
    v = check_formula(text, BELL, 0)
    assert v.status == "agrees" and v.compared == len(BELL), v.describe()


@pytest.mark.parametrize("k", range(1, 8))
def test_stirling_second_kind_columns_dlmf_26_8_2(k):
    want = column(STIRLING2, k)
    # closed form, the ordinary g.f. x^k / prod_{j<=k} (1 - j x) (DLMF 26.8.9) and the e.g.f. (DLMF 26.8.10)
    for text in (f"S2(n, {k})", f"x^{k}/prod_{{j=1}}^{{{k}}} (1 - j x)", f"E.g.f.: (exp(x) - 1)^{k}/{k}!"):
        v = check_formula(text, want, k)
        assert v.status == "agrees" and v.compared == len(want), (text, v.describe())


@pytest.mark.parametrize("k", range(1, 8))
def test_stirling_first_kind_columns_dlmf_26_8_1(k):
    want = column(STIRLING1, k)
    for text in (f"Stirling1(n, {k})", f"E.g.f.: log(1 + x)^{k}/{k}!"):
        v = check_formula(text, want, k)
        assert v.status == "agrees" and v.compared == len(want), (text, v.describe())


@pytest.mark.parametrize("n", [4, 7, 10])
def test_binomial_rows_abramowitz_stegun_24_1(n):
    row = BINOMIAL_ROWS[n]
    for text in (f"binomial({n}, k)", f"C({n},k)", f"(1+x)^{n}"):
        v = check_formula(text, row, 0)
        assert v.status == "agrees" and v.compared == n + 1, (text, v.describe())


def test_fibonacci_and_lucas_common_knowledge():
    assert check_formula("F(n)", FIBONACCI).status == "agrees"
    assert check_formula("a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1", FIBONACCI).status == "agrees"
    assert check_formula("x/(1-x-x^2)", FIBONACCI).status == "agrees"
    assert check_formula("L(n)", LUCAS).status == "agrees"
    assert check_formula("a(n) = F(n-1) + F(n+1) for n >= 1, a(0) = 2", LUCAS).status == "agrees"
    assert check_formula("(2-x)/(1-x-x^2)", LUCAS).status == "agrees"
    # Lucas terms are not Fibonacci numbers
    v = check_formula("F(n)", LUCAS)
    assert (v.status, v.index, v.expected, v.computed) == ("disagrees", 0, 2, 0)


def test_terms_api_and_initial_override():
    f = parse("a(n) = a(n-1) + a(n-2)")
    assert terms(f, 0, 8, initial=[2, 1]) == LUCAS[:8]
    assert terms(f, 0, 8, initial="0,1") == FIBONACCI[:8]
    assert terms(parse("a(n) = n^2 - 1/2"), 0, 3) == [Fraction(-1, 2), Fraction(1, 2), Fraction(7, 2)]
    assert series(parse("E.g.f.: 1/(1-x)^2"), 5) == [1, 2, 6, 24, 120]
    assert series(parse("1/(1-x)^2"), 5) == [1, 2, 3, 4, 5]


# -- disagreements and what they report ------------------------------------------

def test_first_disagreement_reports_index_and_both_values():
    listed = list(FIBONACCI)
    listed[9] = 35
    v = check_formula("a(n) = a(n-1) + a(n-2)", listed, 0, initial=[0, 1])
    assert (v.status, v.index, v.expected, v.computed, v.compared) == ("disagrees", 9, 35, 34, 8)  # a(0), a(1) given
    assert "at n = 9: listed 35, formula gives 34" in v.describe()


def test_offsets_follow_first_index():
    v = check_formula("a(n) = n^2", [1, 4, 9, 16], first_index=1)
    assert v.status == "agrees" and v.compared == 4
    v = check_formula("a(n) = n^2", [1, 4, 9, 16], first_index=0)
    assert (v.status, v.index, v.expected, v.computed) == ("disagrees", 0, 1, 0)


def test_non_integer_where_integers_are_listed():
    v = check_formula("a(n) = n/2", [0, 1, 1, 2])
    assert (v.status, v.index, v.computed) == ("disagrees", 1, Fraction(1, 2))
    assert "non-integer" in v.reason


def test_irrational_values_disagree_with_integers_and_surds_are_exact():
    v = check_formula("a(n) = sqrt(n)", [0, 1, 2])
    assert (v.status, v.index, v.computed) == ("disagrees", 2, "sqrt(2)")
    v = check_formula("a(n) = 2^n + pi", [1, 2, 3])
    assert v.status == "disagrees" and "irrational" in v.reason
    # Binet's formula (common knowledge) is exact through the engine's quadratic surds
    assert check_formula("(phi^n - (-1/phi)^n)/sqrt(5)", FIBONACCI).status == "agrees"
    assert check_formula("a(n) = 1 + 3 + 5 + ... + (2n-1)", [1, 4, 9, 16, 25], 1).status == "agrees"


def test_rational_terms_may_be_listed():
    assert check_formula("a(n) = 1/(n+1)", ["1", "1/2", "1/3"]).status == "agrees"
    assert check_formula("harmonic(n)", [0, 1, Fraction(3, 2), Fraction(11, 6)]).status == "agrees"


def test_range_clause_skips_terms_outside_it():
    v = check_formula("a(n) = 2^(n-1) for n >= 1", [1, 1, 2, 4, 8])
    assert v.status == "agrees" and v.compared == 4 and "skipped" in v.reason


def test_piecewise_and_parity():
    assert check_formula("a(n) = n/2 if n is even, (n+1)/2 otherwise", [0, 1, 1, 2, 2, 3]).status == "agrees"


def test_unlabelled_gf_is_tried_both_ways_but_a_label_is_binding():
    fact = [1, 1, 2, 6, 24, 120]
    v = check_formula("1/(1-x)", fact)
    assert v.status == "agrees" and v.kind == "egf" and "no label" in v.reason
    v = check_formula("G.f.: 1/(1-x)", fact)
    assert v.status == "disagrees" and v.kind == "ogf"


# -- cannot-check, with reasons; never a hang or a traceback ----------------------

@pytest.mark.parametrize("text, listed, words", [
    ("a(n) = a(n+1)", [1, 2, 3], "does not terminate"),
    ("a(n) = a(n) + 1", [1, 2, 3], "defined through itself"),
    ("a(n) = e^(n*log(2))", [1, 2, 4], "to 25 digits"),
    ("a(n) = = 3", [1], "cannot read the formula: 1:8"),
    ("a(n) = b(n-1) + 1", [1, 2], "does not define"),
    ("a(n) = a(n-1) + a(n-2), a(0) = 0, a(0) = 2", [0, 1, 1], "conflicting initial values"),
    ("a(n) = a(n/2) + 1, a(0) = 0", [0, 1, 2], "non-integer index"),
    ("1/x", [1, 1, 1], "Laurent"),
    ("sqrt(2 - x)", [1, 1], "not rational"),
    ("x + y", [1, 2], "second free variable"),
    ("a(n) = a(n-1) + a(n-2)", [1], "every listed term is needed"),
    ("a(n) = 1/(n-2)", {2: 1, 3: 1}, "division by zero"),
])
def test_cannot_check_with_reason(text, listed, words):
    v = check_formula(text, listed)
    assert v.status == "cannot-check", v.describe()
    assert words in v.reason


def test_missing_initial_values_come_from_the_listed_terms():
    v = check_formula("a(n) = 3a(n-1) - 3a(n-2) + a(n-3)", [0, 1, 4, 9, 16, 25, 36])
    assert (v.status, v.initial_from_terms, v.compared) == ("agrees", 3, 4)


def test_division_by_zero_in_a_recurrence():
    v = check_formula("a(n) = a(n-1)/(n-3), a(0) = 6", [6, -3, 3, 1])
    assert v.status == "cannot-check" and "division by zero" in v.reason and v.compared == 3


def test_size_limit_in_bits():
    # a(n) = a(n-1)^2 doubles the size of every term
    listed = [3 ** (2 ** n) for n in range(16)]
    v = check_formula("a(n) = a(n-1)^2, a(0) = 3", listed, limits=Limits(max_bits=10_000))
    assert v.status == "cannot-check" and "bits" in v.reason and v.compared == 13  # 3^(2^12) has 6492 bits, 3^(2^13) 12985
    v = check_formula("a(n) = 3^(2^n)", listed, limits=Limits(max_bits=10_000))
    assert v.status == "cannot-check" and v.compared > 10


def test_time_budget_stops_heavy_formulas():
    t0 = time.monotonic()
    v = check_formula("a(n) = sum_{k=0}^{n^3} sum_{j=0}^{k} j*k", [0] * 1 + [1] * 200, 1,
                      limits=Limits(seconds=0.5))
    assert time.monotonic() - t0 < 5
    assert v.status in ("cannot-check", "disagrees")
    t0 = time.monotonic()
    v = check_formula("Bell(19990 + n)", [1] * 10, 1, limits=Limits(seconds=0.5))
    assert v.status == "cannot-check" and "time budget" in v.reason
    assert time.monotonic() - t0 < 5


def test_too_many_listed_terms_are_cut_with_a_note():
    v = check_formula("a(n) = n", list(range(5000)))
    assert v.status == "agrees" and v.compared == 2000 and "first 2000" in v.reason


@pytest.mark.parametrize("listed", [[], ["x"], [1.5], ["1/0"]])
def test_bad_listed_terms(listed):
    v = check_formula("a(n) = n", listed)
    assert v.status == "cannot-check"


def test_formula_object_and_string_give_the_same_verdict():
    text = "a(n) = 2a(n-1) + 1, a(0) = 0"
    assert check_formula(parse(text), [0, 1, 3, 7]) == check_formula(text, [0, 1, 3, 7])


def test_verdict_is_frozen_and_serialisable():
    v = check_formula("a(n) = n/2", [0, 1])
    assert isinstance(v, Verdict)
    with pytest.raises(AttributeError):
        v.status = "agrees"  # type: ignore[misc]
    d = v.to_dict()
    assert d["computed"] == "1/2" and d["label"] == "disagrees"


def test_asymptotic_wrong_constant_or_growth_is_not_a_trend():
    fib = [0, 1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89, 144, 233, 377, 610, 987, 1597]
    good = check_formula("a(n) ~ phi^n/sqrt(5)", fib)
    assert good.label == "agrees (trend)"
    assert check_formula("a(n) ~ phi^n", fib).status == "disagrees"
    assert check_formula("a(n) ~ 2^n", fib).status == "disagrees"
    assert check_formula("a(n) ~ n^2", fib).status == "disagrees"
    assert check_formula("a(n) ~ 2^n", [1, 2]).status == "cannot-check"


# -- tables read by rows, identities ----------------------------------------------

def test_tables_read_by_rows_against_dlmf_and_abramowitz_stegun():
    # A&S Table 24.1 rows 0..10 flattened; DLMF Table 26.8.2 / 26.8.1 rows 1..10 flattened
    pascal = [c for row in BINOMIAL_ROWS for c in row]
    assert check_formula("T(n,k) = binomial(n,k)", pascal).status == "agrees"
    s2 = [c for row in STIRLING2 for c in row]
    v = check_formula("T(n,k) = S2(n,k), 1 <= k <= n", s2, 1)
    assert v.status == "agrees" and v.compared == len(s2), v.describe()
    s1 = [c for row in STIRLING1 for c in row]
    assert check_formula("T(n,k) = Stirling1(n,k) for 1 <= k <= n", s1, 1).status == "agrees"
    wrong = list(pascal)
    wrong[8] = 4
    v = check_formula("T(n,k) = binomial(n,k)", wrong)
    assert (v.status, v.index, v.expected, v.computed) == ("disagrees", 8, 4, 3)
    assert "T(3,2)" in v.reason and "at term 8" in v.describe()
    assert terms(parse("T(n,k) = binomial(n,k)"), 0, 6) == [1, 1, 1, 1, 2, 1]


def test_identities_check_both_sides():
    # A&S 24.1.1: sum_k binomial(n,k) = 2^n; the squares sum to binomial(2n,n) instead
    v = check_formula("Sum_{k=0..n} binomial(n,k) = 2^n", [1, 2, 4, 8, 16])
    assert v.status == "agrees" and "both sides" in v.reason
    v = check_formula("Sum_{k=0..n} binomial(n,k)^2 = 2^n", [1, 2, 4, 8, 16])
    assert v.status == "disagrees" and v.index == 2 and "left side" in v.reason


def test_long_flat_chains_are_checked_not_refused():
    # a 700-term sum is long, not deep: it must be computed (values by hand: n*700 + 1)
    from normform import check_formula

    assert check_formula("n+" * 700 + "1", [1, 701, 1401]).status == "agrees"
    rec = "a(n)=" + "a(n-1)+" * 700 + "1"
    assert check_formula(rec, [1, 701, 490701]).status == "agrees"
    assert check_formula(rec, [1, 701, 490700]).status == "disagrees"
