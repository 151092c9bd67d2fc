"""The validation / repair pass, fed hand-made labels so the checks are
independent of the trained model."""

from normform.model import Kind
from normform.refs.assemble import assemble
from normform.refs.tokens import tokenize


def _run(text, spec):
    """spec: list of (substring, label); other tokens are O."""
    toks = tokenize(text)
    labels = ["O"] * len(toks)
    for sub, lab in spec:
        a = text.index(sub)
        b = a + len(sub)
        for i, t in enumerate(toks):
            if a <= t.start and t.end <= b:
                labels[i] = lab
    return assemble(text, toks, labels, [0.99] * len(toks), 0.99)


def test_volume_that_is_a_year_becomes_the_date():
    ref = _run("A. Quill, Counting trees, J. Quill. Math. 1996, 1-9.",
               [("A. Quill", "authors"), ("Counting trees", "title"), ("J. Quill. Math.", "container_title"),
                ("1996", "volume"), ("1-9", "pages")])
    assert ref.volume is None and ref.year == 1996
    assert ref.provenance.confidence_of("date") < 0.99


def test_reversed_page_range_is_doubted():
    ref = _run("A. Quill, Counting trees, J. Quill. Math. 3 (1999), 90-12.",
               [("A. Quill", "authors"), ("Counting trees", "title"), ("J. Quill. Math.", "container_title"),
                ("3", "volume"), ("1999", "date"), ("90-12", "pages")])
    assert ref.provenance.confidence_of("pages") < 0.5


def test_author_list_that_ate_the_title_gives_it_back():
    text = "B. Quill and G. Fenwick. Structures de comptage. J. Quill. Math. 3 (1999), 1-9."
    ref = _run(text, [("B. Quill and G. Fenwick. Structures de comptage", "authors"),
                      ("J. Quill. Math.", "container_title"), ("3", "volume"), ("1999", "date"), ("1-9", "pages")])
    assert [n.family for n in ref.authors] == ["Quill", "Fenwick"]
    assert ref.title == "Structures de comptage"
    assert ref.confidence < 0.9


def test_spans_point_into_the_raw_text():
    text = "A. Quill, {\\em Counting trees}, J. Quill. Math. 3 (1999), 1--9."
    ref = _run(text, [("A. Quill", "authors"), ("Counting trees", "title"), ("J. Quill. Math.", "container_title"),
                      ("3", "volume"), ("1999", "date"), ("1--9", "pages")])
    info = ref.provenance.info("title")
    assert text[info.span.start:info.span.end] == "Counting trees"
    assert ref.kind is Kind.ARTICLE and ref.pages.last == "9"


def test_tex_accents_become_unicode():
    text = "P. Erd\\H{o}s, Sur les partitions, C. R. Acad. Sci. Paris 3 (1939), 1-9."
    ref = _run(text, [("P. Erd\\H{o}s", "authors"), ("Sur les partitions", "title"),
                      ("C. R. Acad. Sci. Paris", "container_title"), ("3", "volume"), ("1939", "date"), ("1-9", "pages")])
    assert ref.authors[0].family == "Erdős"


def test_unlabeled_name_before_place_is_the_publisher():
    text = "A. Quill, Counting trees. Fenwickhaus, Utrecht, 1999."
    ref = _run(text, [("A. Quill", "authors"), ("Counting trees", "title"), ("Utrecht", "place"), ("1999", "date")])
    assert ref.publisher == "Fenwickhaus" and ref.place == "Utrecht"


def test_container_of_a_book_is_its_series():
    text = "A. Quill, Counting trees, Quillfeather Studies, Fenwick Press, 1999."
    ref = _run(text, [("A. Quill", "authors"), ("Counting trees", "title"), ("Quillfeather Studies", "container_title"),
                      ("Fenwick Press", "publisher"), ("1999", "date")])
    assert ref.series == "Quillfeather Studies" and ref.container_title is None
    assert ref.kind is Kind.BOOK


def test_no_title_two_containers_first_is_title():
    text = "A. Quill, Counting trees on GL(3) I, Quill. Math. 3, 1-9, 1999."
    ref = _run(text, [("A. Quill", "authors"), ("Counting trees on GL", "container_title"), ("3) I", "O"),
                      ("Quill. Math.", "container_title"), ("3, 1-9", "O"), ("1999", "date")])
    assert ref.title == "Counting trees on GL(3) I" and ref.container_title == "Quill. Math."
