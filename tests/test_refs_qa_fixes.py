"""QA findings on the reference parser, each as an input class (invented
lines of the Quillfeather Society scenario; real journal names are facts).

Two layers: the label repairs of ``normform.refs.relabel`` on hand-written
label sequences (independent of the trained model), and whole lines through
``parse_reference``.
"""

from __future__ import annotations

import datetime

import pytest
from stdnum import isbn as stdnum_isbn

from normform.export.csljson import CslJsonExporter
from normform.model import Date, Kind, Name, Reference, Provenance, FieldInfo, Span
from normform.refs import kinds, relabel, validate
from normform.refs.api import parse_reference
from normform.refs.namelist import split_names
from normform.refs.tokens import tokenize


def _relabel(text: str, spec: dict[str, str], default: str = "O") -> tuple[list, list[str]]:
    """Tokens of ``text`` labeled by ``spec`` (token text -> label; first
    match wins per text, later repeats too), then repaired."""
    tokens = tokenize(text)
    labels = [spec.get(t.text, default) for t in tokens]
    marg = [0.95] * len(tokens)
    relabel.repair(text, tokens, labels, marg)
    return tokens, labels


def _field(tokens, labels, label: str) -> str:
    return " ".join(t.text for t, lab in zip(tokens, labels) if lab == label)


# --- #14 invalid identifiers ---------------------------------------------------

def test_isbn_with_bad_check_digit_kept_invalid_and_doubted():
    # python-stdnum (outside source) rejects the check digit 5; 978-0-387-95385-2 would pass
    assert not stdnum_isbn.is_valid("978-0-387-95385-5")
    ref = parse_reference("C. D. Inkwell, Enumerative quills, Springer, New York, 2001. ISBN 978-0-387-95385-5")
    isbn = ref.ident("isbn")
    assert isbn is not None and isbn.valid is False and isbn.value == "9780387953855"
    assert ref.confidence < 0.9


def test_arxiv_id_with_impossible_month_is_doubted():
    # arXiv's new-style ids are YYMM.NNNNN, and there is no month 99 (from memory)
    ref = parse_reference("E. Penrake, Counting nibs of the plane, preprint, arXiv:2099.99999, 2019.")
    arx = ref.ident("arxiv")
    assert arx is not None and not arx.valid
    assert ref.confidence < 0.9


def test_doi_keyword_with_no_doi_is_kept_as_invalid_doi():
    # a DOI is "10." + a numeric registrant code + "/" + suffix (DOI Handbook, from memory)
    line = "E. Penrake, Counting nibs of the plane, Ann. Comb. 3 (1999), 1-20. doi:10.abc/xyz"
    ref = parse_reference(line)
    doi = ref.ident("doi")
    assert doi is not None and doi.valid is False and doi.value == "10.abc/xyz"
    assert ref.confidence < 0.9
    info = ref.provenance.info("doi")
    assert line[info.span.start:info.span.end] == "doi:10.abc/xyz"
    # the junk is no page range
    assert ref.pages is not None and ref.pages.first == "1"


def test_valid_doi_is_not_reported_twice():
    ref = parse_reference("E. Penrake, Counting nibs, Ann. Comb. 3 (1999), 1-20. doi:10.1007/s00026-999-0001-2")
    assert [i.valid for i in ref.idents("doi")] == [True]


def test_doi_word_without_an_attempt_is_ignored():
    tokens = tokenize("DOI not available")
    assert relabel.bad_doi_mentions("DOI not available", tokens) == []


# --- #18 implausible years -------------------------------------------------------

@pytest.mark.parametrize("year", [1450, datetime.date.today().year + 5])
def test_implausible_year_lowers_date_and_record(year):
    ref = parse_reference(f"E. Penrake, Counting nibs of the plane, Ann. Comb. 3 ({year}), 1-20.")
    assert ref.year == year
    assert ref.confidence < 0.9
    assert ref.provenance.confidence_of("date") < 0.5


def test_validate_review_on_a_plain_record():
    # independent of the labeler: a record claiming a year after next year
    future = datetime.date.today().year + 3
    prov = Provenance(raw="x", fields=(FieldInfo("date", 0.99, Span(0, 1)),), confidence=0.97)
    ref = validate.review(Reference(title="T", date=Date(year=future), provenance=prov), "x", [])
    assert ref.confidence < 0.9 and ref.provenance.confidence_of("date") < 0.5
    ok = validate.review(Reference(title="T", date=Date(year=2001), provenance=prov), "x", [])
    assert ok.confidence == 0.97


