"""Formula rules.

Two layers: the lint logic (position mapping, first-index shifts, fixes) on a
stand-in formula engine whose answers each test sets; then the real formula
engine and checks on handbook values, which skip until those areas are importable.
"""

from __future__ import annotations

from dataclasses import dataclass

import pytest

from lint_support import BASE, findings, need, slugs
from normform.formula.errors import FormulaError
from normform.lint import services


@dataclass
class FakeFormula:
    text: str
    fn: object
    kind: str = "closed-form"
    canonical: str | None = None

    def to_ascii(self):
        return self.canonical or self.text


@dataclass
class FakeVerdict:
    status: str
    reason: str | None = None
    first_bad_index: int | None = None
    expected: int | None = None
    computed: int | None = None


@pytest.fixture
def engine(monkeypatch):
    table: dict[str, FakeFormula] = {}

    def parse(text):
        if text not in table:
            col = text.find("((") + 3 if "((" in text else 1
            raise FormulaError("unbalanced parenthesis", line=1, column=col, source=text, expected=("')'",))
        return table[text]

    def check(formula, terms, first):
        if formula.fn is None:
            return FakeVerdict("cannot-check", reason="an asymptotic formula gives no exact terms")
        for i, t in enumerate(terms):
            n = first + i
            try:
                value = formula.fn(n)
            except (ValueError, ZeroDivisionError):
                return FakeVerdict("cannot-check", reason="undefined")
            if value != t:
                return FakeVerdict("disagrees", first_bad_index=n, expected=t, computed=value)
        return FakeVerdict("agrees")

    monkeypatch.setattr(services, "parse_formula", parse)
    monkeypatch.setattr(services, "check_formula", check)
    return table


FIB = "a(n) = F(n)"


def _fib(n):
    a, b = 0, 1
    for _ in range(n):
        a, b = b, a + b
    return a


def test_formula_syntax_position_maps_into_the_file(engine):
    text = BASE + 'formulas = ["a(n) = \\u00e9 + ((n"]\n'
    (f,) = findings(text, select=["formula-syntax"])
    # the parser's column 13 (after "((") sits after a 6-character escape in the file
    line = text.splitlines()[4]
    assert f.line == 5 and f.column == line.index("((") + 3
    assert "expected ')'" in f.message
    engine[FIB] = FakeFormula(FIB, _fib)
    assert slugs(BASE + f'formulas = ["{FIB}"]\n', "formula-syntax") == []


def test_formula_disagrees_names_index_and_values(engine):
    engine[FIB] = FakeFormula(FIB, lambda n: _fib(n + 1) + (n == 7))
    (f,) = findings(BASE + f'formulas = ["{FIB}"]\n', select=["formula-disagrees"])
    assert "a(7) = 22 but the terms list 21" in f.message
    assert f.related[0][1:] == (3, BASE.splitlines()[2].index("21") + 1)


def test_formula_agrees_is_quiet(engine):
    engine[FIB] = FakeFormula(FIB, lambda n: _fib(n + 1))
    assert slugs(BASE + f'formulas = ["{FIB}"]\n', "formula-disagrees", "first-index-mismatch") == []


def test_first_index_mismatch_with_fix(engine):
    engine[FIB] = FakeFormula(FIB, _fib)      # terms 1,1,2,... are F(1), F(2), ...
    text = BASE + f'formulas = ["{FIB}"]\n'
    found = findings(text, select=["first-index-mismatch", "formula-disagrees"])
    assert [f.slug for f in found] == ["first-index-mismatch"]
    assert found[0].fix.edits[0].text == "1" and "a(1), not a(0)" in found[0].message
    assert slugs(text.replace("first_index = 0", "first_index = 1"), "first-index-mismatch") == []


def test_formula_unchecked_is_a_note_with_reason(engine):
    engine["a(n) ~ phi^n"] = FakeFormula("a(n) ~ phi^n", None, kind="asymptotic")
    (f,) = findings(BASE + 'formulas = [{ text = "a(n) ~ phi^n", kind = "asymptotic" }]\n',
                    select=["formula-unchecked"])
    assert f.severity == "note" and "asymptotic formula gives no exact terms" in f.message
    engine[FIB] = FakeFormula(FIB, lambda n: _fib(n + 1))
    assert slugs(BASE + f'formulas = ["{FIB}"]\n', "formula-unchecked") == []


