"""BibTeX reader features, exporters' conventions, and the convert command."""

import json
import subprocess
import sys

import pytest

from normform.export.bibtex import BibtexExporter
from normform.export.registry import get_exporter
from normform.export.text import HouseStyle
from normform.ids import make
from normform.model import Date, Kind, Name, Pages, Reference
from normform.readers.bibtex import read_bibtex

SAMPLE = r"""@string{qsem = "Quillfeather Society"}
@article{quill2001,
  author = {Quill, Ada and van der Feather, B. L. and {The Quillfeather Society}},
  title = {On the {Riemann} hypothesis for {GL}(n) and Erd{\H o}s},
  journal = qsem # " Bulletin",
  year = 2001, month = mar, volume = {12}, number = 3, pages = {1--20},
  doi = {10.1000/182}, mrnumber = {1234567 (2006j:05214)}, zbl = {1127.11002},
  eprint = {1301.3569}, archiveprefix = {arXiv}, primaryclass = {math.CO},
  isbn = {0-306-40615-3}
}
@inproceedings{child, author = {Doe, Jo}, title = {A part}, crossref = {proc}, pages = {3-4}}
@proceedings{proc, title = {Proceedings of the {QSEM} Meeting}, year = 1999, publisher = {QSEM Press}}
@book{broken, title = {Missing brace,
  year = 1990
@misc{after, title = {Still read}}
"""


def test_reader_macros_months_crossref_latex_and_hints():
    result = read_bibtex(SAMPLE, "sample.bib")
    keys = [r.key for r in result.records]
    assert keys == ["quill2001", "child", "proc", "after"]
    art = result.records[0]
    assert art.container_title == "Quillfeather Society Bulletin"     # @string and #
    assert art.date == Date(year=2001, month=3)                        # month macro
    assert art.title == "On the Riemann hypothesis for GL(n) and Erdős"  # TeX accent to Unicode
    assert "Riemann" in art.title_protected and "GL(n)" in art.title_protected
    assert art.authors[1] == Name(family="Feather", given="B. L.", particle="van der")
    assert art.authors[2] == Name(literal="The Quillfeather Society")
    assert art.ident("mr").detail == "2006j:05214"
    assert art.ident("arxiv").detail == "math.CO"
    assert art.ident("isbn").valid is False                            # bad check digit kept, flagged
    child = result.records[1]
    assert child.container_title == "Proceedings of the QSEM Meeting"  # crossref: title -> booktitle
    assert child.publisher == "QSEM Press" and child.date.year == 1999


def test_reader_reports_malformed_entry_with_position_and_keeps_the_rest():
    result = read_bibtex(SAMPLE, "sample.bib")
    (err,) = result.errors
    assert (err.path, err.line, err.column) == ("sample.bib", 13, 23)
    assert "'}'" in err.expected
    assert err.excerpt().splitlines()[0].startswith("@book{broken")


def test_reader_reports_missing_comma_and_duplicates():
    text = "@article{a, title = {X} year = 2000}\n@misc{b, title={One}}\n@misc{b, title={Two}}\n"
    result = read_bibtex(text, "d.bib")
    messages = [str(e) for e in result.errors]
    assert any("d.bib:1:" in m and "expected" in m for m in messages)
    assert any("duplicate entry key 'b'" in m for m in messages)
    assert [r.title for r in result.records] == ["One"]


def test_preamble_survives_bibtex_to_bibtex(tmp_path):
    src = tmp_path / "p.bib"
    src.write_text('@preamble{"\\newcommand{\\noop}[1]{}"}\n@misc{a, title={A}}\n', "utf-8")
    out = _run(str(src), "--to", "bibtex").stdout
    assert out.startswith('@preamble{"\\newcommand{\\noop}[1]{}"}')
    assert read_bibtex(out).preamble == ["\\newcommand{\\noop}[1]{}"]


def test_unreadable_name_list_skips_only_that_entry():
    result = read_bibtex("@misc{a, author={A, B, C, D}, title={x}}\n@misc{b, title={ok}}\n", "n.bib")
    assert [r.key for r in result.records] == ["b"]
    (err,) = result.errors
    assert (err.line, err.column) == (1, 1) and "Too many commas" in str(err)


def test_stable_unique_keys_and_field_order():
    ref = Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="Ada"),), title="The Hooks of Counting",
                    container_title="Q. J.", date=Date(year=2001), pages=Pages("1", "9"))
    text = BibtexExporter().dumps([ref, ref, ref])
    assert [line for line in text.splitlines() if line.startswith("@")] == [
        "@article{quill2001hooks,", "@article{quill2001hooksb,", "@article{quill2001hooksc,"]
    fields = [line.split("=")[0].strip() for line in text.split("\n\n")[0].splitlines()[1:-1]]
    assert fields == ["author", "title", "journal", "pages", "year"]


def test_latex_output_and_protection():
    ref = Reference(kind=Kind.BOOK, authors=(Name(family="Öztürk", given="Ayşe"),),
                    title="Counting with the McKay correspondence & more", date=Date(year=2020))
    uni = BibtexExporter().entry(ref)
    tex = BibtexExporter(unicode=False).entry(ref)
    assert "Öztürk, Ayşe" in uni and "{McKay}" in uni and "\\&" in uni
    assert tex.isascii() and '{\\"O}zt{\\"u}rk' in tex


def test_identifier_fields():
    ref = Reference(kind=Kind.ARTICLE, title="X", key="k", identifiers=(
        make("arxiv", "1006.0367v3", detail="math.CO"), make("mr", "MR1234567 (2006j:05214)"),
        make("zbl", "Zbl 1127.11002")))
    text = BibtexExporter().entry(ref)
    for line in ("eprint = {1006.0367v3}", "archiveprefix = {arXiv}", "primaryclass = {math.CO}",
                 "mrnumber = {1234567 (2006j:05214)}", "zbl = {1127.11002}"):
        assert line in text


