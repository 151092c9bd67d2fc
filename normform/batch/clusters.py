"""Cluster records that cite the same work differently.

Blocking first (cheap, exact keys from :mod:`normform.batch.keys`, computed
on the workers and read from the work database in sorted order), then
:mod:`rapidfuzz` similarity between the *distinct* titles of each block:

1. same first-author key         -> titles similar, same year (or one unknown);
2. same title prefix and year    -> titles similar and authors compatible (or a long,
                                    near-identical title with the same volume and first page);
3. a shared valid identifier     -> DOI, arXiv, MR or Zbl;
4. same folded text              -> a line typed twice (when it has some substance).

Records with the same block key, title and year are one "cell" and are
merged at once, so comparisons grow with the number of distinct titles, not
of records; a block with many distinct titles compares each with its
``WINDOW`` neighbours in sorted order.

Undated records ("to appear") are compatible with any year, which with
plain single linkage would chain a 1987 and a 1990 paper of the same title
into one cluster through one undated line.  So merges through an undated
record wait until all dated evidence is in, are tried best match first,
and are refused when they would put two different known years into one
cluster (each cluster remembers its year).  Identifier and same-text merges
are exact evidence and always apply.

Union-find lives in flat integer arrays (a few bytes per record); clusters
are streamed back from SQLite in order of their first member.
"""

from __future__ import annotations

import itertools
import sqlite3
from array import array
from functools import lru_cache
from operator import itemgetter
from typing import Iterator

import numpy as np
from rapidfuzz import fuzz, process

WINDOW = 60          # in a block with many distinct titles, compare each with its neighbours only
BIG_BLOCK = 400      # up to this many distinct titles a block compares all pairs
_TILE = 64           # rows per similarity matrix in a windowed block (64 x 124 cells, half needed)
_NO_YEAR = -(2 ** 31)
_MANY_YEARS = -(2 ** 31) + 1


class Forest:
    """Union-find over record numbers ``0..size-1``; each group knows its year."""

    def __init__(self, years: array) -> None:
        self.parent = array("i", range(len(years)))
        self.year = years            # per root: a year, _NO_YEAR or _MANY_YEARS

    def find(self, x: int) -> int:
        parent = self.parent
        root = x
        while parent[root] != root:
            root = parent[root]
        while parent[x] != root:
            parent[x], x = root, parent[x]
        return root

    def union(self, a: int, b: int, guarded: bool = True) -> bool:
        """Merge the groups of ``a`` and ``b``; a guarded merge never mixes two known years."""
        ra, rb = self.find(a), self.find(b)
        if ra == rb:
            return True
        ya, yb = self.year[ra], self.year[rb]
        if ya == _NO_YEAR:
            merged = yb
        elif yb == _NO_YEAR:
            merged = ya
        else:
            merged = ya if ya == yb else _MANY_YEARS
        if guarded and merged == _MANY_YEARS:
            return False
        lo, hi = (ra, rb) if ra < rb else (rb, ra)   # the root is the first member
        self.parent[hi] = lo
        self.year[lo] = merged
        return True


class _Deferred:
    """Merges through an undated record, applied last, best title score first."""

    def __init__(self) -> None:
        self.score, self.a, self.b = array("f"), array("i"), array("i")

    def add(self, score: float, a: int, b: int) -> None:
        self.score.append(score)
        self.a.append(a)
        self.b.append(b)

    def apply(self, forest: Forest) -> None:
        if not self.a:
            return
        a, b = np.frombuffer(self.a, dtype=np.int32), np.frombuffer(self.b, dtype=np.int32)
        score = np.frombuffer(self.score, dtype=np.float32)
        for i in np.lexsort((b, a, -score)):
            forest.union(int(a[i]), int(b[i]))


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


def _scores(rows: list[str], cols: list[str], similarity: float, threads: int) -> np.ndarray:
    """max(ratio, token-sort ratio) for every pair, 0 below ``similarity`` (computed in rapidfuzz)."""
    kw = {"score_cutoff": similarity, "dtype": np.float32, "workers": threads}
    return np.maximum(process.cdist(rows, cols, scorer=fuzz.ratio, **kw),
                      process.cdist(rows, cols, scorer=fuzz.token_sort_ratio, **kw))


