"""Whole-line checks (labeler + repairs) for the second accuracy pass: the
trailing remarks, translations and typing shapes an editor meets in a
legacy collection.  Lines are invented (Quillfeather Society scenario);
journal and publisher names are real facts.  That remarks and signatures
travel in the note is common practice in bibliography maintenance."""

import pytest

import normform
from normform.model import Kind
from normform.refs import relabel
from normform.refs.namelist import parse_one, split_names
from normform.refs.tokens import tokenize

HEAD = "A. B. Featherstone, On quill partitions, Discrete Math. 301 (2005), 1-20"


@pytest.mark.parametrize("tail, note", [
    (". - N. Feathergill, Dec 14 2012", "N. Feathergill, Dec 14 2012"),
    (" -- C. D. Inkwell, 2014", "C. D. Inkwell, 2014"),
    (". — K. Quöllmann", "K. Quöllmann"),
])
def test_trailing_signature_is_the_note(tail, note):
    ref = normform.parse_reference(HEAD + tail)
    assert ref.note == note
    assert ref.year == 2005 and ref.volume == "301"       # the signature's date is not the work's
    assert (ref.pages.first, ref.pages.last) == ("1", "20")


def test_signature_rule_needs_an_initial_or_a_year():
    text = HEAD + ". - Reprinted"
    tokens = tokenize(text)
    labels = ["O"] * len(tokens)
    labels[0] = "authors"
    idx = [i for i, t in enumerate(tokens) if t.text == "2005"][0]
    labels[idx] = "date"
    relabel._signature(text, tokens, [t.start for t in tokens], labels)
    assert "note" not in labels
    text = HEAD + ". - N. Feathergill"
    tokens = tokenize(text)
    labels = ["O"] * len(tokens)
    labels[idx] = "date"
    relabel._signature(text, tokens, [t.start for t in tokens], labels)
    assert labels[-1] == "note" and labels[-2] == "note"


def test_a_dash_inside_the_title_is_no_signature():
    ref = normform.parse_reference("A. B. Featherstone, Quill numbers - A. Survey, Discrete Math. 301 (2005), 1-20.")
    assert ref.note is None


def test_translation_after_the_original_is_the_note():
    ref = normform.parse_reference(HEAD + "; English transl., Sb. Math. 196 (2005), 1-20.")
    assert ref.container_title == "Discrete Math." and ref.volume == "301"
    assert (ref.pages.first, ref.pages.last) == ("1", "20")
    assert ref.note == "English transl., Sb. Math. 196 (2005), 1-20"


def test_translators_phrase_is_still_a_role():
    ref = normform.parse_reference("A. B. Featherstone, Quill Combinatorics, translated by C. D. Inkwell, "
                                   "Springer, Berlin, 2005.")
    assert [n.family for n in ref.translators] == ["Inkwell"] and ref.note is None


def test_all_lower_case_line_is_labelled_from_a_capitalised_copy():
    ref = normform.parse_reference("a. b. featherstone, on quill partitions, discrete math 301 (2005) 1-20")
    assert [n.family for n in ref.authors] == ["featherstone"]      # the typed text is kept
    assert ref.title == "on quill partitions" and ref.container_title == "discrete math"
    assert ref.volume == "301" and ref.year == 2005 and (ref.pages.first, ref.pages.last) == ("1", "20")
    assert ref.confidence < 0.9


def test_lower_case_with_a_longer_capital_is_left_to_the_labeler():
    # "ß".title() is "Ss": offsets would move, so the line is labelled as typed (and never raises)
    ref = normform.parse_reference("a. b. straß, on quill partitions, discrete math 301 (2005) 1-20")
    assert ref.provenance.raw.startswith("a. b. straß")


def test_family_then_dotted_initial_is_inverted():
    assert (parse_one("Quöllmann K.").family, parse_one("Quöllmann K.").given) == ("Quöllmann", "K.")
    assert parse_one("Featherstone A. B.").family == "Featherstone"
    assert parse_one("K. Quöllmann").family == "Quöllmann"
    # a known given name before a bare initial keeps the old given-first reading
    assert parse_one("Ada K.").given == "Ada"
    names, _ = split_names("Featherstone AB, Penrake EF")
    assert [n.family for n in names] == ["Featherstone", "Penrake"]


