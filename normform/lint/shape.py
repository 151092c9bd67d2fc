"""Check an entry's shape against ``entry.schema.json``.

The JSON Schema is the single description of the format (tests check it with
``jsonschema``); this walker reads the small subset it uses -- type, enum,
properties, required, additionalProperties, items, anyOf, $ref -- and reports
*where* each problem is, which a general validator's messages do not give in
file positions.  Loading ``jsonschema`` at run time would also cost start-up.
"""

from __future__ import annotations

import json
from functools import lru_cache
from importlib import resources
from typing import Iterator, NamedTuple

_TYPES = {
    "string": lambda v: isinstance(v, str),
    "integer": lambda v: isinstance(v, int) and not isinstance(v, bool),
    "number": lambda v: isinstance(v, (int, float)) and not isinstance(v, bool),
    "boolean": lambda v: isinstance(v, bool),
    "array": lambda v: isinstance(v, list),
    "object": lambda v: isinstance(v, dict),
}


class Problem(NamedTuple):
    kind: str        # "missing" | "unknown" | "type" | "enum"
    path: tuple
    message: str


@lru_cache(maxsize=1)
def schema() -> dict:
    text = resources.files("normform.lint").joinpath("entry.schema.json").read_text("utf-8")
    return json.loads(text)


def _resolve(node: dict) -> dict:
    ref = node.get("$ref")
    if ref:
        node = schema()
        for part in ref.lstrip("#/").split("/"):
            node = node[part]
    return node


def type_name(value) -> str:
    for name in ("boolean", "integer", "number", "string", "array", "object"):
        if _TYPES[name](value):
            return "float" if name == "number" else name
    return type(value).__name__   # TOML dates and times


def _a(name: str) -> str:
    if name == "object":
        return "a table"
    return f"an {name}" if name[0] in "aeiou" else f"a {name}"


def _matches(node: dict, value) -> bool:
    return not any(True for _ in check(value, node, ()))


def check(value, node: dict | None = None, path: tuple = ()) -> Iterator[Problem]:
    node = _resolve(schema() if node is None else node)
    if "anyOf" in node:
        branches = [_resolve(b) for b in node["anyOf"]]
        if any(_matches(b, value) for b in branches):
            return
        same_type = [b for b in branches if _TYPES[b["type"]](value)]
        if same_type:   # report inside the branch of the value's own type
            yield from check(value, same_type[0], path)
            return
        wanted = " or ".join(_a(b["type"]) for b in branches)
        yield Problem("type", path, f"expected {wanted}, found {_a(type_name(value))}")
        return
    wanted = node.get("type")
    if wanted and not _TYPES[wanted](value):
        yield Problem("type", path, f"expected {_a(wanted)}, found {_a(type_name(value))}")
        return
    if "enum" in node and value not in node["enum"]:
        yield Problem("enum", path, f"{value!r} is not one of: {', '.join(node['enum'])}")
        return
    if wanted == "object":
        props = node.get("properties", {})
        for key in node.get("required", ()):
            if key not in value:
                yield Problem("missing", path + (key,), f"the required key {key!r} is missing")
        for key, item in value.items():
            if key in props:
                yield from check(item, props[key], path + (key,))
            elif node.get("additionalProperties", True) is False:
                from difflib import get_close_matches

                close = get_close_matches(str(key), list(props), n=1, cutoff=0.6)
                hint = f"did you mean {close[0]!r}? " if close else ""
                yield Problem("unknown", path + (key,),
                              f"unknown key {key!r}; {hint}known keys here: {', '.join(props)}")
    elif wanted == "array" and "items" in node:
        for i, item in enumerate(value):
            yield from check(item, node["items"], path + (i,))
