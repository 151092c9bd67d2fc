"""Inline TeX math in titles (``On $q$-analogues``) survives BibTeX (and ASCII LaTeX) export.

Convention (normform/texconv.py, docs/io.md): the model keeps an inline math span as ``$...$``;
the BibTeX writer puts it verbatim in a protecting group (``{$q$}``) and escapes every other
dollar (``\\$``); the BibTeX reader keeps it as ``$...$``.  Outside checks: pybtex (parser and
its port of BibTeX's change.case$), bibtexparser v2, pylatexenc's LatexNodes2Text.
"""

import subprocess
import sys
import time
import unicodedata

import bibtexparser
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st
from pybtex.bibtex.utils import change_case
from pybtex.database import parse_string
from pylatexenc.latex2text import LatexNodes2Text

from normform import capitals
from normform.export.bibtex import BibtexExporter
from normform.export.csljson import CslJsonExporter
from normform.model import Kind, Name, Reference
from normform.readers.bibtex import read_bibtex, title_hints
from normform.texconv import MATH_MAX, math_spans, to_latex, to_unicode

SETTINGS = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
LINE = "A. Quill, On $q$-analogues of nib numbers, J. Combin. Theory Ser. A 12 (1990), 1-20."


def spans(text):
    return [text[a:b] for a, b in math_spans(text)]


def article(title, protected=None):
    hints = capitals.canonical_hints(title) if protected is None else protected
    return Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="Ada"),), title=title,
                     title_protected=hints, container_title="Bull. QSEM", key="quill")


def fields(ref, unicode=True):
    return {f.name: f.value for f in BibtexExporter(unicode=unicode, provenance=False).fields(ref)}


def round_trip(ref, unicode=True):
    text = BibtexExporter(unicode=unicode).dumps([ref])
    result = read_bibtex(text)
    assert result.errors == [], [str(e) for e in result.errors]
    (back,) = result.records
    return text, back


# -- what is a math span ------------------------------------------------------------------
SPAN_TABLE = [
    ("On $q$-analogues of nib numbers", ["$q$"]),
    ("The $q$-quill numbers and $\\lambda$-nibs", ["$q$", "$\\lambda$"]),
    ("Sums over $\\{1,\\dots,n\\}$ and $x^{N_{k^{2}}}$", ["$\\{1,\\dots,n\\}$", "$x^{N_{k^{2}}}$"]),
    ("$\\mathfrak{sl}_2$-modules at 50$\\%$", ["$\\mathfrak{sl}_2$", "$\\%$"]),
    ("A nib costs $5", []),                          # a lone dollar
    ("From $5 to $10", []),                          # closer after a blank: prices
    # Pandoc User's Guide, 8.13.1 tex_math_dollars: "$20,000 and $30,000 won't parse as math"
    ("$20,000 and $30,000", []),
    ("Paid $5 for $x$", ["$x$"]),                    # as in TeX, the first dollar after "$5" closes nothing
    ("$ x $ is no span", []),                        # blanks inside the dollars (pandoc's edge rule)
    ("$x$5", []),                                    # closer followed by a digit (same rule)
    ("$$x$$ is display math", []),
    ("$a$$b$", []),
    ("\\$x$ escaped", []),                           # an escaped dollar opens nothing
    ("\\\\$x$ after an escaped backslash", ["$x$"]),
    ("$\\{x$", []),                                  # BibTeX counts escaped braces: unbalanced
    ("${x$}", []),
    ("$a%b$ and $a#b$ and $a&b$", []),               # comment, parameter, alignment characters
    ("$x^{{{a}}}$", ["$x^{{{a}}}$"]),                # three groups deep
    ("$x^{{{{a}}}}$", []),                           # four: not a span
    ("$a\nb$", []),
]


@pytest.mark.parametrize("text, expected", SPAN_TABLE)
def test_math_spans(text, expected):
    assert spans(text) == expected


def test_length_limit():
    inner = "x" * (MATH_MAX - 2)
    assert spans(f"${inner}$") == [f"${inner}$"]
    assert spans(f"${inner}x$") == []