def test_house_style_examples():
    ref = Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="Ada"),
                                                 Name(family="Feather", given="Bram Lukas", particle="van der")),
                    title="On the Riemann hypothesis", container_title="Quillfeather Soc. Bull.", volume="12",
                    issue="3", date=Date(year=2001), pages=Pages("1", "20"),
                    identifiers=(make("doi", "10.1000/182"), make("mr", "MR1234567")))
    assert HouseStyle().format(ref) == ("A. Quill and B. L. van der Feather, On the Riemann hypothesis, "
                                        "Quillfeather Soc. Bull. 12:3 (2001), 1-20. doi:10.1000/182; MR1234567")
    book = Reference(kind=Kind.BOOK, authors=(Name(family="Quill", given="Jean-Pierre"),), title="Lattice walks",
                     series="QSEM Lecture Notes", series_number="7", publisher="Quillfeather Press",
                     place="Quillton", date=Date(year=1999), edition="2",
                     pages=Pages(count="xii+240"), identifiers=(make("isbn", "0-306-40615-2"),))
    assert HouseStyle().format(book) == ("J.-P. Quill, Lattice walks, ed. 2, QSEM Lecture Notes 7, Quillfeather Press, "
                                         "Quillton, 1999, xii+240 pp. ISBN 0-306-40615-2")


def test_registry():
    assert get_exporter("bibtex").name == "bibtex"
    assert get_exporter("csl-json").name == "csl-json"
    assert isinstance(get_exporter("text"), HouseStyle)
    assert get_exporter("text", style="apa").name == "apa"
    with pytest.raises(KeyError):
        get_exporter("yaml")


def _run(*args, stdin=None):
    return subprocess.run([sys.executable, "-c", "import sys; from normform.cli import main; sys.exit(main())",
                           "convert", *args], input=stdin, capture_output=True, text=True)


def test_convert_command(tmp_path):
    bib = tmp_path / "in.bib"
    bib.write_text(SAMPLE, "utf-8")
    res = _run(str(bib), "--to", "csl-json")
    assert res.returncode == 1                                   # one malformed entry
    assert f"{bib}:13:23" in res.stderr and "expected '}'" in res.stderr
    assert [item["id"] for item in json.loads(res.stdout)] == ["quill2001", "child", "proc", "after"]
    assert json.loads(res.stdout)[0]["custom"]["mr"] == "1234567"
    out = tmp_path / "out.json"
    good = tmp_path / "good.bib"
    good.write_text("@misc{a, title={Alone}}\n", "utf-8")
    assert _run(str(good), "--to", "csl-json", "-o", str(out)).returncode == 0
    assert _run(str(out), "--to", "text").stdout == "Alone.\n"
    assert _run("-", "--to", "bibtex", stdin=out.read_text()).stdout.startswith("@misc{a,")
    res = _run(str(good), "--to", "bibtex", "-o", str(good))
    assert res.returncode == 2 and "refusing to overwrite" in res.stderr
    assert good.read_text() == "@misc{a, title={Alone}}\n"
    assert _run(str(good), "--to", "bibtex", "--style", "apa").returncode == 2
    assert _run(str(good), "--to", "text", "--style", "no-such-style").returncode == 2
    assert _run(str(tmp_path / "missing.bib"), "--to", "text").returncode == 2
    res = _run(str(good), "--to", "text", "--style", "american-mathematical-society-numeric")
    assert res.returncode == 0 and "Alone" in res.stdout


def test_demo_file_converts_cleanly_to_every_format():
    from pathlib import Path
    demo = Path(__file__).parent / "fixtures" / "foundation" / "qsem-demo.bib"
    for fmt in ("bibtex", "csl-json", "text"):
        res = _run(str(demo), "--to", fmt)
        assert res.returncode == 0 and res.stderr == "", res.stderr
    text = _run(str(demo), "--to", "text").stdout.splitlines()
    assert len(text) == 6
    assert text[4].startswith("T. Wren and H. de la Plume, Jr., Counting Motzkin paths by peaks, in: Proceedings")


def test_csljson_errors_have_positions_and_other_items_survive(tmp_path):
    from normform.readers.csljson import CslJsonError, read_csljson_all
    text = '[\n  {"id": "a", "type": "book", "title": "A"},\n  {"id": "b", "type": "book", "issued": {"date-parts": [["19x9"]]}},\n  3\n]'
    records, errors = read_csljson_all(text, "x.json")
    assert [r.key for r in records] == ["a"]
    assert [(e.line, e.column) for e in errors] == [(3, 3), (4, 3)]
    with pytest.raises(CslJsonError) as info:
        read_csljson_all('[{"id": "a"},\n {"id": }]', "y.json")
    assert (info.value.line, info.value.column) == (2, 9)
    bad = tmp_path / "x.json"
    bad.write_text(text, "utf-8")
    res = _run(str(bad), "--to", "text")
    assert res.returncode == 1 and res.stdout == "A.\n" and f"{bad}:3:3" in res.stderr


from hypothesis import given, settings, strategies as st  # noqa: E402

_BIBISH = st.lists(st.sampled_from(list('@{}(),="#%\\ \n\tabcxyzAB019-~$^_&\'') + [
    "@article{", "author = ", "title = {", " and ", "@string{", "crossref = ", "month = ", "year = "]),
    max_size=60).map("".join)


@settings(max_examples=150, deadline=None)
@given(_BIBISH)
def test_reader_never_crashes_on_garbage(text):
    result = read_bibtex(text, "g.bib")
    for err in result.errors:
        assert err.line >= 1 and err.column >= 1 and err.path == "g.bib"
