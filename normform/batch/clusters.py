"""Cluster records that cite the same work differently.

Blocking first (cheap, exact keys from :mod:`normform.batch.keys`, read
from the work database in sorted order so memory stays small), then
:mod:`rapidfuzz` similarity inside each block:

1. same first-author key      -> titles similar, years equal or one unknown;
2. same title prefix          -> the same, and authors compatible;
3. a shared valid identifier  -> DOI, arXiv, MR or Zbl;
4. same folded text           -> a line typed twice (when it has some substance).

Matches are merged with union-find; each cluster's canonical record is the
member with the highest confidence, then most fields, then the first line.
"""

from __future__ import annotations

import collections
import itertools
import sqlite3
from functools import lru_cache
from typing import Iterator

from rapidfuzz import fuzz, process

WINDOW = 60          # in a huge block compare each title with its neighbours only
BIG_BLOCK = 400


class UnionFind:
    def __init__(self) -> None:
        self.parent: dict[int, int] = {}

    def find(self, x: int) -> int:
        parent = self.parent
        root = x
        while parent.get(root, root) != root:
            root = parent[root]
        while parent.get(x, x) != root:
            parent[x], x = root, parent[x]
        return root

    def union(self, a: int, b: int) -> None:
        ra, rb = self.find(a), self.find(b)
        if ra != rb:
            lo, hi = min(ra, rb), max(ra, rb)
            self.parent[hi] = lo
            self.parent.setdefault(lo, lo)


def _similar_pairs(db: sqlite3.Connection, column: str, where: str,
                   similarity: float) -> Iterator[tuple[tuple, tuple]]:
    """Pairs ``((seq, title, author, year), ...)`` with similar titles, within blocks of equal ``column``.

    Rows arrive sorted by (key, title), so memory is bounded by ``BIG_BLOCK``:
    a small block compares all its pairs, a big one each title with its
    ``WINDOW`` predecessors.  The comparisons run inside rapidfuzz
    (``process.extract``), not in a Python loop.
    """
    cur = db.execute(f"SELECT {column}, seq, title, author, year FROM keys WHERE {where} "
                     f"ORDER BY {column}, title, seq")
    for _, group in itertools.groupby(cur, key=lambda row: row[0]):
        buf = []
        for row in group:
            buf.append(row[1:])
            if len(buf) > BIG_BLOCK:
                break
        if len(buf) <= BIG_BLOCK:
            for i in range(len(buf) - 1):
                yield from _hits(buf[i], buf[i + 1:], similarity)
            continue
        window: collections.deque = collections.deque(maxlen=WINDOW)
        for row in itertools.chain(buf, (r[1:] for r in group)):
            yield from _hits(row, list(window), similarity)
            window.append(row)


def _hits(row: tuple, others: list[tuple], similarity: float) -> Iterator[tuple[tuple, tuple]]:
    if not others:
        return
    titles = [other[1] for other in others]
    found: set[int] = set()
    for scorer in (fuzz.ratio, fuzz.token_sort_ratio):
        for _, _, index in process.extract(row[1], titles, scorer=scorer, score_cutoff=similarity,
                                           limit=None):
            found.add(index)
    numbers = _numbers(row[1])
    for index in sorted(found):
        other = others[index]
        if _numbers(other[1]) == numbers:
            yield other, row


def _same_key_runs(cur) -> Iterator[Iterator[int]]:
    """Runs of record numbers sharing the first column of ``cur`` (sorted by it)."""
    for _, group in itertools.groupby(cur, key=lambda row: row[0]):
        yield (row[1] for row in group)


@lru_cache(maxsize=1 << 16)
def _numbers(title: str) -> tuple[str, ...]:
    return tuple(sorted(t for t in title.split() if t.isdigit() or t in _ROMAN))


_ROMAN = frozenset("i ii iii iv v vi vii viii ix x xi xii".split())


def similar_titles(a: str, b: str, similarity: float) -> bool:
    """Fuzzy-equal folded titles whose numbers agree ("Part II" is not "Part III").

    Plain ratio catches typos inside words; token-sort ratio catches words
    typed in another order.
    """
    if not (fuzz.ratio(a, b, score_cutoff=similarity)
            or fuzz.token_sort_ratio(a, b, score_cutoff=similarity)):
        return False
    return _numbers(a) == _numbers(b)


def _years_agree(a, b) -> bool:
    """Equal, or one is unknown ("to appear" and the published version)."""
    return a is None or b is None or a == b


def find(db: sqlite3.Connection, similarity: float = 90.0) -> list[list[int]]:
    """Clusters of two or more record numbers, each sorted, ordered by first member."""
    uf = UnionFind()
    # 1. same first author: similar titles, compatible years
    for (sa, _, _, ya), (sb, _, _, yb) in _similar_pairs(db, "author", "author != '' AND title != ''",
                                                         similarity):
        if _years_agree(ya, yb):
            uf.union(sa, sb)
    # 2. same title start: similar titles, compatible years, compatible authors
    for (sa, ta, aa, ya), (sb, tb, ab, yb) in _similar_pairs(db, "prefix", "prefix != ''", similarity):
        if not _years_agree(ya, yb):
            continue
        authors_ok = not aa or not ab or fuzz.ratio(aa, ab, score_cutoff=70)
        # a long, near-identical title in the same year outweighs a garbled author
        long_twin = (ya is not None and ya == yb and len(ta.split()) >= 5
                     and fuzz.ratio(ta, tb, score_cutoff=97))
        if authors_ok or long_twin:
            uf.union(sa, sb)
    # 3. a shared valid DOI / arXiv / MR / Zbl identifier
    for run in _same_key_runs(db.execute("SELECT ident, seq FROM ids ORDER BY ident, seq")):
        first = next(run)
        for seq in run:
            uf.union(first, seq)
    # 4. the same line typed twice (after folding)
    for run in _same_key_runs(db.execute("SELECT textkey, seq FROM keys WHERE textkey != '' "
                                         "ORDER BY textkey, seq")):
        first = next(run)
        for seq in run:
            uf.union(first, seq)
    groups: dict[int, list[int]] = {}
    for seq in list(uf.parent):
        groups.setdefault(uf.find(seq), []).append(seq)
    return sorted((sorted(g) for g in groups.values() if len(g) > 1), key=lambda g: g[0])


def canonical(db: sqlite3.Connection, members: list[int]) -> int:
    """Highest confidence, then most fields, then the first line."""
    best = None
    for start in range(0, len(members), 500):   # stay under SQLite's bound-variable limit
        part = members[start:start + 500]
        marks = ",".join("?" * len(part))
        for seq, conf, nfields in db.execute(
                f"SELECT seq, conf, nfields FROM keys WHERE seq IN ({marks})", part):
            rank = (conf or 0.0, nfields, -seq)
            if best is None or rank > best[0]:
                best = (rank, seq)
    return best[1]
