"""Every recurrence, ogf, egf and asymptotic case of the shared formula set gives its expected terms.

Source: tests/fixtures/check/formulas-dev-check.jsonl, copied from the project's evaluation file
formulas-dev.jsonl (values computed with sympy 1.14; see SOURCE.md there).
"""

from __future__ import annotations

import json
from fractions import Fraction
from pathlib import Path

import pytest

from normform import parse_formula
from normform.formula.check import check_formula
from normform.formula.terms import series, terms

CASES = [json.loads(line) for line in
         (Path(__file__).parent / "fixtures" / "check" / "formulas-dev-check.jsonl").read_text("utf-8").splitlines()
         if line.strip()]


def by_kind(kind: str) -> list[dict]:
    return [pytest.param(c, id=c["id"]) for c in CASES if c["kind"] == kind]


def exact(values: list) -> list:
    out = []
    for v in values:
        f = Fraction(str(v))
        out.append(f.numerator if f.denominator == 1 else f)
    return out


def test_fixture_counts():
    kinds = [c["kind"] for c in CASES]
    assert (kinds.count("recurrence"), kinds.count("ogf"), kinds.count("egf"), kinds.count("asymptotic"),
            kinds.count("closed-form"), kinds.count("identity")) == (25, 16, 13, 9, 40, 17)


@pytest.mark.parametrize("case", by_kind("recurrence"))
def test_recurrence_terms(case):
    initial = {int(k): int(v) for k, v in case["sympy"]["initial"].items()}
    first = min(initial)
    assert case["vars"]["n"][0] == first
    got = terms(parse_formula(case["text"]), first, len(case["expect"]), initial=initial)
    assert got == exact(case["expect"])


@pytest.mark.parametrize("case", by_kind("recurrence"))
def test_recurrence_verdict_agrees(case):
    initial = {int(k): int(v) for k, v in case["sympy"]["initial"].items()}
    first = min(initial)
    f = parse_formula(case["text"])
    v = check_formula(f, exact(case["expect"]), first, initial=initial)
    assert v.status == "agrees", v.describe()
    # initial values the text states are compared; those only the caller supplies are not
    stated = {i for i in initial if i in (f.initial or {})}
    assert v.compared == len(case["expect"]) - len(set(initial) - stated)


@pytest.mark.parametrize("case", by_kind("recurrence"))
def test_recurrence_verdict_with_initial_values_from_the_listed_terms(case):
    # no initial values given at all: the leading listed terms serve, the rest are compared
    first = min(int(k) for k in case["sympy"]["initial"])
    v = check_formula(case["text"], exact(case["expect"]), first)
    assert v.status == "agrees", v.describe()
    assert v.compared + v.initial_from_terms == len(case["expect"])
    assert v.compared >= 10


@pytest.mark.parametrize("case", by_kind("recurrence"))
def test_recurrence_disagreement_is_located(case):
    first = min(int(k) for k in case["sympy"]["initial"])
    listed = exact(case["expect"])
    listed[12] += 1
    initial = {int(k): int(v) for k, v in case["sympy"]["initial"].items()}
    v = check_formula(case["text"], listed, first, initial=initial)
    assert v.status == "disagrees"
    assert (v.index, v.expected, v.computed) == (first + 12, listed[12], listed[12] - 1)


@pytest.mark.parametrize("case", by_kind("ogf"))
def test_ogf_coefficients(case):
    assert series(parse_formula(case["text"]), 15, kind="ogf") == exact(case["expect"])
    v = check_formula(case["text"], exact(case["expect"]), 0)
    assert v.status == "agrees" and v.compared == 15, v.describe()


@pytest.mark.parametrize("case", by_kind("egf"))
def test_egf_terms(case):
    assert series(parse_formula(case["text"]), 15, kind="egf") == exact(case["expect"])
    # unlabelled lines are first read as ordinary g.f.s, then as exponential ones
    v = check_formula(case["text"], exact(case["expect"]), 0)
    assert v.status == "agrees" and v.kind == "egf" and v.compared == 15, v.describe()


@pytest.mark.parametrize("case", by_kind("egf"))
def test_egf_disagreement_is_located(case):
    listed = exact(case["expect"])
    listed[9] += 2
    v = check_formula(case["text"], listed, 0, kind="egf")
    assert v.status == "disagrees" and v.index == 9, v.describe()


@pytest.mark.parametrize("case", by_kind("asymptotic"))
def test_asymptotic_trend(case):
    points = {row["n"]: int(value) for row, value in zip(case["vars"], case["lhs_values"])}
    v = check_formula(case["text"], points)
    assert (v.status, v.heuristic, v.label) == ("agrees", True, "agrees (trend)"), v.describe()


@pytest.mark.parametrize("case", by_kind("asymptotic"))
def test_asymptotic_trend_rejects_a_wrong_growth_rate(case):
    # the same claim against terms that grow twice as fast per step must not agree
    points = {row["n"]: int(value) * 2 ** row["n"] for row, value in zip(case["vars"], case["lhs_values"])}
    v = check_formula(case["text"], points)
    # an explicit left side (n!, a sum) is compared exactly first; a(n) only by the trend
    assert v.status == "disagrees", v.describe()
    assert v.heuristic or "left side" in v.reason


@pytest.mark.parametrize("case", by_kind("closed-form") + by_kind("identity"))
def test_closed_forms_and_identities_in_n(case):
    points = {row["n"]: value for row, value in zip(case["vars"], exact(case["expect"]))}
    v = check_formula(case["text"], points)
    assert v.status == "agrees" and v.compared == len(points), v.describe()
    if case["kind"] == "identity":
        assert "both sides" in v.reason
    wrong = dict(points)
    last = max(wrong)
    wrong[last] += 1
    v = check_formula(case["text"], wrong)
    assert v.status == "disagrees" and v.index == last, v.describe()
