"""Cross-area checks found during integration (QA area)."""

from __future__ import annotations

import pytest

from normform.export.text import HouseStyle
from normform.model import Date, Kind, Name, Reference


def _book(edition: str) -> Reference:
    return Reference(kind=Kind.BOOK, authors=(Name(family="Pell", given="Ada"),),
                     title="Counting with Fibonacci", publisher="Quillton Press",
                     date=Date(year=1999), edition=edition)


@pytest.mark.parametrize("edition, shown", [
    ("2", "ed. 2"),            # a bare number: the house style's own spelling
    ("2nd", "2nd ed."),        # a bare ordinal used to print as a stray "2nd"
    ("second", "second ed."),
    ("2nd ed.", "2nd ed."),    # already says edition: kept as written
    ("Second edition", "Second edition"),
])
def test_house_style_edition_reads_as_an_edition(edition, shown):
    text = HouseStyle().format(_book(edition))
    assert f", {shown}," in text, text
    assert "ed. ed." not in text


@pytest.mark.parametrize("family", ["revisited", "de", "Ulbricht", "Øre"])
def test_lone_family_word_survives_a_bibtex_round_trip(family):
    # Found on `normform clean` output: a lone lower-case family name was written
    # braced ({revisited}) and read back as a literal (corporate) name.
    from pybtex.database import Person

    from normform.export.bibtex import BibtexExporter
    from normform.readers.bibtex import read_bibtex

    ref = Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="A."), Name(family=family)),
                    title="Zigzags", date=Date(year=1977))
    for unicode in (True, False):
        text = BibtexExporter(unicode=unicode).dumps([ref])
        result = read_bibtex(text)
        assert result.errors == []
        assert result.records[0].authors == ref.authors, text
    # pybtex's BibTeX name rules (independent reader): a lone word is the last name
    person = Person(family)
    assert person.last_names == [family] and not person.first_names and not person.prelast_names


def test_house_style_says_a_status_once():
    # Found on `normform refs` output: "B. Pell, in preparation." rendered as
    # "B. Pell, in preparation. in preparation." (status in both date and note).
    ref = Reference(kind=Kind.UNPUBLISHED, authors=(Name(family="Pell", given="B."),),
                    date=Date(literal="in preparation"), note="in preparation")
    assert HouseStyle().format(ref) == "B. Pell, in preparation."
    other = Reference(kind=Kind.UNPUBLISHED, authors=(Name(family="Pell", given="B."),),
                      date=Date(year=2004), note="personal communication")
    assert HouseStyle().format(other) == "B. Pell, 2004. personal communication."


def test_house_style_article_without_venue_has_a_bare_year():
    # Found with `normform convert` on a CSL item with only a title and a year:
    # it printed "X, (1999)." with an orphan parenthesis.
    ref = Reference(kind=Kind.ARTICLE, title="Zigzags", date=Date(year=1999))
    assert HouseStyle().format(ref) == "Zigzags, 1999."
    ref = Reference(kind=Kind.ARTICLE, title="Zigzags", container_title="Math. Mag.", volume="79",
                    date=Date(year=2006))
    assert HouseStyle().format(ref) == "Zigzags, Math. Mag. 79 (2006)."


def test_convert_reads_the_json_lines_that_refs_writes(tmp_path, capsys):
    # `normform refs --to csl-json` writes JSON Lines; `normform convert` used to
    # reject them ("extra data after the value"), so the two could not be chained.
    import json

    from normform.cli import main
    from normform.export.csljson import CslJsonExporter
    from normform.readers.csljson import read_csljson

    refs = [_book("2"), Reference(kind=Kind.ARTICLE, title="Zigzags", date=Date(year=1999))]
    items = json.loads(CslJsonExporter().dumps(refs))
    lines = "".join(json.dumps(item) + "\n" for item in items)
    assert read_csljson(lines) == read_csljson(json.dumps(items))
    src = tmp_path / "records.jsonl"
    src.write_text(lines, "utf-8")
    assert main(["convert", str(src), "--to", "text"]) == 0
    assert capsys.readouterr().out.splitlines() == [HouseStyle().format(r) for r in read_csljson(lines)]
    # junk after an item is still a positioned error
    with pytest.raises(Exception) as info:
        read_csljson(lines + "not json\n")
    assert (info.value.line, info.value.column) == (3, 1)


@pytest.mark.parametrize("opener, closer", [("{", "}"), ("(", ")")])
def test_unclosed_entry_is_reported_where_it_opens(opener, closer):
    # Found with `normform convert`: an entry whose own brace is never closed was
    # reported at line+1, column 1 (the start of the next entry), with that entry's text.
    from normform.readers.bibtex import read_bibtex

    text = ("@misc{ok1, title={First}}\n"
            f"@article{opener}broken, author = {{X, Y}}, title = {{oops}}\n"
            "@misc{ok2, title={After}}\n")
    result = read_bibtex(text, "t.bib")
    assert [r.title for r in result.records] == ["First", "After"]   # the others still convert
    (error,) = result.errors
    assert (error.line, error.column) == (2, 9)
    assert error.expected == (f"'{closer}'",)
    assert "@article" in error.excerpt()
    # an unclosed *value* still points at its own opening brace
    (value_error,) = read_bibtex("@article{a, title = {oops,\n  year = 1999\n\n@misc{b, title={B}}\n").errors
    assert (value_error.line, value_error.column) == (1, 21)
