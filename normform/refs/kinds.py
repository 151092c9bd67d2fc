"""Kind details the label runs do not give directly: a habilitation thesis
(``Habilitationsschrift``), a report with its own number, a web page's
genre words glued to the title.

The label repairs (:mod:`normform.refs.relabel`) file a report's number,
an accessed date and a version as ``note`` tokens; here they move from the
note to ``report_number``, ``accessed`` and ``version`` (with their spans),
and the note keeps whatever else it said.
"""

from __future__ import annotations

import re

from normform.model import Date, FieldInfo, Kind, Provenance, Reference, Span
from normform.readers.bibtex import MONTHS
from normform.refs.relabel import _ACCESS, _REPORT_NO, _VERSION

# German-language thesis words (habilitation, doctoral, diploma, master's):
# a word of their own, so the English patterns in assembly miss them.
_THESIS_WORD = re.compile(r"(?i)\b(?:habilitationsschrift|habilitation thesis|habilitation|dissertationsschrift|"
                          r"doktorarbeit|diplomarbeit|masterarbeit|inauguraldissertation)\b")
# "Thesis (Ph.D.)", "Dissertation (M.Sc.)", "Diss. (Dr. rer. nat.)" are
# worded as "Ph.D. thesis", the way most styles print the
# genre and the parser gives it for "Ph.D. thesis, University of ...".
_BRACKET_DEGREE = re.compile(r"(?P<word>Thesis|Dissertation|Diss\.?)\s*\(\s*(?P<deg>[^()]{2,30}?)\s*\)\Z")
_WEB_TAIL = re.compile(r"(?i)[,.]?\s*\[?(?:web ?page|website|web site|online)\]?\Z")


def details(ref: Reference, text: str) -> Reference:
    changes: dict = {}
    if "abil" in text or "rbeit" in text or "issertationsschrift" in text:
        m = _THESIS_WORD.search(text)
        if m and not ref.container_title:
            word = m.group()
            if ref.kind is not Kind.THESIS:
                changes["kind"] = Kind.THESIS
            if not ref.genre or word.lower() not in ref.genre.lower():
                changes["genre"] = word
            title = ref.title
            if title and title.lower().endswith(word.lower()) and len(title) > len(word) + 3:
                # "Zählen von Federn, Habilitationsschrift": the genre is no title word
                changes["title"] = title[: -len(word)].rstrip(" ,.;:")
    if ref.genre and "(" in ref.genre:
        info = ref.provenance.info("genre") if ref.provenance is not None else None
        typed = text[info.span.start:info.span.end] if info is not None and info.span is not None else ref.genre
        m = _BRACKET_DEGREE.match(typed.rstrip(" ,.;:-–—")) or _BRACKET_DEGREE.match(ref.genre)
        if m:
            word = "thesis" if m.group("word") == "Thesis" else "dissertation"
            changes["genre"] = m.group("deg") + " " + word
            if ref.kind is not Kind.THESIS and not ref.container_title:
                changes["kind"] = Kind.THESIS   # ("Diss." is no thesis word of the kind rules)
    if ref.kind is Kind.WEBPAGE and ref.title:
        m = _WEB_TAIL.search(ref.title)
        if m and m.start() > 3:
            changes["title"] = ref.title[: m.start()].rstrip(" ,.;:")
    if ref.genre and _is_report_genre(ref.genre) and ref.kind in (Kind.BOOK, Kind.OTHER) \
            and not ref.container_title and not ref.edition:
        # "Report No. 12, Quillfeather Society": the society issued the report
        changes["kind"] = Kind.REPORT
    ref = ref.replace(**changes) if changes else ref
    return _from_note(ref, text) if ref.note else ref


_NUMBER_WORD = re.compile(r"(?:No|Nr|no|nr|Number|number)\.?\s?|#\s?")
_ACCESS_VERB = re.compile(r"(?i)(?:last\s+)?(?:accessed|retrieved|visited|viewed|consulted)(?:\s+on)?:?\s*")


