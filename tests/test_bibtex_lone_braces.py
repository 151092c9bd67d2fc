"""A brace in a record's text that has no partner must not break the BibTeX file.

BibTeX counts braces in a field value even after a backslash (common practice:
BibTeX's own scanner and pybtex's parser both do), so a lone ``{`` written as
``\\{`` leaves the field open and the rest of the file unreadable.  Unbalanced
braces are written as ``\\textbraceleft{}`` / ``\\textbraceright{}`` instead;
balanced ones keep the usual ``\\{ \\}``.  Checked against pybtex's and
bibtexparser's parsers (outside sources) and our own reader (round trip).
"""

from __future__ import annotations

import bibtexparser
import pytest
from hypothesis import given, settings, strategies as st
from pybtex.database import parse_string

from normform import capitals
from normform.export.bibtex import BibtexExporter
from normform.model import Kind, Name, Reference
from normform.readers.bibtex import read_bibtex

TITLES = [
    "A { lone opening brace",
    "A closing } brace first",
    "Sets } and { crossed",
    "Two {{ opening",
    "Balanced {braces} stay as they were",
    "A backslash \\ and a brace {",
]


def record(title: str, key: str = "quill1990") -> Reference:
    return Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="Ada"),), title=title,
                     title_protected=capitals.canonical_hints(title), container_title="Bull. QSEM",
                     key=key)


def written(title: str, unicode: bool = True) -> str:
    # a second entry after it: an unclosed field would swallow it
    return BibtexExporter(unicode=unicode).dumps([record(title), record("Second entry", "nib1991")])


@pytest.mark.parametrize("title", TITLES)
def test_pybtex_reads_both_entries(title):
    data = parse_string(written(title), "bibtex")            # raises on an unclosed field
    assert list(data.entries) == ["quill1990", "nib1991"]


@pytest.mark.parametrize("title", TITLES)
def test_bibtexparser_reads_both_entries(title):
    library = bibtexparser.parse_string(written(title))
    assert [e.key for e in library.entries] == ["quill1990", "nib1991"]
    assert not library.failed_blocks


@pytest.mark.parametrize("unicode", [True, False])
@pytest.mark.parametrize("title", TITLES)
def test_round_trip_keeps_the_title(title, unicode):
    result = read_bibtex(written(title, unicode))
    assert result.errors == []
    assert [r.title for r in result.records] == [title, "Second entry"]


def test_balanced_braces_are_written_as_before():
    text = written("Balanced {braces} stay")
    assert "\\{braces\\}" in text and "textbrace" not in text
    assert "\\textbraceleft{}" in written("A { lone")


@settings(max_examples=150, deadline=None)
@given(st.text(alphabet="ab {}\\$%&#_~^-", min_size=1, max_size=30).map(str.strip).filter(bool))
def test_any_brace_pattern_reads_back(title):
    text = written(title)
    assert list(parse_string(text, "bibtex").entries) == ["quill1990", "nib1991"]
    result = read_bibtex(text)
    assert result.errors == []
    assert result.records[1].title == "Second entry"
    assert result.records[0].title == " ".join(title.split())    # blank runs read back as one
