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


def test_after_emptying_caches_a_worker_waits_until_they_hold_as_much_again(monkeypatch):
    # emptied caches give memory back to Python's allocator, not the system, so resident
    # memory stays high: after the budget is first reached, the live-object count decides
    resident = iter([90.0, 120.0])
    blocks = iter([1_000_000,           # noted when the budget is reached (120 MB > 100)
                   600_000,             # caches refilling: keep them
                   999_999,             # not quite back: keep them
                   1_000_000, 1_200_000])   # back at the count, and past it: empty
    monkeypatch.setattr(process, "_resident_mb", lambda: next(resident))
    monkeypatch.setattr(sys, "getallocatedblocks", lambda: next(blocks))
    monkeypatch.setattr(process, "_blocks_at_budget", None)
    monkeypatch.setattr(process, "CACHE_BUDGET_MB", 100)
    assert process.bound_caches() == 0          # 90 MB: under the budget, nothing noted
    assert process._blocks_at_budget is None
    assert process.bound_caches() > 0           # 120 MB: over it, count noted
    assert process._blocks_at_budget == 1_000_000
    assert process.bound_caches() == 0
    assert process.bound_caches() == 0
    assert process.bound_caches() > 0
    assert process.bound_caches() > 0
    assert process._blocks_at_budget == 1_000_000   # the mark does not move (no ratchet)


def test_memory_stays_bounded_over_many_distinct_lines(monkeypatch):
    """Real objects, no doubles: with a small budget, chunk after chunk of new
    distinct lines leaves the live-object count near the mark, not growing with the input."""
    from normform.batch.inputs import Item

    monkeypatch.setattr(process, "_blocks_at_budget", None)
    monkeypatch.setattr(process, "CACHE_BUDGET_MB", 0)      # the first chunk reaches it
    settings = process.Settings()
    counts = []
    for k in range(12):
        items = [Item("ref", f"Quillby{k}x{i}, Tallies of kind {k * 100 + i} in grid {i}, J. Stuff {k}, {1950 + i}",
                      "x.txt", i) for i in range(150)]
        process.process_chunk(items, 1 + 150 * k, settings)
        counts.append(sys.getallocatedblocks())
    mark = process._blocks_at_budget
    assert mark is not None
    # every chunk ends at or below the mark (with nothing emptied the count passes it
    # by the third chunk and grows by ~3,000 blocks a chunk)
    assert max(counts) <= mark, (mark, counts)
