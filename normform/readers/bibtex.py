"""Read BibTeX into :class:`normform.model.Reference` records, through pybtex.

pybtex's low-level parser reads each entry (string macros, month macros,
``#`` concatenation); entries are cut apart first at lines starting with
``@`` so one malformed entry costs only itself.  Field text goes from TeX to
Unicode (pylatexenc), except inline math, kept as written (``$\\pi$`` stays
``$\\pi$``, see :func:`normform.texconv.math_spans`; ``\\$`` is a dollar); top-level
braces in titles are remembered as capitalization hints; ``crossref`` parents
lend their fields to children.
"""

from __future__ import annotations

import json
import re
from dataclasses import dataclass, field

from normform import capitals, ids
from normform.errors import PositionedError
from normform.model import Date, FieldInfo, Identifier, Kind, Pages, Provenance, Reference, Span
from normform.names import split_names
from normform.texconv import math_spans, to_unicode


class BibtexError(PositionedError):
    """A malformed BibTeX entry: file, line, column and what was expected."""


@dataclass
class BibtexResult:
    records: list[Reference] = field(default_factory=list)
    errors: list[BibtexError] = field(default_factory=list)
    preamble: list[str] = field(default_factory=list)


KIND_OF_TYPE = {
    "article": Kind.ARTICLE, "book": Kind.BOOK, "proceedings": Kind.BOOK, "manual": Kind.BOOK,
    "booklet": Kind.BOOK, "collection": Kind.BOOK, "mvbook": Kind.BOOK,
    "incollection": Kind.CHAPTER, "inbook": Kind.CHAPTER, "inreference": Kind.CHAPTER,
    "inproceedings": Kind.PAPER, "conference": Kind.PAPER,
    "phdthesis": Kind.THESIS, "mastersthesis": Kind.THESIS, "thesis": Kind.THESIS,
    "techreport": Kind.REPORT, "report": Kind.REPORT,
    "online": Kind.WEBPAGE, "electronic": Kind.WEBPAGE, "www": Kind.WEBPAGE,
    "software": Kind.SOFTWARE, "dataset": Kind.SOFTWARE,
    "unpublished": Kind.UNPUBLISHED, "misc": Kind.OTHER,
}
MASTERS = "Master's thesis"

MONTHS = {name: i for i, names in enumerate((
    ("jan", "january", "janvier"), ("feb", "february", "février"), ("mar", "march", "mars"),
    ("apr", "april", "avril"), ("may", "mai"), ("jun", "june", "juin"), ("jul", "july", "juillet"),
    ("aug", "august", "août"), ("sep", "sept", "september", "septembre"), ("oct", "october", "octobre"),
    ("nov", "november", "novembre"), ("dec", "december", "décembre")), 1) for name in names}
SEASONS = ("spring", "summer", "autumn", "fall", "winter")

# Fields stored verbatim (no TeX conversion).
VERBATIM = frozenset({"url", "doi", "eprint", "hdl", "normform-raw", "normform-fields"})
# Our own fields for provenance, so BibTeX round trips keep it.
PROVENANCE_FIELDS = ("normform-raw", "normform-confidence", "normform-fields", "normform-origin")

_ENTRY_START = re.compile(r"^[ \t]*@[A-Za-z]+[ \t]*[{(]", re.MULTILINE)
# A group right after a command word or an accent symbol is its argument, not a protection.
_ARGUMENT_BEFORE = re.compile(r"(?<!\\)(?:\\\\)*\\(?:[A-Za-z]+\*?|['\"^~`=.])$")
_CIRCA = re.compile(r"^(?:c\.|ca\.|circa)\s*(\d{3,4})$", re.IGNORECASE)


def decode_verbatim(text: str) -> str:
    """Inverse of the exporter's JSON-style escaping of raw text."""
    try:
        return json.loads('"' + text + '"')
    except ValueError:
        return text


def _line_col(text: str, pos: int) -> tuple[int, int]:
    line = text.count("\n", 0, pos) + 1
    return line, pos - (text.rfind("\n", 0, pos) + 1) + 1


def _chunks(text: str) -> list[int]:
    starts = [m.start() for m in _ENTRY_START.finditer(text)]
    if not starts or starts[0] != 0:
        starts.insert(0, 0)
    return starts


