"""Fixes: idempotent, never lose a field, refuse results that break the file."""

from __future__ import annotations

import json
import tomllib
import unicodedata

import pytest
import tomlkit
from hypothesis import given, settings, strategies as st

from normform.lint.engine import Context, lint
from normform.lint.entry import parse_entry
from normform.lint.findings import Edit, Finding, Fix
from normform.lint.fixing import FixRefused, apply_edits, fix_text, shape
from normform.lint.registry import select_rules
from normform.lint.settings import LintSettings

TEXT_RULES = select_rules(["not-nfc", "control-character", "trailing-whitespace", "term-not-integer"])


def lint_one(entry):
    return [f for f in lint([entry], TEXT_RULES, Context(LintSettings())) if f.fix]


_words = st.text(alphabet="abc é\u0301\u0007\t ", min_size=1, max_size=12)


@settings(max_examples=120, deadline=None)
@given(title=_words, contributors=st.lists(_words, max_size=3), terms=st.lists(
    st.one_of(st.integers(-50, 50), st.integers(0, 9).map(str), st.integers(0, 9).map(float)), min_size=1, max_size=5),
    as_json=st.booleans())
def test_fixes_are_idempotent_and_keep_every_field(title, contributors, terms, as_json):
    doc = {"id": "Q000100", "title": title, "terms": terms, "contributors": contributors}
    if as_json:
        path, text = "Q000100.json", json.dumps(doc, indent=1)
    else:
        path, text = "Q000100.toml", tomlkit.dumps(doc)
    entry = parse_entry(path, text)
    fixed, _ = fix_text(entry, lint_one)
    again = parse_entry(path, fixed)
    assert shape(again.data) == shape(entry.data)
    assert lint_one(again) == []                        # everything fixable was fixed
    assert fix_text(again, lint_one)[0] == fixed        # a second run changes nothing
    value = again.data["title"]
    assert unicodedata.is_normalized("NFC", value) and (value == value.strip() or not value.strip()) \
        and "\u0007" not in value


def test_overlapping_edits_wait_for_the_next_round():
    text, count = apply_edits("abcdef", [Edit(1, 3, "X"), Edit(2, 4, "Y"), Edit(4, 5, "Z")])
    assert (text, count) == ("aXdZf", 2)


def test_a_fix_that_would_drop_a_key_is_refused():
    entry = parse_entry("Q000100.toml", 'id = "Q000100"\ntitle = "t"\nterms = [1]\n')
    start = entry.text.index("title")
    bad = Finding("x", "note", "m", entry.path, fix=Fix("drop", (Edit(start, start + len('title = "t"\n'), ""),)))
    with pytest.raises(FixRefused):
        fix_text(entry, lambda e: [bad])
    broken = Finding("x", "note", "m", entry.path, fix=Fix("break", (Edit(0, 2, "[["),)))
    with pytest.raises(FixRefused):
        fix_text(entry, lambda e: [broken])
    assert tomllib.loads(entry.text)["title"] == "t"
