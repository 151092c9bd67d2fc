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

import itertools
import sqlite3
from typing import Iterator

from rapidfuzz import fuzz

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


def _blocks(db: sqlite3.Connection, columns: str, where: str) -> Iterator[list[tuple]]:
    cur = db.execute(f"SELECT {columns}, seq, title, author, year FROM keys WHERE {where} "
                     f"ORDER BY {columns}, seq")
    width = len(columns.split(","))
    for _, group in itertools.groupby(cur, key=lambda row: row[:width]):
        rows = list(group)
        if len(rows) > 1:
            yield [row[width:] for row in rows]


def _pairs(rows: list[tuple]) -> Iterator[tuple[tuple, tuple]]:
    if len(rows) <= BIG_BLOCK:
        yield from itertools.combinations(rows, 2)
        return
    rows = sorted(rows, key=lambda r: r[1])
    for i, row in enumerate(rows):
        for other in rows[i + 1:i + 1 + WINDOW]:
            yield row, other


def _numbers(title: str) -> list[str]:
    return sorted(t for t in title.split() if t.isdigit() or t in _ROMAN)


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
    for rows in _blocks(db, "author", "author != '' AND title != ''"):
        for (sa, ta, _, ya), (sb, tb, _, yb) in _pairs(rows):
            if _years_agree(ya, yb) and similar_titles(ta, tb, similarity):
                uf.union(sa, sb)
    # 2. same title start: similar titles, compatible years, compatible authors
    for rows in _blocks(db, "prefix", "prefix != ''"):
        for (sa, ta, aa, ya), (sb, tb, ab, yb) in _pairs(rows):
            if not (_years_agree(ya, yb) and similar_titles(ta, tb, similarity)):
                continue
            authors_ok = not aa or not ab or fuzz.ratio(aa, ab, score_cutoff=70)
            # a long, near-identical title in the same year outweighs a garbled author
            long_twin = (ya is not None and ya == yb and len(ta.split()) >= 5
                         and fuzz.ratio(ta, tb, score_cutoff=97))
            if authors_ok or long_twin:
                uf.union(sa, sb)
    # 3. a shared valid DOI / arXiv / MR / Zbl identifier
    for rows in _id_blocks(db):
        for seq in rows[1:]:
            uf.union(rows[0], seq)
    # 4. the same line typed twice (after folding)
    for rows in _blocks(db, "textkey", "textkey != ''"):
        for row in rows[1:]:
            uf.union(rows[0][0], row[0])
    groups: dict[int, list[int]] = {}
    for seq in list(uf.parent):
        groups.setdefault(uf.find(seq), []).append(seq)
    return sorted((sorted(g) for g in groups.values() if len(g) > 1), key=lambda g: g[0])


def _id_blocks(db: sqlite3.Connection) -> Iterator[list[int]]:
    cur = db.execute("SELECT ident, seq FROM ids ORDER BY ident, seq")
    for _, group in itertools.groupby(cur, key=lambda row: row[0]):
        seqs = [row[1] for row in group]
        if len(seqs) > 1:
            yield seqs


def canonical(db: sqlite3.Connection, members: list[int]) -> int:
    marks = ",".join("?" * len(members))
    rows = db.execute(f"SELECT seq, conf, nfields FROM keys WHERE seq IN ({marks})", members).fetchall()
    best = max(rows, key=lambda r: (r[1] or 0.0, r[2], -r[0]))
    return best[0]