@pytest.mark.parametrize("line, field, value", [
    ("A. B. Featherstone, Quill sums, PLOS One 7 (2012), e1234.", "container_title", "PLOS One"),
    ("A. B. Featherstone, Quill sums, PLOS One 7 (2012), e1234.", "title", "Quill sums"),
    ("T. Reed, Quill identities, Trans. Amer. Math. Soc., to appear.", "container_title", "Trans. Amer. Math. Soc."),
    ("Quillfeather Society for Enumerative Mathematics, The QSEM catalogue of quill numbers, "
     "Quillfeather Society, Oxford, 2010.", "title", "The QSEM catalogue of quill numbers"),
    ("K. Sandarac, Quill statistics, Technical Report No. 5, Department of Mathematics, University of Leeds, 2007.",
     "report_number", "5"),
    ("Inkwell CD, Vellum GH, Penrake EF, et al. Nib counts in inkwells. PLoS One. 2012;7(4):e1234.",
     "issue", "4"),
    ("K. Sandarac, Quill statistics, lecture notes, University of Leeds, 2009.", "genre", "lecture notes"),
    ("G. Scrivener, Lattice paths of quills, in: Proc. Int. Congress of Mathematicians, Vol. 2, Beijing, "
     "2002, 55-66.", "volume", "2"),
])
def test_whole_lines(line, field, value):
    assert getattr(normform.parse_reference(line), field) == value


def test_forthcoming_article_is_an_article():
    ref = normform.parse_reference("T. Reed, Quill identities, Proc. Amer. Math. Soc. (to appear).")
    assert ref.kind == Kind.ARTICLE and ref.publisher is None
    ref = normform.parse_reference("T. Reed, Quill identities, unpublished manuscript, 1998.")
    assert ref.kind == Kind.UNPUBLISHED


@pytest.mark.parametrize("tail, note", [
    (". [From N. Feathergill, Jan 2010]", "From N. Feathergill, Jan 2010"),
    ("; see p. 12.", "see p. 12"),
    (", Eq. (12).", "Eq. (12)"),
    (", Lemma 4.2.", "Lemma 4.2"),
])
def test_remarks_and_pinpoints_after_the_record_are_the_note(tail, note):
    ref = normform.parse_reference(HEAD + tail)
    assert ref.note == note
    assert ref.volume == "301" and ref.issue is None and (ref.pages.first, ref.pages.last) == ("1", "20")


def test_bracketed_identifier_or_class_is_no_remark():
    ref = normform.parse_reference(HEAD + " [MR2123456].")
    assert ref.note is None and ref.ident("mr").value == "2123456"
    ref = normform.parse_reference("A. B. Featherstone, Quill sums, arXiv:1006.0367v3 [math.CO].")
    assert ref.note is None and ref.ident("arxiv").value == "1006.0367v3"


def test_a_title_that_names_a_theorem_is_not_a_pinpoint():
    ref = normform.parse_reference("A. B. Featherstone, Theorem 2 revisited, Discrete Math. 301 (2005), 1-20.")
    assert ref.title == "Theorem 2 revisited" and ref.note is None


def test_pasted_web_markup_is_dropped_and_the_link_kept():
    ref = normform.parse_reference('A. B. Featherstone, <a href="https://example.org/q.pdf">Quill sums</a>, '
                                   'Discrete Math. 301 (2005), 1-20.')
    assert ref.title == "Quill sums" and ref.note is None
    assert ref.ident("url").value == "https://example.org/q.pdf"


def test_a_less_than_sign_in_a_title_is_kept():
    ref = normform.parse_reference("A. B. Featherstone, Quill sums for n<5, Discrete Math. 301 (2005), 1-20.")
    assert ref.title == "Quill sums for n<5"


def test_e_prints_is_no_page():
    ref = normform.parse_reference("A. B. Featherstone, Quill sums, ArXiv e-prints, 2013, arXiv:1301.3569.")
    assert ref.pages is None and ref.ident("arxiv").value == "1301.3569"


def test_single_vancouver_author_keeps_the_initials():
    ref = normform.parse_reference("Featherstone AB. Quill sums. Discrete Math. 2005;301:1-20.")
    assert [(n.family, n.given) for n in ref.authors] == [("Featherstone", "AB")]
