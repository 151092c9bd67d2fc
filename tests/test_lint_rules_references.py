"""Reference rules: each fires on a defect and stays quiet without it.

Check digits of the test identifiers were computed with python-stdnum
(``stdnum.ean.calc_check_digit``, ``stdnum.issn.calc_check_digit``).
"""

from __future__ import annotations

import pytest

from lint_support import BASE, findings, need, slugs
from normform.lint import services
from normform.model import Date, Kind, Name, Pages, Provenance, Reference
from normform.lint.settings import LintSettings


def refs(*lines: str) -> str:
    body = ", ".join('"' + line.replace('"', '\\"') + '"' for line in lines)
    return BASE + f"references = [{body}]\n"


@pytest.fixture
def fake_parser(monkeypatch):
    """A stand-in reference parser: the record and confidence are set by each test."""
    records: dict[str, Reference] = {}
    monkeypatch.setattr(services, "parse_reference", lambda text: records[text])
    return records


ARTICLE = Reference(kind=Kind.ARTICLE, authors=(Name(family="Quillby", given="H."),), title="Lattice paths",
                    container_title="Fibonacci Quart.", volume="41", date=Date(year=2003),
                    pages=Pages(first="112", last="130"), provenance=Provenance(confidence=0.95))


def test_reference_unparsed_uses_confidence(fake_parser):
    fake_parser["junk"] = Reference(provenance=Provenance(confidence=0.1))
    fake_parser["good"] = ARTICLE
    (f,) = findings(refs("good", "junk"), select=["reference-unparsed"])
    assert f.value_path == ("references", 1) and "0.10" in f.message
    assert slugs(refs("junk"), "reference-unparsed", settings=LintSettings(min_confidence=0.05)) == []


def test_reference_unparsed_real_parser_on_noise():
    need("normform.refs.api", "parse_reference")
    assert slugs(refs("qqq zzz !!! ?? ..."), "reference-unparsed") == ["reference-unparsed"]


def test_reference_incomplete_structured():
    table = BASE + ('references = [{ kind = "article", authors = ["Quillby, H."], title = "Lattice paths", '
                    'container_title = "Fibonacci Quart." }]\n')
    (f,) = findings(table, select=["reference-incomplete"])
    assert "year, pages" in f.message
    complete = table.replace('container_title = "Fibonacci Quart."',
                             'container_title = "Fibonacci Quart.", year = 2003, pages = "112-130"')
    assert slugs(complete, "reference-incomplete") == []
    # without a kind, a journal with a volume is taken as an article
    untyped = BASE + 'references = [{ title = "T", container_title = "Discrete Math.", volume = "3" }]\n'
    assert slugs(untyped, "reference-incomplete") == ["reference-incomplete"]
    assert slugs(BASE + 'references = [{ title = "T", publisher = "QSEM Press", year = 2001 }]\n',
                 "reference-incomplete") == []


def test_reference_incomplete_parsed_line(fake_parser):
    fake_parser["line"] = ARTICLE.replace(pages=None, container_title=None)
    (f,) = findings(refs("line"), select=["reference-incomplete"])
    assert "journal, pages" in f.message
    fake_parser["line"] = ARTICLE
    assert slugs(refs("line"), "reference-incomplete") == []


@pytest.mark.parametrize("slug, bad, good", [
    ("doi-invalid", "doi:10.5555/", "doi:10.5555/qsem.2004.0045"),
    ("isbn-check-digit", "ISBN 978-1-85233-001-8", "ISBN 978-1-85233-001-9"),
    ("issn-check-digit", "ISSN 1530-7639", "ISSN 1530-7638"),
    ("arxiv-malformed", "arXiv:1903.123456", "arXiv:1903.12345"),
])
def test_identifier_rules(slug, bad, good):
    need("normform.ids.find")
    line = "H. Quillby, Lattice paths, Fibonacci Quart. 41 (2003), 112-130. "
    text = refs(line + bad)
    (f,) = findings(text, select=[slug])
    value_start = text.splitlines()[4].index(bad)
    assert f.line == 5 and value_start + 1 <= f.column <= value_start + len(bad) + 1
    assert slugs(refs(line + good), slug) == []


