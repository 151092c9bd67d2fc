"""Rules about the entry file as a whole: syntax, keys, value types, the id."""

from __future__ import annotations

import re
from pathlib import Path

from normform.lint.registry import rule


@rule("file-syntax", "entry", "error", "the file is not valid TOML or JSON")
def file_syntax(entry, ctx):
    # Reported by the reader (a file that does not parse has no entry to check).
    return ()


def _problems(entry):
    cached = entry.cache.get("shape")
    if cached is None:
        from normform.lint.shape import check

        cached = entry.cache["shape"] = list(check(entry.data))
    return cached


@rule("missing-key", "entry", "error", "a required key (id, title, terms; text of a formula; url of a link; code of a program) is missing")
def missing_key(entry, ctx):
    for p in _problems(entry):
        if p.kind == "missing":
            where = p.path[:-1]
            yield entry.finding(missing_key.rule, f"{p.message}; add `{p.path[-1]} = ...`"
                                + (" to this table" if where else " at the top of the file"), where)


@rule("unknown-key", "entry", "warning", "a key the entry format does not know (kept, but probably misspelt)")
def unknown_key(entry, ctx):
    for p in _problems(entry):
        if p.kind == "unknown":
            yield entry.finding(unknown_key.rule, f"{p.message}; rename it or move its content into `comments`",
                                p.path, key=True)


@rule("wrong-type", "entry", "error", "a value has the wrong type or is not one of the allowed words")
def wrong_type(entry, ctx):
    for p in _problems(entry):
        if p.kind in ("type", "enum"):
            if len(p.path) == 2 and p.path[0] == "terms":
                continue   # reported by term-not-integer, with a better message
            yield entry.finding(wrong_type.rule, f"`{'.'.join(map(str, p.path))}`: {p.message}", p.path)


@rule("id-format", "entry", "error", "the id does not have the catalogue's form (setting id-pattern, default Q and six digits)")
def id_format(entry, ctx):
    value = entry.data.get("id")
    if isinstance(value, str) and not re.fullmatch(ctx.settings.id_pattern, value):
        yield entry.finding(id_format.rule, f"id {value!r} does not match {ctx.settings.id_pattern}; "
                            "use the id the editors assigned, e.g. Q000123", ("id",))


@rule("file-name-mismatch", "entry", "note", "the file is not named after the entry's id")
def file_name_mismatch(entry, ctx):
    value = entry.id
    if value and not entry.path.startswith("<") and Path(entry.path).stem != value:
        yield entry.finding(file_name_mismatch.rule,
                            f"the file is named {Path(entry.path).name!r} but holds {value}; "
                            f"rename it to {value}{Path(entry.path).suffix}", ("id",))


@rule("empty-value", "entry", "error", "a title, formula, reference, URL, code or id is empty")
def empty_value(entry, ctx):
    from normform.lint.fields import BLOCK, strings

    for path, value, role in strings(entry):
        if role != BLOCK and not value.strip() and path[-1] not in ("note",):
            yield entry.finding(empty_value.rule, f"`{'.'.join(map(str, path))}` is empty; "
                                "fill it in or remove it", path)
