"""Speed of the formula checks (not a test): prints ms per check and the ratio to sympy.

Targets (issue "Check what a formula claims"):
  * 40 terms of a rational generating function of degree <= 10: <= 5 ms per check;
  * 40 terms of a second-order recurrence: <= 1 ms per check.
The reference is sympy, measured in the same run: ``sympy.series`` for the g.f. and
``sympy.series.sequences.RecursiveSeq`` for the recurrence.

Run: ``python bench/bench_check.py`` (add ``--quick`` for fewer repetitions).
"""

from __future__ import annotations

import sys
import time

from normform import parse_formula
from normform.formula.check import check_formula
from normform.formula.terms import series, terms

GF = "G.f.: (1 + 2x - x^3 + 4x^5 - x^7 + 3x^9)/(1 - x - 2x^2 + x^3 - 3x^4 + x^5 - x^6 + 2x^7 - x^8 + x^9 - x^10)"
REC = "a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1"
REC_N = "(n+2)*a(n) = (2n+1)*a(n-1) + 3(n-1)*a(n-2), a(0) = a(1) = 1"  # n-dependent coefficients
COUNT = 40


def per_call(fn, repeat: int) -> float:
    """Best of 5 rounds of ``repeat`` calls, in milliseconds per call."""
    best = float("inf")
    for _ in range(5):
        t0 = time.perf_counter()
        for _ in range(repeat):
            fn()
        best = min(best, (time.perf_counter() - t0) / repeat)
    return best * 1000


def main() -> None:
    quick = "--quick" in sys.argv
    rep = 5 if quick else 40

    gf = parse_formula(GF)
    gf_terms = series(gf, COUNT)
    assert check_formula(gf, gf_terms).status == "agrees"
    t_gf = per_call(lambda: check_formula(gf, gf_terms), rep)
    t_gf_parse = per_call(lambda: check_formula(GF, gf_terms), rep)

    results = []
    for text in (REC, REC_N):
        f = parse_formula(text)
        listed = terms(f, 0, COUNT)
        assert check_formula(f, listed).status == "agrees"
        results.append((text, per_call(lambda: check_formula(f, listed), rep * 5),
                        per_call(lambda: check_formula(text, listed), rep)))

    import sympy
    from sympy.series.sequences import RecursiveSeq

    x, n = sympy.symbols("x n")
    num = 1 + 2 * x - x ** 3 + 4 * x ** 5 - x ** 7 + 3 * x ** 9
    den = 1 - x - 2 * x ** 2 + x ** 3 - 3 * x ** 4 + x ** 5 - x ** 6 + 2 * x ** 7 - x ** 8 + x ** 9 - x ** 10
    ref = sympy.series(num / den, x, 0, COUNT).removeO()
    assert [int(ref.coeff(x, i)) for i in range(COUNT)] == gf_terms, "sympy disagrees with our series"
    t_sym_gf = per_call(lambda: sympy.series(num / den, x, 0, COUNT), 1 if quick else 3)

    y = sympy.Function("y")

    def sympy_rec():
        return list(RecursiveSeq(y(n - 1) + y(n - 2), y(n), n, [0, 1])[:COUNT])
    assert sympy_rec() == terms(parse_formula(REC), 0, COUNT)
    t_sym_rec = per_call(sympy_rec, 3 if quick else 10)

    print(f"rational g.f., degree 10, {COUNT} terms: {t_gf:.2f} ms per check (target <= 5 ms; "
          f"{t_gf_parse:.2f} ms including parsing); sympy.series {t_sym_gf:.1f} ms; "
          f"ratio sympy/ours {t_sym_gf / t_gf:.1f}x")
    for text, t, t_parse in results:
        print(f"recurrence {text!r}, {COUNT} terms: {t:.3f} ms per check (target <= 1 ms; "
              f"{t_parse:.2f} ms including parsing)")
    t_rec = results[0][1]
    print(f"sympy RecursiveSeq (Fibonacci, {COUNT} terms): {t_sym_rec:.2f} ms; ratio sympy/ours {t_sym_rec / t_rec:.1f}x")


if __name__ == "__main__":
    main()
