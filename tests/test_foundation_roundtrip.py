"""Lossless round trips BibTeX -> model -> BibTeX -> model and CSL-JSON -> model -> CSL-JSON -> model.

(a) real records: tests/fixtures/foundation/gold-sample.jsonl (source in SOURCE.md);
(b) hypothesis-generated models with Unicode names, particles, suffixes, protective braces.
"""

import json
from dataclasses import replace
from pathlib import Path

from hypothesis import HealthCheck, given, settings

from foundation_strategies import references
from normform.export.bibtex import BibtexExporter
from normform.ids import module
from normform.export.csljson import CslJsonExporter
from normform.readers.bibtex import read_bibtex
from normform.readers.csljson import from_csl, read_csljson

FIXTURES = Path(__file__).parent / "fixtures" / "foundation"
GOLD = [json.loads(line) for line in (FIXTURES / "gold-sample.jsonl").read_text("utf-8").splitlines()]
SETTINGS = settings(max_examples=80, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def bib_round(refs, unicode=True):
    text = BibtexExporter(unicode=unicode).dumps(refs)
    result = read_bibtex(text)
    assert result.errors == [], [str(e) for e in result.errors]
    return text, result.records


def test_gold_csl_round_trip_is_lossless():
    models = [from_csl(g) for g in GOLD]
    again = read_csljson(CslJsonExporter().dumps(models))
    assert again == models
    # the gold's extension keys come back under custom, unchanged
    for gold, model in zip(GOLD, models):
        item = CslJsonExporter().record(model)
        for key in ("arxiv", "mr", "zbl"):
            if key in gold:
                assert module(key).compact(item["custom"][key]) == module(key).compact(gold[key])
        for var in ("title", "container-title", "publisher", "volume", "page", "DOI", "author"):
            if var in gold:
                assert item[var] == gold[var], (gold["id"], var)


def test_gold_bibtex_round_trip_is_lossless():
    models = [from_csl(g) for g in GOLD]
    for unicode in (True, False):
        bib0, first = bib_round(models, unicode)
        bib1, second = bib_round(first, unicode)
        assert second == first
        assert bib1 == bib0
        # Against the original model only the capitalization hints may grow (braces added on export).
        for a, b in zip(models, first):
            assert replace(b, title_protected=()) == replace(a, title_protected=())


@SETTINGS
@given(references(bibtex=False))
def test_generated_csl_round_trip(ref):
    item = CslJsonExporter().record(ref)
    assert from_csl(json.loads(json.dumps(item))) == ref


@SETTINGS
@given(references(bibtex=True))
def test_generated_bibtex_round_trip_unicode(ref):
    _, (back,) = bib_round([ref], unicode=True)
    assert back == ref


@SETTINGS
@given(references(bibtex=True))
def test_generated_bibtex_round_trip_latex(ref):
    text, (back,) = bib_round([ref], unicode=False)
    assert text.isascii()
    assert back == ref
