"""Long flat operator chains and the CLI's line-by-line contract (QA findings)."""

import json
import subprocess
import sys

import pytest

from normform.formula.api import parse_formula
from normform.formula.errors import FormulaError
from normform.formula.parser import MAX_DEPTH


def test_long_recurrence_chain_no_recursion_error():
    text = "a(n)=" + "a(n-1)+" * 700 + "1"
    f = parse_formula(text)
    assert f.kind == "recurrence"
    assert f.to_ascii().count("a(n - 1)") == 700
    assert f.to_latex().count("+") == 700
    assert f.to_mathml().count("<mo>+</mo>") == 700
    # a(n) = 700 a(n-1) + 1 with a(0) = 1
    assert f.terms(0, 3, [1]) == [1, 701, 700 * 701 + 1]


@pytest.mark.parametrize("op", ["+", "*"])
def test_700_term_chain_every_pass(op):
    f = parse_formula("a(n)=" + (f"n{op}" * 699) + "n")
    assert f.evaluate(n=3) == (3 * 700 if op == "+" else 3 ** 700)
    assert parse_formula(f.to_ascii()) == f  # re-parse of the long canonical form
    assert f.terms(0, 3)[2] == (1400 if op == "+" else 2 ** 700)


def test_chain_is_not_nesting_but_nesting_still_limited():
    parse_formula("+".join(["n"] * 130))  # 130 terms: length, not depth
    with pytest.raises(FormulaError) as exc:
        parse_formula("(" * (MAX_DEPTH + 1) + "n" + ")" * (MAX_DEPTH + 1))
    assert exc.value.column is not None
    with pytest.raises(FormulaError, match="nested deeper"):
        parse_formula("2^" * (MAX_DEPTH + 5) + "2")


def _cli(stdin, *args):
    return subprocess.run([sys.executable, "-m", "normform", "formula", *args], input=stdin,
                          capture_output=True, text=True)


KEYS = {"input", "ok", "kind", "ascii", "latex", "mathml", "error"}


def test_json_all_keys_and_blank_lines_keep_places():
    r = _cli("n+1\n\nn+\n  \n", "--to", "json")
    objs = [json.loads(line) for line in r.stdout.splitlines()]
    assert len(objs) == 4
    assert all(set(o) >= KEYS for o in objs)
    assert objs[0]["ok"] and objs[0]["error"] is None and objs[0]["ascii"] == "n + 1"
    assert objs[1]["error"] == {"line": 2, "column": 1, "message": "empty line"} and objs[1]["kind"] is None
    assert objs[2]["error"]["line"] == 3 and objs[2]["error"]["column"] == 3 and objs[2]["ascii"] is None
    assert r.returncode == 1  # line 3 failed


def test_blank_lines_not_failures_and_lines_aligned():
    r = _cli("n+1\n\n2n\n", "--to", "ascii")
    assert r.stdout.split("\n")[:3] == ["n + 1", "", "2*n"] and r.returncode == 0
    r = _cli("n+1\nn+\n2n\n", "--to", "latex")
    assert r.stdout.split("\n")[:3] == ["n + 1", "", "2 n"] and r.returncode == 1


def test_long_chain_canonical_ascii_reparses():
    # the canonical form adds spaces ("a(n - 1) - "): 7,708 characters, still accepted
    f = parse_formula("a(n)=" + "a(n-1)-" * 700 + "1")
    text = f.to_ascii()
    assert len(text) > 5000 and parse_formula(text) == f


def test_length_limit_positioned():
    from normform.formula.parser import MAX_LENGTH, MAX_RAW_LENGTH

    with pytest.raises(FormulaError) as exc:
        parse_formula("n+" * (MAX_LENGTH // 2) + "n")  # 5,001 characters, no spaces
    assert exc.value.column == MAX_LENGTH + 1
    with pytest.raises(FormulaError, match="longer than"):
        parse_formula("n" + " " * MAX_RAW_LENGTH)


def test_evaluate_function_and_recursion_limit_restored():
    from normform.formula.evaluate import evaluate

    before = sys.getrecursionlimit()
    f = parse_formula("+".join(["k"] * 2000))
    assert evaluate(f.root.body, {"k": 2}) == 4000
    assert sys.getrecursionlimit() == before


@pytest.mark.parametrize("text", ["phi_n", "phi_{n+1}", "a(n) = sigma_n^2"])
def test_subscripted_term_with_function_name_round_trips(text):
    # found by the hypothesis junk test: `phi_n` printed as `phi(n)` read back as the totient
    f = parse_formula(text)
    assert parse_formula(f.to_ascii()) == f
    assert "(" not in f.to_ascii().split("=")[-1]
