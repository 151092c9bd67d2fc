"""Duplicate clustering rules, on a hand-built work database."""

from __future__ import annotations


from normform.batch import clusters, keys
from normform.batch.store import _connect
from normform.model import Identifier, Name, Reference


def _db(rows, ids=()):
    """rows: (author key, year, title) or (author key, year, title, locator)."""
    db = _connect(":memory:")
    for seq, (author, year, title, *where) in enumerate(rows, start=1):
        db.execute("INSERT INTO keys VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?)",
                   (seq, author, year, keys.title_key(title), keys.title_prefix(title), "", 0.5, 3, 0, 0, 0, 0,
                    where[0] if where else ""))
    db.executemany("INSERT INTO ids VALUES (?,?)", ids)
    return db


def test_typos_word_order_and_unknown_years_cluster():
    db = _db([("farrowdale", 1987, "On the enumeration of Dyck words"),
              ("farrowdale", 1987, "On the enumeration of Dcyk words"),       # typo
              ("farrowdale", None, "On the Enumeration of Dyck Words."),      # "to appear"
              ("farrowdale", 1990, "On the enumeration of Dyck words"),       # another year: another work
              ("ormsby", 1987, "Tilings of a strip")])
    # the undated line joins the best-matching dated group (exact title: 1987 and 1990 tie,
    # the earlier record wins) and does not link the 1990 paper to the 1987 one
    assert clusters.find(db) == [[1, 2, 3]]
    # without it, two years means two works
    db2 = _db([("farrowdale", 1987, "On the enumeration of Dyck words"),
               ("farrowdale", 1990, "On the enumeration of Dyck words")])
    assert clusters.find(db2) == []


def test_numbers_in_titles_must_agree():
    db = _db([("quillby", 1970, "Lattice paths II"), ("quillby", 1970, "Lattice paths III"),
              ("quillby", 1971, "Partitions of 12"), ("quillby", 1971, "Partitions of 13")])
    assert clusters.find(db) == []


def test_title_block_needs_compatible_authors():
    db = _db([("kettleridge", 2001, "Generating trees"), ("kettleridg", 2001, "Generating trees"),
              ("nettlefold", 2001, "Generating trees")])
    assert clusters.find(db) == [[1, 2]]


def test_shared_identifier_clusters_even_without_titles():
    db = _db([("a", 2000, ""), ("b", 2001, ""), ("c", 2002, "")], ids=[(1, "doi:10.1/x"), (3, "doi:10.1/x")])
    assert clusters.find(db) == [[1, 3]]


def test_big_block_is_windowed_and_still_finds_neighbours():
    rows = [("smith", 1990, f"Paper number {i} on things") for i in range(clusters.BIG_BLOCK + 100)]
    rows.append(("smith", 1990, "Paper number 7 on thnigs"))
    db = _db(rows)
    assert clusters.find(db) == [[8, len(rows)]]


def test_canonical_prefers_confidence_then_fields_then_first():
    db = _connect(":memory:")
    for seq, conf, nf in [(1, 0.5, 3), (2, 0.9, 2), (3, 0.9, 4), (4, 0.9, 4)]:
        db.execute("INSERT INTO keys VALUES (?,?,?,?,?,?,?,?,?,?,?,?,?)",
                   (seq, "a", 1, "t", "t", "", conf, nf, 0, 0, 0, 0, ""))
    assert clusters.canonical(db, [1, 2, 3, 4]) == 3


def test_identifier_keys_ignore_invalid_and_arxiv_versions():
    ref = Reference(authors=(Name(family="Waerden", particle="van der"),),
                    identifiers=(Identifier("arxiv", "1203.4567v2"), Identifier("doi", "10.1/X"),
                                 Identifier("doi", "10,1/bad", valid=False), Identifier("issn", "0097-3165")))
    assert keys.identifier_keys(ref) == ["arxiv:1203.4567", "doi:10.1/x"]
    assert keys.author_key(ref) == "waerden"
    assert keys.fold("Göttingen – Erdős") == "gottingen erdos"


