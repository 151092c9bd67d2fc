"""find_all on free-form reference lines (the forms are common practice in math bibliographies)."""

import time

import pytest

from normform.ids import find_all


def found(text):
    return [(i.scheme, i.value, i.detail, text[s.start:s.end]) for i, s in find_all(text)]


def test_mixed_line():
    line = ("O. Quillfeather, Counting lattice walks, J. Integer Seq. 12 (2009), 1--9, "
            "doi:10.1000/182. MR1234567 (2006j:05214), Zbl 1127.11002.")
    assert found(line) == [
        ("doi", "10.1000/182", None, "doi:10.1000/182"),
        ("mr", "1234567", "2006j:05214", "MR1234567 (2006j:05214)"),
        ("zbl", "1127.11002", None, "Zbl 1127.11002"),
    ]


@pytest.mark.parametrize("text, expected", [
    ("see 10.1016/S1570-7954(08)00207-6.", ("doi", "10.1016/S1570-7954(08)00207-6")),
    ("(https://doi.org/10.1000/182)", ("doi", "10.1000/182")),
    ("DOI 10.1007/3-540-09519-5_73,", ("doi", "10.1007/3-540-09519-5_73")),
    ("doi.org/10.5169/seals-50379", ("doi", "10.5169/seals-50379")),
    ("arXiv:1301.3569", ("arxiv", "1301.3569")),
    ("preprint, math/0701168v1.", ("arxiv", "math/0701168v1")),
    ("arXiv:1006.0367v3 [math.CO]", ("arxiv", "1006.0367v3")),
    ("arXiv:math.GT/0309136", ("arxiv", "math.GT/0309136")),
    ("http://arxiv.org/abs/1207.6692", ("arxiv", "1207.6692")),
    ("CoRR, abs/1207.6692, 2012.", ("arxiv", "1207.6692")),
    ("MR 2006j:05214", ("mr", "2006j:05214")),
    ("MR0045386", ("mr", "0045386")),
    ("Zbl 0829.68111", ("zbl", "0829.68111")),
    ("Zbl 512.10001", ("zbl", "0512.10001")),
    ("JFM 25.0123.01", ("zbl", "JFM 25.0123.01")),
    ("ISBN 0-19-853762-X, 1994", ("isbn", "019853762X")),
    ("ISBN-13: 978-3-16-148410-0.", ("isbn", "9783161484100")),
    ("ISSN 0002-9939", ("issn", "00029939")),
    ("hdl:1721.1/12345", ("handle", "1721.1/12345")),
    ("online at http://example.org/notes_(draft).pdf.", ("url", "http://example.org/notes_(draft).pdf")),
])
def test_single_forms(text, expected):
    got = found(text)
    assert len(got) == 1, got
    assert got[0][:2] == expected


def test_isbn_list_after_one_keyword():
    got = found("ISBN 978-0-306-40615-7, 0-19-853762-X; 1994")
    assert [g[:2] for g in got] == [("isbn", "9780306406157"), ("isbn", "019853762X")]


def test_category_goes_to_detail():
    assert found("arXiv:1006.0367v3 [math.CO]")[0][2] == "math.CO"


def test_invalid_ids_are_kept_flagged():
    (ident, span), = find_all("ISBN 0-306-40615-3")
    assert ident.valid is False and ident.value == "0306406153"


def test_no_false_friends():
    assert found("Mr. Smith, pages 1127.11002 and 2006 (1999), vol. 10.5") == []


ADVERSARIAL = {
    "dots": "10." * 33_000,
    "registrants": "10.1010." * 12_500,
    "doi-spaces": ("doi" + " " * 50) * 1_900,
    "schemes": "http://" * 14_000,
    "closers": "10.1234/x" + ")" * 100_000,
    "mr": "MR " * 33_000,
    "mr-review": "MR1 (12" * 14_000,
    "arxiv": "arXiv:" * 16_000,
    "old-arxiv": "math/" * 20_000,
    "digits": "1" * 100_000,
    "isbn": "ISBN 1 " * 14_000,
    "zbl": "Zbl 123." * 12_500,
    "corr": "CoRR abs/" * 11_000,
    "mixed": "arXiv:1301.35 MR12 Zbl 1.2 doi:10.1/ ISBN 97 ISSN 12 hdl:1/ " * 1_700,
}


@pytest.mark.parametrize("name", sorted(ADVERSARIAL))
def test_linear_time_on_100kB_adversarial_lines(name):
    # Catastrophic backtracking would take minutes on 100 kB; a linear scan
    # takes well under a second. The bound is a guard, not a speed target.
    text = ADVERSARIAL[name]
    start = time.perf_counter()
    find_all(text)
    assert time.perf_counter() - start < 5.0