ADVERSARIAL = {
    "openers": "$a " * 33_000,
    "groups": "${" * 50_000,
    "deep": "$" + "{" * 100_000,
    "closers": "$x" + "}" * 100_000,
    "backslashes": "$x" + "\\" * 100_000,
    "nested": "${{{a}}}" * 12_500,
    "almost": "$x^{{{a}}}" * 10_000,
    "escapes": "\\$" * 50_000,
    "blanks": "$x $" * 25_000,
}


@pytest.mark.parametrize("name", sorted(ADVERSARIAL))
def test_linear_time_on_100kB_adversarial_text(name):
    # Catastrophic backtracking would take minutes on 100 kB; the bound is a guard, not a speed target.
    text = ADVERSARIAL[name]
    start = time.perf_counter()
    math_spans(text)
    to_latex(text, keep_math=True)
    assert time.perf_counter() - start < 5.0


# -- the writer -------------------------------------------------------------------------------
def test_command_line_example():
    res = subprocess.run([sys.executable, "-m", "normform", "refs", "-", "--to", "bibtex"],
                         input=LINE + "\n", capture_output=True, text=True)
    assert res.returncode == 0, res.stderr
    assert "  title = {On {$q$}-analogues of nib numbers},\n" in res.stdout


@pytest.mark.parametrize("title, tex", [
    ("On $q$-analogues of nib numbers", "On {$q$}-analogues of nib numbers"),
    ("A nib costs $5", "A nib costs \\$5"),
    ("Paid $5 for $x$", "Paid \\$5 for {$x$}"),
    ("Sets $\\{1,\\dots,n\\}$ & quills", "Sets {$\\{1,\\dots,n\\}$} \\& quills"),
    ("\\$x$ escaped", "\\textbackslash{}\\$x\\$ escaped"),
])
def test_writer_keeps_math_and_escapes_other_dollars(title, tex):
    assert fields(article(title))["title"] == tex
    assert to_latex(title, keep_math=True) == tex


def test_case_protection_leaves_math_whole():
    # "Dovecote" (capitalized in a sentence-case title) and "McQuill" (mixed case) are protected;
    # the math only by its own group, and its capitals count for no hint
    title = "Numbers of $\\mathcal{Q}_n$-nibs and $x + Y$ in Dovecote, after McQuill"
    tex = fields(article(title))["title"]
    assert tex == "Numbers of {$\\mathcal{Q}_n$}-nibs and {$x + Y$} in {Dovecote}, after {McQuill}"
    # a hint inside a span is dropped, one reaching into it is widened
    assert capitals.canonical_hints(title, ["Y"]) == ("Dovecote", "McQuill")
    assert capitals.canonical_hints(title, ["Y$ in"])[0] == "$x + Y$ in"
    assert fields(article(title, capitals.canonical_hints(title, ["Y$ in"])))["title"].startswith(
        "Numbers of {$\\mathcal{Q}_n$}-nibs and {$x + Y$ in} {Dovecote}")


def test_ascii_output_keeps_ascii_math_and_writes_other_math_as_text():
    ref = article("Bounds for $\\pi$ and $α$-nibs")
    tex = fields(ref, unicode=False)["title"]
    assert tex.isascii() and tex.startswith("Bounds for {$\\pi$} and \\$")
    assert round_trip(ref, unicode=False)[1].title == ref.title
    assert fields(ref)["title"] == "Bounds for {$\\pi$} and {$α$}-nibs"


def test_csl_json_keeps_math_as_typed():
    assert CslJsonExporter().record(article("On $q$-analogues"))["title"] == "On $q$-analogues"


# -- the reader -------------------------------------------------------------------------------
SOURCE = r"""@article{vellum1990,
  author = {Vellum, Ink},
  title = {Irrationality of $\pi$, {$Q$}-quills and $x^{N}$ at \$5},
  journal = {Bull. QSEM},
  note = {See $\lambda$-nibs},
  year = {1990}
}
"""