def read_bibtex(text: str, path: str | None = None) -> BibtexResult:
    """All records of a BibTeX text, plus one positioned error per malformed entry."""
    from pybtex.database.input.bibtex import LowLevelParser, month_names
    from pybtex.exceptions import PybtexError
    from pybtex.scanner import PybtexSyntaxError
    from pybtex.utils import CaseInsensitiveDict

    result = BibtexResult()
    macros = CaseInsensitiveDict(month_names)
    raw_entries: list[tuple[str, str, list[tuple[str, str]], int]] = []
    seen: set[str] = set()
    starts = _chunks(text)
    for n, start in enumerate(starts):
        end = starts[n + 1] if n + 1 < len(starts) else len(text)
        chunk = text[start:end]
        errors: list[PybtexSyntaxError] = []
        poisoned = [False]

        def on_error(exc: PybtexSyntaxError) -> None:
            errors.append(exc)
            poisoned[0] = True  # pybtex then yields the partial entry: drop it

        parser = LowLevelParser(chunk, macros=macros, handle_error=on_error, filename=path)
        parser.macros = macros
        try:
            for entry in parser:
                if poisoned[0]:
                    poisoned[0] = False
                    continue
                kind = entry[0].lower()
                if kind == "string":
                    continue
                if kind == "preamble":
                    result.preamble.append("".join(entry[1][0]))
                    continue
                key, fields = entry[1]
                raw_entries.append((kind, key, fields, start))
        except PybtexSyntaxError as exc:  # defensive: handler normally collects them
            errors.append(exc)
        for exc in errors:
            _, _, pos = exc.error_context_info
            pos = pos or 0
            entry_open = ""  # the closer the entry still needs, when its own brace is open
            if "premature end" in str(exc) and pos > 0 and chunk[pos - 1:pos] in ("{", '"'):
                pos -= 1  # point at the opening brace that is never closed
            elif "premature end" in str(exc) and not chunk[pos:].strip():
                # the chunk ran out with every value closed: the entry's own brace is open,
                # so point at it rather than at the start of the next entry
                opener = re.search(r"[{(]", chunk)
                if opener:
                    pos, entry_open = opener.start(), "}" if opener.group() == "{" else ")"
            line, col = _line_col(text, start + pos)
            message = str(exc.args[0]) if exc.args else str(exc)
            expected: tuple[str, ...] = ()
            m = re.match(r"(.*) expected$", message)
            if m:
                expected = (m.group(1),)
                message = f"malformed entry: {message}; the entry is skipped"
            elif "premature end" in message and entry_open:
                expected = (f"'{entry_open}'",)
                message = f"unclosed entry: no '{entry_open}' closes this entry; the entry is skipped"
            elif "premature end" in message:
                expected = ("'}'",)
                message = "unclosed brace or quote: the entry ends before this value is closed; the entry is skipped"
            result.errors.append(BibtexError(message, line=line, column=col, source=text,
                                             expected=expected, path=path))
    # Duplicate keys and fields, then crossref inheritance.
    entries: dict[str, tuple[str, dict[str, str], int]] = {}
    order: list[str] = []
    for kind, key, fields, start in raw_entries:
        if key.lower() in seen:
            line, col = _line_col(text, start)
            result.errors.append(BibtexError(f"duplicate entry key {key!r}; the first entry is kept",
                                             line=line, column=col, source=text, path=path))
            continue
        seen.add(key.lower())
        values: dict[str, str] = {}
        for name, value_list in fields:
            lname = name.lower()
            if lname in values:
                line, col = _line_col(text, start)
                result.errors.append(BibtexError(f"entry {key!r} repeats field {name!r}; the first is kept",
                                                 line=line, column=col, source=text, path=path))
                continue
            values[lname] = " ".join("".join(value_list).split())
        entries[key.lower()] = (kind, values, start)
        order.append(key)
    for key in order:
        kind, values, start = entries[key.lower()]
        parent_key = values.get("crossref")
        if parent_key:
            parent = entries.get(parent_key.lower())
            if parent is None:
                line, col = _line_col(text, start)
                result.errors.append(BibtexError(f"entry {key!r} refers to missing crossref {parent_key!r}",
                                                 line=line, column=col, source=text, path=path))
            else:
                values = inherit(values, parent[1])
        try:
            result.records.append(to_reference(kind, key, values))
        except (PybtexError, ValueError) as exc:  # e.g. a name with too many commas
            line, col = _line_col(text, start)
            result.errors.append(BibtexError(f"entry {key!r} skipped: {exc}", line=line, column=col,
                                             source=text, path=path))
    return result


