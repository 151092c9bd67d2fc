"""Which records go to needs-review: the record confidence decides; weak
fields only say where to look (invented records, Quillfeather scenario)."""

from __future__ import annotations

import dataclasses
import json

from normform.batch import process, toolkit
from normform.batch.inputs import Item
from normform.model import Date, FieldInfo, Kind, Name, Provenance, Reference, Span


def _ref(record: float, title_field: float) -> Reference:
    text = "A. B. Featherstone, On quill partitions, Discrete Math. 301 (2005), 1-20."
    fields = (FieldInfo("authors", 0.99, Span(0, 18)), FieldInfo("title", title_field, Span(20, 39)))
    return Reference(kind=Kind.ARTICLE, authors=(Name(family="Featherstone", given="A. B."),),
                     title="On quill partitions", container_title="Discrete Math.", volume="301",
                     date=Date(year=2005), provenance=Provenance(raw=text, fields=fields, confidence=record))


def _outcome(record: float, title_field: float) -> dict:
    kit = dataclasses.replace(toolkit.load(toolkit.DEFAULT), parse=lambda text: _ref(record, title_field),
                              parse_many=None)
    item = Item("ref", "A. B. Featherstone, On quill partitions, Discrete Math. 301 (2005), 1-20.", "a.txt", 1)
    return process.process_ref(item, 1, process.Settings(threshold=0.9), kit)


def test_a_confident_record_with_one_weaker_field_is_not_sent_to_review():
    out = _outcome(record=0.95, title_field=0.8)
    assert out["review"] is None
    assert out["stat"]["review"] is False


def test_a_record_under_the_threshold_is_sent_with_its_weak_fields_named():
    out = _outcome(record=0.7, title_field=0.8)
    reasons = json.loads(out["review"])["reasons"]
    assert reasons == ["confidence 0.70 below threshold 0.9", "low confidence in title (0.80)"]
