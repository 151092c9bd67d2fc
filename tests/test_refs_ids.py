"""Identifiers found in reference lines, validated by the foundation's
identifier modules; check digits compared with python-stdnum."""

import pytest
from stdnum import isbn as std_isbn
from stdnum import issn as std_issn

from normform import parse_reference


@pytest.mark.parametrize("raw", ["978-0-19-853762-8", "0-19-853762-X", "978-3-16-148410-0", "0-306-40615-2",
                                 "0-306-40615-3", "978-3-16-148410-9"])
def test_isbn_validity_matches_stdnum(raw):
    ref = parse_reference(f"A. Quill, Counting trees, Quillfeather Press, 1999. ISBN {raw}.")
    ident = ref.ident("isbn")
    assert ident is not None
    assert ident.valid == std_isbn.is_valid(raw)


@pytest.mark.parametrize("raw", ["0378-5955", "0378-5956", "2049-3630", "1050-124X"])
def test_issn_validity_matches_stdnum(raw):
    ref = parse_reference(f"A. Quill, Counting trees, J. Quill. Math. 3 (1999), 1-9. ISSN {raw}")
    ident = ref.ident("issn")
    assert ident is not None
    assert ident.valid == std_issn.is_valid(raw)


# DOI syntax: "10." prefix, registrant code, "/" suffix -- DOI Handbook section 2.2
# (its own example DOI 10.1000/182).  arXiv identifiers: info.arxiv.org
# "Understanding the arXiv identifier" (YYMM.NNNNN with optional vN; old
# archive/YYMMNNN form such as hep-th/9901001 and math.GT/0309136).
@pytest.mark.parametrize("line,scheme,value", [
    ("A. Quill, Trees, J. Quill. Math. 3 (1999), 1-9, doi:10.1000/182.", "doi", "10.1000/182"),
    ("A. Quill, Trees, https://doi.org/10.1000/182", "doi", "10.1000/182"),
    ("A. Quill, Trees, preprint, arXiv:1501.00001v2 [math.CO], 2015.", "arxiv", "1501.00001v2"),
    ("A. Quill, Trees, arXiv:0706.0001.", "arxiv", "0706.0001"),
    ("A. Quill, Trees, hep-th/9901001.", "arxiv", "hep-th/9901001"),
    ("A. Quill, Trees, math.GT/0309136.", "arxiv", "math.GT/0309136"),
])
def test_identifier_syntax_examples(line, scheme, value):
    ref = parse_reference(line)
    ident = ref.ident(scheme)
    assert ident is not None and ident.value.lower() == value.lower()
    info = ref.provenance.info(scheme)
    assert info is not None and info.span is not None
    assert value.lower() in line[info.span.start:info.span.end].lower()


def test_mr_and_zbl():
    ref = parse_reference("A. Quill, Trees, J. Quill. Math. 3 (1999), 1-9. MR1234567 (2000a:05001) Zbl 0829.68111")
    assert ref.ident("mr") is not None and ref.ident("mr").value.lstrip("0") == "1234567"
    assert ref.ident("zbl").value == "0829.68111"


def test_arxiv_doi_also_gives_the_arxiv_id():
    # arXiv registers DOIs of the form 10.48550/arXiv.<id> for its preprints
    # (arXiv's DOI help page, info.arxiv.org/help/doi.html; from memory).
    from normform import parse_reference
    ref = parse_reference("A. Quill, Ink walks on nib lattices, 2021, doi:10.48550/arXiv.2101.00001.")
    assert ref.ident("doi").value == "10.48550/arXiv.2101.00001"
    assert ref.ident("arxiv").value == "2101.00001"
    plain = parse_reference("A. Quill, Ink walks on nib lattices, 2021, doi:10.1000/quill.2021.7.")
    assert plain.ident("arxiv") is None
