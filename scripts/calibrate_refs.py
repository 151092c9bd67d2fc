#!/usr/bin/env python3
"""Fit the record-confidence calibration map on held-out SYNTHETIC lines.

    python scripts/synth_refs.py --out build/refs-calib.jsonl --n 3000 --seed 777
    nice -n 10 python scripts/calibrate_refs.py build/refs-calib.jsonl

The lines must come from a seed the model was not trained on.  Each line is
parsed with the raw (uncalibrated) confidence; a record counts as exactly
right when every scored field the line was made with (authors, title,
container, volume, issue, pages, year, publisher) comes out with the same
text, compared after folding case, accents, punctuation and spaces.  A
monotone (pool-adjacent-violators) fit of "exactly right" against the raw
confidence is thinned to a few knots and written to
``normform/data/refs-calibration.json``.  Nothing here reads the evaluation
corpora.
"""

from __future__ import annotations

import argparse
import json
import os
import sys
import unicodedata

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

from normform.refs import assemble  # noqa: E402
from normform.refs.api import parse_reference  # noqa: E402

_SCORED = {"title": "title", "container_title": "container_title", "volume": "volume", "issue": "issue",
           "pages": "pages", "publisher": "publisher"}


def fold(s) -> str:
    s = unicodedata.normalize("NFKD", str(s or "").lower())
    return "".join(ch for ch in s if ch.isalnum() and not unicodedata.combining(ch))


def exactly_right(rec: dict) -> bool:
    text = rec["text"]
    gold: dict[str, str] = {}
    for a, b, lab in rec["spans"]:
        gold[lab] = gold.get(lab, "") + " " + text[a:b]
    ref = parse_reference(text)
    for lab, attr in _SCORED.items():
        g = fold(gold.get(lab))
        v = getattr(ref, attr)
        if attr == "pages" and v is not None:
            v = v.range_text() if not v.count else None
        p = fold(v)
        if lab == "pages" and g and p and g.endswith("pp"):
            g = g[:-2]
        if g != p:
            return False
    gy = gold.get("date")
    if gy and (ref.year is None or str(ref.year) not in gy):
        return False
    if not gy and ref.year is not None:
        return False
    for role, attr in (("authors", "authors"), ("editors", "editors")):
        names = getattr(ref, attr)
        g = fold(gold.get(role))
        if bool(g) != bool(names):
            return False
        if names and not all(fold(n.family_full()) in g for n in names):
            return False
    return True


def pav(points: list[tuple[float, int]]) -> list[tuple[float, float, int]]:
    """Pool adjacent violators: blocks (mean x, mean y, weight), y non-decreasing."""
    blocks: list[list[float]] = []
    for x, y in sorted(points):
        blocks.append([x, float(y), 1])
        while len(blocks) > 1 and blocks[-2][1] >= blocks[-1][1]:
            x2, y2, w2 = blocks.pop()
            x1, y1, w1 = blocks.pop()
            w = w1 + w2
            blocks.append([(x1 * w1 + x2 * w2) / w, (y1 * w1 + y2 * w2) / w, w])
    return [(b[0], b[1], int(b[2])) for b in blocks]


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("data", help="held-out synthetic JSON Lines from scripts/synth_refs.py")
    ap.add_argument("--out", default=os.path.join(os.path.dirname(__file__), "..", "normform", "data",
                                                  "refs-calibration.json"))
    ap.add_argument("--min-block", type=int, default=40, help="merge fitted blocks smaller than this")
    args = ap.parse_args(argv)
    assemble.CALIBRATE = False
    points = []
    with open(args.data, encoding="utf-8") as fh:
        for line in fh:
            rec = json.loads(line)
            ref = parse_reference(rec["text"])
            points.append((float(ref.confidence or 0.0), int(exactly_right(rec))))
    blocks = pav(points)
    # thin: merge small blocks with the next one so each knot rests on enough lines
    knots: list[list[float]] = []
    acc = None
    for x, y, w in blocks:
        acc = [x * w, y * w, w] if acc is None else [acc[0] + x * w, acc[1] + y * w, acc[2] + w]
        if acc[2] >= args.min_block:
            knots.append([acc[0] / acc[2], acc[1] / acc[2], acc[2]])
            acc = None
    if acc is not None:
        if knots:
            k = knots[-1]
            w = k[2] + acc[2]
            knots[-1] = [(k[0] * k[2] + acc[0]) / w, (k[1] * k[2] + acc[1]) / w, w]
        else:
            knots.append([acc[0] / acc[2], acc[1] / acc[2], acc[2]])
    for i in range(1, len(knots)):   # merging keeps y monotone, but make it explicit
        knots[i][1] = max(knots[i][1], knots[i - 1][1])
    data = {"about": "record-confidence map fitted by scripts/calibrate_refs.py on held-out synthetic lines",
            "lines": len(points), "raw": [round(k[0], 4) for k in knots],
            "calibrated": [round(k[1], 4) for k in knots], "weight": [int(k[2]) for k in knots]}
    with open(args.out, "w", encoding="utf-8") as fh:
        json.dump(data, fh, indent=1)
        fh.write("\n")
    exact = sum(y for _, y in points)
    print(f"{len(points)} synthetic lines, {exact / len(points):.1%} exactly right; {len(knots)} knots -> {args.out}",
          file=sys.stderr)
    for x, y, w in knots:
        print(f"  raw {x:.3f} -> {y:.3f}  (n={int(w)})", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
