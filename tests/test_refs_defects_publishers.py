"""Three reference-parser defects of imprints and edited books, fixed
together, with invented lines (the Quillfeather scenario: invented people,
titles and places such as Dovecote and Ink Harbour; real publisher names
and the usual company suffixes and region abbreviations are facts of the
trade).

1. a company suffix (``Inc.``, ``Ltd.``, ``GmbH``, ``S.A.``, ``B.V.``,
   ``AG``) ends a publisher's name, and an unknown place after it is the
   place: ``Quill Press, Inc., Dovecote, 1990``;
2. a region abbreviation after the place stays with it:
   ``Providence, R.I., 1995``, ``Dovecote, Mass.``, ``Ink Harbour, NJ``;
3. the book's title right after "in", before its editor:
   ``in: Nib Studies, E. Vellum (ed.), ...`` (no editor named "Nib Studies").

End-to-end checks go through ``parse_reference`` (several shapes per
defect); the repairs are also checked on hand-set labels, so that a
retrained labeler cannot make them pass or fail by itself.
"""

from __future__ import annotations

import pytest

from normform import parse_reference
from normform.model import Kind
from normform.refs import repairs as rp
from normform.refs.tokens import tokenize
from tests.refs_support import families, labelled, leaves_alone


def labels_of(toks, labels, words):
    return [lab for t, lab in zip(toks, labels) if t.text in words]


# --- 1. company suffixes end the publisher ------------------------------------------------------

@pytest.mark.parametrize("line, publisher, place", [
    ("A. Quill, Nib Theory, Quill Press, Inc., Dovecote, 1990.", "Quill Press, Inc.", "Dovecote"),
    ("A. Quill, Nib Theory, Quill Press, Ltd., Ink Harbour, 1990.", "Quill Press, Ltd.", "Ink Harbour"),
    ("A. Quill, Nib Theory, Quill Press Ltd., Dovecote, 1990.", "Quill Press Ltd.", "Dovecote"),
    ("A. Quill, Nib Theory, Quill Verlag GmbH, Dovecote, 1990.", "Quill Verlag GmbH", "Dovecote"),
    ("A. Quill, Nib Theory, Quill Verlag AG, Dovecote, 1990.", "Quill Verlag AG", "Dovecote"),
    ("A. Quill, Nib Theory, Éditions Quill S.A., Dovecote, 1990.", "Éditions Quill S.A.", "Dovecote"),
    ("A. Quill, Nib Theory, Quill Uitgevers B.V., Ink Harbour, 1990.", "Quill Uitgevers B.V.", "Ink Harbour"),
    ("A. Quill, Nib Theory, Quill & Co., Dovecote, 1990.", "Quill & Co.", "Dovecote"),
    ("A. Quill, Nib Theory, Quill Publishing Co., Inc., Dovecote, 1990.", "Quill Publishing Co., Inc.", "Dovecote"),
    ("A. Quill. Nib Theory. Quill Press, Inc., Dovecote, 1990.", "Quill Press, Inc.", "Dovecote"),
    # known places: these worked before and must keep working
    ("A. Quill, Nib Theory, Academic Press, Inc., New York, 1990.", "Academic Press, Inc.", "New York"),
    ("A. Quill, Nib Theory, John Wiley & Sons, Inc., New York, 1990.", "John Wiley & Sons, Inc.", "New York"),
])
def test_company_suffix_ends_the_publisher(line, publisher, place):
    ref = parse_reference(line)
    assert ref.publisher == publisher
    assert ref.place == place
    assert ref.title == "Nib Theory"
    assert families(ref.authors) == ["Quill"]
    assert ref.kind is Kind.BOOK
    assert ref.year == 1990


def test_company_suffix_without_place():
    ref = parse_reference("A. Quill, Nib Theory, Quill Press, Inc., 1990.")
    assert ref.publisher == "Quill Press, Inc." and ref.place is None and ref.year == 1990


def test_company_suffix_with_place_and_region():
    ref = parse_reference("A. Quill, Nib Theory, Quill Publishing Co., Inc., Dovecote, N.J., 1990.")
    assert ref.publisher == "Quill Publishing Co., Inc."
    assert ref.place == "Dovecote, N.J."


