"""The Python API of the linter."""

from __future__ import annotations

from lint_support import DEMO, need
from normform.lint.api import lint_paths, lint_text

PELL = '''id = "Q000100"
title = "Pell numbers"
terms = [0, 1, 2, 5, 12, 29, 70, 169, 408, 985, 2378]
formulas = ["a(n) = 2*a(n - 1) + a(n - 2), a(0) = 0, a(1) = 1"]
'''


def test_lint_text_syntax_error_is_a_finding():
    (f,) = lint_text('id = "Q000100"\ntitle = \n', "Q000100.toml")
    assert (f.slug, f.line, f.column) == ("file-syntax", 2, 9)


def test_lint_text_pell_numbers():
    # Pell numbers 0, 1, 2, 5, 12, 29, 70, 169, 408, 985, 2378: a(n) = 2a(n-1) + a(n-2) (from memory;
    # the terms follow from the recurrence by hand)
    need("normform.formula.check", "check_formula")
    assert lint_text(PELL, "Q000100.toml", ignore=["references"]) == []
    (f,) = lint_text(PELL.replace("2378", "2379"), "Q000100.toml", select=["formula-disagrees"])
    assert "a(10) = 2378 but the terms list 2379" in f.message and f.line == 4


def test_lint_paths_sees_the_whole_directory():
    found = lint_paths([str(DEMO)], select=["duplicate-id", "see-also-missing"])
    assert sorted(f.slug for f in found) == ["duplicate-id", "see-also-missing"]
