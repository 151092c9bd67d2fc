"""End to end, text -> verdict, against sympy as an independent reference (sympy only in tests).

sympy's series() expands random rational generating functions; sympy's RecursiveSeq computes
random recurrences with n-dependent coefficients. Our formula text of the same object must agree,
and a one-term change must be located.
"""

from __future__ import annotations

import random

import pytest

from normform.formula.check import check_formula

sympy = pytest.importorskip("sympy")
from sympy.series.sequences import RecursiveSeq  # noqa: E402

X, N = sympy.symbols("x n")


def poly_text(coeffs: list[int]) -> str:
    parts = []
    for i, c in enumerate(coeffs):
        if c == 0:
            continue
        mono = "" if i == 0 else ("x" if i == 1 else f"x^{i}")
        num = str(abs(c)) if (abs(c) != 1 or i == 0) else ""
        parts.append(("-" if c < 0 else "+") + " " + num + mono)
    text = " ".join(parts).lstrip("+ ") or "0"
    return text if not text.startswith("-") else "-" + text[1:].lstrip()


@pytest.mark.parametrize("seed", range(8))
def test_random_rational_gf_text_against_sympy_series(seed):
    rng = random.Random(500 + seed)
    num = [rng.randint(-4, 4) for _ in range(rng.randint(1, 5))]
    num[0] = num[0] or 1
    den = [1] + [rng.randint(-3, 3) for _ in range(rng.randint(1, 5))]
    expr = sum(c * X ** i for i, c in enumerate(num)) / sum(c * X ** i for i, c in enumerate(den))
    order = 14
    ref = sympy.series(expr, X, 0, order).removeO()
    want = [int(ref.coeff(X, i)) for i in range(order)]  # integral: den has constant term 1
    text = f"G.f.: ({poly_text(num)})/({poly_text(den)})"
    v = check_formula(text, want)
    assert v.status == "agrees" and v.compared == order, (text, v.describe())
    want[7] += 1
    v = check_formula(text, want)
    assert (v.status, v.index) == ("disagrees", 7), (text, v.describe())


@pytest.mark.parametrize("seed", range(8))
def test_random_recurrence_text_against_sympy_recursiveseq(seed):
    rng = random.Random(900 + seed)
    a, b, c = rng.randint(-3, 3), rng.choice([-3, -2, -1, 1, 2, 3]), rng.randint(0, 3)
    y0, y1 = rng.randint(-2, 2), rng.randint(-2, 2)
    y = sympy.Function("y")
    seq = RecursiveSeq((a + c * N) * y(N - 1) + b * y(N - 2) + N, y(N), N, [y0, y1])
    want = [int(t) for t in seq[:16]]
    text = f"a(n) = ({a} + {c}*n)*a(n-1) + ({b})*a(n-2) + n, a(0) = {y0}, a(1) = {y1}"
    v = check_formula(text, want)
    assert v.status == "agrees" and v.compared == 16, (text, v.describe())