def test_an_undated_line_never_bridges_two_years():
    # the undated line is the only link between the 1987 and the 1990 paper
    db = _db([("penhallow", 1987, "Asymptotics of plane partitions"),
              ("penhallow", None, "Asymptotics of plane partitions"),
              ("penhallow", 1990, "Asymptotics of plane partitions"),
              ("penhallow", None, "Asymptotics of plane partitons"),      # typo, also undated
              ("penhallow", 1990, "Asymptotics of plane partitions")])
    # undated 2 and 4 are one group; it joins one dated group (the tie goes to the
    # earlier record), never both
    assert clusters.find(db) == [[1, 2, 4], [3, 5]]


def test_undated_line_prefers_the_closer_title():
    db = _db([("wendlow", 1999, "Refined counting of Motzkin paths"),
              ("wendlow", 2004, "Refined counting of Motzkin path"),
              ("wendlow", None, "Refined counting of Motzkin path")])
    assert clusters.find(db) == [[2, 3]]


def test_shared_identifier_overrides_years_but_blocks_further_undated_merges():
    db = _db([("ashgrove", 1970, "Necklaces and bracelets"),
              ("ashgrove", 1971, "Necklaces and bracelets"),
              ("ashgrove", None, "Necklaces and bracelets")],
             ids=[(1, "mr:123"), (2, "mr:123")])
    # 1 and 2 share an MR number (exact evidence, typo in a year); the group now has two
    # known years, so the undated line is not added on title evidence alone
    assert clusters.find(db) == [[1, 2]]


def test_forest_guard():
    from array import array

    forest = clusters.Forest(array("i", [clusters._NO_YEAR, 1980, clusters._NO_YEAR, 1981]))
    assert forest.union(1, 2)
    assert not forest.union(2, 3)           # would mix 1980 and 1981
    assert forest.union(2, 3, guarded=False)
    assert forest.find(3) == forest.find(1) == 1


def test_windowed_block_of_identical_titles_stays_linear():
    # many records with one title collapse into one cell per year before any comparison
    rows = [("smith", 1990 + i % 3, "Tables of combinatorial numbers") for i in range(3000)]
    assert clusters.find(db := _db(rows)) == [list(range(1, 3001, 3)), list(range(2, 3001, 3)),
                                             list(range(3, 3001, 3))]
    db.close()


def test_long_identical_title_and_garbled_author_need_the_same_place():
    # A collection reuses titles: the same long title and year by different people is two
    # works unless the citations also agree on where: the same volume and first page.
    title = "A combinatorial interpretation of Bell numbers modulo primes"
    db = _db([("tillinghast", 1994, title, "31|212"),
              ("tllnghast", 1994, title, "31|212"),      # author key garbled beyond ratio 70
              ("xanthopoulos", 1994, title, "58|17"),    # another work, same title and year
              ("winterbourne", 1994, title, ""),         # nothing to compare: not merged
              ("ystradgynlais", 1994, title, "31|640"),  # same volume, another first page
              ("zoltanovich", 1994, title, "31|")])      # a volume alone is not enough
    assert clusters.find(db) == [[1, 2]]


def test_place_agreement_rules():
    def place(*locators):
        p = clusters._Place()
        for loc in locators:
            p.add(loc)
        return p

    same = clusters._same_place
    assert same(place("12|101"), place("12|101"))
    assert same(place("12|101", "12|"), place("12|101"))   # one citation without pages: the cell still knows
    assert same(place("12|101", "13|101"), place("13|101"))
    assert not same(place("12|"), place("12|101"))         # first page unknown on one side
    assert not same(place("|101"), place("7|101"))         # volume unknown on one side
    assert not same(place("12|101"), place("12|102"))      # first pages differ
    assert not same(place(), place("12|101")) and not same(None, place("12|101"))


def test_locator_key():
    from normform.model import Pages

    ref = Reference(title="t", volume="XII", pages=Pages(first="101", last="120"))
    assert keys.locator(ref) == "xii|101"
    assert keys.locator(Reference(title="t", pages=Pages(article="e17"))) == "|e17"
    assert keys.locator(Reference(title="t")) == ""
