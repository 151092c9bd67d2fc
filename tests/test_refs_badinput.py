"""Bad input never raises: one record per line, raw text kept, low confidence,
and linear time on long adversarial lines."""

import time

import pytest

from normform import parse_reference, parse_references

BAD = ["", "   ", "\t\t", "\x00\x01\x02\x1b[31m", "\ufffd\ufffd\x7f", "��\x00PK\x03\x04\x14\x00",
       "https://example.org/quillfeather", "doi:10.1000/182", "10.1000/182", "....", "1990", "()"]


@pytest.mark.parametrize("text", BAD)
def test_bad_lines_give_one_honest_record(text):
    ref = parse_reference(text)
    assert ref.provenance is not None and ref.provenance.raw == text
    assert (ref.confidence or 0.0) < 0.5


def test_generator_keeps_line_count_and_order():
    lines = BAD + ["A. Quill, Counting trees, J. Quill. Math. 3 (1999), 1-9."]
    refs = list(parse_references(lines))
    assert len(refs) == len(lines)
    assert [r.provenance.raw for r in refs] == lines


def test_doi_only_line_keeps_the_doi():
    ref = parse_reference("doi:10.1000/182")
    assert ref.ident("doi").value == "10.1000/182"


@pytest.mark.parametrize("unit", [".", "1", "(", "A. ", "a", "-", "((1990))", "10.", "J.-P. ", "$x$ ", "\\em "])
def test_long_adversarial_lines_are_fast(unit):
    text = (unit * (100_000 // len(unit) + 1))[:100_000]
    t0 = time.perf_counter()
    ref = parse_reference(text)
    elapsed = time.perf_counter() - t0
    assert ref.provenance.raw == text
    assert (ref.confidence or 0.0) < 0.5
    # linear-time guard (issue requirement), generous for a shared machine
    assert elapsed < 1.0, f"{elapsed:.2f}s for a 100 kB line of {unit!r}"


def test_parse_references_splits_a_string_into_lines_not_characters():
    from normform import parse_references

    refs = list(parse_references("A. Quill, On zigzags, Math. Mag. 79 (2006), 1-9.\nabc"))
    assert len(refs) == 2
    assert refs[1].provenance.raw == "abc"