def _similar_pairs(titles: list[str], similarity: float, threads: int) -> Iterator[tuple[int, int, float]]:
    """``(i, j, score)``, ``i < j``, for similar distinct titles with equal numbers.

    All pairs when there are at most ``BIG_BLOCK`` titles, else each title
    with its ``WINDOW`` predecessors (titles are sorted, so near-equal ones
    are near each other).
    """
    n = len(titles)
    if n < 2:
        return
    if n <= 8:     # tiny blocks: direct calls beat building matrices
        for i in range(n - 1):
            for j in range(i + 1, n):
                score = max(fuzz.ratio(titles[i], titles[j], score_cutoff=similarity),
                            fuzz.token_sort_ratio(titles[i], titles[j], score_cutoff=similarity))
                if score >= similarity and score > 0 and _numbers(titles[i]) == _numbers(titles[j]):
                    yield i, j, score
        return
    if n <= BIG_BLOCK:
        tiles = [(0, n, 0)]
    else:
        tiles = [(s, min(n, s + _TILE), max(0, s - WINDOW)) for s in range(0, n, _TILE)]
    for start, end, left in tiles:
        matrix = _scores(titles[start:end], titles[left:end], similarity, threads)
        r, c = np.nonzero(matrix >= max(similarity, 1e-9))
        rows, cols = r + start, c + left
        keep = cols < rows
        if n > BIG_BLOCK:
            keep &= rows - cols <= WINDOW
        for i, j, score in zip(cols[keep].tolist(), rows[keep].tolist(), matrix[r[keep], c[keep]].tolist()):
            if _numbers(titles[i]) == _numbers(titles[j]):
                yield i, j, score


def _years(db: sqlite3.Connection) -> array:
    size = (db.execute("SELECT max(seq) FROM keys").fetchone()[0] or 0) + 1
    years = array("i", [_NO_YEAR]) * size
    for seq, year in db.execute("SELECT seq, year FROM keys WHERE year IS NOT NULL"):
        if isinstance(year, int) and _MANY_YEARS < year < 2 ** 31:
            years[seq] = year
    return years


def _author_pass(db, forest: Forest, deferred: _Deferred, similarity: float, threads: int) -> None:
    cur = db.execute("SELECT author, title, year, seq FROM keys WHERE author != '' AND title != '' "
                     "ORDER BY author, title, seq")
    for _, block in itertools.groupby(cur, key=itemgetter(0)):
        titles: list[str] = []
        dated: list[dict[int, int]] = []     # per distinct title: year -> first record
        undated: list[int] = []              # per distinct title: first undated record, or 0
        for _, title, year, seq in block:
            if not titles or titles[-1] != title:
                titles.append(title)
                dated.append({})
                undated.append(0)
            if year is None:
                if undated[-1]:
                    forest.union(undated[-1], seq)
                else:
                    undated[-1] = seq
            else:
                rep = dated[-1].setdefault(year, seq)
                if rep != seq:
                    forest.union(rep, seq)
        for i in range(len(titles)):          # an undated line and dated lines of the same title
            if undated[i]:
                for rep in dated[i].values():
                    deferred.add(100.0, undated[i], rep)
        for i, j, score in _similar_pairs(titles, similarity, threads):
            for year, rep in dated[i].items():
                if year in dated[j]:
                    forest.union(rep, dated[j][year])
            if undated[i]:
                for rep in dated[j].values():
                    deferred.add(score, undated[i], rep)
            if undated[j]:
                for rep in dated[i].values():
                    deferred.add(score, undated[j], rep)
            if undated[i] and undated[j]:
                forest.union(undated[i], undated[j])


class _Place:
    """The volumes and first pages seen in one cell (see :func:`normform.batch.keys.locator`)."""

    __slots__ = ("volumes", "pages")

    def __init__(self) -> None:
        self.volumes: set[str] = set()
        self.pages: set[str] = set()

    def add(self, locator: str) -> None:
        if locator:
            volume, _, page = locator.partition("|")
            if volume:
                self.volumes.add(volume)
            if page:
                self.pages.add(page)


def _same_place(a: _Place | None, b: _Place | None) -> bool:
    """Both cells know a volume and a first page, and share one of each.

    (Volume *or* first page was too weak: on 100,000 generated lines it let
    through 2,000 false pairs, a volume alone being shared by one work in ~40
    of the same year.)
    """
    if a is None or b is None:
        return False
    return bool(a.volumes and b.volumes and a.pages and b.pages
                and not a.volumes.isdisjoint(b.volumes) and not a.pages.isdisjoint(b.pages))


def _authors_compatible(a: str, b: str, ta: str, tb: str,
                        pa: _Place | None = None, pb: _Place | None = None) -> bool:
    """Authors alike; or a long, near-identical title (same year) *in the same place* (the same
    volume and first page) outweighs a garbled author.

    Without the place the title rule merged different works: a collection reuses titles
    ("A note on integer partitions") and on a million generated lines it built a cluster of 124.
    """
    if not a or not b or a == b or fuzz.ratio(a, b, score_cutoff=70):
        return True
    return (len(ta.split()) >= 5 and _same_place(pa, pb)
            and bool(fuzz.ratio(ta, tb, score_cutoff=97)))


