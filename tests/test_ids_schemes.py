"""Identifier schemes checked against python-stdnum and published worked examples."""

import pytest
from hypothesis import given, strategies as st
from stdnum import isbn as std_isbn, issn as std_issn

from normform.errors import PositionedError
from normform.ids import InvalidIdentifier, SCHEMES, make, module
from normform.ids import arxiv, doi, handle, isbn, issn, mr, url, zbl


def test_every_scheme_has_the_common_functions():
    for scheme in SCHEMES:
        mod = module(scheme)
        for name in ("compact", "validate", "is_valid", "format"):
            assert callable(getattr(mod, name)), (scheme, name)
    assert issubclass(InvalidIdentifier, PositionedError)


# --- DOI: DOI Handbook (doi.org/10.1000/182), section 2 "Numbering" — from memory.
def test_doi_handbook_examples():
    # The Handbook's own DOI is 10.1000/182.
    assert doi.validate("10.1000/182") == "10.1000/182"
    assert doi.validate("doi:10.1000/182") == "10.1000/182"
    assert doi.validate("https://doi.org/10.1000/182") == "10.1000/182"
    assert doi.validate("http://dx.doi.org/10.1000/182") == "10.1000/182"
    # Registrant codes may be subdivided: 10.1000.10/123456 (Handbook 2.2.2, from memory).
    assert doi.is_valid("10.1000.10/123456")
    # Case-insensitive comparison (Handbook 2.4, from memory).
    assert doi.key("10.1000/ABC") == doi.key("10.1000/abc")
    assert doi.link("10.1000/182") == "https://doi.org/10.1000/182"


def test_doi_resolver_url_is_percent_decoded():
    # A '#' inside a suffix is percent-encoded in URLs (Handbook 2.5.2.3, from memory).
    assert doi.compact("https://doi.org/10.1000/a%23b") == "10.1000/a#b"
    assert doi.link("10.1000/a#b") == "https://doi.org/10.1000/a%23b"


@pytest.mark.parametrize("bad, words", [
    ("11.1000/182", "'10.'"), ("10.1000", "'/'"), ("10.1000/", "suffix is empty"),
    ("10.10a0/x", "digits"), ("10.1000/a b", "blank"),
])
def test_doi_errors_say_what_is_wrong(bad, words):
    with pytest.raises(InvalidIdentifier) as info:
        doi.validate(bad)
    assert words in str(info.value)


# --- arXiv: arxiv.org/help/arxiv_identifier — examples from memory.
@pytest.mark.parametrize("text, compact", [
    ("arXiv:0704.0001", "0704.0001"),          # first new-style identifier
    ("0706.0001v2", "0706.0001v2"),
    ("arXiv:1501.00001", "1501.00001"),         # five digits from 2015
    ("math.GT/0309136", "math.GT/0309136"),     # old style with subject class
    ("hep-th/9901001", "hep-th/9901001"),
    ("https://arxiv.org/abs/1301.3569", "1301.3569"),
    ("https://arxiv.org/pdf/1301.3569v2.pdf", "1301.3569v2"),
])
def test_arxiv_documentation_examples(text, compact):
    assert arxiv.validate(text) == compact


@pytest.mark.parametrize("bad, words", [
    ("1301.35690", "4 digits"), ("1501.0001", "5 digits"), ("1313.0001", "month"),
    ("0703.0001", "April 2007"), ("foo/0701168", "archive"), ("hello", "not an arXiv"),
])
def test_arxiv_errors(bad, words):
    with pytest.raises(InvalidIdentifier) as info:
        arxiv.validate(bad)
    assert words in str(info.value)


def test_arxiv_subject_class_goes_to_detail():
    assert arxiv.split("arXiv:1006.0367v3 [math.CO]") == ("1006.0367v3", "math.CO")
    ident = make("arxiv", "arXiv:1006.0367v3 [math.CO]")
    assert (ident.value, ident.detail, ident.valid) == ("1006.0367v3", "math.CO", True)


def test_arxiv_id_inside_an_arxiv_doi():
    # arXiv registers DOIs 10.48550/arXiv.<id> (from memory of arXiv's 2022 announcement).
    assert arxiv.from_doi("https://doi.org/10.48550/arXiv.1805.11451") == "1805.11451"
    assert arxiv.from_doi("10.48550/arXiv.math/0403276") == "math/0403276"
    assert arxiv.from_doi("10.1000/182") is None


def test_arxiv_version_and_link():
    assert arxiv.base("1006.0367v3") == "1006.0367"
    assert arxiv.version("1006.0367v3") == 3
    assert arxiv.link("math/0701168v1") == "https://arxiv.org/abs/math/0701168v1"
    assert arxiv.format("1301.3569") == "arXiv:1301.3569"


# --- ISBN / ISSN against python-stdnum.
def test_isbn_known_examples():
    # 0-306-40615-2 -> 978-0-306-40615-7 (the ISBN-10 to 13 worked example; from memory).
    assert isbn.to_isbn13("0-306-40615-2") == "9780306406157"
    assert isbn.to_isbn13("0-306-40615-2") == std_isbn.compact(std_isbn.to_isbn13("0306406152"))
    assert isbn.validate("ISBN 978-3-16-148410-0") == "9783161484100"
    assert isbn.format("019853762X") == std_isbn.format("019853762X") == "0-19-853762-X"
    assert isbn.to_isbn10("9780306406157") == "0306406152"


