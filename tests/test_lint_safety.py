"""QA findings on lint: the house-style fix only when safe, a missing file, the public table converter.

Invented QSEM references.
"""

from __future__ import annotations

import pytest

from lint_support import BASE, findings, run_cli
from normform.lint import services
from normform.lint.rules.references import words_dropped
from normform.lint.settings import LintSettings
from normform.model import Date, Kind, Name, Pages, Provenance, Reference


def refs(*lines: str) -> str:
    body = ", ".join('"' + line.replace('"', '\\"') + '"' for line in lines)
    return BASE + f"references = [{body}]\n"


ARTICLE = Reference(kind=Kind.ARTICLE, authors=(Name(family="Quill", given="A."), Name(family="Pell", given="B.")),
                    title="Lattice paths in a strip", container_title="Fibonacci Quart.", volume="41",
                    date=Date(year=2003), pages=Pages(first="112", last="130"),
                    provenance=Provenance(confidence=0.95))


class _Style:
    def format(self, ref):
        names = " and ".join(f"{n.given} {n.family}" for n in ref.authors)
        return f"{names}, {ref.title}, {ref.container_title} {ref.volume} ({ref.year}), " \
               f"{ref.pages.first}–{ref.pages.last}."


@pytest.fixture
def fake(monkeypatch):
    records: dict[str, Reference] = {}
    monkeypatch.setattr(services, "parse_reference", lambda text: records[text])
    monkeypatch.setattr(services, "house_style", lambda: _Style())
    return records


def test_words_dropped():
    # a parser slip that turns family names into initials loses the names
    assert words_dropped("Quill A., Pell B. Lattice paths. Fibonacci Quart. 41 (2003) 112-130.",
                         "Q. A. and P. B., Lattice paths, Fibonacci Quart. 41 (2003), 112–130.") == ["quill", "pell"]
    # labels, joiners, case and accents do not count; an abbreviation may come back spelled out
    assert words_dropped("A. Quill & B. Péll, Paths, Fib. Quart., vol. 41, no. 2, pp. 112-130",
                         "A. Quill and B. Pell, Paths, Fibonacci Quart. 41(2) 112–130") == []
    # a full word is not an abbreviation of a longer one
    assert words_dropped("A. Pell, Paths", "A. Pellington, Paths") == ["pell"]


def test_fix_offered_when_confident_and_no_word_lost(fake):
    line = "A. Quill, B. Pell: Lattice paths in a strip. Fibonacci Quart. vol. 41 (2003) pp. 112-130"
    styled = _Style().format(ARTICLE)
    fake[line] = fake[styled] = ARTICLE
    (f,) = findings(refs(line), select=["reference-house-style"])
    assert f.fix is not None


def test_no_fix_when_the_rewrite_drops_words(fake):
    line = "Quill A., Pell B. Lattice paths in a strip. Fibonacci Quart. 41 (2003) 112-130."
    slip = ARTICLE.replace(authors=(Name(family="Q.", given="A."), Name(family="P.", given="B.")))
    styled = _Style().format(slip)
    fake[line] = fake[styled] = slip
    (f,) = findings(refs(line), select=["reference-house-style"])
    assert f.fix is None and "quill" in f.message and "pell" in f.message


def test_no_fix_below_fix_confidence(fake):
    line = "A. Quill, B. Pell: Lattice paths in a strip. Fibonacci Quart. vol. 41 (2003) pp. 112-130"
    doubtful = ARTICLE.replace(provenance=Provenance(confidence=0.88))
    fake[line] = fake[_Style().format(doubtful)] = doubtful
    (f,) = findings(refs(line), select=["reference-house-style"])
    assert f.fix is None and "confidence 0.88" in f.message
    assert LintSettings().fix_confidence == 0.9
    (g,) = findings(refs(line), select=["reference-house-style"], settings=LintSettings(fix_confidence=0.85))
    assert g.fix is not None


def test_real_parser_qa_line_gets_no_fix():
    line = "Quill A., Pell B. Lattice paths in a strip. Fibonacci Quart. 41 (2003) 112-130."
    ref = services.parse_reference(line)
    found = findings(refs(line), select=["reference-house-style"])
    if (ref.confidence or 0) >= LintSettings().style_confidence:
        assert found                  # compared with the house style, reported...
    assert all(f.fix is None for f in found)      # ...but never with the unsafe fix


def test_missing_file_prints_only_the_error(tmp_path):
    r = run_cli("nofile.toml", cwd=tmp_path)
    assert r.returncode == 2 and r.stdout == ""
    assert "nofile.toml" in r.stderr and "0 files" not in r.stderr
    r = run_cli("nofile.toml", "--format", "json", cwd=tmp_path)
    assert r.returncode == 2 and r.stdout == ""


def test_reference_from_table_is_public_and_the_old_name_remains():
    from normform.lint.api import reference_from_table
    from normform.lint.refs_facts import _from_table

    assert _from_table is reference_from_table
    ref = reference_from_table({"authors": ["Quill, Ada"], "title": "Ordered trees",
                                "container_title": "Discrete Mathematics", "volume": "230",
                                "pages": "100-120", "year": 2001})
    assert ref.kind == Kind.ARTICLE and ref.authors[0].family == "Quill" and ref.year == 2001
    assert ref.pages == Pages(first="100", last="120")