def _prefix_pass(db, forest: Forest, similarity: float, threads: int) -> None:
    """Same title start and the same year (undated lines are left to the author pass)."""
    cur = db.execute("SELECT prefix, year, title, author, seq, locator FROM keys "
                     "WHERE prefix != '' AND year IS NOT NULL ORDER BY prefix, year, title, seq")
    for _, block in itertools.groupby(cur, key=itemgetter(0, 1)):
        titles: list[str] = []
        cells: list[dict[str, int]] = []     # per distinct title: author -> first record
        places: list[dict[str, _Place]] = []  # per distinct title: author -> volumes and pages seen
        for _, _, title, author, seq, locator in block:
            if not titles or titles[-1] != title:
                titles.append(title)
                cells.append({})
                places.append({})
            rep = cells[-1].setdefault(author, seq)
            if rep != seq:
                forest.union(rep, seq)
            if locator:
                place = places[-1].get(author)
                if place is None:
                    place = places[-1][author] = _Place()
                place.add(locator)
        for i, title in enumerate(titles):
            people = list(cells[i].items())
            where = places[i]
            for (a, ra), (b, rb) in itertools.combinations(people, 2):
                if _authors_compatible(a, b, title, title, where.get(a), where.get(b)):
                    forest.union(ra, rb)
        for i, j, _ in _similar_pairs(titles, similarity, threads):
            for a, ra in cells[i].items():
                for b, rb in cells[j].items():
                    if _authors_compatible(a, b, titles[i], titles[j], places[i].get(a), places[j].get(b)):
                        forest.union(ra, rb)


def _same_key_runs(cur) -> Iterator[Iterator[int]]:
    """Runs of record numbers sharing the first column of ``cur`` (sorted by it)."""
    for _, group in itertools.groupby(cur, key=itemgetter(0)):
        yield (row[1] for row in group)


def link(db: sqlite3.Connection, similarity: float = 90.0, threads: int = 1) -> Forest:
    """All merges, in the order that keeps undated records from chaining years together."""
    forest = Forest(_years(db))
    deferred = _Deferred()
    _author_pass(db, forest, deferred, similarity, threads)
    _prefix_pass(db, forest, similarity, threads)
    for query in ("SELECT ident, seq FROM ids ORDER BY ident, seq",
                  "SELECT textkey, seq FROM keys WHERE textkey != '' ORDER BY textkey, seq"):
        for run in _same_key_runs(db.execute(query)):
            first = next(run)
            for seq in run:
                forest.union(first, seq, guarded=False)
    deferred.apply(forest)
    return forest


# one member as streamed by groups()
Member = tuple   # (seq, conf, nfields, offset, length, moff, mlen)


def groups(db: sqlite3.Connection, forest: Forest) -> Iterator[list[Member]]:
    """Clusters of two or more records, ordered by first member, members in record order.

    The (cluster, record) pairs go to a temporary SQLite table and come back
    joined with each record's byte offsets, so only one cluster at a time is
    in memory.
    """
    size = len(forest.parent)
    roots = array("i", (forest.find(seq) for seq in range(size)))
    counts = array("i", bytes(4 * size))
    for root in roots:
        counts[root] += 1
    db.execute("DROP TABLE IF EXISTS temp.clus")
    db.execute("CREATE TEMP TABLE clus (root INTEGER, seq INTEGER)")
    db.executemany("INSERT INTO temp.clus VALUES (?, ?)",
                   ((roots[seq], seq) for seq in range(1, size) if counts[roots[seq]] > 1))
    del roots, counts
    db.execute("CREATE INDEX temp.clus_r ON clus(root, seq)")
    cur = db.execute("SELECT c.root, k.seq, k.conf, k.nfields, k.offset, k.length, k.moff, k.mlen "
                     "FROM temp.clus c JOIN keys k ON k.seq = c.seq ORDER BY c.root, c.seq")
    for _, rows in itertools.groupby(cur, key=itemgetter(0)):
        yield [row[1:] for row in rows]
    db.execute("DROP TABLE temp.clus")


def find(db: sqlite3.Connection, similarity: float = 90.0, threads: int = 1) -> list[list[int]]:
    """Clusters of two or more record numbers, each sorted, ordered by first member."""
    return [[m[0] for m in g] for g in groups(db, link(db, similarity, threads))]


def best(members: list[Member]) -> Member:
    """The canonical member: highest confidence, then most fields, then the first line."""
    return max(members, key=lambda m: (m[1] or 0.0, m[2], -m[0]))


def canonical(db: sqlite3.Connection, members: list[int]) -> int:
    """:func:`best` for a list of record numbers."""
    found = []
    for start in range(0, len(members), 500):   # stay under SQLite's bound-variable limit
        part = members[start:start + 500]
        marks = ",".join("?" * len(part))
        found.extend(db.execute(f"SELECT seq, conf, nfields FROM keys WHERE seq IN ({marks})", part))
    return best(found)[0]
