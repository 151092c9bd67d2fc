"""Initials typed run together: ``Family AB`` (author-initials styles) and ``A.B.``.

The model keeps a given name as typed (``AB``); the house style prints
initials spaced and dotted, one per letter (common practice in mathematics
house styles: "A. B. Family").  Invented Quillfeather names.
"""

from __future__ import annotations

import pytest

from normform import parse_reference
from normform.export.text import initials, short_name
from normform.model import Name


@pytest.mark.parametrize("family, given, shown", [
    ("Quill", "AB", "A. B. Quill"),
    ("Ystradgynlais", "IC", "I. C. Ystradgynlais"),
    ("Quill", "ABC", "A. B. C. Quill"),
    ("Quill", "A.B.", "A. B. Quill"),
    ("Quill", "A.B", "A. B. Quill"),
    ("Quill", "E.Z.", "E. Z. Quill"),
    ("Quill", "A. B.", "A. B. Quill"),
    ("Quill", "Ada", "A. Quill"),
    ("Quill", "Ada Beatrix", "A. B. Quill"),
    ("Quill", "J.-P.", "J.-P. Quill"),
    ("Quill", "Jean-Pierre", "J.-P. Quill"),
    ("Quill", "Ch.", "C. Quill"),
    # a whole name in capitals is a name typed in capitals, not three initials
    ("QUILL", "ADA", "A. QUILL"),
])
def test_house_style_initials(family, given, shown):
    assert short_name(Name(family=family, given=given)) == shown


def test_initials_without_the_caps_rule_keep_the_old_reading():
    assert initials("AB") == "A."
    assert initials("AB", caps_are_initials=True) == "A. B."


@pytest.mark.parametrize("line, authors", [
    # the last name's initials before an author-year "(2005)" belong to the list
    ("Featherstone AB, Penrake EF (2005) Quill sums. Discrete Math. 301:1-20",
     [("Featherstone", "AB"), ("Penrake", "EF")]),
    ("Featherstone AB, Penrake EF, Vellum G (2005) Quill sums. Discrete Math. 301:1-20",
     [("Featherstone", "AB"), ("Penrake", "EF"), ("Vellum", "G")]),
    ("Featherstone AB (2005) Quill sums. Discrete Math. 301:1-20", [("Featherstone", "AB")]),
    # and still, as before, before the title's period
    ("Featherstone AB, Penrake EF. Quill sums. Discrete Math. 2005;301:1-20.",
     [("Featherstone", "AB"), ("Penrake", "EF")]),
])
def test_last_initials_before_the_year_join_the_list(line, authors):
    ref = parse_reference(line)
    assert [(n.family, n.given) for n in ref.authors] == authors
    assert ref.title == "Quill sums"
    assert ref.year == 2005


def test_house_line_of_an_author_initials_reference():
    from normform.export.text import HouseStyle
    ref = parse_reference("Featherstone AB, Penrake EF (2005) Quill sums. Discrete Math. 301:1-20")
    assert HouseStyle().format(ref).startswith("A. B. Featherstone and E. F. Penrake, Quill sums, ")
