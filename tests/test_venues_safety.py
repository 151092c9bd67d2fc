"""QA findings on matching: vetoes, author evidence, fill-only enrichment, skipped library entries.

All records are invented (QSEM scenario); journal names are real facts.
"""

from __future__ import annotations

import json

from normform.cli import main
from normform.model import Date, Identifier, Kind, Name, Pages, Provenance, Reference
from normform.venues.match import AuthorityMatcher, enrich_report, hard_conflicts

LINE = "E. N. Marrowfeld, A note on integer partitions, Proc. Amer. Math. Soc. 24 (1949), 465-504."


def _rec(title, names, year, venue, volume, pages, key=None, doi=None, raw=None):
    return Reference(
        kind=Kind.ARTICLE, title=title,
        authors=tuple(Name(family=f, given=g) for g, f in names),
        date=Date(year=year), container_title=venue, volume=volume,
        pages=Pages(first=pages[0], last=pages[1]), key=key,
        identifiers=(Identifier("doi", doi),) if doi else (),
        provenance=Provenance(raw=raw) if raw else None)


OTHER = _rec("A note on integer partitions", [("Edwin", "Marrowfeld"), ("Lydia", "Quarrington")], 1972,
             "Duke Mathematical Journal", "53", ("429", "450"), key="mq72", doi="10.9999/qsem.72")
QUERY = _rec("A note on integer partitions", [("E. N.", "Marrowfeld")], 1949,
             "Proc. Amer. Math. Soc.", "24", ("465", "504"), raw=LINE)


def test_two_hard_conflicts_veto_even_a_high_score():
    # a low threshold so that the score alone would accept the pair
    r = AuthorityMatcher([OTHER], threshold=0.5).match(QUERY)
    assert r.score >= 0.5 and not r.matched and r.rejected
    assert r.reference is QUERY                       # nothing replaced
    assert {c.field for c in r.conflicts} == {"year", "volume", "pages"}
    assert "rejected" in r.notes[0]


def test_one_hard_conflict_does_not_veto():
    same = OTHER.replace(date=Date(year=1949), volume="24")     # only the pages differ
    r = AuthorityMatcher([same], threshold=0.5).match(QUERY)
    assert r.matched and not r.rejected
    assert [c.field for c in r.conflicts] == ["pages"]


def test_vetoed_best_falls_back_to_a_consistent_candidate():
    right = _rec("A note on integer partitions", [("Edwin N.", "Marrowfeld")], 1949,
                 "Proceedings of the American Mathematical Society", "24", ("465", "504"), key="m49")
    r = AuthorityMatcher([OTHER, right], threshold=0.5).match(QUERY)
    assert r.matched and r.record.key == "m49"


def test_author_count_and_initials_lower_the_author_score():
    m = AuthorityMatcher([OTHER])
    one = dict(m.match(QUERY).field_scores)["authors"]
    both = dict(m.match(QUERY.replace(authors=OTHER.authors)).field_scores)["authors"]
    assert both == 1.0 and one < 1.0                  # fewer names, no "et al.": weaker evidence
    etal = QUERY.replace(provenance=Provenance(raw=LINE.replace("Marrowfeld,", "Marrowfeld et al.,")))
    assert dict(m.match(etal).field_scores)["authors"] == 1.0
    other_person = QUERY.replace(authors=(Name(family="Marrowfeld", given="T."),) + OTHER.authors[1:])
    assert dict(m.match(other_person).field_scores)["authors"] < 1.0


def test_qa_line_against_other_paper_does_not_match_at_default_threshold(tmp_path):
    lib = tmp_path / "lib.bib"
    lib.write_text("@article{mq72, author = {Marrowfeld, Edwin and Quarrington, Lydia},\n"
                   "  title = {A note on integer partitions}, journal = {Duke Mathematical Journal},\n"
                   "  volume = {53}, year = {1972}, pages = {429--450}}\n", "utf-8")
    q = tmp_path / "q.txt"
    q.write_text(LINE + "\n", "utf-8")
    out = tmp_path / "out.jsonl"
    main(["match", str(q), "--against", str(lib), "-o", str(out)])
    row = json.loads(out.read_text("utf-8"))
    assert not row["matched"]
    assert row["record"]["volume"] == "24" and row["record"]["container-title"] == "Proc. Amer. Math. Soc."


def test_enrich_fills_only_missing_fields_and_reports_the_rest():
    line = QUERY.replace(pages=None, date=Date(year=1950))
    ref, supplied, kept = enrich_report(line, OTHER.replace(date=Date(year=1949), volume="24"))
    assert ref.pages == OTHER.pages and "pages" in supplied          # missing: filled
    assert ref.authors == QUERY.authors and "authors" not in supplied  # present: kept
    assert ref.year == 1950 and ref.container_title == "Proc. Amer. Math. Soc."
    assert {c.field for c in kept} >= {"authors", "year", "container_title"}
    assert ref.ident("doi").value == "10.9999/qsem.72"


def test_abbreviated_venue_takes_the_full_title_and_says_so():
    lib = OTHER.replace(container_title="Proceedings of the American Mathematical Society")
    ref, supplied, kept = enrich_report(QUERY, lib)
    assert ref.container_title == "Proceedings of the American Mathematical Society"
    assert "container_title" in supplied and "container_title" not in {c.field for c in kept}


def test_hard_conflicts_ignore_a_cited_page_and_a_year_off_by_one():
    a = QUERY.replace(date=Date(year=1950), pages=Pages(first="465", last=None))
    assert hard_conflicts(a, QUERY) == ()


BAD_LIB = """@article{ok1,
  author = {Marrowfeld, Edwin and Pell, Bea},
  title = {A note on integer partitions},
  journal = {Proceedings of the American Mathematical Society},
  volume = {24}, year = {1949}, pages = {465--504},
}
@article{broken,
  author = {Pell, Bea}
  title = {Broken entry},
}
@article{ok2, author = {Quill, Ada}, title = {Ordered trees}, journal = {Discrete Mathematics}, year = {2001}}
"""


def test_malformed_library_entry_is_skipped_with_a_warning(tmp_path, capsys):
    lib = tmp_path / "lib.bib"
    lib.write_text(BAD_LIB, "utf-8")
    q = tmp_path / "q.txt"
    q.write_text(LINE + "\nA. Quill, Ordered trees, Discrete Math. (2001).\n", "utf-8")
    rc = main(["match", str(q), "--against", str(lib)])
    cap = capsys.readouterr()
    rows = [json.loads(x) for x in cap.out.splitlines()]
    assert rc == 1 and len(rows) == 2                       # output complete, data error reported
    assert [r["library_key"] for r in rows] == ["ok1", "ok2"]
    assert f"{lib}:9:" in cap.err and "warning" in cap.err and "1 malformed library entries skipped" in cap.err


def test_malformed_jsonl_library_line_is_skipped(tmp_path, capsys):
    lib = tmp_path / "lib.jsonl"
    good = {"id": "ok2", "type": "article-journal", "title": "Ordered trees",
            "author": [{"family": "Quill", "given": "Ada"}], "container-title": "Discrete Mathematics",
            "issued": {"date-parts": [[2001]]}}
    lib.write_text("{oops\n" + json.dumps(good) + "\n", "utf-8")
    q = tmp_path / "q.txt"
    q.write_text("A. Quill, Ordered trees, Discrete Math. (2001).\n", "utf-8")
    rc = main(["match", str(q), "--against", str(lib)])
    cap = capsys.readouterr()
    assert rc == 1 and json.loads(cap.out)["library_key"] == "ok2"
    assert f"{lib}:1:" in cap.err