def _from_note(ref: Reference, text: str) -> Reference:
    """Report number, accessed date and version out of the note, where the
    text shows the phrase that made them note tokens."""
    note = ref.note or ""
    found: dict = {}
    spans: list[tuple[str, Span]] = []

    def take(field: str, piece: str, start: int, end: int, value) -> None:
        nonlocal note
        # the note holds the tokens joined by single spaces or none ("No . 12" -> "No. 12")
        m = re.search(r"(?<![\w.])" + r"\s*".join(re.escape(c) for c in piece if not c.isspace()) + r"(?!\w)", note)
        if m is None or field in found or value is None:
            return
        note = (note[:m.start()] + note[m.end():])
        found[field] = value
        spans.append((field, Span(start, end)))

    if ref.kind in (Kind.REPORT, Kind.BOOK, Kind.OTHER) or ref.genre:
        for m in _REPORT_NO.finditer(text):
            number = _NUMBER_WORD.sub("", m.group("num"), count=1).strip()
            take("report_number", m.group("num"), m.start("num"), m.end("num"), number or None)
    for m in _ACCESS.finditer(text):
        take("accessed", m.group(), m.start(), m.end(), _date(_ACCESS_VERB.sub("", m.group(), count=1)))
    for m in _VERSION.finditer(text):
        number = re.search(r"\d[\d.]*", m.group()).group()
        # "v2.1" reaches the note as "2.1" (assembly drops the glued "v"): try the whole phrase first
        take("version", m.group(), m.start(), m.end(), number)
        if "version" not in found and m.group()[:1] in "Vv" and not m.group().lower().startswith("ver"):
            take("version", number, m.start(), m.end(), number)
    if not found:
        return ref
    note = re.sub(r"\s*;(\s*;)+", ";", note).strip(" ,;.:") or None
    return ref.replace(note=note, **found, provenance=_moved(ref.provenance, spans, note is None))


def _moved(prov: Provenance | None, spans: list[tuple[str, Span]], note_gone: bool) -> Provenance | None:
    if prov is None:
        return None
    conf = prov.confidence_of("note")
    conf = 0.9 if conf is None else conf
    kept = tuple(i for i in prov.fields if not (note_gone and i.field == "note"))
    return Provenance(raw=prov.raw, fields=kept + tuple(FieldInfo(f, conf, s) for f, s in spans),
                      confidence=prov.confidence, origin=prov.origin)


def _date(text: str) -> Date | None:
    """``3 May 2020``, ``May 3, 2020``, ``May 2020``, ``2020-05-03``, ``3/5/2020``
    (day and month told apart only when one is above 12; else kept as typed)."""
    t = text.strip(" .,")
    m = re.fullmatch(r"(\d{4})-(\d{2})-(\d{2})", t)
    if m:
        return Date(int(m.group(1)), int(m.group(2)), int(m.group(3)))
    m = re.fullmatch(r"(\d{1,2})/(\d{1,2})/(\d{4})", t)
    if m:
        a, b, y = int(m.group(1)), int(m.group(2)), int(m.group(3))
        if a > 12 >= b:
            return Date(y, b, a)
        if b > 12 >= a:
            return Date(y, a, b)
        return Date(literal=t)
    m = re.fullmatch(r"(?:(\d{1,2})\.?\s+)?([^\W\d]+)\.?(?:\s+(\d{1,2}),)?\s+(\d{4})", t)
    if m and m.group(2).lower() in MONTHS and not (m.group(1) and m.group(3)):
        day = m.group(1) or m.group(3)
        return Date(int(m.group(4)), MONTHS[m.group(2).lower()], int(day) if day else None)
    return Date(literal=t)


def _is_report_genre(genre: str) -> bool:
    g = genre.lower()
    return "rep" in g or "preprint" in g
