"""Kind details the label runs do not give directly: a habilitation thesis
(``Habilitationsschrift``), a report with its own number, a web page's
genre words glued to the title.

The model has no report number, accessed date or software version; those
stay in ``note`` as typed (see :mod:`normform.refs.relabel`).
"""

from __future__ import annotations

import re

from normform.model import Kind, Reference

# German-language thesis words (habilitation, doctoral, diploma, master's):
# a word of their own, so the English patterns in assembly miss them.
_THESIS_WORD = re.compile(r"(?i)\b(?:habilitationsschrift|habilitation thesis|habilitation|dissertationsschrift|"
                          r"doktorarbeit|diplomarbeit|masterarbeit|inauguraldissertation)\b")
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
    if ref.kind is Kind.WEBPAGE and ref.title:
        m = _WEB_TAIL.search(ref.title)
        if m and m.start() > 3:
            changes["title"] = ref.title[: m.start()].rstrip(" ,.;:")
    if ref.genre and _is_report_genre(ref.genre) and ref.kind in (Kind.BOOK, Kind.OTHER) \
            and not ref.container_title and not ref.edition:
        # "Report No. 12, Quillfeather Society": the society issued the report
        changes["kind"] = Kind.REPORT
    return ref.replace(**changes) if changes else ref


def _is_report_genre(genre: str) -> bool:
    g = genre.lower()
    return "rep" in g or "preprint" in g
