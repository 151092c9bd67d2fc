"""``normform venues``: rewriting venue fields of JSON Lines and BibTeX, house tables."""

from __future__ import annotations

import json
import re

import pytest

from normform.cli import main
from normform.venues.bibfields import BibScanError, fields
from normform.venues.errors import VenueTableError
from normform.venues.style import VenueStyle
from normform.venues.table import load_table, parse_table, shipped_table

LINES = [
    {"id": "Q000123-1", "type": "article-journal", "title": "Counting lattice paths in a strip",
     "container-title": "Trans. Amer. Math. Soc.", "volume": "312"},
    {"id": "Q000123-2", "type": "article-journal", "title": "Lattice paths again",
     "container-title": "Transactions of the American Mathematical Society"},
    {"id": "Q000124-1", "type": "article-journal", "title": "Sums of binomial coefficients",
     "container-title": "Bulletin of the Quillfeather Society for Enumerative Mathematics"},
    {"id": "Q000124-2", "type": "article-journal", "title": "More sums",
     "container-title": "Bull. Quillfeather Soc. Enumer. Math."},
    {"id": "Q000125-1", "type": "article-journal", "title": "A partition identity",
     "container-title": "J. Phys. A"},
]

BIB = r"""% QSEM catalogue bibliography -- kept byte for byte
@string{jcta = "J. Combin. Theory Ser. A"}
@article{marrowby1989,
  author  = {Marrowby, Edwina},
  title   = {Counting lattice paths in a strip},
  journal = {Journal f{\"u}r die reine und angewandte Mathematik},
  year    = 1989,
}

@article{tallowmere2001, title="Ordered trees", journal = "Math. Ann.", year={2001}}
@article{k3, title="y", journal = jcta}
"""


def _write_jsonl(path, records):
    path.write_text("".join(json.dumps(r) + "\n" for r in records), "utf-8")


def test_shipped_table_size_and_issns():
    from stdnum import issn  # python-stdnum: ISSN check digits (the outside source)

    table = shipped_table()
    assert len(table) >= 300
    with_issn = [v for v in table if v.issns]
    assert len(with_issn) >= 200
    assert all(issn.is_valid(i) for v in with_issn for i in v.issns)


def test_jsonl_abbreviated_with_counts(tmp_path, capsys):
    src, out = tmp_path / "refs.jsonl", tmp_path / "out.jsonl"
    _write_jsonl(src, LINES)
    rc = main(["venues", str(src), "--to", "abbreviated", "-o", str(out), "--report", str(tmp_path / "r.json")])
    assert rc == 1                       # J. Phys. A is ambiguous: a finding
    got = [json.loads(line)["container-title"] for line in out.read_text().splitlines()]
    assert got == ["Trans. Am. Math. Soc.", "Trans. Am. Math. Soc.", "Bull. Quillfeather Soc. Enumer. Math.",
                   "Bull. Quillfeather Soc. Enumer. Math.", "J. Phys. A"]
    report = json.loads((tmp_path / "r.json").read_text())
    assert report["records"] == 5 and report["rewritten"] == 3
    maps = {(m["from"], m["to"]): m["count"] for m in report["mappings"]}
    assert maps[("Trans. Amer. Math. Soc.", "Trans. Am. Math. Soc.")] == 1
    assert report["left_as_written"][0]["why"] == "ambiguous"
    assert src.read_text() == "".join(json.dumps(r) + "\n" for r in LINES)   # input untouched


def test_jsonl_full_uses_the_collection(tmp_path, capsys):
    src = tmp_path / "refs.jsonl"
    _write_jsonl(src, LINES[:4])
    assert main(["venues", str(src), "--to", "full"]) == 0
    captured = capsys.readouterr()
    got = [json.loads(line)["container-title"] for line in captured.out.splitlines()]
    assert got[0] == got[1] == "Transactions of the American Mathematical Society"
    assert got[3] == "Bulletin of the Quillfeather Society for Enumerative Mathematics"
    assert "[collection]" in captured.err and "2 rewritten" in captured.err


def test_bad_json_line_is_kept_and_reported(tmp_path, capsys):
    src = tmp_path / "refs.jsonl"
    src.write_text(json.dumps(LINES[0]) + "\n{not json\n", "utf-8")
    assert main(["venues", str(src), "--to", "full"]) == 1
    captured = capsys.readouterr()
    assert captured.out.splitlines()[1] == "{not json"
    assert "refs.jsonl:2:2" in captured.err


def test_bibtex_rewrites_only_journal_values(tmp_path, capsys):
    src, out = tmp_path / "lib.bib", tmp_path / "out.bib"
    src.write_text(BIB, "utf-8")
    assert main(["venues", str(src), "--to", "abbreviated", "-o", str(out)]) == 0
    text = out.read_text()
    assert text == BIB.replace(r'{Journal f{\"u}r die reine und angewandte Mathematik}', "{J. Reine Angew. Math.}")
    assert main(["venues", str(src), "--to", "full", "-o", str(out)]) == 0
    assert 'journal = {Mathematische Annalen}' in out.read_text()
    assert "macro" in capsys.readouterr().err      # `journal = jcta` is noted, not rewritten


def test_never_overwrites_input(tmp_path):
    src = tmp_path / "refs.jsonl"
    _write_jsonl(src, LINES)
    assert main(["venues", str(src), "--to", "full", "-o", str(src)]) == 2