def inherit(child: dict[str, str], parent: dict[str, str]) -> dict[str, str]:
    """BibTeX crossref rule: the child takes every field it lacks; a parent's title is the child's booktitle."""
    merged = dict(child)
    for name, value in parent.items():
        if name in ("crossref", "key", "ids"):
            continue
        if name == "title":
            merged.setdefault("booktitle", value)
            continue
        merged.setdefault(name, value)
    return merged


def _text(values: dict[str, str], name: str) -> str | None:
    value = values.pop(name, None)
    if value is None:
        return None
    return value if name in VERBATIM else (to_unicode(value, keep_math=True) or None)


def title_hints(tex: str) -> list[str]:
    """Unicode text of the top-level brace groups of a title, skipping accent groups ``{\\'e}``,
    groups inside math and a group that holds just one math span (``{$Q$}``: math protection)."""
    out: list[str] = []
    depth, begin = 0, 0
    math = {a: b for a, b in math_spans(tex)}
    skip_to = 0
    for i, ch in enumerate(tex):
        if i < skip_to:
            continue
        if depth == 0 and i in math:   # braces inside math at the top level are not hints
            skip_to = math[i]
            continue
        if ch == "{" and (i == 0 or tex[i - 1] != "\\"):
            if depth == 0:
                begin = i
            depth += 1
        elif ch == "}" and (i == 0 or tex[i - 1] != "\\") and depth:
            depth -= 1
            if depth == 0:
                inner = tex[begin + 1:i]
                before = tex[:begin].rstrip()
                is_argument = _ARGUMENT_BEFORE.search(before) is not None
                bare = inner.strip()
                if (inner and not inner.startswith("\\") and not is_argument
                        and math_spans(bare) != [(0, len(bare))]):
                    text = to_unicode(inner, keep_math=True)
                    if text:
                        out.append(text)
    return out


def parse_pages(text: str) -> Pages:
    parts = re.split(r"\s*(?:--|–|—|-)\s*", text, maxsplit=1)
    if len(parts) == 2 and parts[0] and parts[1]:
        return Pages(first=parts[0], last=parts[1])
    return Pages(first=text)


def _date(values: dict[str, str], extra: list[tuple[str, str]]) -> Date | None:
    year_text = _text(values, "year")
    month_text = _text(values, "month")
    day_text = _text(values, "day")
    literal = _text(values, "pubstate")
    date_text = values.pop("date", None)
    year = month = day = None
    circa = False
    season = None
    if date_text and not year_text:
        m = re.fullmatch(r"(\d{4})(?:-(\d{2}))?(?:-(\d{2}))?", date_text.strip())
        if m:
            year = int(m.group(1))
            month = int(m.group(2)) if m.group(2) else None
            day = int(m.group(3)) if m.group(3) else None
        else:
            extra.append(("date", date_text))
    if year_text:
        m = _CIRCA.match(year_text)
        if year_text.isdigit():
            year = int(year_text)
        elif m:
            year, circa = int(m.group(1)), True
        elif literal is None:
            literal = year_text
        else:
            extra.append(("year", year_text))
    if month_text:
        low = month_text.lower().rstrip(".")
        if low.isdigit() and 1 <= int(low) <= 12:
            month = int(low)
        elif low in MONTHS:
            month = MONTHS[low]
        elif low in SEASONS:
            season = month_text
        else:
            extra.append(("month", month_text))
    if day_text:
        if day_text.isdigit():
            day = int(day_text)
        else:
            extra.append(("day", day_text))
    if year is None and month is None and day is None and season is None and literal is None:
        return None
    return Date(year=year, month=month, day=day, season=season, circa=circa, literal=literal)


def _idents(values: dict[str, str]) -> list[Identifier]:
    out: list[Identifier] = []

    def add(scheme: str, name: str, sep: str) -> None:
        value = values.pop(name, None)
        if value:
            for part in re.split(sep, value):
                if part.strip():
                    out.append(ids.make(scheme, part.strip()))

    add("doi", "doi", r"\s+")
    archive = values.get("archiveprefix", values.get("eprinttype", "")).lower()
    if values.get("eprint") and archive in ("", "arxiv"):
        values.pop("archiveprefix", None)
        values.pop("eprinttype", None)
        cls = values.pop("primaryclass", None) or values.pop("eprintclass", None)
        for part in re.split(r"[\s,]+", values.pop("eprint")):
            if part:
                out.append(ids.make("arxiv", part, detail=to_unicode(cls) if cls else None))
                cls = None  # one class, for the first eprint
    add("isbn", "isbn", r"\s*[,;]\s*")
    add("issn", "issn", r"\s*[,;]\s*")
    add("mr", "mrnumber", r"\s*[,;]\s*")
    add("zbl", "zbl", r"\s*[,;]\s*")
    add("handle", "hdl", r"\s+")
    add("url", "url", r"\s+")
    return out


