"""Terms of up to 20,000 bits (docs/checks.md), beyond Python's 4,300-digit conversion limit.

Python refuses ``int`` <-> ``str`` conversion of more than
``sys.get_int_max_str_digits()`` digits (4,300 by default; "Integer string
conversion length limitation", Python 3.11 documentation of ``sys``).  2^15000
has 4,516 digits: it must be read and checked by ``check_formula``, ``normform
check`` and ``normform lint``; a term beyond the bound is refused with its
position and the bound, and never with a traceback.  The digit strings are
made with :mod:`decimal`, which has no such limit, so the tests do not lean on
the code under test to write them.
"""

from __future__ import annotations

import decimal
import json
import sys
import threading

import pytest

from normform import check_formula
from normform.cli import main

_EXACT = decimal.Context(prec=20_000, traps=[decimal.Inexact])


def power_of_two(e: int) -> str:
    """The decimal digits of 2**e, by decimal arithmetic (exact: Inexact traps)."""
    return str(_EXACT.power(decimal.Decimal(2), e))


P15000 = power_of_two(15000)        # 4,516 digits, 15,001 bits: inside the bound
P30000 = power_of_two(30000)        # 9,031 digits: beyond 20,000 bits


DEFAULT_LIMIT = 4300     # sys.int_info.default_max_str_digits (Python 3.11 documentation)


@pytest.fixture(autouse=True)
def _default_limit():
    """Each test runs under Python's default limit (another command in this process, ``normform
    formula``, may have lifted it) and leaves it as it found it: the code never sets it for good."""
    outer = sys.get_int_max_str_digits()
    sys.set_int_max_str_digits(DEFAULT_LIMIT)
    try:
        yield
        assert sys.get_int_max_str_digits() == DEFAULT_LIMIT
    finally:
        sys.set_int_max_str_digits(outer)


def test_the_test_data():
    assert len(P15000) == 4516 and len(P30000) == 9031          # from memory: 15000*log10(2) = 4515.4
    assert sys.int_info.default_max_str_digits == DEFAULT_LIMIT < len(P15000)   # the limit is in the way
    with pytest.raises(ValueError):
        int(P15000)


# -- the Python API ------------------------------------------------------------

def test_check_formula_reads_a_4516_digit_term():
    v = check_formula("a(n) = 2^(15000*n)", [1, P15000])
    assert v.status == "agrees" and v.compared == 2, v.describe()
    v = check_formula("a(n) = 2^15000 * n", {0: "0", 1: P15000, 2: "-" + P15000})
    assert v.status == "disagrees" and v.index == 2
    assert "(4517 characters)" in v.describe()          # the listed -2^15000, shortened


def test_check_formula_refuses_a_term_beyond_the_bound_with_its_position():
    v = check_formula("a(n) = 2^(15000*n)", [1, 2, P30000])
    assert v.status == "cannot-check"
    assert "listed term 3 (n = 2)" in v.reason and "20,000 bits" in v.reason and "9,031 digits" in v.reason
    # a term given as a Python int is not read from text: the check stops at its own bit limit
    v = check_formula("a(n) = 2^n", [1, 2, 2 ** 30000])
    assert v.status == "disagrees" and v.index == 2 and "(9031 characters)" in v.describe()


def test_an_exponent_is_not_expanded_beyond_the_bound():
    v = check_formula("a(n) = 10^n", ["1e999999999", 10])
    assert v.status == "cannot-check" and "listed term 1" in v.reason and "20,000 bits" in v.reason
    assert check_formula("a(n) = 10^n", ["1e0", "1e1", "100"]).status == "agrees"


def test_a_huge_computed_value_is_described_not_raised():
    v = check_formula("a(n) = 2^(15000*n)", [1, 2])
    assert v.status == "disagrees"
    text = v.describe()
    assert P15000[:20] in text and P15000[-10:] in text and "(4516 characters)" in text


