"""Read CSL-JSON (CSL 1.0.2) into references: the exact inverse of the CSL-JSON exporter.

Also accepts the top-level extension keys ``arxiv``/``mr``/``zbl`` some
datasets put beside the CSL variables.  ``number`` is the report number of a
report (CSL types ``report``, ``article``, ``standard``) and the article
number of anything else.
"""

from __future__ import annotations

import json
import re

from normform import ids
from normform.errors import PositionedError
from normform.model import Date, FieldInfo, Identifier, Kind, Name, Pages, Provenance, Reference, Span

KIND_OF_TYPE = {
    "article-journal": Kind.ARTICLE, "article-magazine": Kind.ARTICLE, "article-newspaper": Kind.ARTICLE,
    "review": Kind.ARTICLE, "review-book": Kind.ARTICLE, "periodical": Kind.BOOK,
    "book": Kind.BOOK, "collection": Kind.BOOK, "classic": Kind.BOOK,
    "chapter": Kind.CHAPTER, "entry": Kind.CHAPTER, "entry-dictionary": Kind.CHAPTER,
    "entry-encyclopedia": Kind.CHAPTER, "paper-conference": Kind.PAPER, "speech": Kind.PAPER,
    "thesis": Kind.THESIS, "report": Kind.REPORT, "article": Kind.REPORT, "standard": Kind.REPORT,
    "webpage": Kind.WEBPAGE, "post": Kind.WEBPAGE, "post-weblog": Kind.WEBPAGE,
    "software": Kind.SOFTWARE, "dataset": Kind.SOFTWARE,
    "manuscript": Kind.UNPUBLISHED, "personal_communication": Kind.UNPUBLISHED,
}


class CslJsonError(PositionedError):
    """Malformed CSL-JSON: bad JSON (with its position) or an item that is not an object."""


def _name(data) -> Name:
    if isinstance(data, str):
        return Name(literal=data)
    if "literal" in data:
        return Name(literal=str(data["literal"]))
    return Name(family=data.get("family"), given=data.get("given"),
                particle=data.get("non-dropping-particle"),
                dropping_particle=data.get("dropping-particle"), suffix=data.get("suffix"))


def _date(data) -> Date | None:
    if not isinstance(data, dict):
        return Date(literal=str(data))
    year = month = day = None
    parts = data.get("date-parts")
    if parts and parts[0]:
        first = [int(p) if p not in (None, "") else None for p in parts[0]]  # ValueError: reported per item
        year, month, day = (first + [None, None, None])[:3]
    elif "raw" in data:
        bits = str(data["raw"]).split("-")
        nums = [int(b) if b.isdigit() else None for b in bits] + [None, None, None]
        year, month, day = nums[:3]
    circa = data.get("circa")
    return Date(year=year, month=month, day=day, season=data.get("season") and str(data["season"]),
                circa=bool(circa) and circa not in ("false", "0"), literal=data.get("literal"))


def _str(value) -> str | None:
    return None if value is None else str(value)


def _pages(item: dict, number: str | None) -> Pages | None:
    page, count = _str(item.get("page")), _str(item.get("number-of-pages"))
    if page is None and number is None and count is None:
        return None
    first = last = None
    if page is not None:
        m = re.fullmatch(r"([^-–]*)[-–]+(.*)", page)
        if m and m.group(2):
            first, last = m.group(1) or None, m.group(2)
        else:
            first = page
    return Pages(first=first, last=last, article=number, count=count)


def _split(value, sep: str) -> list[str]:
    return [p.strip() for p in re.split(sep, str(value)) if p.strip()]