def test_formula_spelling_fix_only_when_it_reads_back(engine):
    engine["a(n) = 2**n"] = FakeFormula("a(n) = 2**n", lambda n: 2**n, canonical="a(n) = 2^n")
    engine["a(n) = 2^n"] = FakeFormula("a(n) = 2^n", lambda n: 2**n)
    (f,) = findings(BASE + 'formulas = ["a(n) = 2**n"]\n', select=["formula-spelling"])
    assert f.fix.edits[0].text == '"a(n) = 2^n"'
    assert slugs(BASE + 'formulas = ["a(n) = 2^n"]\n', "formula-spelling") == []
    engine["a(n) = 3**n"] = FakeFormula("a(n) = 3**n", lambda n: 3**n, canonical="a(n) = 3^^n")
    (f,) = findings(BASE + 'formulas = ["a(n) = 3**n"]\n', select=["formula-spelling"])
    assert f.fix is None   # the canonical text would not parse: no fix offered


def test_formula_kind_mismatch(engine):
    engine[FIB] = FakeFormula(FIB, _fib, kind="recurrence")
    (f,) = findings(BASE + f'formulas = [{{ text = "{FIB}", kind = "ogf" }}]\n', select=["formula-kind-mismatch"])
    assert f.value_path == ("formulas", 0, "kind") and f.fix.edits[0].text == '"recurrence"'
    assert slugs(BASE + f'formulas = [{{ text = "{FIB}", kind = "recurrence" }}]\n', "formula-kind-mismatch") == []


# -- the real engines on handbook values -------------------------------------------

# Values: DLMF Table 26.8.2 (Stirling numbers of the second kind), Table 26.8.1 (first kind),
# Table 26.7.1 (Bell numbers), Table 26.9.1 (partitions p(n)), and DLMF §26.5 (Catalan numbers);
# the rows are from memory and are cross-checked against sympy in ``test_handbook_rows``.
HANDBOOK = [
    ("a(n) = S2(n,3)", 3, [1, 6, 25, 90, 301, 966, 3025, 9330, 28501, 86526]),
    ("a(n) = abs(Stirling1(n,2))", 2, [1, 3, 11, 50, 274, 1764, 13068, 109584, 1026576]),
    ("a(n) = Bell(n)", 0, [1, 1, 2, 5, 15, 52, 203, 877, 4140, 21147, 115975, 678570]),
    ("a(n) = binomial(2n,n)/(n+1)", 0, [1, 1, 2, 5, 14, 42, 132, 429, 1430, 4862, 16796]),
    ("a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1", 0, [0, 1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]),
]


def test_handbook_rows():
    from sympy import bell, catalan, fibonacci
    from sympy.functions.combinatorial.numbers import stirling

    rows = [r[2] for r in HANDBOOK]
    assert rows[0] == [stirling(n, 3) for n in range(3, 13)]
    assert rows[1] == [stirling(n, 2, kind=1) for n in range(2, 11)]
    assert rows[2] == [bell(n) for n in range(12)]
    assert rows[3] == [catalan(n) for n in range(11)]
    assert rows[4] == [fibonacci(n) for n in range(12)]


def _entry(formula, first, terms):
    return (f'id = "Q000100"\ntitle = "t"\nterms = {terms}\nfirst_index = {first}\n'
            f'formulas = ["{formula}"]\n')


@pytest.mark.parametrize("formula, first, terms", HANDBOOK)
def test_formula_vs_terms_on_handbook_values(formula, first, terms):
    need("normform.formula.api", "parse_formula")
    need("normform.formula.check", "check_formula")
    assert slugs(_entry(formula, first, terms), "formula-syntax", "formula-disagrees",
                 "first-index-mismatch") == []
    wrong = list(terms)
    wrong[5] += 1
    found = findings(_entry(formula, first, wrong), select=["formula-disagrees"])
    assert [f.slug for f in found] == ["formula-disagrees"]
    assert f"a({first + 5}) = {terms[5]} but the terms list {wrong[5]}" in found[0].message


def test_real_parser_error_position():
    need("normform.formula.api", "parse_formula")
    text = _entry("a(n) = (n + 1", 0, [1, 2, 3])
    (f,) = findings(text, select=["formula-syntax"])
    assert f.line == 5 and f.column >= text.splitlines()[4].index("(n") + 1