def test_company_imprint_repair_on_hand_labels():
    # the place glued to the publisher after the suffix
    text = "A. Quill, Nib Theory, Quill Press, Inc., Dovecote, 1990."
    toks, labels = labelled(text, [("A. Quill", "authors"), ("Nib Theory", "title"),
                                   ("Quill Press, Inc., Dovecote", "publisher"), ("1990", "date")])
    rp.repair_company_imprint(toks, labels)
    assert labels_of(toks, labels, ("Press", "Inc", "Dovecote")) == ["publisher", "publisher", "place"]
    assert labels[toks.index(next(t for t in toks if t.text == "Dovecote")) - 1] == "O"
    # the suffix's letters read as a name, the name before it as a journal
    text = "A. Quill, Nib Theory, Éditions Quill S.A., Dovecote, 1990."
    toks, labels = labelled(text, [("A. Quill", "authors"), ("Nib Theory", "title"),
                                   ("Éditions Quill", "container_title"), ("S.A.", "authors"), ("1990", "date")])
    rp.repair_company_imprint(toks, labels)
    assert labels_of(toks, labels, ("Éditions", "S.", "A.", "Dovecote"))[1:] == \
        ["publisher", "publisher", "publisher", "place"]
    assert "container_title" not in labels


@pytest.mark.parametrize("text, spec", [
    # a name's initials are no company suffix
    ("C. Inkwell, Penholder graphs, in: Vellum, S.A., Nib Studies, Dovecote, 1990.",
     [("C. Inkwell", "authors"), ("Penholder graphs", "title"), ("Vellum, S.A.", "editors"),
      ("Nib Studies", "container_title"), ("Dovecote", "place"), ("1990", "date")]),
    # a joint imprint keeps its places (repair_joint_imprint)
    ("A. Quill, Nib Theory, Quill Press, Ink Harbour; Vellum Books, Inc., Dovecote, 1990.",
     [("A. Quill", "authors"), ("Nib Theory", "title"),
      ("Quill Press, Ink Harbour; Vellum Books, Inc., Dovecote", "publisher"), ("1990", "date")]),
    # another publisher run: the pieces cannot be told apart
    ("A. Quill, Nib Theory, Quill Society, Vellum Books, Inc., Dovecote, 1990.",
     [("A. Quill", "authors"), ("Nib Theory", "title"), ("Quill Society", "publisher"),
      ("Vellum Books, Inc.", "note"), ("Dovecote", "place"), ("1990", "date")]),
    # no year after the piece
    ("A. Quill, Nib Theory, Quill Press, Inc., Dovecote Lectures 12, 1990.",
     [("A. Quill", "authors"), ("Nib Theory", "title"), ("Quill Press, Inc.", "publisher"),
      ("Dovecote Lectures", "series"), ("12", "series_number"), ("1990", "date")]),
])
def test_company_imprint_repair_leaves_other_shapes(text, spec):
    assert leaves_alone(rp.repair_company_imprint, text, spec)


def test_company_gate():
    assert rp.COMPANY_GATE.search("Quill Press, Inc., Dovecote")
    assert rp.COMPANY_GATE.search("Quill Uitgevers B.V., Dovecote")
    assert not rp.COMPANY_GATE.search("Quill Press, Dovecote, 1990")
    assert not rp.COMPANY_GATE.search("Coloured inks, Incunabula")


# --- 2. region abbreviations after the place ---------------------------------------------------

