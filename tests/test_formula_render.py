"""Output: MathML Core validity, LaTeX checked by an independent converter, canonical ASCII round trips."""

from __future__ import annotations

import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st
from lxml import etree

from formula_support import FIXTURES, VALID
from normform import parse_formula
from normform.formula import ast as A

M = "{http://www.w3.org/1998/Math/MathML}"


@pytest.fixture(scope="module")
def core_schema():
    # W3C MathML Core RELAX NG schema (w3c/mathml-schema rng/mathml4-core.rng, see fixtures/formula/SOURCE.md)
    return etree.RelaxNG(etree.parse(str(FIXTURES / "mathml4-core.rng")))


def test_schema_is_strict_enough_to_mean_something(core_schema):
    bad = ['<math xmlns="http://www.w3.org/1998/Math/MathML"><mfenced><mi>x</mi></mfenced></math>',
           '<math xmlns="http://www.w3.org/1998/Math/MathML"><mo fence="true">(</mo></math>',
           '<math xmlns="http://www.w3.org/1998/Math/MathML"><mfrac><mn>1</mn><mn>2</mn><mn>3</mn></mfrac></math>']
    for xml in bad:
        assert not core_schema.validate(etree.fromstring(xml))


@pytest.mark.parametrize("display", ["block", "inline"])
def test_all_dev_mathml_validates_against_core(core_schema, display):
    invalid = []
    for case in VALID:
        xml = parse_formula(case["text"]).to_mathml(display)
        doc = etree.fromstring(xml.encode("utf-8"))
        assert doc.get("display") == display
        if not core_schema.validate(doc):
            invalid.append((case["id"], str(core_schema.error_log.last_error)))
    assert not invalid


def test_semantics_with_content_mathml_validates(core_schema):
    for case in VALID:
        xml = parse_formula(case["text"]).to_mathml(semantics=True)
        doc = etree.fromstring(xml.encode())
        assert core_schema.validate(doc), (case["id"], str(core_schema.error_log.last_error))
        ann = doc.find(f"{M}semantics/{M}annotation-xml")
        assert ann is not None and ann.get("encoding") == "MathML-Content" and len(ann) == 1
    xml = parse_formula("sum_{k=0}^{n} k^2").to_mathml(semantics=True)
    assert "<apply><sum/><bvar><ci>k</ci></bvar><lowlimit><cn>0</cn></lowlimit><uplimit><ci>n</ci></uplimit>" \
        "<apply><power/><ci>k</ci><cn>2</cn></apply></apply>" in xml


def test_mathml_constructs(core_schema):
    xml = parse_formula("sum_{k=0}^{n} binomial(n,k) x^k < 2^n (mod 3)").to_mathml()
    doc = etree.fromstring(xml.encode())
    assert doc.find(f".//{M}munderover/{M}mo").get("largeop") == "true"
    assert doc.find(f".//{M}mfrac").get("linethickness") == "0"
    assert "&lt;" in xml and core_schema.validate(doc)
    assert "mfenced" not in xml and "fence=" not in xml and "separator" not in xml


# ---------------------------------------------------------------- latex2mathml agreement

FIXED = {"mfrac", "msup", "msub", "msubsup", "munder", "mover", "munderover", "mroot", "mtable", "mtr"}
SPLICE = {"mrow", "math", "mstyle", "semantics", "mtd"}
INVISIBLE = {"\u2061", "\u2062", "\u2063", ""}
# spellings that differ only in the character chosen for the same operator
SAME = {"\u2212": "-", "\u00b7": "⋅", "\u22c5": "⋅", "\u223c": "~", "\u2223": "|"}


def shape(el) -> list:
    """Layout elements with their argument groups, and token texts, with mrow nesting,
    spacing, attributes and invisible operators normalised away."""
    tag = el.tag.replace(M, "")
    if tag in SPLICE:
        return [x for child in el for x in shape(child)]
    if tag == "mspace":
        return []
    if tag in ("mi", "mo", "mn", "mtext"):
        text = "".join(SAME.get(c, c) for c in (el.text or "").replace("\u00a0", " ").strip())
        if text in INVISIBLE:
            return []
        if tag == "mo" and text == "!!":
            return [("tok", "!"), ("tok", "!")]
        return [("tok", w) for w in text.split()] if tag == "mtext" else [("tok", text)]
    groups = [tuple(shape(child)) for child in el]
    if tag in FIXED:
        return [(tag, tuple(groups))]
    return [(tag, tuple(x for g in groups for x in g))]


def test_latex_through_latex2mathml_has_our_mathml_shape():
    # Independent converter: latex2mathml (general-purpose LaTeX -> MathML library).
    from latex2mathml.converter import convert

    different = []
    for case in VALID:
        f = parse_formula(case["text"])
        ours = shape(etree.fromstring(f.to_mathml().encode()))
        theirs = shape(etree.fromstring(convert(f.to_latex()).encode()))
        if ours != theirs:
            different.append(case["id"])
    assert not different


def test_latex_spellings():
    assert parse_formula("C(n,k)").to_latex() == "\\binom{n}{k}"
    assert parse_formula("[n/2]").to_latex() == "\\left\\lfloor \\frac{n}{2} \\right\\rfloor"
    assert parse_formula("sum_{k=0}^{n} k").to_latex() == "\\sum\\limits_{k=0}^{n} k"
    assert parse_formula("a == b (mod 5)").to_latex() == "a \\equiv b \\pmod{5}"
    assert parse_formula("a(n) = 2n+1 for n >= 0").to_latex() == \
        "a\\left(n\\right) = 2 n + 1\\quad \\text{for } n \\geq 0"


