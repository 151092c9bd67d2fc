"""The book's title of a chapter, when the labeler cuts it or runs the
editors over it (invented Quillfeather lines).

* ``in: Partitions, Quills and Inks (O. Vellum, ed.)``: a comma inside the
  book's title;
* ``in: Quill Studies (O. Vellum, ed.)``: the editors' run reaching back over
  the bracket into the title (a name list never holds an opening bracket).

End to end through ``parse_reference``, and on hand-set labels, so a retrained
labeler can neither make these pass nor fail by itself.
"""

from __future__ import annotations

import pytest

from normform import parse_reference
from normform.model import Kind
from normform.refs import repairs as rp
from tests.refs_support import families, labelled, leaves_alone

TAIL = ", Quill Press, Dovecote, 1965, pp. 1-9."


@pytest.mark.parametrize("book, editors", [
    ("Quill Studies (O. Vellum, ed.)", ["Vellum"]),
    ("Quill Studies (E. Vellum, ed.)", ["Vellum"]),
    ("Quill Studies (O. Vellum and U. Nib, eds.)", ["Vellum", "Nib"]),
    ("Partitions, Quills and Inks (O. Vellum, ed.)", ["Vellum"]),
    ("Partitions, Quills and Symmetric Inks (O. Xanthopoulos, ed.)", ["Xanthopoulos"]),
])
def test_book_title_of_a_chapter(book, editors):
    ref = parse_reference("R. Brackenbury, Nib words, in: " + book + TAIL)
    assert ref.kind is Kind.CHAPTER
    assert ref.container_title == book.split(" (")[0]
    assert families(ref.editors) == editors
    assert ref.title == "Nib words"
    assert ref.publisher == "Quill Press" and ref.place == "Dovecote"
    assert ref.note is None


def test_split_book_title_on_hand_labels():
    text = "R. Brackenbury, Nib words, in: Partitions, Quills and Inks (O. Vellum, ed.), Quill Press, 1965."
    toks, labels = labelled(text, [("R. Brackenbury", "authors"), ("Nib words", "title"),
                                   ("Partitions", "container_title"), ("Quills and Inks", "container_title"),
                                   ("O. Vellum", "editors"), ("Quill Press", "publisher"), ("1965", "date")])
    rp.repair_split_book_title(toks, labels)
    comma = next(i for i, t in enumerate(toks) if t.text == "," and toks[i - 1].text == "Partitions")
    assert labels[comma] == "container_title"


@pytest.mark.parametrize("text, spec", [
    # no "in": two venues (a journal and a series?) stay apart
    ("R. Brackenbury, Nib words, Partitions, Quills and Inks (O. Vellum, ed.), 1965.",
     [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Partitions", "container_title"),
      ("Quills and Inks", "container_title"), ("O. Vellum", "editors"), ("1965", "date")]),
    # no editors after the second piece
    ("R. Brackenbury, Nib words, in: Quill Studies, Quill Lectures, 1965.",
     [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Quill Studies", "container_title"),
      ("Quill Lectures", "container_title"), ("1965", "date")]),
])
def test_split_book_title_leaves_other_shapes(text, spec):
    assert leaves_alone(rp.repair_split_book_title, text, spec)


def test_title_in_bracketed_editors_on_hand_labels():
    text = "R. Brackenbury, Nib words, in: Quill Studies (O. Vellum, ed.), Quill Press, 1965."
    toks, labels = labelled(text, [("R. Brackenbury", "authors"), ("Nib words", "title"),
                                   ("Quill Studies (O. Vellum", "editors"), ("Quill Press", "publisher"),
                                   ("1965", "date")])
    rp.repair_title_in_bracketed_editors(toks, labels)
    got = {t.text: lab for t, lab in zip(toks, labels) if t.text in ("Quill", "Studies", "(", "O.", "Vellum")}
    assert got["Studies"] == "container_title" and got["("] == "O"
    assert got["O."] == "editors" and got["Vellum"] == "editors"


@pytest.mark.parametrize("text, spec", [
    # initials before the bracket: a name list with a remark, not a title
    ("R. Brackenbury, Nib words, in: A. Quill (O. Vellum, ed.), 1965.",
     [("R. Brackenbury", "authors"), ("Nib words", "title"), ("A. Quill (O. Vellum", "editors"), ("1965", "date")]),
    # a known given name opens the run (lexicon.GIVEN_NAMES)
    ("R. Brackenbury, Nib words, in: Anna (O. Vellum, ed.), 1965.",
     [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Anna (O. Vellum", "editors"), ("1965", "date")]),
    # no initial after the bracket
    ("R. Brackenbury, Nib words, in: Quill Studies (Vellum, ed.), 1965.",
     [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Quill Studies (Vellum", "editors"), ("1965", "date")]),
])
def test_title_in_bracketed_editors_leaves_other_shapes(text, spec):
    assert leaves_alone(rp.repair_title_in_bracketed_editors, text, spec)


def test_in_inside_title_on_hand_labels():
    text = "R. Brackenbury, Nib words, in: Partitions, Quills and Inks (O. Vellum, ed.), 1965."
    toks, labels = labelled(text, [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Partitions", "title"),
                                   ("Quills and Inks", "container_title"), ("O. Vellum", "editors"),
                                   ("1965", "date")])
    rp.repair_in_inside_title(toks, labels)
    runs = [(t.text, lab) for t, lab in zip(toks, labels)]
    assert runs[3:6] == [("Nib", "title"), ("words", "title"), (",", "O")]
    assert runs[6:13] == [("in", "O"), (":", "O"), ("Partitions", "container_title"), (",", "container_title"),
                          ("Quills", "container_title"), ("and", "container_title"), ("Inks", "container_title")]


def test_in_inside_title_leaves_a_title_with_no_book_after_it():
    # "in:" inside a title with nothing of a book after it: a title's own words
    text = "R. Brackenbury, Nib words, in: Partitions. Quill Math. J. 3 (1965), 1-9."
    toks, labels = labelled(text, [("R. Brackenbury", "authors"), ("Nib words", "title"), ("Partitions", "title"),
                                   ("Quill Math. J.", "container_title"), ("3", "volume"), ("1965", "date"),
                                   ("1-9", "pages")])
    before = list(labels)
    rp.repair_in_inside_title(toks, labels)
    assert labels == before