def from_csl(item: dict) -> Reference:
    """One CSL-JSON item as a Reference."""
    custom = item.get("custom") or {}
    kind = KIND_OF_TYPE.get(item.get("type", ""), Kind.OTHER)
    identifiers: list[Identifier] = []
    # Canonical scheme order, the same as the BibTeX reader's.
    if item.get("DOI"):
        identifiers += [ids.make("doi", v) for v in _split(item["DOI"], r"\s+")]
    arx_class = custom.get("arxiv_class")
    for n, value in enumerate(_split(custom.get("arxiv") or item.get("arxiv") or "", r"\s*,\s*")):
        identifiers.append(ids.make("arxiv", value, detail=arx_class if n == 0 else None))
    for var, scheme in (("ISBN", "isbn"), ("ISSN", "issn")):
        if item.get(var):
            identifiers += [ids.make(scheme, v) for v in _split(item[var], r"\s*[,;]\s*")]
    reviews = str(custom.get("mr_review", "")).split(", ") if "mr_review" in custom else []
    for n, value in enumerate(_split(custom.get("mr") or item.get("mr") or "", r"\s*,\s*")):
        review = reviews[n] if n < len(reviews) and reviews[n] else None
        ident = ids.make("mr", value)
        if review:
            ident = Identifier(ident.scheme, ident.value, ident.valid, review)
        identifiers.append(ident)
    for value in _split(custom.get("zbl") or item.get("zbl") or "", r"\s*,\s*"):
        identifiers.append(ids.make("zbl", value))
    for value in _split(custom.get("handle") or "", r"\s*,\s*"):
        identifiers.append(ids.make("handle", value))
    if item.get("URL"):
        identifiers += [ids.make("url", v) for v in _split(item["URL"], r"\s+")]
    provenance = None
    if any(k in custom for k in ("raw", "confidence", "field_confidence", "origin", "provenance")):
        spans = custom.get("field_spans", {})
        fields = tuple(FieldInfo(name, float(conf), Span(*spans[name]) if name in spans else None)
                       for name, conf in custom.get("field_confidence", {}).items())
        conf = custom.get("confidence")
        provenance = Provenance(raw=custom.get("raw"), fields=fields,
                                confidence=None if conf is None else float(conf), origin=custom.get("origin"))
    # CSL "number" of a report is its report number, else the article number
    # (the exporter keeps the other one under custom)
    if kind is Kind.REPORT:
        report_number, article = _str(item.get("number")), _str(custom.get("article_number"))
    else:
        report_number, article = _str(custom.get("report_number")), _str(item.get("number"))
    names = lambda role: tuple(_name(n) for n in item.get(role, ()))  # noqa: E731
    return Reference(
        kind=kind, authors=names("author"), editors=names("editor"), translators=names("translator"),
        title=_str(item.get("title")), container_title=_str(item.get("container-title")),
        series=_str(item.get("collection-title")), series_number=_str(item.get("collection-number")),
        volume=_str(item.get("volume")), issue=_str(item.get("issue")), pages=_pages(item, article),
        date=_date(item["issued"]) if "issued" in item else None,
        accessed=_date(item["accessed"]) if "accessed" in item else None,
        report_number=report_number, version=_str(item.get("version")),
        publisher=_str(item.get("publisher")), place=_str(item.get("publisher-place")),
        edition=_str(item.get("edition")), genre=_str(item.get("genre")), language=_str(item.get("language")),
        identifiers=tuple(identifiers), note=_str(item.get("note")),
        key=_str(item.get("id")), title_protected=tuple(custom.get("title_protected", ())),
        extra=tuple((str(k), str(v)) for k, v in custom.get("extra", ())), provenance=provenance,
    )


def _line_col(text: str, pos: int) -> tuple[int, int]:
    return text.count("\n", 0, pos) + 1, pos - (text.rfind("\n", 0, pos) + 1) + 1


def _items(text: str, path: str | None) -> list[tuple[int, object]]:
    """(offset, value) of each array element, so errors can name a line."""
    decoder = json.JSONDecoder()
    try:
        stripped = len(text) - len(text.lstrip())
        if not text[stripped:stripped + 1] == "[":
            # one object, or JSON Lines (one object per line, as `normform refs` writes)
            out, pos = [], stripped
            while pos < len(text):
                if out and text[pos:pos + 1] != "{":
                    raise json.JSONDecodeError("extra data after the value", text, pos)
                value, end = decoder.raw_decode(text, pos)
                out.append((pos, value))
                pos = end
                while pos < len(text) and text[pos] in " \t\r\n":
                    pos += 1
            return out
        out, pos = [], stripped + 1
        while True:
            while pos < len(text) and text[pos] in " \t\r\n":
                pos += 1
            if text[pos:pos + 1] == "]":
                if text[pos + 1:].strip():
                    raise json.JSONDecodeError("extra data after the array", text, pos + 1)
                return out
            if out:
                if text[pos:pos + 1] != ",":
                    raise json.JSONDecodeError("expected ',' or ']'", text, pos)
                pos += 1
                while pos < len(text) and text[pos] in " \t\r\n":
                    pos += 1
            value, end = decoder.raw_decode(text, pos)
            out.append((pos, value))
            pos = end
    except json.JSONDecodeError as exc:
        raise CslJsonError(f"invalid JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                           source=text, path=path, expected=("a JSON array of CSL items, or one item per line",)) from None
    except IndexError:
        line, col = _line_col(text, len(text))
        raise CslJsonError("invalid JSON: the array is not closed", line=line, column=col,
                           source=text, path=path, expected=("']'",)) from None


def read_csljson_all(text: str, path: str | None = None) -> tuple[list[Reference], list[CslJsonError]]:
    """Every readable item, plus one positioned error per item that is not (bad JSON stops all)."""
    records: list[Reference] = []
    errors: list[CslJsonError] = []
    for n, (offset, item) in enumerate(_items(text, path)):
        line, col = _line_col(text, offset)
        if not isinstance(item, dict):
            errors.append(CslJsonError(f"item {n + 1} is not an object", line=line, column=col,
                                       source=text, path=path, expected=("an object with id and type",)))
            continue
        try:
            records.append(from_csl(item))
        except (TypeError, ValueError, AttributeError, KeyError) as exc:
            errors.append(CslJsonError(f"item {n + 1} ({item.get('id', 'no id')}): unreadable value: {exc}",
                                       line=line, column=col, source=text, path=path))
    return records, errors


def read_csljson(text: str, path: str | None = None) -> list[Reference]:
    """All items of a CSL-JSON text (an array, one object, or JSON Lines); raises the first error."""
    records, errors = read_csljson_all(text, path)
    if errors:
        raise errors[0]
    return records


__all__ = ["CslJsonError", "from_csl", "read_csljson", "read_csljson_all", "KIND_OF_TYPE"]