# --- #5 full dates ---------------------------------------------------------------------

@pytest.mark.parametrize("date", ["15 March 2005", "March 15, 2005", "2005-03-15"])
def test_bracketed_full_date_relabel(date):
    text = f"A. Quill, Counting nibs, Discrete Math. 301 ({date}), 1-20."
    tokens, labels = _relabel(text, {"15": "date"} if not date.startswith("2005") else {"2005": "date", "03": "note"})
    assert _field(tokens, labels, "date").replace(" ", "") == date.replace(" ", "")


@pytest.mark.parametrize("line", [
    "A. Quill, Counting nibs of the plane, Discrete Math. 301 (15 March 2005), 1-20.",
    "A. Quill, Counting nibs of the plane, Discrete Math. 301 (March 15, 2005), 1-20.",
    "A. Quill, Counting nibs of the plane, Discrete Math. 301 (2005-03-15), 1-20.",
    "A. Quill, Counting nibs of the plane, Discrete Math. 301 (2005), 1-20, 15 March 2005.",
])
def test_full_date_gives_date_parts(line):
    ref = parse_reference(line)
    assert (ref.date.year, ref.date.month, ref.date.day) == (2005, 3, 15)
    assert CslJsonExporter().record(ref)["issued"] == {"date-parts": [[2005, 3, 15]]}
    assert "03-15" not in (ref.note or "")


# --- #15 Vancouver names -----------------------------------------------------------------

def test_vancouver_last_initials_join_the_list():
    text = "Featherstone AB, Penrake EF. On the enumeration of quill walks. Discrete Math. 2005;301:1-20."
    tokens, labels = _relabel(text, {"Featherstone": "authors", "AB": "authors", ",": "authors",
                                     "Penrake": "authors"})
    assert labels[4] == "authors" and tokens[4].text == "EF"
    # as typed, like "Family A B" (tests/test_refs_names.py)
    names, _ = split_names("Featherstone AB, Penrake EF")
    assert [(n.family, n.given) for n in names] == [("Featherstone", "AB"), ("Penrake", "EF")]
    ref = parse_reference(text)
    assert [(n.family, n.given) for n in ref.authors] == [("Featherstone", "AB"), ("Penrake", "EF")]


# --- #8 translators, "edited by" -----------------------------------------------------------

@pytest.mark.parametrize("phrase", ["translated by B. Vellum", "trans. B. Vellum", "(transl. B. Vellum)"])
def test_translators(phrase):
    sep = " " if phrase.startswith("(") else ", "
    ref = parse_reference(f"A. Quill, Theory of Quills{sep}{phrase}, Springer, Berlin, 1999.")
    assert [(n.family, n.given) for n in ref.translators] == [("Vellum", "B.")]
    assert ref.title == "Theory of Quills"
    assert CslJsonExporter().record(ref)["translator"] == [{"family": "Vellum", "given": "B."}]


def test_journal_transactions_is_no_translator():
    text = "W. Inkwell, Higher quills, Trans. Amer. Math. Soc. 107 (1963), 353-375."
    tokens, labels = _relabel(text, {"W.": "authors", "Inkwell": "authors", "Trans": "container_title"})
    assert "translators" not in labels


def test_edited_by_keeps_the_title():
    ref = parse_reference("Topics in Enumeration, edited by F. Vellum, Springer, Berlin, 2001.")
    assert ref.title == "Topics in Enumeration"
    assert [n.family for n in ref.editors] == ["Vellum"]


# --- #12 kind details -------------------------------------------------------------------------

def test_habilitation_is_a_thesis_with_genre():
    ref = parse_reference("C. Inkwell, Zählen von Federn, Habilitationsschrift, Universität Bonn, 2008.")
    assert ref.kind is Kind.THESIS and ref.genre == "Habilitationsschrift"
    assert "Habilitationsschrift" not in (ref.title or "")
    ref = parse_reference("C. Inkwell, Counting feathers in the plane, habilitation thesis, University of Bonn, 2008.")
    assert ref.kind is Kind.THESIS and "habilitation" in ref.genre.lower()