def test_isbn_bad_check_digit_is_reported_with_expected_digit():
    with pytest.raises(InvalidIdentifier) as info:
        isbn.validate("0-306-40615-3")
    assert "check digit" in str(info.value) and "expected 2" in str(info.value)
    ident = make("isbn", "0-306-40615-3")
    assert ident.valid is False and ident.value == "0306406153"   # kept, not dropped


@given(st.text(alphabet="0123456789X-", min_size=8, max_size=17))
def test_isbn_validity_agrees_with_stdnum(text):
    assert isbn.is_valid(text) == std_isbn.is_valid(text)


@given(st.from_regex(r"\A[0-9]{9}\Z").map(lambda d: d + std_isbn._calc_isbn10_check_digit(d)))
def test_isbn10_to_13_agrees_with_stdnum(number):
    assert isbn.to_isbn13(number) == std_isbn.compact(std_isbn.to_isbn13(number))


def test_issn_examples():
    # 0378-5955 (Hearing Research; the usual ISSN worked example, from memory).
    assert issn.validate("ISSN 0378-5955") == "03785955"
    assert issn.format("03785955") == "0378-5955"
    with pytest.raises(InvalidIdentifier, match="check digit 6 \\(expected 5\\)"):
        issn.validate("0378-5956")
    assert issn.link("0002-9939") == "https://portal.issn.org/resource/ISSN/0002-9939"


@given(st.text(alphabet="0123456789X-", min_size=6, max_size=10))
def test_issn_validity_agrees_with_stdnum(text):
    assert issn.is_valid(text) == std_issn.is_valid(text)


# --- MR / Zbl: no default link; links only from configuration.
def test_mr_forms():
    assert mr.split("MR1234567 (2006j:05214)") == ("1234567", "2006j:05214")
    assert mr.split("MR 45386") == ("0045386", None)           # zero-padded to 7 digits
    assert mr.split("MR0123456 (58 #1234)") == ("0123456", "58 #1234")
    assert mr.format("45386") == "MR0045386"
    assert mr.validate("2006j:05214") == "2006j:05214"
    assert make("mr", "MR1234567 (2006j:05214)").detail == "2006j:05214"
    with pytest.raises(InvalidIdentifier, match="digits"):
        mr.validate("MR12a4")
    assert mr.link("1234567") is None
    cfg = {"links": {"mr": "https://example.org/review?id={id}"}}
    assert mr.link("1234567", cfg) == "https://example.org/review?id=1234567"
    assert mr.link("2006j:05214", cfg) is None


def test_zbl_forms():
    assert zbl.validate("Zbl 1127.11002") == "1127.11002"
    assert zbl.validate("Zbl 0829.68111") == "0829.68111"
    assert zbl.validate("Zbl 512.10001") == "0512.10001"     # leading zero dropped in old prints
    assert zbl.validate("JFM 25.0123.01") == "JFM 25.0123.01"
    assert zbl.format("1127.11002") == "Zbl 1127.11002"
    with pytest.raises(InvalidIdentifier):
        zbl.validate("Zbl 11.27")
    assert zbl.link("1127.11002") is None
    assert zbl.link("1127.11002", {"links": {"zbl": "https://example.org/?q={id}"}}) \
        == "https://example.org/?q=1127.11002"


def test_handle_and_url():
    # RFC 3650 example handle form prefix/suffix (from memory: 10.1045/may99-payette).
    assert handle.validate("hdl:1721.1/12345") == "1721.1/12345"
    assert handle.link("1721.1/12345") == "https://hdl.handle.net/1721.1/12345"
    with pytest.raises(InvalidIdentifier, match="'/'"):
        handle.validate("1721.1")
    # RFC 3986 section 1.1.2 examples (from memory).
    for ok in ("ftp://ftp.is.co.za/rfc/rfc1808.txt", "http://www.ietf.org/rfc/rfc2396.txt",
               "mailto:John.Doe@example.com", "urn:oasis:names:specification:docbook:dtd:xml:4.1.2",
               "ldap://[2001:db8::7]/c=GB?objectClass?one"):
        assert url.is_valid(ok), ok
    for bad, words in (("www.example.org", "scheme"), ("http://exa mple.org", "not allowed"),
                       ("http://x.org/%zz", "hex"), ("http:///path", "host")):
        with pytest.raises(InvalidIdentifier, match=words):
            url.validate(bad)


def test_error_positions_point_at_the_fault():
    with pytest.raises(InvalidIdentifier) as info:
        doi.validate("10.10a0/x")
    assert info.value.column == 6
    assert info.value.excerpt().splitlines()[1] == "     ^"


_JUNK = st.lists(st.sampled_from(list("0123456789./:-X x#()[]%abcvMRZbl") + [
    "10.", "doi:", "arXiv:", "MR", "Zbl ", "ISBN ", "ISSN ", "hdl:", "http://", "math/", "JFM "]),
    max_size=30).map("".join)


@given(_JUNK)
def test_only_invalid_identifier_is_ever_raised(text):
    for scheme in SCHEMES:
        mod = module(scheme)
        try:
            value = mod.validate(text)
        except InvalidIdentifier as exc:
            assert exc.column >= 1 and exc.message
        else:
            assert mod.is_valid(value)
        assert make(scheme, text).valid == mod.is_valid(text)
