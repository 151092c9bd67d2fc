"""Formula engine speed (plain script, not a test).

Prints: `import normform` time; parse + MathML per second on the dev formulas versus
latex2mathml converting our LaTeX of the same formulas (target ratio >= 2); parse per
second versus sympy's parse_expr on our canonical ASCII of the same expressions
(target >= 10). Each comparison is run REPEATS times; the verdict uses the median ratio.
Run: nice -n 10 python3 bench/bench_formula.py [--repeats N]

No result cache is involved: `parse_formula` keeps none (every call lexes and parses
its text); the parser only fills input-independent tables on first use (the lexer's
entry per character, the table driver's runs of reductions per state), which the warm-up
parse before timing settles. sympy's own expression cache stays on, as in normal use.
"""

from __future__ import annotations

import argparse
import gc
import json
import statistics
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT))
DEV = ROOT / "tests" / "fixtures" / "formula" / "formulas-dev.jsonl"
REPEATS = 5


def best_of_pair(fa, fb, rounds: int) -> tuple[float, float]:
    """Best CPU time of each (process time: the 2 cores are shared, so wall time would
    count other people's jobs), measured alternately so that load changes hit both."""
    ta, tb = [], []
    gc.collect()
    gc.disable()  # as timeit does: collector pauses land at random in one or the other
    try:
        for _ in range(rounds):
            for fn, out in ((fa, ta), (fb, tb)):
                t = time.process_time()
                fn()
                out.append(time.process_time() - t)
    finally:
        gc.enable()
    return min(ta), min(tb)


def compare(fa, fb, items_a: int, items_b: int, rounds: int, repeats: int) -> tuple[float, float, list[float]]:
    """`repeats` runs of best_of_pair: (median items/s of a, of b, the speed ratio a/b of each run)."""
    rates_a, rates_b, ratios = [], [], []
    for _ in range(repeats):
        ta, tb = best_of_pair(fa, fb, rounds)
        rates_a.append(items_a / ta)
        rates_b.append(items_b / tb)
        ratios.append(rates_a[-1] / rates_b[-1])
    return statistics.median(rates_a), statistics.median(rates_b), ratios


def import_time() -> float:
    code = "import time; t=time.perf_counter(); import normform; print(time.perf_counter()-t)"
    runs = [float(subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                                 cwd=ROOT, check=True).stdout) for _ in range(5)]
    return min(runs)


def verdict(ratios: list[float], target: float) -> str:
    med = statistics.median(ratios)
    runs = ", ".join(f"{r:.2f}" for r in ratios)
    ok = "met" if med >= target else "NOT met"
    return f"{med:.2f} median of {len(ratios)} runs [{runs}]  (target >= {target:g}: {ok})"


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--repeats", type=int, default=REPEATS, help=f"runs per comparison (default {REPEATS})")
    repeats = max(1, ap.parse_args().repeats)

    print(f"import normform: {import_time() * 1000:.1f} ms (best of 5, fresh interpreters; "
          f"the grammar loads on first parse)")
    t = time.perf_counter()
    from normform import parse_formula

    parse_formula("1")
    print(f"first parse (grammar load, lark cache): {(time.perf_counter() - t) * 1000:.1f} ms")

    texts = [t for t in (json.loads(line) for line in DEV.read_text("utf-8").splitlines())
             if t["kind"] != "malformed"]
    texts = [c["text"] for c in texts]
    latex = [parse_formula(t).to_latex() for t in texts]
    n = len(texts)

    def ours():
        for _ in range(4):
            for t in texts:
                parse_formula(t).to_mathml()

    from latex2mathml.converter import convert

    def theirs():
        for _ in range(4):
            for s in latex:
                convert(s)

    ours()  # warm-up (first-use tables of the lexer and the parser)
    r_ours, r_l2m, ratios = compare(ours, theirs, 4 * n, 4 * n, rounds=5, repeats=repeats)
    print(f"parse + MathML: {r_ours:,.0f} formulas/s (CPU, median) over {n} dev formulas")
    print(f"latex2mathml on our LaTeX of them: {r_l2m:,.0f} formulas/s (CPU, median)")
    print(f"ratio ours / latex2mathml: {verdict(ratios, 2.0)}")

    from sympy.parsing.sympy_parser import convert_xor, factorial_notation, parse_expr, standard_transformations

    from normform.export.ascii import to_ascii

    transforms = standard_transformations + (convert_xor, factorial_notation)
    exprs = []
    for t in texts:
        f = parse_formula(t)
        s = to_ascii(f.rhs) if not hasattr(f.rhs, "branches") else None
        if s is None:
            continue
        try:
            parse_expr(s, transformations=transforms)  # bench only: trusted, our own output
        except Exception:
            continue
        exprs.append(s)

    def ours_parse():  # (ten passes: a pass alone is only a few ms, too short to time well)
        for _ in range(10):
            for s in exprs:
                parse_formula(s)

    def sympy_parse():
        for s in exprs:
            parse_expr(s, transformations=transforms)

    ours_parse()
    r_p, r_s, ratios = compare(ours_parse, sympy_parse, 10 * len(exprs), len(exprs), rounds=9, repeats=repeats)
    print(f"parse only: {r_p:,.0f} expressions/s (CPU, median); sympy parse_expr on the same "
          f"canonical ASCII: {r_s:,.0f}/s ({len(exprs)} expressions sympy accepts)")
    print(f"ratio ours / sympy parse_expr: {verdict(ratios, 10.0)}")


if __name__ == "__main__":
    main()
