"""The entry format's JSON Schema, checked with jsonschema; the built-in shape walker must agree."""

from __future__ import annotations

import copy
import json
import tomllib
from importlib import resources

import jsonschema
from hypothesis import given, settings, strategies as st

from lint_support import DEMO
from normform.lint.shape import check

SCHEMA = json.loads(resources.files("normform.lint").joinpath("entry.schema.json").read_text("utf-8"))
VALIDATOR = jsonschema.Draft7Validator(SCHEMA)


def load(path):
    text = path.read_text("utf-8")
    return json.loads(text) if path.suffix == ".json" else tomllib.loads(text)


def test_schema_is_valid_draft7():
    jsonschema.Draft7Validator.check_schema(SCHEMA)


def test_demo_entries_against_the_schema():
    invalid = {p.name for p in DEMO.iterdir() if not VALIDATOR.is_valid(load(p))}
    # the two deliberate shape defects: an unknown key, a term written as a string
    assert invalid == {"Q000017.toml", "Q000018.json"}
    for p in DEMO.iterdir():
        assert VALIDATOR.is_valid(load(p)) == (not list(check(load(p)))), p.name


_junk = st.one_of(st.integers(), st.text(max_size=5), st.booleans(), st.lists(st.integers(), max_size=2),
                  st.dictionaries(st.sampled_from(["text", "kind", "url", "x"]), st.text(max_size=3), max_size=2))


@settings(max_examples=200, deadline=None)
@given(st.sampled_from(sorted(p.name for p in DEMO.iterdir())), st.data())
def test_shape_walker_agrees_with_jsonschema(name, data):
    entry = copy.deepcopy(load(DEMO / name))
    # replace or add one value somewhere in the entry
    target = entry
    for _ in range(data.draw(st.integers(0, 2))):
        keys = list(target) if isinstance(target, dict) else list(range(len(target)))
        children = [k for k in keys if isinstance(target[k], (dict, list)) and target[k]]
        if not children:
            break
        target = target[data.draw(st.sampled_from(children))]
    if isinstance(target, dict):
        key = data.draw(st.sampled_from(list(target) + ["extra_key"]))
        target[key] = data.draw(_junk)
    elif target:
        target[data.draw(st.integers(0, len(target) - 1))] = data.draw(_junk)
    assert VALIDATOR.is_valid(entry) == (not list(check(entry)))


def test_reference_table_with_report_number_version_and_accessed_date():
    from normform.lint.refs_facts import reference_from_table
    table = {"kind": "report", "title": "Quill counts", "report_number": "TR-2007-13", "version": "2.1",
             "accessed": "2020-05-03", "year": 2007}
    entry = {"id": "Q000999", "name": "x", "references": [table]}
    assert not [e for e in VALIDATOR.iter_errors(entry) if "references" in list(e.absolute_path)]
    ref = reference_from_table(table)
    assert (ref.report_number, ref.version) == ("TR-2007-13", "2.1")
    assert (ref.accessed.year, ref.accessed.month, ref.accessed.day) == (2020, 5, 3)
