"""The small lark grammars for the well-defined sub-languages of a reference:
page ranges (``refs-pages.lark``), volume/issue clusters
(``refs-volume.lark``) and dates (``refs-dates.lark``).

Each parser is LALR (linear time) and built once; results are cached since
the same short strings recur a lot in a collection.  A string the grammar
rejects returns ``None`` and the caller keeps the raw text.
"""

from __future__ import annotations

import os
import re
from functools import lru_cache

from normform.model import Date, Pages
from normform.refs import lexicon as lx
from normform.resources import grammar_text


# lark is imported at the first grammar use: most strings take the regex
# fast paths below, and importing lark costs ~0.1 s of start-up.
Tree = LarkToken = None
_LarkError: type[Exception] = Exception


def _cache_file(name: str) -> str | bool:
    """Where lark keeps the analysed grammar between runs (a per-user cache
    directory, not the shared temp dir: the cache is a pickle).  Building
    the LALR tables is most of the cold-start cost; lark checks the grammar
    hash stored in the file, so an edited grammar rebuilds."""
    base = os.environ.get("XDG_CACHE_HOME") or os.path.join(os.path.expanduser("~"), ".cache")
    folder = os.path.join(base, "normform")
    try:
        os.makedirs(folder, exist_ok=True)
    except OSError:
        return False
    return os.path.join(folder, f"lark-{name}.cache")


@lru_cache(maxsize=None)
def _parser(name: str):
    global Tree, LarkToken, _LarkError
    from lark import Lark, Token, Tree as LarkTree
    from lark.exceptions import LarkError
    Tree, LarkToken, _LarkError = LarkTree, Token, LarkError
    return Lark(grammar_text(name), parser="lalr", lexer="contextual", cache=_cache_file(name))


def _parse(name: str, text: str):
    """The parse tree, or None when the grammar rejects ``text``."""
    parser = _parser(name)
    try:
        return parser.parse(text)
    except _LarkError:
        return None


def _page_text(tree) -> str:
    return "".join(str(t) for t in tree.scan_values(lambda v: isinstance(v, LarkToken)))


def expand_range(first: str, last: str) -> str:
    """``205-63`` -> ``263``: an abbreviated last page borrows the leading
    digits of the first (common practice in older typesetting)."""
    if first.isdigit() and last.isdigit() and len(last) < len(first):
        cand = first[: len(first) - len(last)] + last
        if int(cand) >= int(first):
            return cand
    return last


# Fast paths for the shapes most lines use; everything else goes to the grammar.
_SIMPLE_RANGE = re.compile(r"(\d{1,6})\s?(?:-{1,3}|[–—])\s?(\d{1,6})\Z")
_SIMPLE_NUM = re.compile(r"\d{1,6}\Z")
# article-number pages "12:1-12:17" (volume-local numbering, LIPIcs style)
_COLON_RANGE = re.compile(r"(\d{1,4}:\d{1,4})\s?(?:-{1,3}|[–—])\s?(\d{1,4}:\d{1,4})\Z")
_SIMPLE_VOL = re.compile(r"(?:[Vv]ol(?:ume)?\.?\s?|\*\*)?(\d{1,5})(?:\*\*)?(?:\s?\((\d{1,4})\))?\Z")
_SIMPLE_YEAR = re.compile(r"\(?((?:1[5-9]|20)\d\d)\)?\.?\Z")


@lru_cache(maxsize=50_000)
def parse_pages(text: str) -> Pages | None:
    text = text.strip().strip(",.;:").strip()
    if not text or len(text) > 60:
        return None
    m = _SIMPLE_RANGE.match(text)
    if m:
        return Pages(first=m.group(1), last=expand_range(m.group(1), m.group(2)))
    if _SIMPLE_NUM.match(text):
        return Pages(first=text)
    m = _COLON_RANGE.match(text)
    if m:
        return Pages(first=m.group(1), last=m.group(2))
    tree = _parse("refs-pages.lark", text)
    if tree is None:
        return None
    body = tree
    if isinstance(tree, Tree) and tree.data == "start":
        body = next((c for c in tree.children if isinstance(c, Tree) and c.data in
                     ("range", "single", "count", "article")), None)
    if body is None:
        return None
    if body.data == "range":
        pages = [c for c in body.children if isinstance(c, Tree)]
        first, last = _page_text(pages[0]), _page_text(pages[1])
        return Pages(first=first, last=expand_range(first, last))
    if body.data == "single":
        return Pages(first=_page_text(body))
    if body.data == "count":
        pages = [c for c in body.children if isinstance(c, Tree)]
        return Pages(count=f"{_page_text(pages[0])}+{_page_text(pages[1])}")
    if body.data == "article":
        return Pages(article=str(body.children[-1]))
    return None


@lru_cache(maxsize=50_000)
def parse_volume(text: str) -> tuple[str | None, str | None] | None:
    """``(volume, issue)`` of a cluster such as ``Vol. 12, no. 3`` or ``12(3)``."""
    text = text.strip().strip(",.;:").strip()
    if not text or len(text) > 60:
        return None
    m = _SIMPLE_VOL.match(text)
    if m:
        return m.group(1), m.group(2)
    tree = _parse("refs-volume.lark", text)
    if tree is None:
        return None
    vol = iss = None
    for sub in tree.iter_subtrees():
        if sub.data in ("volume", "issue"):
            nums = [str(t) for t in sub.children if isinstance(t, LarkToken) and t.type == "NUMBER"]
            if nums:
                if sub.data == "volume":
                    vol = nums[0]
                else:
                    iss = nums[0]
    return vol, iss


@lru_cache(maxsize=50_000)
def parse_date(text: str) -> Date | None:
    text = text.strip().strip(",;:").strip()
    if not text or len(text) > 40:
        return None
    m = _SIMPLE_YEAR.match(text)
    if m:
        return Date(year=int(m.group(1)))
    tree = _parse("refs-dates.lark", text)
    if tree is None:
        return None
    year = month = day = None
    season = literal = None
    circa = False
    prev = None
    for tok in tree.scan_values(lambda v: isinstance(v, LarkToken)):
        after_slash, prev = prev == "SLASH", tok.type
        if after_slash:
            continue  # "2003/04": the second year of a span
        if tok.type == "YEAR" and year is None:
            year = int(tok)
        elif tok.type == "MONTH":
            month = lx.MONTHS.get(str(tok).lower()[:3] if str(tok).lower()[:4] != "sept" else "sep")
        elif tok.type == "NUM2":
            # in iso dates the first NUM2 is the month
            if tree.data == "iso" or any(isinstance(s, Tree) and s.data == "iso" for s in tree.iter_subtrees()):
                if month is None:
                    month = int(tok)
                else:
                    day = int(tok)
            else:
                day = int(tok)
        elif tok.type == "SEASON":
            season = str(tok).capitalize()
        elif tok.type == "CIRCA":
            circa = True
        elif tok.type == "LITERAL":
            literal = str(tok)
    if month is not None and not 1 <= month <= 12:
        return None
    if day is not None and not 1 <= day <= 31:
        day = None
    return Date(year=year, month=month, day=day, season=season, circa=circa, literal=literal)