def test_reader_keeps_math_and_reads_escaped_dollars():
    (ref,) = read_bibtex(SOURCE).records
    assert ref.title == "Irrationality of $\\pi$, $Q$-quills and $x^{N}$ at $5"
    assert ref.note == "See $\\lambda$-nibs"
    # neither the math group {$Q$} nor the group {N} inside math is a capitalization hint
    assert title_hints("Irrationality of $\\pi$, {$Q$}-quills and $x^{N}$") == []
    assert title_hints("{$Q$-Quills} of {GL}") == ["$Q$-Quills", "GL"]
    assert ref.title_protected == ()
    # plain reading (other callers: the reference parser) is unchanged: pylatexenc's text
    assert to_unicode("Irrationality of $\\pi$") == "Irrationality of π"
    assert to_unicode("Irrationality of $\\pi$", keep_math=True) == "Irrationality of $\\pi$"
    assert to_unicode("a \\textbackslash{}$x$", keep_math=True) == to_unicode("a \\textbackslash{}$x$")


def test_bibtex_model_bibtex_keeps_pi_and_q():
    (first,) = read_bibtex(SOURCE).records
    text = BibtexExporter().dumps([first])
    assert "title = {Irrationality of {$\\pi$}, {$Q$}-quills and {$x^{N}$} at \\$5}" in text
    assert "note = {See {$\\lambda$}-nibs}" in text
    (second,) = read_bibtex(text).records
    assert second == first
    assert BibtexExporter().dumps([second]) == text


# -- outside sources ---------------------------------------------------------------------------
_PYLATEXENC = LatexNodes2Text(strict_latex_spaces=True)


def check_outside(ref):
    ours = fields(ref)
    text = BibtexExporter(provenance=False).dumps([ref])
    maths = spans(ref.title)
    # pybtex 0.26 parses the entry; its field text holds every math span verbatim
    theirs = parse_string(text, "bibtex").entries[ref.key].fields["title"]
    assert theirs == ours["title"]
    assert all(m in theirs for m in maths)
    # pybtex's port of BibTeX's change.case$ ("t", as plain.bst applies to titles) changes no math
    assert all(m in change_case(theirs, "t") for m in maths)
    # bibtexparser v2 parses it to the same field text
    library = bibtexparser.parse_string(text)
    assert library.failed_blocks == []
    assert {f.key: f.value for f in library.entries[0].fields}["title"] == ours["title"]
    # pylatexenc reads what we wrote as it reads the title typed as TeX
    assert _PYLATEXENC.latex_to_text(ours["title"]) == _PYLATEXENC.latex_to_text(ref.title)


@pytest.mark.parametrize("title", [
    "On $q$-analogues of nib numbers",
    "The $q$-quill numbers and $\\lambda$-nibs",
    "Nibs in $\\mathbb{Z}[\\sqrt{2}]$ and $\\mathfrak{sl}_2$-Modules of Ink Harbour",
    "$Q$-Vellum numbers",
])
def test_outside_sources_read_what_we_write(title):
    check_outside(article(title))


def test_pybtex_would_lower_case_unprotected_math():
    # why the group: BibTeX's change.case$ (pybtex's port) lower-cases math at brace depth 0
    assert change_case("$Q$-vellum numbers", "t") == "$q$-vellum numbers"
    assert change_case("{$Q$}-vellum numbers", "t") == "{$Q$}-vellum numbers"


# -- round trips, generated --------------------------------------------------------------------
_WORD = st.sampled_from(["nib", "Nib", "quill", "Quill", "vellum", "McQuill", "GL(n)", "Dovecote",
                         "of", "and", "Ink", "numbers", "-analogues", "cost", "5", "2nd"])
_MATH_TOKEN = st.sampled_from(["q", "x", "Q", "n", "\\pi", "\\lambda", "^{2}", "_n", "_{k^{2}}", "+", " ",
                               "\\{1\\}", "\\mathbb{Z}", "\\%", "\\$", "'", "\\,", "1"])