def test_identifier_rules_on_structured_fields():
    need("normform.ids")
    text = BASE + 'references = [{ title = "Book", isbn = "978-1-85233-001-8", doi = "10.5555" }]\n'
    assert sorted(slugs(text, "isbn-check-digit", "doi-invalid")) == ["doi-invalid", "isbn-check-digit"]
    ok = BASE + 'references = [{ title = "Book", isbn = "978-1-85233-001-9", doi = "10.5555/x" }]\n'
    assert slugs(ok, "isbn-check-digit", "doi-invalid") == []


def test_reference_duplicate_by_doi_in_different_forms(fake_parser):
    need("normform.ids")
    a = "H. Quillby, Lattice paths, Fibonacci Quart. 41 (2003), 112-130. doi:10.5555/QSEM.1"
    b = "Quillby, H.: Lattice paths. Fibonacci Quart. 41, 112-130 (2003). https://doi.org/10.5555/qsem.1"
    from normform.model import Identifier

    fake_parser[a] = ARTICLE.replace(identifiers=(Identifier("doi", "10.5555/QSEM.1"),))
    fake_parser[b] = ARTICLE.replace(identifiers=(Identifier("doi", "10.5555/qsem.1"),))
    (f,) = findings(refs(a, b), select=["reference-duplicate"])
    assert f.value_path == ("references", 1) and "line 5" in f.message
    fake_parser["other"] = ARTICLE.replace(title="Another paper")
    assert slugs(refs(a, "other"), "reference-duplicate") == []


class _Style:
    def format(self, ref):
        return f"{ref.authors[0].given} {ref.authors[0].family}, {ref.title}, {ref.container_title} " \
               f"{ref.volume} ({ref.year}), {ref.pages.first}–{ref.pages.last}."


def test_reference_house_style_fix_only_when_nothing_is_lost(fake_parser, monkeypatch):
    monkeypatch.setattr(services, "house_style", lambda: _Style())
    styled = "H. Quillby, Lattice paths, Fibonacci Quart. 41 (2003), 112–130."
    fake_parser["Quillby H, Lattice paths, Fib. Q. 41, 2003, 112-130"] = ARTICLE
    fake_parser[styled] = ARTICLE
    (f,) = findings(refs("Quillby H, Lattice paths, Fib. Q. 41, 2003, 112-130"), select=["reference-house-style"])
    assert f.fix is not None and f.fix.edits[0].text == f'"{styled}"'
    assert slugs(refs(styled), "reference-house-style") == []
    # when the restyled line reads back differently, the finding has no fix
    fake_parser[styled] = ARTICLE.replace(volume="14")
    (f,) = findings(refs("Quillby H, Lattice paths, Fib. Q. 41, 2003, 112-130"), select=["reference-house-style"])
    assert f.fix is None


def test_reference_house_style_real_formatter():
    need("normform.export.text", "HouseStyle")
    need("normform.refs.api", "parse_reference")
    line = "H. Quillby, Lattice paths below the diagonal, Fibonacci Quart. 41 (2003), 112–130."
    ref = services.parse_reference(line)
    styled = services.house_style().format(ref)
    got = slugs(refs(line), "reference-house-style")
    low = (ref.confidence or 0) < LintSettings().style_confidence
    assert got == ([] if styled == line or low else ["reference-house-style"])


def test_reference_duplicate_real_parser_by_doi():
    need("normform.refs.api", "parse_reference")
    need("normform.ids.find")
    a = "H. Quillby, Lattice paths, Fibonacci Quart. 41 (2003), 112-130. doi:10.5555/QSEM.1"
    b = "Quillby, H.: Lattice paths. Fibonacci Quart. 41, 112-130 (2003). https://doi.org/10.5555/qsem.1"
    (f,) = findings(refs(a, b), select=["reference-duplicate"])
    assert f.value_path == ("references", 1)
    c = "H. Quillby, Lattice paths, Fibonacci Quart. 41 (2003), 112-130. doi:10.5555/qsem.2"
    assert slugs(refs(a, c), "reference-duplicate") == []