@pytest.mark.parametrize("line, publisher, place", [
    ("B. Nib, Blots, American Mathematical Society, Providence, R.I., 1995.", "American Mathematical Society",
     "Providence, R.I."),
    ("B. Nib, Blots, Amer. Math. Soc., Providence, R.I., 1995.", "Amer. Math. Soc.", "Providence, R.I."),
    ("B. Nib, Blots, American Mathematical Society, Providence, R.I. (1995).", "American Mathematical Society",
     "Providence, R.I."),
    ("B. Nib, Blots, Quill Press, Princeton, N.J., 1995.", "Quill Press", "Princeton, N.J."),
    ("B. Nib, Blots, Quill Press, Boston, Mass., 1995.", "Quill Press", "Boston, Mass."),
    ("B. Nib, Blotting partitions, Quill Press, Pasadena, Calif., 1995.", "Quill Press", "Pasadena, Calif."),
    ("B. Nib, Blotting partitions, Quill Press, Dovecote, Ill., 1995.", "Quill Press", "Dovecote, Ill."),
    ("B. Nib, Blotting partitions, Quill Press, Dovecote, Penn., 1995.", "Quill Press", "Dovecote, Penn."),
    ("B. Nib, Blotting partitions, Quill Press, Dovecote, N.Y., 1995.", "Quill Press", "Dovecote, N.Y."),
    ("B. Nib, Blotting partitions, Quill Press, Ink Harbour, N.J., 1995.", "Quill Press", "Ink Harbour, N.J."),
    ("B. Nib, Blotting partitions, Quill Press, Ink Harbour, NJ, 1995.", "Quill Press", "Ink Harbour, NJ"),
    ("B. Nib, Blotting partitions, Quill Press, Dovecote, Mass. 1995.", "Quill Press", "Dovecote, Mass."),
    # two-letter codes, which worked before
    ("B. Nib, Blots, American Mathematical Society, Providence, RI, 1995.", "American Mathematical Society",
     "Providence, RI"),
    ("B. Nib, Blots, Springer, New York, NY, 1995.", "Springer", "New York, NY"),
    ("B. Nib, Blots, Springer, New York, NY, USA, 1995.", "Springer", "New York, NY, USA"),
])
def test_region_stays_with_the_place(line, publisher, place):
    ref = parse_reference(line)
    assert ref.publisher == publisher
    assert ref.place == place
    assert families(ref.authors) == ["Nib"]
    assert ref.kind is Kind.BOOK
    assert ref.year == 1995


def test_imprint_named_for_its_city_keeps_the_code():
    ref = parse_reference("B. Nib, Blots, Springer New York, NY, 2009.")
    assert ref.publisher == "Springer New York, NY" and ref.place is None


def test_region_after_place_repair_on_hand_labels():
    text = "B. Nib, Blots, American Mathematical Society, Providence, R.I., 1995."
    toks, labels = labelled(text, [("B. Nib", "authors"), ("Blots", "title"),
                                   ("American Mathematical Society", "publisher"), ("Providence", "place"),
                                   ("R.I.", "authors"), ("1995", "date")])
    rp.repair_region_after_place(toks, labels)
    k = next(i for i, t in enumerate(toks) if t.text == "Providence")
    assert labels[k:k + 4] == ["place"] * 4        # "Providence , R. I."
    assert labels[k + 4] == "O" and labels.count("authors") == 2
    # a dotted word with its period outside the run, before a colon
    text = "B. Nib, Blots, Boston, Mass.: Quill Press, 1995."
    toks, labels = labelled(text, [("B. Nib", "authors"), ("Blots", "title"), ("Boston", "place"),
                                   ("Quill Press", "publisher"), ("1995", "date")])
    rp.repair_region_after_place(toks, labels)
    assert labels_of(toks, labels, ("Boston", "Mass")) == ["place", "place"]
    assert labels[[t.text for t in toks].index("Mass") + 1] == "place"   # its period


@pytest.mark.parametrize("text, spec", [
    # initials of a name after the place, not before the year
    ("B. Nib, Blots, Quill Press, Dovecote, A. B. Vellum, Ink sums, 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Quill Press", "publisher"), ("Dovecote", "place"),
      ("A. B. Vellum", "authors"), ("Ink sums", "title"), ("1995", "date")]),
    # a region code that runs into a longer word
    ("B. Nib, Blots, Quill Press, Dovecote, N.Yx, 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Quill Press", "publisher"), ("Dovecote", "place"),
      ("1995", "date")]),
    # a title word after the comma
    ("B. Nib, Blots, Dovecote, Pa. Studies, 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Dovecote", "place"), ("Pa. Studies", "container_title"),
      ("1995", "date")]),
])
def test_region_after_place_repair_leaves_other_shapes(text, spec):
    assert leaves_alone(rp.repair_region_after_place, text, spec)