_MATH = st.lists(_MATH_TOKEN, min_size=1, max_size=6).map(lambda t: "$" + "".join(t).strip() + "$") \
    .filter(lambda m: len(m) > 2)
_DOLLARS = st.sampled_from(["$5", "$20,000", "US$", "$", "\\$", "$$", "\\", "%", "&", "~", "^", "_"])
_PIECE = st.one_of(_WORD, _WORD, _MATH, _MATH, _DOLLARS, st.tuples(_MATH, _WORD).map("".join),
                   st.tuples(_WORD, _MATH).map("".join))
MATH_TITLES = st.lists(_PIECE, min_size=1, max_size=7).map(" ".join)
# anything made of the characters that matter, single-spaced (braces left out: a lone brace outside
# math cannot be written so that pybtex, which counts escaped braces, balances the field)
ODD_TITLES = st.text(st.sampled_from(list("$\\ aQ5%&#^_~-'")), min_size=1, max_size=24) \
    .map(lambda s: " ".join(s.split())).filter(bool)


@st.composite
def math_refs(draw, titles=MATH_TITLES):
    title = unicodedata.normalize("NFC", " ".join(draw(titles).split()))   # model text: single spaces
    chosen = draw(st.lists(st.sampled_from(title.split()), max_size=2, unique=True))
    return article(title, capitals.canonical_hints(title, chosen))


@SETTINGS
@given(math_refs(), st.booleans())
def test_generated_round_trip_keeps_titles(ref, unicode):
    text, back = round_trip(ref, unicode)
    assert back.title == ref.title
    assert back.title_protected == ref.title_protected
    assert unicode or text.isascii()


@SETTINGS
@given(math_refs(ODD_TITLES), st.booleans())
def test_generated_round_trip_keeps_odd_dollars_and_backslashes(ref, unicode):
    _, back = round_trip(ref, unicode)
    assert (back.title, back.title_protected) == (ref.title, ref.title_protected)


@SETTINGS
@given(math_refs())
def test_generated_intervals_never_split_math(ref):
    math = math_spans(ref.title)
    for start, end in capitals.intervals(ref.title, ref.title_protected):
        for a, b in math:
            assert end <= a or b <= start or (start <= a and b <= end and (start, end) != (a, b))


def _no_dollar_outside_math(title):
    # LatexNodes2Text reads any dollar pair as math: compare only titles whose dollars are all math
    rest, pos = [], 0
    for a, b in math_spans(title):
        rest.append(title[pos:a])
        pos = b
    return "$" not in "".join(rest) + title[pos:]


@settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(math_refs(st.lists(st.one_of(_WORD, _MATH, st.tuples(_MATH, _WORD).map("".join)),
                          min_size=1, max_size=6).map(" ".join).filter(_no_dollar_outside_math)))
def test_generated_outside_sources_agree(ref):
    check_outside(ref)


_TEX_PIECE = st.sampled_from(["nib", "Quill", "of", "{GL}(n)", "$\\pi$", "{$Q$}", "$x^{N}$", "\\$5", "\\$",
                              "{$Q$-Nibs}", "\\textbackslash{}", "--", "{\\'e}", "$ x $", "$a$$b$", "$q$-",
                              "\\&", "$\\{1\\}$", "5", "{\\em ink}"])

@SETTINGS
@given(st.lists(st.tuples(_TEX_PIECE, st.sampled_from(["", " "])), min_size=1, max_size=6))
def test_generated_bibtex_model_bibtex_is_a_fixed_point(pieces):
    tex = "".join(p + sep for p, sep in pieces).strip()
    (first,) = read_bibtex("@article{vellum, title = {" + tex + "}}").records
    # math as written in the source, unless the text around it stops it being math in the
    # model ("$a${$b$}" would read as "$a$$b$"): then the whole title is read as plain TeX
    assert all(m in first.title for m in spans(tex) if "{" not in m) or first.title == to_unicode(tex)
    text, second = round_trip(first)
    assert second == first
    assert BibtexExporter().dumps([second]) == text
