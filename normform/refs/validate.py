"""Checks run on an assembled record: identifiers and dates that cannot be
right, and the final period of an abbreviated journal name.

A record that fails a check keeps what was typed (an invalid identifier
stays, with ``valid=False``) but its confidence drops below the review
threshold of 0.9, so batch review sees it.
"""

from __future__ import annotations

import dataclasses
import datetime
import re

from normform.model import Date, FieldInfo, Identifier, Provenance, Reference, Span
from normform.refs import lexicon as lx
from normform.refs.tokens import Token

# A record with a failed check is never trusted: every confidence is <= 1,
# so this factor puts it below the 0.9 review threshold.
DOUBT = 0.8
# Printing started in the 1450s; a reference year before 1500 or after next
# year is a typo far more often than not (common practice in catalogue work).
FIRST_YEAR = 1500


def last_plausible_year() -> int:
    return datetime.date.today().year + 1


def year_plausible(year: int) -> bool:
    return FIRST_YEAR <= year <= last_plausible_year()


def review(ref: Reference, text: str, tokens: list[Token]) -> Reference:
    """The record with the checks applied (a new record; ``ref`` is frozen)."""
    prov = ref.provenance
    if prov is None:
        return ref
    fields = list(prov.fields)
    factor = 1.0
    changes: dict = {}

    # -- identifiers ---------------------------------------------------------
    idents = list(ref.identifiers)
    if "doi" in text or "DOI" in text or "Doi" in text:
        from normform.refs.relabel import bad_doi_mentions
        for start, vstart, end in bad_doi_mentions(text, tokens):
            # "doi:10.abc/xyz": kept as typed, marked invalid (never dropped)
            idents.append(Identifier("doi", text[vstart:end], valid=False))
            fields.append(FieldInfo("doi", 0.3, Span(start, end)))
        if len(idents) != len(ref.identifiers):
            changes["identifiers"] = tuple(idents)
    if any(not i.valid for i in idents):
        factor *= DOUBT

    # -- date ----------------------------------------------------------------
    date = ref.date
    if date is None and ref.issue and len(ref.issue) == 4 and ref.issue[0] in "12" and ref.issue.isdigit() \
            and ref.volume:
        # "3 (1450)" with no date anywhere: the bracket holds a year the date
        # grammar does not take (it is doubted below), not issue 1450
        date = Date(literal=ref.issue)
        changes["issue"] = None
        fields = [FieldInfo("date", f.confidence, f.span) if f.field == "issue" else f for f in fields]
        changes["date"] = date
    if date is not None:
        new = date
        if date.year is None and date.literal and date.literal.isdigit() and len(date.literal) in (3, 4):
            # "(1450)": a year the date grammar does not take is still a year
            new = dataclasses.replace(date, year=int(date.literal), literal=None)
        if new.year is not None and not year_plausible(new.year):
            factor *= DOUBT
            already = not (1500 <= new.year <= 2100) and new is date   # assembly doubted it already
            if not already:
                fields = [FieldInfo(f.field, round(f.confidence * 0.3, 4), f.span) if f.field == "date" else f
                          for f in fields]
        if new is not date:
            changes["date"] = new

    # -- journal abbreviation's final period -------------------------------------
    cont = ref.container_title
    if cont and not cont.endswith(".") and _abbreviated_end(cont):
        at = text.find(cont)
        if at >= 0 and text[at + len(cont):at + len(cont) + 1] == ".":
            changes["container_title"] = cont + "."

    if not changes and factor == 1.0 and len(fields) == len(prov.fields):
        return ref
    conf = prov.confidence
    if conf is not None and factor != 1.0:
        conf = round(conf * factor, 4)
    changes["provenance"] = Provenance(raw=prov.raw, fields=tuple(fields), confidence=conf, origin=prov.origin)
    return ref.replace(**changes)


_ABBREV_ELSEWHERE = re.compile(r"\b[A-Z][a-z]{0,7}\.\s")


def _abbreviated_end(name: str) -> bool:
    """The last word of a journal name is an abbreviation: a known one
    ("Comb."), or a short capitalised word in a name abbreviated elsewhere
    ("Rev. Mat. Iberoam.") -- ISO 4 abbreviates every word it can."""
    last = name.rsplit(" ", 1)[-1]
    if not last.isalpha() or not last[:1].isupper():
        return False
    if (last.lower() + ".") in lx.JOURNAL_WORDS:
        return True
    return len(last) <= 8 and _ABBREV_ELSEWHERE.search(name) is not None
