"""The ``--against LIBRARY`` step: enrich each record from a curated bibliography.

The matching itself belongs to the venues/authority area
(``normform.venues.match``); this adapter loads the library once per
worker process and turns the matcher's answer into (record, review notes).
"""

from __future__ import annotations

from functools import lru_cache


class MatcherMissing(RuntimeError):
    pass


@lru_cache(maxsize=2)
def _matcher(library: str):
    try:
        from normform.venues import match as matching
    except ImportError as exc:
        raise MatcherMissing("--against needs normform.venues.match, which is not installed") from exc
    return matching, matching.load_library(library)


def match(ref, library: str):
    """``(enriched ref, notes)``; notes explain a doubtful or missing match."""
    matching, lib = _matcher(library)
    outcome = matching.match(ref, lib)
    return outcome.reference, list(outcome.notes)
