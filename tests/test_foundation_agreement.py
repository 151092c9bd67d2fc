"""Independent tools agree with what we write: bibtexparser (v2), pybtex name rules,
the published CSL-JSON schema (jsonschema) and citeproc-py."""

import json
from pathlib import Path

import bibtexparser
import jsonschema
import pytest
from hypothesis import HealthCheck, given, settings, strategies as st
from pybtex.database import Person

from foundation_strategies import references
from normform.export.bibtex import BibtexExporter
from normform.export.citeproc import CitationStyle
from normform.export.csljson import CslJsonExporter
from normform.export.base import KeyMaker
from normform.names import format_name, split_name
from normform.readers.csljson import from_csl
from normform.texconv import to_unicode

FIXTURES = Path(__file__).parent / "fixtures" / "foundation"
GOLD = [from_csl(json.loads(line)) for line in (FIXTURES / "gold-sample.jsonl").read_text("utf-8").splitlines()]
# CSL 1.0.2 data schema, citation-style-language/schema v1.0.2 (see fixtures/foundation/SOURCE.md).
SCHEMA = json.loads((FIXTURES / "csl-data.json").read_text("utf-8"))
SETTINGS = settings(max_examples=40, deadline=None, suppress_health_check=[HealthCheck.too_slow])


def check_with_bibtexparser(refs, unicode):
    exporter = BibtexExporter(unicode=unicode)
    text = exporter.dumps(refs)
    library = bibtexparser.parse_string(text)
    assert library.failed_blocks == []
    assert len(library.entries) == len(refs)
    keys = KeyMaker()
    for ref, entry in zip(refs, library.entries):
        assert entry.key == keys.make(ref)
        ours = {f.name: f.value for f in exporter.fields(ref)}
        theirs = {f.key.lower(): f.value for f in entry.fields}
        assert theirs == ours


def test_bibtexparser_reads_gold_sample_the_same():
    check_with_bibtexparser(GOLD, unicode=True)
    check_with_bibtexparser(GOLD, unicode=False)


@SETTINGS
@given(st.lists(references(bibtex=True), min_size=1, max_size=3), st.booleans())
def test_bibtexparser_reads_generated_files_the_same(refs, unicode):
    check_with_bibtexparser(refs, unicode)


# Tricky names and their BibTeX parts (First, von, Last, Jr): rules of BibTeX's name
# format as described in Patashnik's "BibTeXing" and "Tame the BeaST" (from memory).
NAME_TABLE = [
    ("Donald E. Knuth", "Donald E.", None, "Knuth", None),
    ("Knuth, Donald E.", "Donald E.", None, "Knuth", None),
    ("Charles Louis Xavier Joseph de la Vallée Poussin", "Charles Louis Xavier Joseph", "de la", "Vallée Poussin", None),
    ("Jean de La Fontaine", "Jean", "de", "La Fontaine", None),
    ("de La Fontaine, Jean", "Jean", "de", "La Fontaine", None),
    ("van der Waerden, B. L.", "B. L.", "van der", "Waerden", None),
    ("Ford, Jr., Henry", "Henry", None, "Ford", "Jr."),
    ("Hess, III, Otto", "Otto", None, "Hess", "III"),
    ("Ludwig van Beethoven", "Ludwig", "van", "Beethoven", None),
    ("Jean-Pierre Serre", "Jean-Pierre", None, "Serre", None),
    ("Erd{\\H{o}}s, P{\\'a}l", "Pál", None, "Erdős", None),
    ("Ojeda Mart{\\'\\i}nez de Castilla, Jos{\\'e}", "José", "Ojeda Martínez de", "Castilla", None),
    ("{Barnes and Noble}, Inc.", "Inc.", None, "Barnes and Noble", None),
    ("Euclid", None, None, "Euclid", None),
    ("{\\\"O}zt{\\\"u}rk, Ay{\\c{s}}e", "Ayşe", None, "Öztürk", None),
]


def _pybtex_parts(text):
    p = Person(text)
    conv = lambda parts: to_unicode(" ".join(parts)) or None  # noqa: E731
    return conv(p.first_names + p.middle_names), conv(p.prelast_names), conv(p.last_names), conv(p.lineage_names)


@pytest.mark.parametrize("text, first, von, last, jr", NAME_TABLE)
def test_name_splitting_agrees_with_pybtex(text, first, von, last, jr):
    name = split_name(text)
    assert (name.given, name.particle, name.family, name.suffix) == (first, von, last, jr)
    assert _pybtex_parts(text) == (first, von, last, jr)
    # and what we write back is read by pybtex into the same parts
    assert _pybtex_parts(format_name(name)) == (first, von, last, jr)
    assert _pybtex_parts(format_name(name, ascii=True)) == (first, von, last, jr)


def test_and_others():
    from normform.names import ET_AL, format_names, split_names
    names = split_names("Quill, Ada and others")
    assert names[-1] == ET_AL and format_names(names) == "Quill, Ada and others"


def test_literal_names():
    assert split_name("{The Quillfeather Society}").literal == "The Quillfeather Society"
    assert format_name(split_name("{The Quillfeather Society}")) == "{The Quillfeather Society}"
    assert split_name("{\\'E}mile Borel").family == "Borel"  # an accent group is not a literal


def test_gold_csl_validates_and_renders():
    items = [CslJsonExporter().record(ref) for ref in GOLD]
    jsonschema.validate(items, SCHEMA)
    rendered = CitationStyle("american-mathematical-society-numeric").format_all(GOLD)
    assert all(rendered) and len(rendered) == len(GOLD)


@settings(max_examples=25, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.lists(references(bibtex=False), min_size=1, max_size=3))
def test_generated_csl_validates_and_citeproc_renders(refs):
    items = CslJsonExporter().items(refs)
    jsonschema.validate(items, SCHEMA)
    rendered = CitationStyle("apa").format_all(refs)
    assert len(rendered) == len(refs)
    for ref, text in zip(refs, rendered):
        if ref.title:  # every APA entry shows its title
            assert text


def test_schema_rejects_what_it_should():
    # sanity check that validation can fail: an unknown top-level key
    with pytest.raises(jsonschema.ValidationError):
        jsonschema.validate([{"id": "x", "type": "book", "arxiv": "1301.3569"}], SCHEMA)
