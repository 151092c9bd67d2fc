"""Remarks a collection adds after a reference are kept in the note, never
dropped and never taken for a field (invented lines, Quillfeather Society
scenario; journal names are real and used as facts).  That editors' remarks
travel as a note is common practice in bibliography maintenance."""

import pytest

import normform
from normform.refs import relabel

HEAD = "A. B. Featherstone, On quill partitions, Discrete Math. 301 (2005), 1-20. "


@pytest.mark.parametrize("tail, note", [
    ("[Added by the QSEM editors]", "Added by the QSEM editors"),
    ("(Contributed by N. Feathergill, Dec 2012)", "Contributed by N. Feathergill, Dec 2012"),
    ("See also entry Q000123.", "See also entry Q000123"),
    ("Erratum in the same volume.", "Erratum in the same volume"),
])
def test_attribution_remark_is_the_note(tail, note):
    ref = normform.parse_reference(HEAD + tail)
    assert ref.note == note
    assert ref.title == "On quill partitions"
    assert ref.date.year == 2005            # the remark's own date does not replace it
    assert (ref.pages.first, ref.pages.last) == ("1", "20")


def test_unlabelled_words_after_the_record_become_the_note():
    text = "C. D. Inkwell, The theory of quill numbers, Springer-Verlag, Berlin, 1987. Entered from the card index."
    tokens, labels = _tokens_with_labels(text, upto="1987")
    relabel._leftover_tail(tokens, labels)
    words = [t.text for t, y in zip(tokens, labels) if y == "note"]
    assert words == ["Entered", "from", "the", "card", "index", "."]


def test_a_field_that_runs_on_is_not_cut_into_a_note():
    # "p>0" continues the title: no sentence break before the leftover
    text = "B. Quillson, Quill numbers for p>0"
    tokens, labels = _tokens_with_labels(text, upto="p")
    relabel._leftover_tail(tokens, labels)
    assert "note" not in labels


def test_one_stray_word_is_not_a_note():
    text = "B. Quillson, Quill numbers, 2004. sv"
    tokens, labels = _tokens_with_labels(text, upto="2004")
    relabel._leftover_tail(tokens, labels)
    assert "note" not in labels


def _tokens_with_labels(text, upto):
    """Authors, title and the rest up to ``upto`` labelled, what follows unlabelled."""
    from normform.refs.tokens import tokenize
    tokens = tokenize(text)
    end = max(k for k, t in enumerate(tokens) if t.text == upto)
    labels = ["title"] * (end + 1) + ["O"] * (len(tokens) - end - 1)
    if tokens[end].text.isdigit():
        labels[end] = "date"
    return tokens, labels
