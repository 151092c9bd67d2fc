"""Cluster records that cite the same work differently.

Blocking first (cheap, exact keys from :mod:`normform.batch.keys`, read
from the work database in sorted order so memory stays small), then
:mod:`rapidfuzz` similarity inside each block:

1. same first-author key and year  -> titles similar;
2. same title prefix and year      -> titles similar and authors compatible;
3. same folded text                -> identical lines (even untitled ones).

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
    cur = db.execute(f"SELECT {columns}, seq, title, author FROM keys WHERE {where} "
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
    """Fuzzy-equal folded titles whose numbers agree ("Part II" is not "Part III")."""
    if not fuzz.token_sort_ratio(a, b, score_cutoff=similarity):
        return False
    return _numbers(a) == _numbers(b)


def _numbers(title: str) -> list[str]:
    return sorted(t for t in title.split() if t.isdigit() or t in _ROMAN)


_ROMAN = frozenset("i ii iii iv v vi vii viii ix x xi xii".split())


def similar_titles(a: str, b: str, similarity: float) -> bool:
    """Fuzzy-equal folded titles whose numbers agree ("Part II" is not "Part III")."""
    if not fuzz.token_sort_ratio(a, b, score_cutoff=similarity):
        return False
    return _numbers(a) == _numbers(b)


def find(db: sqlite3.Connection, similarity: float = 90.0) -> list[list[int]]:
    """Clusters of two or more record numbers, each sorted, ordered by first member."""
    uf = UnionFind()
    for rows in _blocks(db, "author, year", "author != '' AND title != ''"):
        for (sa, ta, _), (sb, tb, _) in _pairs(rows):
            if similar_titles(ta, tb, similarity):
                uf.union(sa, sb)
    for rows in _blocks(db, "prefix, year", "prefix != ''"):
        for (sa, ta, aa), (sb, tb, ab) in _pairs(rows):
            if not similar_titles(ta, tb, similarity):
                continue
            # Same title by different people is a different work.
            if aa and ab and not fuzz.ratio(aa, ab, score_cutoff=70):
                continue
            uf.union(sa, sb)
    for rows in _blocks(db, "textkey", "textkey != ''"):
        first = rows[0][0]
        for row in rows[1:]:
            uf.union(first, row[0])
    groups: dict[int, list[int]] = {}
    for seq in list(uf.parent):
        groups.setdefault(uf.find(seq), []).append(seq)
    return sorted((sorted(g) for g in groups.values() if len(g) > 1), key=lambda g: g[0])


def canonical(db: sqlite3.Connection, members: list[int]) -> int:
    marks = ",".join("?" * len(members))
    rows = db.execute(f"SELECT seq, conf, nfields FROM keys WHERE seq IN ({marks})", members).fetchall()
    best = max(rows, key=lambda r: (r[1] or 0.0, r[2], -r[0]))
    return best[0]
