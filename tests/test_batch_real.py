"""The shipped pipeline with the real parser, exporters and formula engine.

Skipped (with the reason) while another area's module is missing.  Outside
checks: pybtex and bibtexparser read references.bib; every CSL record
validates against the CSL 1.0.2 schema; duplicate clusters are scored
against the demo generator's own record of which line cites which work.
"""

from __future__ import annotations

import importlib.util
import itertools
import json
import sys
from collections import defaultdict
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FIXTURES, records  # noqa: E402

from normform.batch.runner import clean  # noqa: E402

MISSING = [m for m in ("normform.refs.api", "normform.export.csljson", "normform.export.bibtex",
                       "normform.export.text") if importlib.util.find_spec(m) is None]
pytestmark = pytest.mark.skipif(bool(MISSING), reason=f"not landed yet: {', '.join(MISSING)}")


@pytest.fixture(scope="module")
def run(tmp_path_factory):
    from make_demo_corpus import build_with_truth

    tmp = tmp_path_factory.mktemp("real")
    data = build_with_truth(700)
    demo = tmp / "legacy.txt"
    demo.write_bytes(b"\n".join(line for line, _ in data) + b"\n")
    out = tmp / "out"
    result = clean([str(demo), str(FIXTURES / "refs-wild-sample.txt"), str(FIXTURES / "entries")], out,
                   jobs=1, quiet=True)
    return result, out, data


def test_nothing_lost(run):
    result, out, data = run
    non_blank = sum(1 for line, _ in data if line.strip()) + 12 + 4   # demo + wild sample + entry refs
    assert result.references_read == result.records == len(records(out)) == non_blank
    bad = [r for r in records(out) if "flags" in r and "invalid_utf8" in r["flags"]]
    assert len(bad) == sum(1 for line, _ in data if _not_utf8(line))


def test_lines_joined_on_workers_are_plain_json_encodings(run):
    # record, review and cluster-member lines are joined from pre-encoded pieces; each must be
    # byte-for-byte what json.dumps(sort_keys=True, compact separators) gives for its content
    from normform.batch.process import dumps

    _, out, _ = run
    for name in ("records.jsonl", "needs-review.jsonl", "clusters.jsonl"):
        lines = (out / name).read_text("utf-8").splitlines()
        assert lines, name
        assert all(dumps(json.loads(line)) == line for line in lines), name
    member = json.loads((out / "clusters.jsonl").read_text("utf-8").splitlines()[0])["members"][0]
    assert sorted(member) == ["confidence", "entry", "file", "house", "id", "line", "seq", "text"]


def _not_utf8(raw: bytes) -> bool:
    try:
        raw.decode("utf-8")
    except UnicodeDecodeError:
        return True
    return False


def test_bibtex_reads_back_with_pybtex_and_bibtexparser(run):
    result, out, _ = run
    import bibtexparser
    from pybtex.database import parse_file

    db = parse_file(str(out / "references.bib"), "bibtex")          # pybtex: general BibTeX reader
    assert len(db.entries) == result.records
    library = bibtexparser.parse_string((out / "references.bib").read_text("utf-8"))
    assert not library.failed_blocks
    assert len(library.entries) == result.records
    ids = {r["id"] for r in records(out)}
    assert set(db.entries.keys()) == ids                            # keys are the record ids


def test_csl_records_validate_against_the_csl_schema(run):
    _, out, _ = run
    import jsonschema

    schema = json.loads((FIXTURES / "csl-data.json").read_text("utf-8"))   # CSL 1.0.2 input schema
    jsonschema.Draft7Validator(schema).validate([r["csl"] for r in records(out)])


def test_duplicate_clusters_match_the_generators_truth(run):
    _, out, data = run
    truth = defaultdict(list)
    for number, (_, work) in enumerate(data, start=1):
        if work is not None:
            truth[work].append(number)
    gold = {p for lines in truth.values() for p in itertools.combinations(sorted(lines), 2)}
    found = set()
    for line in (out / "clusters.jsonl").read_text("utf-8").splitlines():
        cluster = json.loads(line)
        lines = sorted(m["line"] for m in cluster["members"] if m["file"].endswith("legacy.txt"))
        found |= set(itertools.combinations(lines, 2))
        assert cluster["canonical"]["seq"] in {m["seq"] for m in cluster["members"]}
    hits = len(found & gold)
    precision, recall = hits / max(len(found), 1), hits / len(gold)
    assert precision >= 0.9 and recall >= 0.75, (precision, recall)


@pytest.mark.skipif(importlib.util.find_spec("normform.export.mathml") is None,
                    reason="formula engine's MathML printer not landed yet")
def test_entry_formulas_render_as_mathml(run):
    _, out, _ = run
    from lxml import html as lxml_html

    tree = lxml_html.fromstring((out / "report.html").read_text("utf-8"))
    assert len(tree.xpath("//td[@class='math']/math")) == 3
    ascii_forms = [c.text_content() for c in tree.xpath("//td[@class='ascii']")]
    assert len(ascii_forms) == 3 and all(ascii_forms)


@pytest.mark.skipif(importlib.util.find_spec("normform.venues.match") is None,
                    reason="the venues area's matcher has not landed yet")
def test_against_a_curated_library_enriches_records(tmp_path):
    src = tmp_path / "lines.txt"
    src.write_text("A. B. Farrowdale, On the enumeration of Dyck words, J. Combin. Theory Ser. A 45 (1987), 123-145.\n"
                   "Q. Nettlefold, Tilings of a strip by squares, Fibonacci Quart. 12 (1974), 1-9.\n",
                   encoding="utf-8")
    clean([str(src)], tmp_path / "out", jobs=1, quiet=True, against=str(FIXTURES / "library.bib"))
    first, second = records(tmp_path / "out")
    assert first["library"]["matched"] and first["library"]["record"] == "farrowdale1987dyck"
    assert first["csl"].get("DOI") == "10.1016/qsem.1987.45123"     # supplied by the library
    assert not second["library"]["matched"] and "DOI" not in second["csl"]


def test_emptying_caches_to_bound_memory_changes_no_output(monkeypatch):
    # workers empty normform's lru caches when over CACHE_BUDGET_MB; memoisation only, so the
    # bytes of every output must be the same as with warm caches
    from make_demo_corpus import build

    from normform.batch import clusters, process
    from normform.batch.inputs import Item

    texts = [line.decode("utf-8", "replace") for line in build(120) if line.strip()]
    items = [Item(what="ref", text=t, file="x.txt", line=i) for i, t in enumerate(texts, 1)]
    settings = process.Settings()
    warm = [process.process_chunk(items[i:i + 30], i + 1, settings) for i in range(0, len(items), 30)]
    clusters._numbers("a 2 b")
    assert process.bound_caches(budget_mb=1e9) == 0 and clusters._numbers.cache_info().currsize > 0
    monkeypatch.setattr(process, "CACHE_BUDGET_MB", 0)     # empty them after every chunk:
    monkeypatch.setattr(process, "_blocks_at_budget", 0)   # live objects always "back at the count"
    cold = [process.process_chunk(items[i:i + 30], i + 1, settings) for i in range(0, len(items), 30)]
    assert clusters._numbers.cache_info().currsize == 0
    assert [c["blobs"] for c in cold] == [w["blobs"] for w in warm]
    assert [c["keys"] for c in cold] == [w["keys"] for w in warm]
