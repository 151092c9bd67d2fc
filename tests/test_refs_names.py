"""Free-form name splitting (normform.refs.namelist) against pybtex's BibTeX
name rules, on the name shapes both can express: "First von Last",
"von Last, First" and "Last, First" (pybtex.database.Person, BibTeX's
documented First/von/Last/Jr parts)."""

import pytest
from pybtex.database import Person

from normform.refs.namelist import parse_one, split_names

GIVEN_FIRST = [
    "Donald E. Knuth", "B. L. van der Waerden", "Jean-Pierre Serre", "J.-P. Serre",
    "Ludwig von Mises", "Charles de la Vallée Poussin", "Ada Quillfeather", "Émile Borel",
    "Henk ter Quillen", "A. B. C. Dovrandt", "Maria di Tolvetti",
]
INVERTED = [
    "Knuth, Donald E.", "van der Waerden, B. L.", "Serre, J.-P.", "Quillfeather, Ada",
    "de la Vallée Poussin, Charles", "Ørsted-Lund, K.", "Dovrandt, A. B. C.",
]


def _pybtex_parts(text: str) -> tuple[str, str, str]:
    p = Person(text)
    given = " ".join(p.first_names + p.middle_names)
    return " ".join(p.last_names), given, " ".join(p.prelast_names)


@pytest.mark.parametrize("text", GIVEN_FIRST)
def test_given_first_agrees_with_pybtex(text):
    n = parse_one(text)
    assert (n.family, n.given or "", n.particle or "") == _pybtex_parts(text)


@pytest.mark.parametrize("text", INVERTED)
def test_inverted_agrees_with_pybtex(text):
    names, etal = split_names(text)
    assert len(names) == 1 and not etal
    n = names[0]
    assert (n.family, n.given or "", n.particle or "") == _pybtex_parts(text)


def test_lists_and_et_al():
    names, etal = split_names("A. Quill, B. Fenwick and C. D. Marrow")
    assert [n.family for n in names] == ["Quill", "Fenwick", "Marrow"] and not etal
    names, etal = split_names("Quill, A., Fenwick, B. & Marrow, C. D.")
    assert [n.family for n in names] == ["Quill", "Fenwick", "Marrow"]
    assert names[2].given == "C. D."
    names, etal = split_names("A. Quill et al.")
    assert [n.family for n in names] == ["Quill"] and etal


def test_family_then_bare_initials():
    # "Family A B" (no periods), common in numeric styles
    names, _ = split_names("Quill AB, Fenwick C")
    assert [(n.family, n.given) for n in names] == [("Quill", "AB"), ("Fenwick", "C")]


def test_suffix_kept():
    n = parse_one("John Quillfeather Jr.")
    assert (n.family, n.given, n.suffix) == ("Quillfeather", "John", "Jr.")
    # pybtex's "Last, Jr, First" form gives the same parts
    p = Person("Quillfeather, Jr., John")
    assert p.lineage_names == ["Jr."] and p.last_names == [n.family]


def test_a_list_of_only_separators_gives_no_names():
    from normform.refs.namelist import split_names

    for text in ("and", "&", " and ", ";"):
        names, _ = split_names(text)
        assert names == ()