def _provenance(values: dict[str, str]) -> Provenance | None:
    if not any(name in values for name in PROVENANCE_FIELDS):
        return None
    raw = values.pop("normform-raw", None)
    conf = values.pop("normform-confidence", None)
    spec = values.pop("normform-fields", None)
    origin = values.pop("normform-origin", None)
    infos: list[FieldInfo] = []
    if spec:
        for item in decode_verbatim(spec).split(";"):
            m = re.fullmatch(r"\s*([\w.-]+)=([0-9.eE+-]+)(?:@(\d+)-(\d+))?\s*", item)
            if m:
                span = Span(int(m.group(3)), int(m.group(4))) if m.group(3) else None
                infos.append(FieldInfo(m.group(1), float(m.group(2)), span))
    return Provenance(raw=decode_verbatim(raw) if raw is not None else None, fields=tuple(infos),
                      confidence=float(conf) if conf else None,
                      origin=to_unicode(origin, keep_math=True) if origin else None)


def to_reference(entry_type: str, key: str, fields: dict[str, str]) -> Reference:
    """One entry (type, key, raw TeX field values) as a Reference."""
    values = dict(fields)
    kind = KIND_OF_TYPE.get(entry_type, Kind.OTHER)
    extra: list[tuple[str, str]] = []
    if entry_type not in KIND_OF_TYPE:
        extra.append(("entrytype", entry_type))
    authors = split_names(values.pop("author")) if "author" in values else ()
    editors = split_names(values.pop("editor")) if "editor" in values else ()
    translators = split_names(values.pop("translator")) if "translator" in values else ()
    title_tex = values.get("title")
    title = _text(values, "title")
    protected = capitals.canonical_hints(title, title_hints(title_tex)) if title and title_tex else ()
    report_number = None
    if kind is Kind.ARTICLE:
        container = _text(values, "journal") or _text(values, "journaltitle")
        issue = _text(values, "number") or _text(values, "issue")
        series_number = _text(values, "seriesnumber")
    elif kind is Kind.REPORT:   # a report's "number" is its own number
        container = _text(values, "booktitle")
        issue = _text(values, "issue")
        report_number = _text(values, "number")
        series_number = _text(values, "seriesnumber")
    else:
        container = _text(values, "booktitle")
        issue = _text(values, "issue")
        series_number = _text(values, "number")
    if report_number is None:
        report_number = _text(values, "reportnumber")
    genre = _text(values, "type")
    if kind is Kind.THESIS and genre is None and entry_type == "mastersthesis":
        genre = MASTERS
    publisher = _text(values, "publisher")
    for alt in ("school", "institution", "organization"):
        if alt in values:
            if publisher is None:
                publisher = _text(values, alt)
            else:
                break
    pages_text = _text(values, "pages")
    article = _text(values, "eid")
    count = _text(values, "pagetotal")
    pages = None
    if pages_text or article or count:
        base = parse_pages(pages_text) if pages_text else Pages()
        pages = Pages(first=base.first, last=base.last, article=article, count=count)
    date = _date(values, extra)
    accessed = Date.from_iso(_text(values, "urldate"))   # biblatex urldate
    identifiers = _idents(values)
    provenance = _provenance(values)
    ref = Reference(
        kind=kind, authors=authors, editors=editors, translators=translators,
        title=title, container_title=container,
        series=_text(values, "series"), series_number=series_number,
        volume=_text(values, "volume"), issue=issue, pages=pages, date=date,
        publisher=publisher, place=_text(values, "address") or _text(values, "location"),
        edition=_text(values, "edition"), genre=genre, language=_text(values, "language"),
        report_number=report_number, accessed=accessed, version=_text(values, "version"),
        identifiers=tuple(identifiers), note=_text(values, "note"), key=key,
        title_protected=protected, provenance=provenance,
        extra=tuple(extra) + tuple((name, value if name in VERBATIM else to_unicode(value, keep_math=True))
                                   for name, value in values.items()),
    )
    return ref


__all__ = ["BibtexError", "BibtexResult", "read_bibtex", "to_reference", "title_hints", "KIND_OF_TYPE"]