def test_region_in_publisher_repair_on_hand_labels():
    # the unknown place and its region read into the publisher
    text = "B. Nib, Blots, Quill Press, Ink Harbour, N.J., 1995."
    toks, labels = labelled(text, [("B. Nib", "authors"), ("Blots", "title"),
                                   ("Quill Press, Ink Harbour, N.J.", "publisher"), ("1995", "date")])
    rp.repair_region_in_publisher(toks, labels)
    assert labels_of(toks, labels, ("Press", "Ink", "Harbour", "N.", "J.")) == \
        ["publisher", "place", "place", "place", "place"]
    # only the code split off as the place
    text = "B. Nib, Blots, Quill Press, Ink Harbour, NJ, 1995."
    toks, labels = labelled(text, [("B. Nib", "authors"), ("Blots", "title"), ("Quill Press, Ink Harbour", "publisher"),
                                   ("NJ", "place"), ("1995", "date")])
    rp.repair_region_in_publisher(toks, labels)
    assert labels_of(toks, labels, ("Press", "Ink", "Harbour", "NJ")) == ["publisher", "place", "place", "place"]
    # the imprint read as a journal, in a record with no journal numbers
    text = "B. Nib, Blots, Quill Press, Dovecote, Ill., 1995."
    toks, labels = labelled(text, [("B. Nib", "authors"), ("Blots", "title"),
                                   ("Quill Press, Dovecote, Ill", "container_title"), ("1995", "date")])
    rp.repair_region_in_publisher(toks, labels)
    assert labels_of(toks, labels, ("Press", "Dovecote", "Ill")) == ["publisher", "place", "place"]
    assert "container_title" not in labels


@pytest.mark.parametrize("text, spec", [
    # the imprint is named for its city: the code qualifies it
    ("B. Nib, Blots, Springer New York, NY, 2009.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Springer New York, NY", "publisher"), ("2009", "date")]),
    # no publisher word in what is left: the comma pieces cannot be told apart
    ("B. Nib, Blots, Harcourt Brace, Dovecote, N.J., 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Harcourt Brace, Dovecote, N.J.", "publisher"), ("1995", "date")]),
    # a journal of a chapter's book, after "in"
    ("B. Nib, Blots, in: Quill Press, Dovecote, Ill., 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Quill Press, Dovecote, Ill", "container_title"),
      ("1995", "date")]),
    # a joint imprint keeps its places
    ("B. Nib, Blots, Quill Press, Ink Harbour; Vellum Books, Dovecote, N.J., 1995.",
     [("B. Nib", "authors"), ("Blots", "title"), ("Quill Press, Ink Harbour; Vellum Books, Dovecote, N.J.", "publisher"),
      ("1995", "date")]),
])
def test_region_in_publisher_repair_leaves_other_shapes(text, spec):
    assert leaves_alone(rp.repair_region_in_publisher, text, spec)


# --- 3. the book's title before its editor ---------------------------------------------------------

@pytest.mark.parametrize("line, editors", [
    ("C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum (ed.), Quill Press, Dovecote, 1996, pp. 1-12.",
     ["Vellum"]),
    ("C. Inkwell, Penholder graphs, in: Nib Studies (E. Vellum, ed.), Quill Press, Dovecote, 1996, pp. 1-12.",
     ["Vellum"]),
    ("C. Inkwell, Penholder graphs, In Nib Studies, edited by E. Vellum, Quill Press, Dovecote, 1996, pp. 1-12.",
     ["Vellum"]),
    ("C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum, ed., Quill Press, Dovecote, 1996, pp. 1-12.",
     ["Vellum"]),
    ("C. Inkwell, Penholder graphs, In Nib Studies, E. F. Vellum (Ed.), Quill Press, Dovecote, 1996, pp. 1-12.",
     ["Vellum"]),
    ("C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum and F. Quill (eds.), Quill Press, Dovecote, 1996, "
     "pp. 1-12.", ["Vellum", "Quill"]),
    ("C. Inkwell. Penholder graphs. In: Nib Studies, E. Vellum (ed.). Quill Press, Dovecote, 1996, 1-12.",
     ["Vellum"]),
])
def test_book_title_before_its_editor(line, editors):
    ref = parse_reference(line)
    assert ref.kind is Kind.CHAPTER
    assert ref.container_title == "Nib Studies"
    assert families(ref.editors) == editors
    assert families(ref.authors) == ["Inkwell"]
    assert ref.title == "Penholder graphs"
    assert ref.publisher == "Quill Press" and ref.place == "Dovecote"
    assert ref.year == 1996
    assert ref.pages.first == "1" and ref.pages.last == "12"


