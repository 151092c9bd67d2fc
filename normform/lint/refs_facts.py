"""Facts about an entry's references shared by several rules (computed once per entry)."""

from __future__ import annotations

import re
import unicodedata
from dataclasses import dataclass

from normform.lint import services

ID_FIELDS = ("doi", "arxiv", "isbn", "issn", "mr", "zbl")


@dataclass
class RefItem:
    path: tuple
    text: str | None = None      # a free-form line
    table: dict | None = None    # a structured reference


def items(entry) -> list[RefItem]:
    cached = entry.cache.get("ref_items")
    if cached is None:
        cached = []
        refs = entry.data.get("references")
        for i, item in enumerate(refs if isinstance(refs, list) else []):
            if isinstance(item, str):
                cached.append(RefItem(("references", i), text=item))
            elif isinstance(item, dict):
                cached.append(RefItem(("references", i), table=item))
        entry.cache["ref_items"] = cached
    return cached


def reference_ids(entry) -> list[tuple[tuple, object, tuple]]:
    """``(reference path, Identifier, (string path, start, end))`` for every identifier."""
    cached = entry.cache.get("ref_ids")
    if cached is not None:
        return cached
    cached = []
    refs = items(entry)
    if refs:
        ids = services.need("normform.ids")
        for item in refs:
            if item.text is not None:
                found = ids.find_all(item.text)
                for ident, span in found:
                    cached.append((item.path, ident, (item.path, span.start, span.end)))
                for ident, start, end in _loose(ids, item.text, found):
                    cached.append((item.path, ident, (item.path, start, end)))
            else:
                for scheme in ID_FIELDS:
                    raw = item.table.get(scheme)
                    if isinstance(raw, str):
                        path = item.path + (scheme,)
                        cached.append((item.path, ids.make(scheme, raw), (path, 0, len(raw))))
    entry.cache["ref_ids"] = cached
    return cached


# A keyword followed by something that is not a well-formed identifier: the
# strict finder skips these, but a contributor meant an identifier there.
_LOOSE = {
    "doi": re.compile(r"(?<![\w])doi\s*:\s*(\S+?)[.,;]?(?=\s|$)", re.I),
    "arxiv": re.compile(r"(?<![\w])arxiv\s*:\s*(\S+?)[.,;]?(?=\s|$)", re.I),
}


def _loose(ids, text: str, found) -> list:
    out = []
    for scheme, pattern in _LOOSE.items():
        for m in pattern.finditer(text):
            start, end = m.span(1)
            if any(s.start < end and start < s.end for _, s in found):
                continue
            out.append((ids.make(scheme, m.group(1)), start, end))
    return out


def _name_from_text(text: str):
    from normform.model import Name

    text = text.strip()
    if "," in text:
        family, given = (p.strip() for p in text.split(",", 1))
        return Name(family=family, given=given or None)
    parts = text.split()
    return Name(family=parts[-1], given=" ".join(parts[:-1]) or None) if parts else Name(literal=text)


def reference_from_table(table: dict):
    """The model :class:`~normform.model.Reference` of a structured entry reference (a TOML/JSON table
    with the model's field names; ``pages`` as "first-last", ``year`` an integer, identifiers by scheme)."""
    from normform.model import Date, Kind, Name, Pages, Provenance, Reference

    def names(key):
        out = []
        for item in table.get(key) or ():
            if isinstance(item, str):
                out.append(_name_from_text(item))
            elif isinstance(item, dict):
                out.append(Name(**{k: v for k, v in item.items() if isinstance(v, str)}))
        return tuple(out)

    pages = None
    if isinstance(table.get("pages"), str):
        bits = re.split(r"\s*[-–—]+\s*", table["pages"])
        pages = Pages(first=bits[0], last=bits[1] if len(bits) > 1 else None)
    year = table.get("year")
    ids = services.need("normform.ids")
    idents = tuple(ids.make(s, table[s]) for s in ID_FIELDS if isinstance(table.get(s), str))
    default = "article" if isinstance(table.get("container_title"), str) and "volume" in table else "other"
    try:
        kind = Kind(table.get("kind", default))   # a journal with a volume: an article, unless told
    except ValueError:
        kind = Kind.OTHER
    text_fields = {k: table[k] for k in ("title", "container_title", "series", "series_number", "volume",
                                          "issue", "publisher", "place", "edition", "genre", "note",
                                          "report_number", "version")
                   if isinstance(table.get(k), str)}
    accessed = Date.from_iso(table["accessed"]) if isinstance(table.get("accessed"), str) else None
    return Reference(kind=kind, authors=names("authors"), editors=names("editors"), pages=pages, accessed=accessed,
                     date=Date(year=year) if isinstance(year, int) else None, identifiers=idents,
                     provenance=Provenance(confidence=1.0), **text_fields)


_from_table = reference_from_table     # the former private name, kept for existing callers


def parsed(entry, item: RefItem):
    """The model record of one reference (parsed when it is a free-form line)."""
    cache = entry.cache.setdefault("ref_parsed", {})
    if item.path not in cache:
        cache[item.path] = services.parse_reference(item.text) if item.text is not None else reference_from_table(item.table)
    return cache[item.path]


def _fold(text: str | None) -> str:
    if not text:
        return ""
    text = unicodedata.normalize("NFKD", text)
    return re.sub(r"[^a-z0-9]+", "", "".join(c for c in text if not unicodedata.combining(c)).lower())


def identity_key(ref, raw: str | None = None) -> tuple:
    """Two references with equal keys cite the same work (DOI first, else author/year/title)."""
    doi = ref.ident("doi") if ref is not None else None
    if doi is not None:
        return ("doi", doi.value.lower())
    arxiv = ref.ident("arxiv") if ref is not None else None
    if arxiv is not None:
        return ("arxiv", arxiv.value.lower().split("v")[0] if arxiv.value[:4].isdigit() else arxiv.value.lower())
    if ref is not None and ref.title and ref.authors:
        return ("work", _fold(ref.authors[0].family_full()), ref.year, _fold(ref.title)[:60])
    return ("text", _fold(raw))


def work_key(entry, item: RefItem) -> tuple:
    """``identity_key`` of one reference, preferring identifiers found in its own text."""
    for ref_path, ident, _span in reference_ids(entry):
        if ref_path == item.path and ident.valid and ident.scheme in ("doi", "arxiv"):
            value = ident.value.lower()
            if ident.scheme == "arxiv" and value[:4].isdigit():
                value = value.split("v")[0]
            return (ident.scheme, value)
    return identity_key(parsed(entry, item), item.text)
