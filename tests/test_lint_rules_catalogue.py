"""Cross-entry rules: each fires on a defect and stays quiet without it."""

from __future__ import annotations

import pytest

from lint_support import BASE, findings, slugs
from normform.lint import services
from normform.model import Date, Kind, Name, Pages, Provenance, Reference

OTHER = BASE.replace("Q000100", "Q000101")


def test_duplicate_id_names_the_other_file():
    found = findings(BASE, select=["duplicate-id"], others=[("b/Q000100.toml", BASE)])
    assert len(found) == 1 and found[0].path == "b/Q000100.toml"
    assert found[0].related == [("Q000100.toml", 1, 6)]
    assert slugs(BASE, "duplicate-id", others=[("Q000101.toml", OTHER)]) == []


def test_see_also_missing():
    text = BASE + 'see_also = ["Q000101", "Q000999"]\n'
    found = findings(text, select=["see-also-missing"], others=[("Q000101.toml", OTHER)])
    assert [f.value_path for f in found] == [("see_also", 1)]
    assert slugs(BASE + 'see_also = ["Q000101"]\n', "see-also-missing", others=[("Q000101.toml", OTHER)]) == []


def test_see_also_uses_known_ids_of_files_beside_the_linted_ones(tmp_path):
    from lint_support import run_cli

    (tmp_path / "Q000100.toml").write_text(BASE + 'see_also = ["Q000101"]\n', "utf-8")
    (tmp_path / "Q000101.toml").write_text(OTHER, "utf-8")
    done = run_cli(str(tmp_path / "Q000100.toml"), "--select", "see-also-missing", cwd=tmp_path)
    assert done.returncode == 0, done.stdout + done.stderr
    (tmp_path / "Q000101.toml").unlink()
    done = run_cli(str(tmp_path / "Q000100.toml"), "--select", "see-also-missing", cwd=tmp_path)
    assert done.returncode == 1 and "see-also-missing" in done.stdout


REF = Reference(kind=Kind.ARTICLE, authors=(Name(family="Penrith-Vale", given="A."),),
                title="Set partitions with two blocks", container_title="Discrete Math.", volume="301",
                date=Date(year=2005), pages=Pages(first="88", last="97"), provenance=Provenance(confidence=0.9))


@pytest.fixture
def fake_parser(monkeypatch):
    monkeypatch.setattr(services, "parse_reference", lambda text: REF)


def test_reference_cited_differently(fake_parser):
    a = 'references = ["A. Penrith-Vale, Set partitions with two blocks, Discrete Math. 301 (2005), 88–97."]\n'
    b = 'references = ["Penrith-Vale, A.: Set partitions with two blocks. Discrete Math. 301, 88–97 (2005)"]\n'
    found = findings(BASE + a, select=["reference-cited-differently"],
                     others=[("Q000101.toml", OTHER + b), ("Q000102.toml", OTHER.replace("101", "102") + a)])
    assert [f.path for f in found] == ["Q000101.toml"]
    assert "Q000100 cites this work as: A. Penrith-Vale" in found[0].message
    assert slugs(BASE + a, "reference-cited-differently", others=[("Q000101.toml", OTHER + a)]) == []


def test_duplicate_id_of_a_file_beside_the_linted_one(tmp_path):
    from lint_support import run_cli

    (tmp_path / "Q000100.toml").write_text(BASE, "utf-8")
    (tmp_path / "Q000101.toml").write_text(BASE, "utf-8")     # holds id Q000100 as well
    done = run_cli("Q000101.toml", "--select", "duplicate-id", cwd=tmp_path)
    assert done.returncode == 1 and "id Q000100 is already used by Q000100.toml" in done.stdout
    done = run_cli("Q000100.toml", "--select", "duplicate-id", cwd=tmp_path)
    assert done.returncode == 0, done.stdout
