"""QA findings on ``normform venues``: broken BibTeX entries, book titles of chapters.

Invented QSEM records; journal names are real facts.
"""

from __future__ import annotations

import json

from normform.cli import main
from normform.venues.bibfields import fields

BROKEN = """@article{a1, author = {Quill, Ada}, title = {Ordered trees}, journal = {Discrete Mathematics}, year = {2001}}
@article{broken,
  author = {Pell, Bea}
  title = {Broken entry},
  journal = {Journal of Algebra},
}
@article{a2, title = {Trees again}, journal = {Journal of Number Theory}, year = {2003}}
"""


def test_broken_bibtex_entry_keeps_the_rest(tmp_path, capsys):
    src = tmp_path / "lib.bib"
    src.write_text(BROKEN, "utf-8")
    rc = main(["venues", str(src), "--to", "abbreviated"])
    cap = capsys.readouterr()
    assert rc == 1
    # every readable entry rewritten, the broken one passed through byte for byte
    assert "journal = {Discrete Math.}" in cap.out and "journal = {J. Number Theory}" in cap.out
    assert "  journal = {Journal of Algebra},\n" in cap.out
    assert cap.out.count("@article") == 3
    # positioned, with a readable expected list (the missing ',' after line 3's value)
    assert f"{src}:4:3:" in cap.err
    assert "expected ',' or '}'" in cap.err and ",, }" not in cap.err


def test_fields_reports_and_resumes_at_the_next_entry():
    errors = []
    found = list(fields(BROKEN, on_error=errors.append))
    assert [f.entry_key for f in found if f.name == "journal"] == ["a1", "a2"]
    assert len(errors) == 1 and (errors[0].line, errors[0].column) == (4, 3)
    assert errors[0].expected == ("',' or '}'",)


def test_chapter_book_title_is_not_abbreviated(tmp_path, capsys):
    rows = [
        {"id": "Q000130-1", "type": "chapter", "title": "Counting with series",
         "container-title": "An Introduction to Generating Functions"},
        {"id": "Q000130-2", "type": "paper-conference", "title": "Trees",
         "container-title": "Proceedings of the Quillfeather Conference on Enumeration"},
        {"id": "Q000130-3", "type": "article-journal", "title": "Lattice paths",
         "container-title": "Journal of Number Theory"},
    ]
    src = tmp_path / "refs.jsonl"
    src.write_text("".join(json.dumps(r) + "\n" for r in rows), "utf-8")
    assert main(["venues", str(src), "--to", "abbreviated"]) == 0
    cap = capsys.readouterr()
    out = [json.loads(x) for x in cap.out.splitlines()]
    assert out[0]["container-title"] == "An Introduction to Generating Functions"
    assert out[1]["container-title"] == rows[1]["container-title"]
    assert out[2]["container-title"] == "J. Number Theory"     # journal abbreviation, from memory
    assert "1 chapter record(s)" in cap.err


def test_csl_array_chapter_kept(tmp_path, capsys):
    rows = [{"id": "c", "type": "chapter", "container-title": "An Introduction to Generating Functions"},
            {"id": "j", "type": "article-journal", "container-title": "Journal of Number Theory"}]
    src = tmp_path / "refs.json"
    src.write_text(json.dumps(rows), "utf-8")
    assert main(["venues", str(src), "--to", "abbreviated", "--format", "jsonl"]) == 0
    out = json.loads(capsys.readouterr().out)
    assert [r["container-title"] for r in out] == ["An Introduction to Generating Functions", "J. Number Theory"]


def test_bibtex_incollection_booktitle_untouched(tmp_path, capsys):
    src = tmp_path / "b.bib"
    text = "@incollection{c1, title = {Chapter}, booktitle = {An Introduction to Generating Functions}, year = {2003}}\n"
    src.write_text(text, "utf-8")
    assert main(["venues", str(src), "--to", "abbreviated"]) == 0
    assert capsys.readouterr().out == text
