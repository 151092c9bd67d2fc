"""Name-list shapes the splitter used to get wrong; invented people (QSEM
scenario).  Particles after the given names, "Family Initials" lists,
given-first lists whose second given name is a common word, and a family
name that is also a suffix abbreviation."""

from normform.refs.namelist import split_names


def _triples(text):
    return [(n.family, n.given, n.particle) for n in split_names(text)[0]]


def test_particles_after_initials_of_an_inverted_name():
    assert _triples("Plume, A. C. M. van") == [("Plume", "A. C. M.", "van")]
    assert _triples("Quillby, B. L. van der") == [("Quillby", "B. L.", "van der")]


def test_particles_after_a_full_given_name():
    assert _triples("Featherstone, Joris van der") == [("Featherstone", "Joris", "van der")]


def test_family_initials_list_without_periods():
    # Springer/Vancouver shape: "Family Initials, Family Initials"
    assert _triples("Quöllmann K, Featherstone AB") == [("Quöllmann", "K", None), ("Featherstone", "AB", None)]


def test_given_first_list_is_not_read_as_inverted():
    assert _triples("M. Featherstone, P. Gabriel") == [("Featherstone", "M.", None), ("Gabriel", "P.", None)]


def test_jun_before_initials_is_a_family_name():
    assert _triples("Quillby, J. and Jun, K.") == [("Quillby", "J.", None), ("Jun", "K.", None)]


def test_suffix_after_an_inverted_name_still_a_suffix():
    names = split_names("Quillby, A., Jr., Plume, B.")[0]
    assert [(n.family, n.suffix) for n in names] == [("Quillby", "Jr."), ("Plume", None)]