def test_house_table_overrides(tmp_path, capsys):
    house = tmp_path / "house.tsv"
    house.write_text("# QSEM house style\nfull\tabbreviation\n"
                     "Transactions of the American Mathematical Society\tTAMS\n", "utf-8")
    src = tmp_path / "refs.jsonl"
    _write_jsonl(src, LINES[:2])
    assert main(["venues", str(src), "--to", "abbreviated", "--table", str(house)]) == 0
    got = [json.loads(line)["container-title"] for line in capsys.readouterr().out.splitlines()]
    # the shipped table recognises "Trans. Amer. Math. Soc."; the house row decides its form
    assert got == ["TAMS", "TAMS"]


def test_house_table_from_pyproject(tmp_path, capsys, monkeypatch):
    (tmp_path / "house.json").write_text(json.dumps({"Mathematische Annalen": "Math. Annalen"}), "utf-8")
    (tmp_path / "pyproject.toml").write_text('[tool.normform.venues]\ntable = "house.json"\n', "utf-8")
    src = tmp_path / "refs.jsonl"
    _write_jsonl(src, [{"id": "x", "type": "article-journal", "container-title": "Mathematische Annalen"}])
    monkeypatch.chdir(tmp_path)
    assert main(["venues", str(src), "--to", "abbreviated"]) == 0
    assert json.loads(capsys.readouterr().out)["container-title"] == "Math. Annalen"


def test_bad_table_has_position(tmp_path):
    bad = tmp_path / "house.tsv"
    bad.write_text("full\tabbreviation\nAnnals of Quillfeather\t\n", "utf-8")
    with pytest.raises(VenueTableError) as info:
        load_table(bad)
    assert info.value.line == 2 and "abbreviation" in str(info.value)
    with pytest.raises(VenueTableError) as info:
        parse_table("name\tshort\n")
    assert info.value.line == 1
    with pytest.raises(VenueTableError) as info:
        parse_table('[{"full": "A"', fmt="json")
    assert info.value.line == 1


def test_bibtex_scanner_positions():
    spans = list(fields(BIB))
    journal = [f for f in spans if f.name == "journal"]
    assert [f.entry_key for f in journal] == ["marrowby1989", "tallowmere2001", "k3"]
    assert journal[0].line == 6 and not journal[2].delimited
    with pytest.raises(BibScanError) as info:
        list(fields("@article{a,\n  title = {open\n"))
    assert info.value.line == 2


def test_former_title_is_not_replaced_by_the_new_one():
    style = VenueStyle()
    r = style.abbreviate("Journal of Combinatorial Theory")
    assert r.result == "J. Comb. Theory" and r.how == "former title"


QSEM_BIB = r"""@article{marrowby1989,
  author  = {Marrowby, Edwina and Tallowmere, Jonas},
  title   = {Counting lattice paths in a strip},
  journal = {Transactions of the American Mathematical Society},
  volume  = {312},
  pages   = {1--20},
  year    = {1989},
  doi     = {10.9999/qsem.1989.1},
}
@book{fenwick2001,
  author = {Fenwick, Odile},
  title = {Ordered trees and {C}atalan numbers},
  publisher = {Quillfeather Press},
  year = {2001},
}
"""

QSEM_LINES = """E. Marrowby and J. Tallowmere, Counting latice paths in a strip, Trans. Amer. Math. Soc. 312 (1990), 1-20.
O. Fenwick. Ordered trees and Catalan numbers. Quillfeather Press, 2001.
A. Quenby, Spectral gaps of random regular graphs, J. Graph Theory 5 (2011) 1-9.
"""


def test_match_command_jsonl(tmp_path, capsys):
    (tmp_path / "lib.bib").write_text(QSEM_BIB, "utf-8")
    (tmp_path / "lines.txt").write_text(QSEM_LINES, "utf-8")
    rc = main(["match", str(tmp_path / "lines.txt"), "--against", str(tmp_path / "lib.bib")])
    assert rc == 1                                   # line 1 has a year conflict: a finding
    captured = capsys.readouterr()
    out = [json.loads(line) for line in captured.out.splitlines()]
    assert [o["library_key"] for o in out[:2]] == ["marrowby1989", "fenwick2001"]
    assert out[0]["matched"] and out[0]["record"]["DOI"] == "10.9999/qsem.1989.1"
    assert out[0]["record"]["container-title"] == "Transactions of the American Mathematical Society"
    assert out[0]["conflicts"] == [{"field": "year", "line": "1990", "library": "1989"}]
    assert not out[2]["matched"] and out[2]["record"]["title"] == "Spectral gaps of random regular graphs"
    assert "2 matched" in captured.err


def test_match_command_bibtex_and_threshold(tmp_path, capsys):
    (tmp_path / "lib.bib").write_text(QSEM_BIB, "utf-8")
    (tmp_path / "lines.txt").write_text(QSEM_LINES, "utf-8")
    out = tmp_path / "out.bib"
    main(["match", str(tmp_path / "lines.txt"), "--against", str(tmp_path / "lib.bib"), "--to", "bibtex", "-o", str(out)])
    text = out.read_text()
    assert len(re.findall(r"^@", text, re.M)) == 3 and "10.9999/qsem.1989.1" in text   # every line kept, line 1 enriched
    assert main(["match", str(tmp_path / "lines.txt"), "--against", str(tmp_path / "lib.bib"), "--threshold", "2"]) == 2
    assert main(["match", str(tmp_path / "lines.txt"), "--against", str(tmp_path / "missing.bib")]) == 2


def test_csl_json_array_input(tmp_path, capsys):
    src = tmp_path / "refs.json"
    src.write_text(json.dumps(LINES[:2], indent=1), "utf-8")
    assert main(["venues", str(src), "--to", "abbreviated"]) == 0
    items = json.loads(capsys.readouterr().out)
    assert [i["container-title"] for i in items] == ["Trans. Am. Math. Soc.", "Trans. Am. Math. Soc."]
