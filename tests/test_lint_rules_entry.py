"""Entry-shape rules and the text rules: each one fires on a defect and stays quiet without it."""

from __future__ import annotations

import pytest

from lint_support import BASE, findings, slugs
from normform.lint.entry import EntrySyntaxError, parse_entry
from normform.lint.settings import LintSettings


def test_file_syntax_error_has_position():
    with pytest.raises(EntrySyntaxError) as err:
        parse_entry("Q000100.toml", 'id = "Q000100"\nterms = [1, 2\ntitle = "x"\n')
    assert err.value.line == 3 and err.value.column >= 1
    with pytest.raises(EntrySyntaxError) as err:
        parse_entry("Q000100.json", '{"id": "Q000100",\n "terms": [1, 2,]}')
    assert (err.value.line, err.value.column) == (2, 17)
    assert parse_entry("Q000100.toml", BASE).data["id"] == "Q000100"


def test_missing_key():
    text = 'id = "Q000100"\nterms = [1, 2, 3, 4, 5, 6, 7, 8, 9, 10]\n'
    found = findings(text, select=["missing-key"])
    assert [f.message.split(";")[0] for f in found] == ["the required key 'title' is missing"]
    assert slugs(BASE, "missing-key") == []
    # required keys inside tables: a link without url, a program without code
    text = BASE + 'links = [{ title = "notes" }]\n[[programs]]\nlanguage = "python"\n'
    found = findings(text, select=["missing-key"])
    assert [(f.line, f.value_path) for f in found] == [(5, ("links", 0)), (6, ("programs", 0))]


def test_unknown_key_points_at_the_key():
    found = findings(BASE + 'refrences = ["x"]\n', select=["unknown-key"])
    assert [(f.line, f.column, f.end_column) for f in found] == [(5, 1, 10)]
    assert slugs(BASE + 'references = ["x"]\n', "unknown-key") == []
    found = findings(BASE + 'links = [{ url = "https://a.invalid/", titel = "x" }]\n', select=["unknown-key"])
    assert found[0].value_path == ("links", 0, "titel") and found[0].column == 40


def test_wrong_type_and_enum():
    text = BASE.replace('title = "Test entry"', "title = 12") + 'formulas = [{ text = "a(n) = n", kind = "closed" }]\n'
    found = findings(text, select=["wrong-type"])
    assert [(f.value_path, f.line) for f in found] == [(("title",), 2), (("formulas", 0, "kind"), 5)]
    assert found[0].message == "`title`: expected a string, found an integer"
    assert slugs(BASE + 'formulas = [{ text = "a(n) = n", kind = "closed-form" }]\n', "wrong-type") == []


def test_id_format_and_setting():
    bad = BASE.replace("Q000100", "Q12")
    assert slugs(bad, "id-format", path="Q12.toml") == ["id-format"]
    assert slugs(BASE, "id-format") == []
    assert slugs(bad, "id-format", path="Q12.toml", settings=LintSettings(id_pattern=r"^Q\d+$")) == []


def test_file_name_mismatch():
    assert slugs(BASE, "file-name-mismatch", path="entries/Q000999.toml") == ["file-name-mismatch"]
    assert slugs(BASE, "file-name-mismatch", path="entries/Q000100.toml") == []


# -- text rules ---------------------------------------------------------------

def test_not_nfc_with_fix():
    text = BASE + 'contributors = ["Rene\\u0301e Talbot"]\n'
    (f,) = findings(text, select=["not-nfc"])
    assert (f.line, f.column) == (5, 21)     # the 'e' before the combining accent (escaped in the file)
    assert f.fix.edits[0].text == '"Ren\u00e9e Talbot"'
    assert slugs(BASE + 'contributors = ["Ren\u00e9e Talbot"]\n', "not-nfc") == []


def test_control_character():
    text = BASE.replace('"Test entry"', '"Test\\u0007 entry"')
    (f,) = findings(text, select=["control-character"])
    assert (f.line, f.column) == (2, 14) and "U+0007" in f.message
    assert f.fix.edits[0].text == '"Test entry"'
    # a zero-width space is invisible and reported too
    assert slugs(BASE.replace('"Test entry"', '"Test\u200b entry"'), "control-character") == ["control-character"]
    # newlines are fine in comments, not in a title
    assert slugs(BASE + 'comments = ["""\nline one\nline two"""]\n', "control-character") == []
    assert slugs(BASE.replace('"Test entry"', '"Test\\nentry"'), "control-character") == ["control-character"]


def test_trailing_whitespace():
    (f,) = findings(BASE.replace('"Test entry"', '"Test entry  "'), select=["trailing-whitespace"])
    assert (f.line, f.column) == (2, 20) and f.fix.edits[0].text == '"Test entry"'
    found = findings(BASE + 'comments = ["""\nfirst line  \nsecond"""]\n', select=["trailing-whitespace"])
    assert [(f.line, f.column) for f in found] == [(6, 11)]
    assert slugs(BASE + 'comments = ["ok"]\n', "trailing-whitespace") == []


def test_mixed_dashes():
    refs = ('references = ["A. Author, One, Discrete Math. 1 (2001), 10–20.", '
            '"B. Author, Two, Discrete Math. 2 (2002), 30-40.", "C. Author, Three, Discrete Math. 3 (2003), 50–60."]\n')
    found = findings(BASE + refs, select=["mixed-dashes"])
    assert len(found) == 1 and found[0].value_path == ("references", 1)
    assert "hyphen" in found[0].message
    same = refs.replace("30-40", "30–40")
    assert slugs(BASE + same, "mixed-dashes") == []
    # identifiers with hyphens are not ranges
    isbn = 'references = ["A. Author, Book, Press, 2001, 10–20. ISBN 978-0-00-000001-9 ISSN 0015-0517"]\n'
    assert slugs(BASE + isbn, "mixed-dashes") == []


def test_tex_in_text_with_fix():
    text = BASE.replace('"Test entry"', '"Numbers of Erd\\\\H{o}s type and $\\\\alpha$"')
    (f,) = findings(text, select=["tex-in-text"])
    assert "H{o}" in f.message
    assert f.fix.edits[0].text == '"Numbers of Erdős type and α"'
    assert slugs(BASE.replace('"Test entry"', '"Numbers of Erdős type"'), "tex-in-text") == []
    # formulas and programs may hold backslashes and dollars
    assert slugs(BASE + 'formulas = ["a(n) = \\\\binom{2n}{n}"]\n', "tex-in-text") == []


def test_empty_value():
    found = findings(BASE.replace('"Test entry"', '"  "') + 'references = ["", "x"]\ncomments = [""]\n',
                     select=["empty-value"])
    assert [f.value_path for f in found] == [("title",), ("references", 0)]
    assert slugs(BASE + 'references = ["x"]\n', "empty-value") == []