def test_kinds_details_without_labeler():
    ref = kinds.details(Reference(kind=Kind.BOOK, title="Zählen von Federn, Habilitationsschrift"),
                        "C. Inkwell, Zählen von Federn, Habilitationsschrift, Bonn, 2008.")
    assert (ref.kind, ref.genre, ref.title) == (Kind.THESIS, "Habilitationsschrift", "Zählen von Federn")


def test_report_number_field():
    # relabel files the number as note tokens; kinds.details moves it to report_number
    line = "C. Inkwell, Counting feathers in the plane, Tech. Rep. TR-2007-13, Quillfeather University, 2007."
    ref = parse_reference(line)
    assert ref.kind is Kind.REPORT and ref.report_number == "TR-2007-13"
    assert "TR-2007-13" not in (ref.note or "")
    span = ref.provenance.info("report_number").span
    assert line[span.start:span.end] == "TR-2007-13"
    text = "C. Inkwell, Counting feathers, Report No. 12, Quillfeather Society, 2007."
    tokens, labels = _relabel(text, {"12": "series_number", "Report": "O"})
    assert _field(tokens, labels, "note") == "No . 12" and _field(tokens, labels, "genre") == "Report"
    # CSL "number" of a report is its number (CSL 1.0.2 variable list, from memory)
    ref = parse_reference(text)
    assert ref.report_number == "12" and CslJsonExporter().record(ref)["number"] == "12"


def test_report_number_leaves_the_rest_of_the_note():
    ref = kinds.details(Reference(kind=Kind.REPORT, genre="Preprint", note="2004-17; with an appendix"),
                        "Q. Vellum, Quill tables, Preprint 2004-17, Quillfeather Society, 2004, with an appendix.")
    assert (ref.report_number, ref.note) == ("2004-17", "with an appendix")


def test_accessed_date_is_not_the_issued_date():
    text = "QSEM editors, The Quill Tables, https://qsem.example.org/tables, accessed 3 May 2020."
    tokens, labels = _relabel(text, {"2020": "date", "The": "title", "Quill": "title", "Tables": "title"})
    assert "date" not in labels and _field(tokens, labels, "note") == "accessed 3 May 2020"
    ref = parse_reference("QSEM Working Group, The Quill Tables, web page, https://qsem.example.org/tables, "
                          "accessed 3 May 2020.")
    assert ref.accessed == Date(year=2020, month=5, day=3)
    assert "accessed" not in (ref.note or "") and "accessed" not in (ref.title or "") and ref.year is None
    assert CslJsonExporter().record(ref)["accessed"] == {"date-parts": [[2020, 5, 3]]}


@pytest.mark.parametrize("typed, date", [
    ("retrieved 2020-05-03", Date(2020, 5, 3)),
    ("last accessed on May 3, 2021", Date(2021, 5, 3)),
    ("accessed March 2019", Date(2019, 3)),
    ("accessed 13/05/2020", Date(2020, 5, 13)),
    ("accessed 03/05/2020", Date(literal="03/05/2020")),   # day and month cannot be told apart
])
def test_accessed_date_forms(typed, date):
    text = f"QSEM, Feather counts, https://qsem.example.org/f, {typed}."
    ref = kinds.details(Reference(kind=Kind.WEBPAGE, title="Feather counts", note=typed), text)
    assert ref.accessed == date and ref.note is None


def test_software_version_field():
    ref = parse_reference("N. Feathergill, Quillcount, version 2.1, software, 2019. https://example.org/quillcount")
    assert ref.kind is Kind.SOFTWARE and ref.version == "2.1" and "2.1" not in (ref.note or "")
    # a glued "v2.1" reaches the note without its "v"
    ref = kinds.details(Reference(kind=Kind.SOFTWARE, title="Quillcount", note="2.1; 2nd printing"),
                        "N. Feathergill, Quillcount, v2.1, software, 2019, 2nd printing.")
    assert (ref.version, ref.note) == ("2.1", "2nd printing")
    # "v. 12" of older styles is a volume, not a version
    text = "A. Quill, Nibs, Quill Quart. v. 12 (1950), 1-9."
    tokens, labels = _relabel(text, {"12": "volume"})
    assert "note" not in labels


