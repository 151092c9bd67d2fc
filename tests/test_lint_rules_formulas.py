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
# Table 26.7.1 (Bell numbers; their e.g.f. exp(e^x - 1) is in DLMF §26.7), Table 26.9.1 (partitions
# p(n); the product g.f. is in DLMF §26.9), DLMF §26.5 (Catalan numbers), DLMF §26.6 (Motzkin numbers);
# the rows are from memory and are cross-checked against sympy in ``test_handbook_rows``.
HANDBOOK = [
    ("a(n) = S2(n,3)", 3, [1, 6, 25, 90, 301, 966, 3025, 9330, 28501, 86526]),
    ("a(n) = abs(Stirling1(n,2))", 2, [1, 3, 11, 50, 274, 1764, 13068, 109584, 1026576]),
    ("a(n) = Bell(n)", 0, [1, 1, 2, 5, 15, 52, 203, 877, 4140, 21147, 115975, 678570]),
    ("a(n) = binomial(2n,n)/(n+1)", 0, [1, 1, 2, 5, 14, 42, 132, 429, 1430, 4862, 16796]),
    ("a(n) = a(n-1) + a(n-2), a(0) = 0, a(1) = 1", 0, [0, 1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]),
    ("G.f.: Product_{k>=1} 1/(1-x^k)", 0, [1, 1, 2, 3, 5, 7, 11, 15, 22, 30, 42, 56, 77, 101, 135]),
    ("E.g.f.: exp(exp(x) - 1)", 0, [1, 1, 2, 5, 15, 52, 203, 877, 4140, 21147, 115975]),
    ("a(n) = Sum_{k=0..[n/2]} binomial(n,2k)*C(k)", 0, [1, 1, 2, 4, 9, 21, 51, 127, 323, 835, 2188]),
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
    from sympy import binomial
    from sympy.functions.combinatorial.numbers import partition

    assert rows[5] == [partition(n) for n in range(15)]
    assert rows[6] == [bell(n) for n in range(11)]
    assert rows[7] == [sum(binomial(n, 2 * k) * catalan(k) for k in range(n // 2 + 1)) for n in range(11)]


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


@pytest.mark.parametrize("formula", ["a(n) = 2^(n-1) for n >= 1", "a(n) = 2*a(n-1), a(1) = 1"])
def test_real_first_index_mismatch(formula):
    # compositions of n: 2^(n-1) for n >= 1 (common practice)
    need("normform.formula.check", "check_formula")
    terms = [1, 2, 4, 8, 16, 32, 64, 128, 256, 512]
    found = findings(_entry(formula, 0, terms), select=["first-index-mismatch", "formula-disagrees"])
    assert [f.slug for f in found] == ["first-index-mismatch"]
    assert found[0].fix.edits[0].text == "1"
    assert slugs(_entry(formula, 1, terms), "first-index-mismatch", "formula-disagrees") == []


def test_an_engine_crash_on_one_formula_does_not_hide_the_others(engine, monkeypatch):
    from normform.lint.engine import Context, lint
    from normform.lint.entry import parse_entry
    from normform.lint.registry import select_rules
    from normform.lint.settings import LintSettings

    parse = services.parse_formula

    def flaky(text):
        if text == "boom":
            raise RuntimeError("engine bug")
        return parse(text)

    monkeypatch.setattr(services, "parse_formula", flaky)
    engine[FIB] = FakeFormula(FIB, lambda n: _fib(n + 1) + (n == 7))
    ctx = Context(LintSettings())
    found = lint([parse_entry("Q000100.toml", BASE + f'formulas = ["boom", "{FIB}"]\n')],
                 select_rules(["formulas"]), ctx)
    assert [f.slug for f in found] == ["formula-disagrees"]
    assert "engine bug" in ctx.failed["formula-engine"]


@pytest.mark.parametrize("path", ["Q000100.toml", "Q000100.json"])
def test_first_index_fix_adds_the_key_when_absent(engine, path):
    import json
    import tomllib

    from normform.lint.engine import Context, lint
    from normform.lint.entry import parse_entry
    from normform.lint.fixing import fix_text
    from normform.lint.registry import select_rules
    from normform.lint.settings import LintSettings

    engine[FIB] = FakeFormula(FIB, _fib)
    doc = {"id": "Q000100", "title": "t", "terms": [1, 1, 2, 3, 5, 8, 13, 21, 34, 55], "formulas": [FIB]}
    text = json.dumps(doc) if path.endswith(".json") else (
        'id = "Q000100"\ntitle = "t"\nterms = [1, 1, 2, 3, 5, 8, 13, 21, 34, 55]  # F(1)...\n'
        f'formulas = ["{FIB}"]\n')
    rules = select_rules(["first-index-mismatch"])
    entry = parse_entry(path, text)
    fixed, count = fix_text(entry, lambda e: lint([e], rules, Context(LintSettings())))
    data = json.loads(fixed) if path.endswith(".json") else tomllib.loads(fixed)
    assert count == 1 and data["first_index"] == 1 and data["terms"] == doc["terms"]
    assert fix_text(parse_entry(path, fixed), lambda e: lint([e], rules, Context(LintSettings())))[1] == 0
