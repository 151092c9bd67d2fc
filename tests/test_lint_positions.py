"""Value positions in TOML and JSON sources (the standard parsers give none)."""

from __future__ import annotations

import json
import tomllib

import tomlkit
from hypothesis import HealthCheck, given, settings, strategies as st

from lint_support import FIXTURES
from normform.lint.positions import locate_json, locate_toml


def leaves(value, path=()):
    if isinstance(value, dict):
        for k, v in value.items():
            yield from leaves(v, path + (k,))
    elif isinstance(value, list):
        for i, v in enumerate(value):
            yield from leaves(v, path + (i,))
    else:
        yield path, value


def check_toml(text: str) -> int:
    """Every leaf's span re-reads (with tomllib) to the leaf's value; strings map char by char."""
    data = tomllib.loads(text)
    where = locate_toml(text)
    count = 0
    for path, value in leaves(data):
        start, end = where.values[path]
        assert tomllib.loads("x = " + text[start:end])["x"] == value, path
        if isinstance(value, str):
            for i, ch in enumerate(value):
                off = where.string_offset(path, i)
                # a plain character maps to itself; an escape maps to its backslash
                assert text[off] == ch or text[off] == "\\" or (ch == "\n" and text[off] == "\r"), (path, i)
        count += 1
    return count


def test_tricky_toml_fixture():
    text = (FIXTURES / "tricky.toml").read_text("utf-8")
    assert check_toml(text) == 20
    where = locate_toml(text)
    # array of tables, nested: [[programs.extra]] under the second [[programs]]
    assert where.line_col(where.values[("programs", 1, "extra", 0, "z")][0]) == (28, 5)
    assert where.line_col(where.values[("programs", 0, "language")][0]) == (18, 12)
    # inline table inside a multi-line array
    assert where.line_col(where.values[("terms", 4, "x")][0]) == (8, 16)
    assert where.line_col(where.keys[("quoted key",)][0]) == (3, 1)
    # dotted key with blanks around a dot; a date-time with a space
    assert text[slice(*where.values[("a", "b", "c")])] == "1979-05-27 07:32:00Z"


def test_escapes_map_into_the_source():
    text = 's = "esc \\"q\\" \\U0001F600 x"\n'
    where = locate_toml(text)
    value = tomllib.loads(text)["s"]
    assert value == 'esc "q" \U0001F600 x'
    i = value.index("x")
    assert where.line_col(where.string_offset(("s",), i)) == (1, 27)
    assert text[where.string_offset(("s",), value.index("\U0001F600"))] == "\\"


def test_multiline_string_trims_first_newline_and_line_ending_backslash():
    text = 't = """\nab \\\n    cd"""\n'
    where = locate_toml(text)
    value = tomllib.loads(text)["t"]
    assert value == "ab cd"
    assert where.line_col(where.string_offset(("t",), 0)) == (2, 1)      # 'a'
    assert where.line_col(where.string_offset(("t",), 3)) == (3, 5)      # 'c'


def test_literal_strings_have_no_escapes():
    text = "p = '''\nC:\\new\\t'''\nq = 'a\\b'\n"
    assert check_toml(text) == 2
    where = locate_toml(text)
    assert where.line_col(where.string_offset(("p",), 2)) == (2, 3)


def test_arrays_of_tables_count_per_parent():
    text = ("[[a]]\nx = 1\n[[a.b]]\ny = 2\n[[a.b]]\ny = 3\n[[a]]\nx = 4\n[[a.b]]\ny = 5\n")
    where = locate_toml(text)
    assert check_toml(text) == 5
    assert where.line_col(where.values[("a", 1, "b", 0, "y")][0]) == (10, 5)
    assert where.line_col(where.values[("a", 0, "b", 1, "y")][0]) == (6, 5)


def test_crlf_line_endings():
    text = 'id = "Q1"\r\nterms = [\r\n  1,\r\n  2]\r\n'
    where = locate_toml(text)
    assert check_toml(text) == 3
    assert where.line_col(where.values[("terms", 1)][0]) == (4, 3)


def test_json_positions_and_surrogates():
    text = '{\n  "a": [1, {"b": "x\\ud83d\\ude00y\\n"}],\n  "c": true\n}\n'
    data = json.loads(text)
    where = locate_json(text)
    assert where.line_col(where.values[("a", 1, "b")][0]) == (2, 18)
    assert where.line_col(where.keys[("c",)][0]) == (3, 3)
    value = data["a"][1]["b"]
    assert value == "x\U0001F600y\n"
    # 'y' comes after the 12-character surrogate-pair escape
    assert text[where.string_offset(("a", 1, "b"), 2)] == "y"
    assert text[where.string_offset(("a", 1, "b"), 1)] == "\\"
    for path, value in leaves(data):
        start, end = where.values[path]
        assert json.loads(text[start:end]) == value


_keys = st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), min_size=1, max_size=6)
_scalars = st.one_of(st.integers(-10**12, 10**12), st.booleans(),
                     st.text(alphabet=st.characters(codec="utf-8", exclude_categories=("Cs",)), max_size=12),
                     st.floats(allow_nan=False, allow_infinity=False))
_values = st.recursive(_scalars, lambda inner: st.one_of(
    st.lists(inner, max_size=4), st.dictionaries(_keys, inner, max_size=4)), max_leaves=12)


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.dictionaries(_keys, _values, min_size=1, max_size=5))
def test_any_document_tomlkit_writes(doc):
    # tomlkit picks the layout (tables, arrays of tables, inline tables, quoted keys, escapes)
    text = tomlkit.dumps(doc)
    check_toml(text)


@settings(max_examples=100, deadline=None)
@given(st.dictionaries(_keys, _values, min_size=1, max_size=5), st.sampled_from([None, 2]))
def test_any_json_document(doc, indent):
    text = json.dumps(doc, indent=indent, ensure_ascii=bool(indent))
    where = locate_json(text)
    for path, value in leaves(doc):
        start, end = where.values[path]
        assert json.loads(text[start:end]) == value