def test_initial_values_may_be_long_too():
    v = check_formula("a(n) = 2*a(n-1)", [P15000, power_of_two(15001)], initial=[P15000])
    assert v.status == "agrees", v.describe()


def test_the_limit_is_restored_across_threads():
    errors: list[BaseException] = []

    def work():
        try:
            for _ in range(20):
                assert check_formula("a(n) = 2^(15000*n)", [1, P15000]).status == "agrees"
        except BaseException as exc:  # noqa: BLE001 - reported below
            errors.append(exc)

    threads = [threading.Thread(target=work) for _ in range(4)]
    for t in threads:
        t.start()
    for t in threads:
        t.join()
    assert not errors


# -- normform check ------------------------------------------------------------------

def test_check_command_agrees_on_a_4516_digit_term(capsys):
    assert main(["check", f"1,{P15000}", "a(n) = 2^(15000*n)"]) == 0
    assert capsys.readouterr().out.startswith("agrees:")
    assert main(["check", f"1,{P15000}", "a(n) = 2^(15000*n) + n", "--format", "json"]) == 1
    row = json.loads(capsys.readouterr().out, parse_int=str)    # the numbers as written, digit for digit
    assert row["status"] == "disagrees" and row["expected"] == P15000
    assert P15000[-1] == "6" and row["computed"] == P15000[:-1] + "7"     # 2^15000 + 1 at n = 1


def test_check_command_refuses_a_term_beyond_the_bound(capsys):
    assert main(["check", f"1,2,{P30000}", "a(n) = 2^n"]) == 2
    err = capsys.readouterr().err
    assert "term 3" in err and "20,000 bits" in err and "Traceback" not in err
    assert main(["check", "1,2", "a(n) = 2^n", "--initial", P30000]) == 2
    assert "--initial: term 1" in capsys.readouterr().err
    assert main(["check", "1,x", "a(n) = 2^n"]) == 2
    assert "is not an integer or p/q" in capsys.readouterr().err


# -- normform lint -----------------------------------------------------------------

def _toml(path, terms: str, formula: str = "a(n) = 2^(15000*n)"):
    path.write_text(f'id = "{path.stem}"\ntitle = "Powers of 2^15000"\nterms = [{terms}]\n'
                    f'formulas = ["{formula}"]\n', "utf-8")
    return path


def test_lint_reads_a_4516_digit_term(tmp_path, capsys):
    toml = _toml(tmp_path / "Q000200.toml", f"1, {P15000}")
    js = tmp_path / "Q000201.json"
    js.write_text('{"id": "Q000201", "title": "Powers of 2^15000", "terms": [1, %s], '
                  '"formulas": ["a(n) = 2^(15000*n)"]}' % P15000, "utf-8")
    code = main(["lint", "--format", "json", "--ignore", "too-few-terms", str(toml), str(js)])
    out = capsys.readouterr()
    assert "Traceback" not in out.err
    report = json.loads(out.out)
    assert code == 0 and report["findings"] == [], report["findings"]   # read, and the formula agrees


def test_lint_refuses_a_term_beyond_the_bound_at_its_position(tmp_path, capsys):
    toml = _toml(tmp_path / "Q000202.toml", f"1, 2, {P30000}", "a(n) = 2^n")
    js = tmp_path / "Q000203.json"
    js.write_text('{"id": "Q000203", "terms": [1, %s]}' % P30000, "utf-8")
    assert main(["lint", "--format", "json", str(toml), str(js)]) == 1
    findings = {f["path"]: f for f in json.loads(capsys.readouterr().out)["findings"] if f["rule"] == "file-syntax"}
    f = findings[str(toml)]
    assert (f["line"], f["column"]) == (3, len("terms = [1, 2, ") + 1)
    assert "term 3 (terms[2])" in f["message"] and "20,000 bits" in f["message"]
    f = findings[str(js)]
    assert (f["line"], f["column"]) == (1, len('{"id": "Q000203", "terms": [1, ') + 1)
    assert "term 2 (terms[1])" in f["message"] and "9,031 digits" in f["message"]
