"""Walk an entry's values by role, so rules need not know the layout twice."""

from __future__ import annotations

from typing import Iterator

LINE = "line"        # one line of plain text: title, a reference, a link title
BLOCK = "block"      # free text that may span lines: comments
FORMULA = "formula"
CODE = "code"
WORD = "word"        # ids, urls, language tags: no prose rules


def _list(entry, key: str) -> list:
    value = entry.data.get(key)
    return value if isinstance(value, list) else []


def strings(entry) -> Iterator[tuple[tuple, str, str]]:
    """Every string value as ``(path, value, role)``."""
    data = entry.data
    if isinstance(data.get("id"), str):
        yield ("id",), data["id"], WORD
    if isinstance(data.get("title"), str):
        yield ("title",), data["title"], LINE
    for i, item in enumerate(_list(entry, "formulas")):
        if isinstance(item, str):
            yield ("formulas", i), item, FORMULA
        elif isinstance(item, dict):
            if isinstance(item.get("text"), str):
                yield ("formulas", i, "text"), item["text"], FORMULA
            if isinstance(item.get("note"), str):
                yield ("formulas", i, "note"), item["note"], LINE
    for i, item in enumerate(_list(entry, "references")):
        if isinstance(item, str):
            yield ("references", i), item, LINE
        elif isinstance(item, dict):
            for key, value in item.items():
                if isinstance(value, str):
                    role = WORD if key in ("doi", "arxiv", "isbn", "issn", "mr", "zbl", "url", "kind") else LINE
                    yield ("references", i, key), value, role
                elif isinstance(value, list):
                    for j, name in enumerate(value):
                        if isinstance(name, str):
                            yield ("references", i, key, j), name, LINE
                        elif isinstance(name, dict):
                            for part, text in name.items():
                                if isinstance(text, str):
                                    yield ("references", i, key, j, part), text, LINE
    for i, item in enumerate(_list(entry, "links")):
        if isinstance(item, dict):
            if isinstance(item.get("url"), str):
                yield ("links", i, "url"), item["url"], WORD
            if isinstance(item.get("title"), str):
                yield ("links", i, "title"), item["title"], LINE
    for i, item in enumerate(_list(entry, "programs")):
        if isinstance(item, dict):
            if isinstance(item.get("language"), str):
                yield ("programs", i, "language"), item["language"], WORD
            if isinstance(item.get("code"), str):
                yield ("programs", i, "code"), item["code"], CODE
            if isinstance(item.get("note"), str):
                yield ("programs", i, "note"), item["note"], LINE
    for i, item in enumerate(_list(entry, "comments")):
        if isinstance(item, str):
            yield ("comments", i), item, BLOCK
    for i, item in enumerate(_list(entry, "contributors")):
        if isinstance(item, str):
            yield ("contributors", i), item, LINE
    for i, item in enumerate(_list(entry, "see_also")):
        if isinstance(item, str):
            yield ("see_also", i), item, WORD


def formulas(entry) -> Iterator[tuple[tuple, str, str | None]]:
    """``(path of the text, text, declared kind or None)`` for each formula."""
    for i, item in enumerate(_list(entry, "formulas")):
        if isinstance(item, str):
            yield ("formulas", i), item, None
        elif isinstance(item, dict) and isinstance(item.get("text"), str):
            kind = item.get("kind") if isinstance(item.get("kind"), str) else None
            yield ("formulas", i, "text"), item["text"], kind


def int_terms(entry) -> list[int] | None:
    """The terms when every one is an integer, else None."""
    terms = entry.data.get("terms")
    if not isinstance(terms, list) or not terms:
        return None
    if not all(isinstance(t, int) and not isinstance(t, bool) for t in terms):
        return None
    return terms


def first_index(entry) -> int:
    value = entry.data.get("first_index", 0)
    return value if isinstance(value, int) and not isinstance(value, bool) else 0
