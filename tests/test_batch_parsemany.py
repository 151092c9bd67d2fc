"""A chunk's plain-text references go to the parser in one ``parse_many`` call."""

from __future__ import annotations

import dataclasses
import json
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
import batch_fake_toolkit as fake  # noqa: E402

from normform.batch import process, toolkit  # noqa: E402
from normform.batch.inputs import Item  # noqa: E402

CALLS: list[list[str]] = []


def _recording_many(texts):
    CALLS.append(list(texts))
    return [fake.parse(t) for t in texts]


def _failing_many(texts):
    CALLS.append(list(texts))
    raise RuntimeError("the batched decoder gave up")


BATCHED = dataclasses.replace(fake.TOOLKIT, parse_many=_recording_many)
FAILING = dataclasses.replace(fake.TOOLKIT, parse_many=_failing_many)


def _items() -> list[Item]:
    structured = json.dumps({"title": "Invented tables of Quillfeather numbers", "authors": ["Inkwell, P."],
                             "year": 1987})
    return [
        Item("ref", "Quillby, Counting paths in grids, J. Stuff, 1961", "a.txt", 1),
        Item("formula", "a(n) = 1/n", "Q000001.toml", 4, entry="Q000001"),
        Item("ref", structured, "Q000001.toml", 5, entry="Q000001", flags=(("structured", True),)),
        Item("ref", "EXPLODE, the parser fails here", "a.txt", 2),
        Item("ref", "Featherby, Lattice words, Ann. Quill, 1974", "a.txt", 3),
    ]


def _chunk(kit_name: str) -> dict:
    return process.process_chunk(_items(), 1, process.Settings(toolkit=f"{__name__}:{kit_name}"))


def test_default_parse_many_maps_parse():
    kit = toolkit.Toolkit(parse=fake.parse, csl=fake.csl, bibtex=fake.bibtex, house=fake.house,
                          formula=fake.formula)
    texts = ["Quillby, Counting paths, J. Stuff, 1961", "Featherby, Lattice words, 1974"]
    assert kit.parse_many is None
    assert kit.parse_all(texts) == [fake.parse(t) for t in texts]
    # a double made from it by replacing parse maps the new parse, not the old one
    other = dataclasses.replace(kit, parse=lambda text: text.upper())
    assert other.parse_all(texts) == [t.upper() for t in texts]


def test_one_call_per_chunk_with_the_plain_texts_in_order():
    CALLS.clear()
    batched = _chunk("BATCHED")
    # structured entry references and formulas are not the parser's
    assert CALLS == [[_items()[0].text, _items()[3].text, _items()[4].text]]
    # and the outputs are byte for byte those of parsing one line at a time
    assert batched["blobs"] == _chunk("SINGLE")["blobs"]
    assert batched["keys"] == _chunk("SINGLE")["keys"]


def test_a_failing_batch_falls_back_to_one_line_at_a_time():
    CALLS.clear()
    out = _chunk("FAILING")
    assert len(CALLS) == 1
    assert out["blobs"] == _chunk("SINGLE")["blobs"]
    records = [json.loads(line) for line in out["blobs"]["records"].decode().splitlines()]
    assert len(records) == 4
    reasons = {r["text"]: r["reasons"] for r in records}
    assert any(x.startswith("parser error: RuntimeError: fake parser failure")
               for x in reasons["EXPLODE, the parser fails here"])
    assert not any(x.startswith("parser error") for x in reasons[_items()[4].text])


def test_a_wrong_number_of_records_is_not_trusted():
    short = dataclasses.replace(fake.TOOLKIT, parse_many=lambda texts: [fake.parse(t) for t in texts[:-1]])
    refs = process.parse_items(_items(), short)
    assert refs[4] == fake.parse(_items()[4].text)


def test_a_text_with_a_line_end_is_parsed_alone():
    # parse_references strips a line end that parse_reference keeps in the raw text
    items = [Item("ref", "Quillby, Counting paths, 1961\r", "b.jsonl", 1),
             Item("ref", "Featherby, Lattice words, 1974", "b.jsonl", 2)]
    CALLS.clear()
    refs = process.parse_items(items, BATCHED)
    assert CALLS == [["Featherby, Lattice words, 1974"]]
    assert refs[0].provenance.raw == "Quillby, Counting paths, 1961\r"


def test_bounding_memory_empties_memos_but_not_loaders():
    from normform.export.text import short_name
    from normform.model import Name
    from normform.texconv import _reader

    _reader()                             # a loader: one pylatexenc reader
    short_name(Name(family="Quillby", given="Ada"))   # a memo per distinct name
    assert process.bound_caches(budget_mb=0) >= 1
    assert short_name.cache_info().currsize == 0
    assert _reader.cache_info().currsize == 1
    assert not process._memo_cache(_reader) and process._memo_cache(short_name)


SINGLE = fake.TOOLKIT


def test_after_emptying_caches_a_worker_waits_for_new_growth(monkeypatch):
    # emptied caches give memory back to Python's allocator, not the system: without the
    # headroom a worker over the budget emptied them after every chunk (cold caches for good)
    seen = iter([120.0, 120.0,      # over the budget of 100: empty; 120 right after
                 125.0,             # under 120 + 10: keep the caches
                 131.0, 129.0])     # grown past it: empty again
    monkeypatch.setattr(process, "_resident_mb", lambda: next(seen))
    monkeypatch.setattr(process, "_floor_mb", None)
    monkeypatch.setattr(process, "CACHE_BUDGET_MB", 100)
    monkeypatch.setattr(process, "CACHE_HEADROOM_MB", 10)
    assert process.bound_caches() > 0
    assert process.bound_caches() == 0
    assert process.bound_caches() > 0
    assert process._floor_mb == 129.0
