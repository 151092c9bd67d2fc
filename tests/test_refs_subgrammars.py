"""The lark sub-grammars: page ranges, volume/issue clusters, dates."""

import pytest

from normform.model import Pages
from normform.refs.subgrammars import expand_range, parse_date, parse_pages, parse_volume


@pytest.mark.parametrize("text,expected", [
    ("pp. 1--20", Pages(first="1", last="20")),
    ("1–20", Pages(first="1", last="20")),
    ("205-63", Pages(first="205", last="263")),       # abbreviated last page (common practice)
    ("p. 45", Pages(first="45")),
    ("Art. 12", Pages(article="12")),
    ("Paper No. 13.2.4", Pages(article="13.2.4")),
    ("e1234", Pages(first="e1234")),
    ("xii+253 pp.", Pages(count="xii+253")),
    ("S12–S20", Pages(first="S12", last="S20")),
])
def test_pages(text, expected):
    assert parse_pages(text) == expected


def test_expand_range_never_goes_backwards():
    assert expand_range("1996", "8") == "1998"
    assert expand_range("95", "105") == "105"
    assert expand_range("190", "5") == "195"


def test_pages_rejects_junk():
    assert parse_pages("ALL-ALL") is None
    assert parse_pages("") is None


@pytest.mark.parametrize("text,expected", [
    ("12", ("12", None)), ("vol. 12", ("12", None)), ("Vol. 12, no. 3", ("12", "3")),
    ("12(3)", ("12", "3")), ("4 (2)", ("4", "2")), ("Band 5, Heft 2", ("5", "2")),
    ("Issue 3-4", (None, "3-4")), ("**12**", ("12", None)),
])
def test_volume(text, expected):
    assert parse_volume(text) == expected


@pytest.mark.parametrize("text,year,month,day", [
    ("1990", 1990, None, None), ("(1990)", 1990, None, None), ("1990a", 1990, None, None),
    ("March 1990", 1990, 3, None), ("12 March 1990", 1990, 3, 12), ("Mar. 12, 1990", 1990, 3, 12),
    ("1990-03-12", 1990, 3, 12), ("2003/04", 2003, None, None),
])
def test_dates(text, year, month, day):
    d = parse_date(text)
    assert (d.year, d.month, d.day) == (year, month, day)


def test_literal_dates():
    assert parse_date("to appear").literal == "to appear"
    assert parse_date("n.d.").literal == "n.d."
    assert parse_date("Spring 1990").season == "Spring"


def test_article_number_pages_with_colons():
    # volume-local article numbering "12:1-12:17" (common practice in LIPIcs proceedings)
    from normform.refs.subgrammars import parse_pages
    p = parse_pages("12:1–12:17")
    assert (p.first, p.last) == ("12:1", "12:17")
