"""Rules on terms, programs and links: each fires on a defect and stays quiet without it."""

from __future__ import annotations

from lint_support import BASE, findings, slugs
from normform.lint.settings import LintSettings


def test_term_not_integer_with_fixes():
    text = BASE.replace("[1, 1, 2, 3,", '[1, 1.0, "2", 3.5, true,')
    found = findings(text, select=["term-not-integer"])
    assert [f.value_path for f in found] == [("terms", 1), ("terms", 2), ("terms", 3), ("terms", 4)]
    assert [f.fix.edits[0].text if f.fix else None for f in found] == ["1", "2", None, None]
    assert found[0].column == 13
    assert slugs(BASE, "term-not-integer") == []


def test_too_few_terms_and_setting():
    short = BASE.replace("[1, 1, 2, 3, 5, 8, 13, 21, 34, 55, 89]", "[1, 1, 2, 3]")
    assert slugs(short, "too-few-terms") == ["too-few-terms"]
    assert slugs(short, "too-few-terms", settings=LintSettings(min_terms=4)) == []
    assert slugs(BASE, "too-few-terms") == []


def test_program_language():
    text = BASE + '[[programs]]\ncode = "print(1)"\n[[programs]]\nlanguage = "Python"\ncode = "x = 1"\n' \
                  '[[programs]]\nlanguage = "cobol"\ncode = "x"\n'
    found = findings(text, select=["program-language"])
    assert [f.value_path for f in found] == [("programs", 0), ("programs", 1, "language"), ("programs", 2, "language")]
    assert found[1].fix.edits[0].text == '"python"' and found[2].fix is None
    assert slugs(BASE + '[[programs]]\nlanguage = "sage"\ncode = "x"\n', "program-language") == []
    assert slugs(BASE + '[[programs]]\nlanguage = "cobol"\ncode = "x"\n', "program-language",
                 settings=LintSettings(languages=["cobol"])) == []


def test_python_syntax_position_inside_multiline_string():
    text = BASE + '[[programs]]\nlanguage = "python"\ncode = """\ndef a(n):\n    return (n +\n"""\n'
    (f,) = findings(text, select=["python-syntax"])
    assert f.line == 9 and "does not compile" in f.message
    ok = BASE + '[[programs]]\nlanguage = "python"\ncode = """\ndef a(n):\n    return n + 1\n"""\n'
    assert slugs(ok, "python-syntax") == []
    # non-Python code is not compiled; nothing is ever executed
    other = BASE + '[[programs]]\nlanguage = "pari"\ncode = "a(n)=n+1"\n'
    assert slugs(other, "python-syntax") == []


def test_python_syntax_column_after_escapes():
    text = BASE + '[[programs]]\nlanguage = "python"\ncode = "s = \\"\\u00e9\\"; x = (1"\n'
    (f,) = findings(text, select=["python-syntax"])
    assert f.line == 7 and f.column >= 8


def test_url_malformed():
    text = BASE + 'links = [{ url = "htp//qsem.invalid/x" }, { url = "https://qsem.invalid/a b" }]\n'
    found = findings(text, select=["url-malformed"])
    assert [f.value_path for f in found] == [("links", 0, "url"), ("links", 1, "url")]
    assert found[1].column == text.splitlines()[4].index("a b") + 2   # the blank inside the second URL
    assert slugs(BASE + 'links = [{ url = "https://qsem.invalid/notes.html" }]\n', "url-malformed") == []


def test_link_duplicate():
    text = BASE + 'links = [{ url = "https://qsem.invalid/a" }, { url = "https://QSEM.invalid/a/" }]\n'
    (f,) = findings(text, select=["link-duplicate"])
    assert f.value_path == ("links", 1, "url") and "line 5" in f.message
    text = BASE + 'links = [{ url = "https://qsem.invalid/a" }, { url = "https://qsem.invalid/b" }]\n'
    assert slugs(text, "link-duplicate") == []


def test_link_repeats_reference():
    refs = 'references = ["A. B, T, Discrete Math. 1 (2001), 1-2. doi:10.5555/qsem.1 arXiv:1901.01234"]\n'
    text = BASE + refs + 'links = [{ url = "https://doi.org/10.5555/QSEM.1" }, { url = "https://arxiv.org/abs/1901.01234v2" }]\n'
    found = findings(text, select=["link-repeats-reference"])
    assert [f.value_path for f in found] == [("links", 0, "url"), ("links", 1, "url")]
    assert "DOI" in found[0].message and "arXiv" in found[1].message
    text = BASE + refs + 'links = [{ url = "https://doi.org/10.5555/qsem.2" }]\n'
    assert slugs(text, "link-repeats-reference") == []
