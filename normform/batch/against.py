"""The ``--against LIBRARY`` step: enrich each record from a curated bibliography.

The matching itself belongs to the venues/authority area
(:mod:`normform.venues.match`); this adapter loads the library once per
worker process and turns the matcher's answer into (record, review notes,
match summary).  A record with no library match is not sent to review for
that alone (most legacy lines are not in a curated library); a match whose
year, volume or pages disagree is.
"""

from __future__ import annotations

from functools import lru_cache


@lru_cache(maxsize=2)
def _matcher(library: str):
    from normform.venues import match as matching

    return matching, matching.load_library(library)


def match(ref, library: str):
    """``(enriched ref, review notes, summary dict)`` for one record."""
    matching, lib = _matcher(library)
    outcome = matching.match(ref, lib)
    summary = {"matched": bool(outcome.matched), "score": round(float(outcome.score), 4),
               "record": outcome.record.key if outcome.record is not None else None,
               "enriched": list(outcome.enriched), "notes": list(outcome.notes)}
    review = [f"library match: {c.field} differs (line {c.line!r}, library {c.library!r})"
              for c in outcome.conflicts] if outcome.matched else []
    return outcome.reference, review, summary
