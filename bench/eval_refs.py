#!/usr/bin/env python3
"""Score the reference parser against a gold JSON Lines file.

    python bench/eval_refs.py GOLD.jsonl [--show-errors N] [--field title]

Each gold line is ``{"text", "gold": {CSL-JSON}, "fields_in_text"?, "authors_in_text"?}``.
Per field (author family names in order, title, container-title, volume,
issue, page, year, publisher, DOI, arxiv, mr) it prints precision, recall
and F1, then the macro F1, the exact-record rate and the calibration: the
share of records with confidence >= 0.9 that are exactly right.

Values are compared after folding case, accents, punctuation and spacing.
Where the gold says which fields are visible in the line
(``fields_in_text``), a gold field that is not visible is not scored; a
predicted field the gold lacks altogether counts as a false positive.
This script only measures -- nothing here feeds back into training.
"""

from __future__ import annotations

import argparse
import json
import os
import re
import sys
import time
import unicodedata
from collections import Counter

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

FIELDS = ("author", "title", "container-title", "volume", "issue", "page", "year", "publisher",
          "DOI", "arxiv", "mr")
_VISIBLE_KEY = {"year": "issued"}


def fold(s) -> str:
    if s is None:
        return ""
    s = unicodedata.normalize("NFKD", str(s).lower())
    s = "".join(ch for ch in s if not unicodedata.combining(ch))
    return "".join(ch for ch in s if ch.isalnum())


def _gold_names(gold: dict, limit: int | None) -> list[str] | None:
    names = gold.get("author") or gold.get("editor")
    if not names:
        return None
    out = []
    for n in names:
        if "literal" in n:
            out.append(fold(n["literal"]))
        else:
            out.append(fold((n.get("non-dropping-particle", "") + " " + n.get("family", "")).strip()))
    if limit is not None:
        out = out[:limit]
    return out or None


def gold_values(rec: dict) -> dict[str, object]:
    g = rec["gold"]
    vis = rec.get("fields_in_text")
    out: dict[str, object] = {}
    limit = rec.get("authors_in_text")
    for f in FIELDS:
        key = _VISIBLE_KEY.get(f, f)
        if f == "author":
            role = "author" if g.get("author") else "editor"
            if vis is not None and role not in vis:
                out[f] = "SKIP" if g.get(role) else None
                continue
            out[f] = _gold_names(g, limit if limit else None)
            continue
        if f == "year":
            parts = (g.get("issued") or {}).get("date-parts") or [[None]]
            val = parts[0][0] if parts and parts[0] else None
        else:
            val = g.get(f)
        if vis is not None and val is not None and key not in vis:
            out[f] = "SKIP"
            continue
        out[f] = val
    return out


def pred_values(ref, gold: dict | None = None) -> dict[str, object]:
    names = ref.authors or ref.editors
    volume = ref.volume
    if volume is None and ref.series_number and gold is not None and "collection-number" not in gold:
        # The number of a book inside its series: our model calls it
        # series_number; a gold that has no collection-number files it under
        # volume ("volume 83 of Graduate Texts").  Same fact, two conventions.
        volume = ref.series_number
    pages = ref.pages.range_text() if ref.pages and not ref.pages.count else None
    return {
        "author": [fold(n.family_full()) for n in names] or None,
        "title": ref.title, "container-title": ref.container_title, "volume": volume,
        "issue": ref.issue, "page": pages, "year": ref.year, "publisher": ref.publisher,
        "DOI": ref.ident("doi").value if ref.ident("doi") else None,
        "arxiv": ref.ident("arxiv").value if ref.ident("arxiv") else None,
        "mr": ref.ident("mr").value if ref.ident("mr") else None,
    }


def same(field: str, g, p) -> bool:
    if field == "author":
        if len(g) != len(p):
            return False
        return all(a == b or (b and a.endswith(b)) for a, b in zip(g, p))
    if field == "page":
        return fold(str(g).replace("–", "-")) == fold(str(p))
    if field == "arxiv":
        # a version suffix names the same paper: 1707.00328v1 = 1707.00328
        return re.sub(r"v\d+$", "", fold(g)) == re.sub(r"v\d+$", "", fold(p))
    if field == "mr":
        # MR numbers are numbers: "0220785" and "220785" are the same review
        return fold(g).lstrip("mr0") == fold(p).lstrip("mr0")
    return fold(g) == fold(p)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("gold")
    ap.add_argument("--show-errors", type=int, default=0, help="print N wrong fields")
    ap.add_argument("--field", default=None, help="only show errors of this field")
    args = ap.parse_args(argv)
    from normform.refs.api import parse_reference

    recs = [json.loads(line) for line in open(args.gold, encoding="utf-8") if line.strip()]
    tp, fp, fn = Counter(), Counter(), Counter()
    exact = 0
    hi_conf = hi_exact = 0
    errors = []
    t0 = time.time()
    for rec in recs:
        ref = parse_reference(rec["text"])
        gv, pv = gold_values(rec), pred_values(ref, rec["gold"])
        ok = True
        for f in FIELDS:
            g, p = gv[f], pv[f]
            if g == "SKIP":
                continue
            if g is None and p is None:
                continue
            if g is not None and p is not None and same(f, g, p):
                tp[f] += 1
                continue
            ok = False
            if p is not None:
                fp[f] += 1
            if g is not None:
                fn[f] += 1
            errors.append((f, rec["text"], g, p))
        exact += ok
        conf = ref.confidence or 0.0
        if conf >= 0.9:
            hi_conf += 1
            hi_exact += ok
    dt = time.time() - t0
    n = len(recs)
    print(f"{args.gold}: {n} lines in {dt:.1f}s")
    print(f"{'field':16s} {'P':>6s} {'R':>6s} {'F1':>6s} {'gold':>6s}")
    f1s = []
    for f in FIELDS:
        p = tp[f] / (tp[f] + fp[f]) if tp[f] + fp[f] else None
        r = tp[f] / (tp[f] + fn[f]) if tp[f] + fn[f] else None
        if p is None and r is None:
            print(f"{f:16s} {'-':>6s} {'-':>6s} {'-':>6s} {0:6d}")
            continue
        p = p or 0.0
        r = r or 0.0
        f1 = 2 * p * r / (p + r) if p + r else 0.0
        f1s.append(f1)
        print(f"{f:16s} {p:6.3f} {r:6.3f} {f1:6.3f} {tp[f] + fn[f]:6d}")
    macro = sum(f1s) / len(f1s) if f1s else 0.0
    print(f"macro F1 {macro:.3f} over {len(f1s)} fields")
    print(f"exact records {exact}/{n} = {exact / n:.3f}")
    share = hi_exact / hi_conf if hi_conf else float("nan")
    print(f"calibration: {hi_conf} records with confidence >= 0.9 ({hi_conf / n:.1%}), "
          f"{share:.1%} of them exactly right (target >= 97%)")
    shown = 0
    for f, text, g, p in errors:
        if args.field and f != args.field:
            continue
        if shown >= args.show_errors:
            break
        print(f"--- {f}: gold={g!r} pred={p!r}\n    {text}")
        shown += 1
    return 0


if __name__ == "__main__":
    sys.exit(main())
