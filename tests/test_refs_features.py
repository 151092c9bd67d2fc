"""Token features of the reference labeler: the venue-phrase feature and the
"what follows this segment" feature, and the frozen venue snapshot."""

from __future__ import annotations

import pytest

from normform.refs import features as F
from normform.refs import lexicon as lx
from normform.refs.tokens import tokenize


@pytest.fixture(autouse=True)
def all_attributes():
    # the labeler filters features to the shipped model's attribute list;
    # these tests look at the full feature set, then restore the filter
    known = F.KNOWN
    F.set_known(None)
    yield
    F.set_known(known)


def _attrs(text: str, prefix: str) -> list[tuple[str, list[str]]]:
    toks = tokenize(text)
    return [(t.text, [a for a in f if a.startswith(prefix)]) for t, f in zip(toks, F.sequence_features(toks, text))]


def test_journal_name_with_commas_is_one_phrase():
    # "Combinatorics, Probability and Computing" is a journal (lexicon, from memory)
    got = _attrs("N. Quill. Sums. Combinatorics, Probability and Computing, 8(1):7-29, 1999.", "gz=")
    marks = {t: a for t, a in got if a}
    assert marks["Combinatorics"] == ["gz=B:j"]
    assert marks["Probability"] == ["gz=I:j"] and marks["and"] == ["gz=I:j"]
    assert marks["Computing"] == ["gz=E:j"]
    assert marks["8"] == ["gz=A"]            # the first token after the name
    assert "Sums" not in marks and "Quill" not in marks


def test_abbreviated_journal_after_a_sentence_period():
    got = _attrs("A. Quill. Zigzag theorems. I. Proc. Cambridge Philos. Soc., 46:209-218, 1950.", "gz=")
    marks = [t for t, a in got if a and a[0] != "gz=A"]
    assert marks[0] == "Proc" and marks[-1] == "Soc"
    assert "I." not in marks and "theorems" not in marks


def test_longest_phrase_wins_and_kinds():
    got = dict((t, a) for t, a in _attrs("In Lecture Notes in Math., vol. 3. Springer-Verlag, Berlin, 1970.", "gz="))
    assert got["Lecture"] == ["gz=B:s"] and got["Math"] == ["gz=E:s"]
    assert got["Springer"] == ["gz=B:p"] and got["Verlag"] == ["gz=E:p"]


def test_no_match_in_lower_case_or_for_one_word_names():
    # a sentence-cased title that spells a journal's words does not light up,
    # nor does a one-word journal name ("Topology") that is also a plain word
    assert not any(a for _, a in _attrs("A. Quill, topics in discrete mathematics, Topology 3 (1970).", "gz="))


def test_next_segment_feature():
    got = _attrs("A. Quill, Zigzags, Adv. Math., 4 (1970), 1-20. In Tilings, vol. 2.", "nx=")
    by = dict(got)
    assert by["Adv"] == by["Math"] == ["nx=num"]   # the segment before ", 4"
    assert by["Tilings"] == ["nx=vol"]             # the segment before ", vol."
    assert by["Quill"] == [] and by["Zigzags"] == []   # followed by words


def test_features_are_deterministic_and_strings():
    text = "J. Fenwick, Lectures on plane partitions, Cambridge Univ. Press, Cambridge, 2004."
    toks = tokenize(text)
    a = F.sequence_features(toks, text)
    b = F.sequence_features(toks, text)
    assert a == b and len(a) == len(toks)
    assert all(isinstance(x, str) for f in a for x in f)


def test_venue_snapshot_rows():
    rows = lx.venue_rows()
    assert len(rows) > 400
    assert {kind for kind, _, _ in rows} <= {"journal", "series"}
    assert all(full and "\t" not in full for _, full, _ in rows)


def test_word_after_inverted_name_initials():
    def marked(text):
        toks = tokenize(text)
        return [t.text for t, f in zip(toks, F.sequence_features(toks, text)) if "fi+" in f]
    assert marked("Fenwick, K. Nib Theory. Cambridge Univ. Press, 1997.") == ["Nib"]
    assert marked("van der Marrow, B. L. Tilings. 2004.") == ["Tilings"]
    # next name of an initials-first list, or after a separator: not marked
    assert marked("J. Quill, K. Fenwick, Zigzags, 2004.") == []
    assert marked("Quill, A. and Fenwick, B. Zigzags, 2004.") == ["Zigzags"]
    assert marked("Quill, J. M., and Z. Fenwick. Zigzags.") == []
