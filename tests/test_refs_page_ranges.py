"""A number range in the number cluster is read as one field (invented lines,
Quillfeather Society scenario; journal names are real and used as facts)."""

import pytest

import normform
from normform.refs import relabel

HEAD = "A. B. Featherstone, On the number of quill partitions, Discrete Math. "


@pytest.mark.parametrize("tail", [
    "301, 1-20 (2005).",                 # pages before the bracketed year
    "301 (2005), 1-20, 15 March 2005.",  # a full date after the pages
    "301(3) (2005) 1-20.",               # no comma before the pages
    "301 (2005), 1-20; MR2123456; Zbl 1077.05012",
])
def test_range_after_the_number_cluster_is_the_page_range(tail):
    ref = normform.parse_reference(HEAD + tail)
    assert (ref.pages.first, ref.pages.last) == ("1", "20")
    assert ref.volume == "301"
    assert ref.issue in (None, "3")


@pytest.mark.parametrize("tail, issue", [
    ("301 (2005), no. 3-4, 1-20.", "3-4"),   # named issue range
    ("301 (3-4) (2005), 1-20.", "3-4"),      # bracketed issue range
])
def test_named_or_bracketed_issue_range_stays_the_issue(tail, issue):
    ref = normform.parse_reference(HEAD + tail)
    assert ref.issue == issue
    assert (ref.pages.first, ref.pages.last) == ("1", "20")


def test_repair_only_moves_labels_of_the_range():
    from normform.refs.tokens import tokenize
    text = HEAD + "301 (2005), 1-20."
    tokens = tokenize(text)
    i = next(k for k, t in enumerate(tokens) if t.text == "1")
    labels = ["O"] * len(tokens)
    labels[i - 5] = "volume"          # "301"
    labels[i - 3] = "date"            # "2005"
    labels[i:i + 3] = ["issue"] * 3
    marg = [1.0] * len(tokens)
    before = list(labels)
    relabel._page_ranges(tokens, labels, marg)
    assert labels[i:i + 3] == ["pages"] * 3
    assert labels[:i] == before[:i] and labels[i + 3:] == before[i + 3:]
    assert marg[i] < 1.0              # a moved label is not fully trusted


def test_year_range_is_left_alone():
    from normform.refs.tokens import tokenize
    text = "Proceedings 1998-2001"
    tokens = tokenize(text)
    labels = ["title", "date", "date", "date"]
    relabel._page_ranges(tokens, labels, [1.0] * 4)
    assert labels == ["title", "date", "date", "date"]