def test_book_title_before_editor_to_csl_json():
    from normform.export.csljson import CslJsonExporter
    ref = parse_reference("C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum (ed.), Quill Press, Dovecote, "
                          "1996, pp. 1-12.")
    rec = CslJsonExporter().record(ref)
    assert rec["type"] == "chapter"
    assert rec["container-title"] == "Nib Studies"
    assert rec["editor"] == [{"family": "Vellum", "given": "E."}]


def test_book_in_editors_repair_on_hand_labels():
    text = "C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum (ed.), Quill Press, 1996, pp. 1-12."
    toks, labels = labelled(text, [("C. Inkwell", "authors"), ("Penholder graphs", "title"),
                                   ("Nib Studies, E. Vellum", "editors"), ("Quill Press", "publisher"),
                                   ("1996", "date"), ("1-12", "pages")])
    rp.repair_book_in_editors(toks, labels)
    assert labels_of(toks, labels, ("Nib", "Studies", "E.", "Vellum")) == \
        ["container_title", "container_title", "editors", "editors"]


@pytest.mark.parametrize("text, spec", [
    # inverted names: only initials after the family's comma
    ("C. Inkwell, Penholder graphs, in: Vellum, E., Quill, F. (eds.), Nib Studies, Quill Press, 1996, pp. 1-12.",
     [("C. Inkwell", "authors"), ("Penholder graphs", "title"), ("Vellum, E., Quill, F.", "editors"),
      ("Nib Studies", "container_title"), ("Quill Press", "publisher"), ("1996", "date"), ("1-12", "pages")]),
    # a given name first, as the lexicon knows it
    ("C. Inkwell, Penholder graphs, in: Alice Vellum, F. Quill (eds.), Nib Studies, Quill Press, 1996, pp. 1-12.",
     [("C. Inkwell", "authors"), ("Penholder graphs", "title"), ("Alice Vellum, F. Quill", "editors"),
      ("Nib Studies", "container_title"), ("Quill Press", "publisher"), ("1996", "date"), ("1-12", "pages")]),
    # names with initials from the first
    ("C. Inkwell, Penholder graphs, in: E. Vellum, F. Quill (eds.), Nib Studies, Quill Press, 1996, pp. 1-12.",
     [("C. Inkwell", "authors"), ("Penholder graphs", "title"), ("E. Vellum, F. Quill", "editors"),
      ("Nib Studies", "container_title"), ("Quill Press", "publisher"), ("1996", "date"), ("1-12", "pages")]),
])
def test_book_in_editors_repair_leaves_name_lists(text, spec):
    assert leaves_alone(rp.repair_book_in_editors, text, spec)


# --- nothing vanishes ---------------------------------------------------------------------------

_DECORATION = frozenset("pp p vol no in and et al ed eds edited by".split())

LINES = [
    "A. Quill, Nib Theory, Quill Press, Inc., Dovecote, 1990.",
    "A. Quill, Nib Theory, Éditions Quill S.A., Dovecote, 1990.",
    "A. Quill, Nib Theory, Quill Publishing Co., Inc., Dovecote, N.J., 1990.",
    "B. Nib, Blots, American Mathematical Society, Providence, R.I., 1995.",
    "B. Nib, Blotting partitions, Quill Press, Dovecote, Ill., 1995.",
    "C. Inkwell, Penholder graphs, in: Nib Studies, E. Vellum (ed.), Quill Press, Dovecote, 1996, pp. 1-12.",
]


@pytest.mark.parametrize("line", LINES)
def test_every_word_lands_in_some_field(line):
    ref = parse_reference(line)
    spans = [(i.span.start, i.span.end) for i in ref.provenance.fields if i.span is not None]
    lost = [t.text for t in tokenize(line) if t.kind in ("word", "num", "initial")
            and t.text.lower().rstrip(".") not in _DECORATION
            and not any(a <= t.start and t.end <= b for a, b in spans)]
    assert lost == []