def test_corporate_name_ending_in_a_role_word():
    # "ed" of "editors" is no role abbreviation: the role word must be a whole word
    assert split_names("QSEM editors")[0] == (Name(literal="QSEM editors"),)
    assert split_names("A. Quill, editor")[0] == (Name(family="Quill", given="A."),)
    assert [n.family for n in split_names("A. Quill and B. Vellum, editors")[0]] == ["Quill", "Vellum"]
    ref = parse_reference("QSEM editors, The Quill Tables, https://qsem.example.org/tables, accessed 3 May 2020.")
    assert ref.authors == (Name(literal="QSEM editors"),)


# --- #10 final period of an abbreviated venue --------------------------------------------------

@pytest.mark.parametrize("tail,journal", [
    ("Rev. Mat. Iberoam. 12 (1996), 1-20.", "Rev. Mat. Iberoam."),
    ("Ann. Comb. 10 (2006), no. 2, 44--81.", "Ann. Comb."),
    ("Ann. Comb. 3 (1999), 1-20.", "Ann. Comb."),
])
def test_abbreviated_venue_keeps_final_period(tail, journal):
    ref = parse_reference("E. Penrake, Counting nibs of the plane, " + tail)
    assert ref.container_title == journal


def test_full_word_venue_gets_no_period():
    assert not validate._abbreviated_end("Discrete Mathematics")
    assert validate._abbreviated_end("Rev. Mat. Iberoam")


# --- #13 journal, volume, bracketed year, article number -------------------------------------

def test_plos_one_layout():
    ref = parse_reference("E. Penrake, Counting nibs of the plane, PLoS ONE 8 (2013), e1234.")
    assert (ref.container_title, ref.volume, ref.kind) == ("PLoS ONE", "8", Kind.ARTICLE)
    assert ref.title == "Counting nibs of the plane"
    assert CslJsonExporter().record(ref)["page"] == "e1234"


def test_journal_volume_year_repair_on_labels():
    text = "E. Penrake, Counting nibs, Quill Lett. 8 (2013), 1-9."
    spec = {"E.": "authors", "Penrake": "authors", "Counting": "title", "nibs": "title", "Quill": "title",
            "Lett": "title", "8": "title", "2013": "date", "1": "pages", "-": "pages", "9": "pages"}
    tokens, labels = _relabel(text, spec)
    assert _field(tokens, labels, "container_title") == "Quill Lett ." and _field(tokens, labels, "volume") == "8"
    assert _field(tokens, labels, "title") == "Counting nibs"


def test_translated_from_a_language_by():
    ref = parse_reference("B. Vellum, Theory of nibs, translated from the Russian by A. Quill and C. Inkwell, "
                          "Springer, 1980.")
    assert [(n.family, n.given) for n in ref.translators] == [("Quill", "A."), ("Inkwell", "C.")]
    assert [n.family for n in ref.authors] == ["Vellum"] and ref.title == "Theory of nibs"


def test_journal_name_with_small_words_before_volume():
    text = "A. Quill, Counting nibs, Reports on Mathematical Physics 12 (1977), 1-20."
    spec = {"A.": "authors", "Quill": "authors", "Counting": "title", "nibs": "title", "Reports": "title",
            "on": "title", "Mathematical": "title", "Physics": "title", "12": "volume", "1977": "date",
            "1": "pages", "-": "pages", "20": "pages"}
    tokens, labels = _relabel(text, spec)
    assert _field(tokens, labels, "container_title") == "Reports on Mathematical Physics"
    assert _field(tokens, labels, "title") == "Counting nibs"


def test_report_phrase_read_as_a_journal():
    text = "A. Quill, Counting nibs, Technical Report No. 5, Quillfeather University, 2004."
    spec = {"Technical": "container_title", "Report": "container_title", "No": "container_title",
            "5": "issue", "2004": "date"}
    tokens, labels = _relabel(text, spec)
    assert "container_title" not in labels
    assert _field(tokens, labels, "genre") == "Technical Report" and _field(tokens, labels, "note") == "No . 5"
    # a journal whose name has "Report" in it keeps its label
    text = "A. Quill, Counting nibs, Quill Report Lett. No. 5 (2004), 1-9."
    spec = {"Quill": "container_title", "Report": "container_title", "Lett": "container_title"}
    tokens, labels = _relabel(text, spec)
    assert labels[tokens.index(next(t for t in tokens if t.text == "Report"))] == "container_title"