def test_latex_compiles_structurally_with_pylatexenc():
    # pylatexenc's LaTeX walker must read our output back without leftover errors.
    from pylatexenc.latexwalker import LatexWalker

    for case in VALID:
        latex = parse_formula(case["text"]).to_latex()
        assert latex.count("{") == latex.count("}"), case["id"]
        assert latex.count("\\left") == latex.count("\\right"), case["id"]
        LatexWalker(latex, tolerant_parsing=False).get_latex_nodes()


# ---------------------------------------------------------------- canonical ASCII

@pytest.mark.parametrize("case", VALID, ids=lambda c: c["id"])
def test_ascii_round_trip_and_idempotence(case):
    f = parse_formula(case["text"])
    once = f.to_ascii()
    g = parse_formula(once)
    assert g == f  # parse(ascii(f)) == f structurally (spans are not compared)
    assert g.to_ascii() == once  # ascii(parse(ascii(parse(s)))) == ascii(parse(s))
    assert once.isascii() or f.note  # canonical form is plain ASCII
    assert g.kind == f.kind


@pytest.mark.parametrize("text,canonical", [
    ("-x^2", "-x^2"), ("(-x)^2", "(-x)^2"), ("2^n^2", "2^n^2"), ("(2^n)^2", "(2^n)^2"),
    ("n!^2", "n!^2"), ("(n!)!", "(n!)!"), ("a - (b - c)", "a - (b - c)"), ("a/(b/c)", "a/(b/c)"),
    ("(a*b)*c", "a*b*c"), ("a*(b*c)", "a*(b*c)"), ("(-a)*b", "(-a)*b"), ("-(a*b)", "-a*b"),
    ("n mod 2 + 1", "n mod 2 + 1"), ("(n mod 2) + 1", "(n mod 2) + 1"), ("2^(-n)", "2^(-n)"),
    ("Sum_{k=0..n} k + 1", "sum(k=0..n, k) + 1"), ("Sum_{k=0..n} (k + 1)", "sum(k=0..n, k + 1)"),
])
def test_minimal_parentheses(text, canonical):
    assert parse_formula(text).to_ascii() == canonical


# random trees built directly from the AST, printed, re-read
_leaf = st.one_of(st.integers(0, 30).map(A.Integer), st.sampled_from("nkx").map(A.Symbol),
                  st.sampled_from(["pi", "e"]).map(A.Constant))


def _grow(children):
    return st.one_of(
        st.tuples(st.sampled_from(["+", "-", "*", "/", "mod"]), children, children).map(lambda t: A.BinOp(*t)),
        children.map(lambda c: A.UnaryOp("-", c)),
        st.tuples(children, children).map(lambda t: A.Power(*t)),
        st.tuples(children, st.booleans()).map(lambda t: A.Factorial(*t)),
        st.tuples(st.sampled_from(["floor", "binomial", "sqrt", "gcd"]), st.lists(children, min_size=1, max_size=2))
        .filter(lambda t: (t[0] in ("binomial",)) == (len(t[1]) == 2) or t[0] == "gcd")
        .map(lambda t: A.Call(t[0], tuple(t[1]))),
        st.tuples(children, children).map(lambda t: A.BigOp("sum", "j", t[1], A.Integer(0), t[0])),
    )


@settings(max_examples=300, deadline=None, suppress_health_check=[HealthCheck.too_slow, HealthCheck.filter_too_much])
@given(st.recursive(_leaf, _grow, max_leaves=10))
def test_random_trees_round_trip(node):
    stmt = A.Statement(node)
    text = parse_formula("0").__class__("", stmt).to_ascii()
    again = parse_formula(text)
    assert again.root == stmt, text
    assert again.to_ascii() == text


# ---------------------------------------------------------------- robustness on junk input

_PIECES = list("nkxa0123456789+-*/^()[]{},.=<>!|_ ~") + [
    "mod", "sum", "Sum_", "prod", "for", "if", "otherwise", "with", "even", "is", "and", "sqrt", "binomial",
    "C", "F", "phi", "pi", "e", "i", "...", "√", "≤", "²", "−", "·", "∑", "G.f.:", "E.g.f.:", "inf", "floor",
    "S2", "a(n)", "a(n-1)", "k=0..n", "{k=0}^{n}", "(mod 3)", "==", "≡", " - Ada Quill, 2020"]


@settings(max_examples=400, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(st.sampled_from(_PIECES), min_size=1, max_size=12).map("".join))
def test_junk_input_is_rejected_or_round_trips(text):
    from normform import FormulaError
    from normform.formula.errors import EvaluationError

    try:
        f = parse_formula(text)
    except FormulaError as exc:
        assert exc.line >= 1 and exc.column >= 1
        return
    again = parse_formula(f.to_ascii())
    assert again == f and again.to_ascii() == f.to_ascii()
    f.to_latex()
    etree.fromstring(f.to_mathml().encode())  # well-formed XML
    try:
        f.evaluate(n=3, k=2, x=1)
    except EvaluationError:
        pass
