#!/usr/bin/env python3
"""Fit the reference parser's record and field confidence on held-out SYNTHETIC lines.

    nice -n 10 python scripts/calibrate_refs.py --remake

(about 3 minutes, deterministic: fixed seeds, same output byte for byte;
without ``--remake`` it reuses ``build/refs-calib-heldout.jsonl``).  Re-run
it after every retraining of the labeler: it writes
``normform/data/refs-calibration.json``.

NOTHING HERE READS THE EVALUATION CORPORA (``/work/shared/eval`` or any
other gold file): no parameter is fitted or tuned on them.  They are for
measurement only, with ``bench/eval_refs.py``.

Held-out lines: ``scripts/synth_refs.py`` with a seed, a style pool and a
style mix that training (``--seed 424242``, default mix) did not use
(SYNTH_ARGS below); every other line then gets a second round of the
generator's typing noise, because real lines are messier than synthetic
ones.  A line is split in halves by a fixed rule (index mod 4).

A record counts as exactly right when every scored field the line was made
with (names, title, container, volume, issue, pages, year, publisher, DOI,
arXiv, MR) comes out with the same text after folding case, accents,
punctuation and spaces, with the conventions of ``bench/eval_refs.py``
(authors or else editors, family names in order; a series number is the
volume when the line has no other; a page count is no page range); a field
counts as right the same way.

1. Field maps (half A): per field -- and for container titles per class
   (known journal / known series / unknown name), for publishers known or
   not -- an isotonic (pool-adjacent-violators) fit of "field right" against
   the labeler's field confidence, each block at the lower end of the 95%
   Wilson interval of its rate.  At run time a field's confidence is only
   ever lowered by its map.
2. Record map (half B, twice-noised lines only): the raw score is
   ``confidence.product_rule`` over the calibrated fields (the product of
   field confidences, the sequence probability, repair and leftover
   penalties, missing title/names/essentials).  It was compared on these
   lines with logistic models over the same signals (with and without the
   sequence probability and the weakest field) and ranked records at least
   as well, so it stays.  The map is ``min(p(s), 1 - 3 e(s))``: ``p(s)`` the
   isotonic rate of being right at score ``s``, ``e(s)`` the upper end of the
   95% Wilson interval of the error rate of all lines scoring >= s.  The 3
   is the issue's contract: confidence >= 0.9 must mean >= 97% exactly
   right, so a doubt of 0.1 stands for at most 1 error in 30.  Step knots
   keep the map flat between thresholds.
3. The record map is applied only to record kinds with at least MIN_KIND
   held-out lines; other kinds, and records without a title, keep the raw
   score (never lifted).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import random
import re
import subprocess
import sys
import unicodedata
from collections import Counter

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, ".."))

import numpy as np  # noqa: E402  (fitting only; the parser itself never uses numpy)

from normform.model import Kind  # noqa: E402
from normform.refs import confidence  # noqa: E402
from normform.refs.api import parse_reference  # noqa: E402
from normform.refs.assemble import clean_text  # noqa: E402
from normform.refs.subgrammars import parse_pages  # noqa: E402

# Held-out generation: not training's seed (424242) nor its defaults for the
# style pool and mix (120 styles, 0.45 CSL, 0.15 pybtex, 0.4 BibTeX-like).
SYNTH_ARGS = ["--n", "12000", "--seed", "9137", "--styles", "260", "--csl-share", "0.5",
              "--pybtex-share", "0.2", "--bst-share", "0.5"]
NOISE_SEED = 31337
MIN_BLOCK = 60      # lines under each knot of a map
MIN_KIND = 4 * MIN_BLOCK   # held-out lines a record kind needs before its records may be lifted
Z = 1.96            # Wilson interval, 95%
# The contract is "confidence >= 0.9: at least 97% exactly right", so
# a record's doubt (1 - confidence) is three times its error rate: 0.9 means
# at most 1 error in 30.
RECORD_MARGIN = 3.0

_SCORED = ("title", "container_title", "volume", "issue", "pages", "publisher")
_IDS = ("doi", "arxiv", "mr")
_PAGE_COUNT = re.compile(r"\+|\bpp\b|\bpages\b")
_ARXIV_CLASS = re.compile(r"\s*\[[^\]]*\]")
_DIGITS = re.compile(r"\d+")


def fold(s) -> str:
    s = unicodedata.normalize("NFKD", str(s or "").lower())
    return "".join(ch for ch in s if ch.isalnum() and not unicodedata.combining(ch))


def make_lines(path: str) -> None:
    cmd = [sys.executable, os.path.join(HERE, "synth_refs.py"), "--out", path, *SYNTH_ARGS]
    subprocess.run(cmd, check=True)


def renoise(recs: list[dict]) -> list[dict]:
    """A second round of the generator's typing noise on every other line."""
    sys.path.insert(0, HERE)
    import synth_refs
    r = random.Random(NOISE_SEED)
    out = []
    for i, rec in enumerate(recs):
        if i % 2:
            pieces = synth_refs.spans_to_pieces(rec["text"], sorted(rec["spans"]))
            text, spans = synth_refs.pieces_to_spans(synth_refs.noise(pieces, r))
            if text.strip():
                rec = {"text": text, "spans": spans, "src": rec["src"] + "+noise"}
        out.append(rec)
    return out


def gold_of(rec: dict) -> dict[str, str]:
    gold: dict[str, str] = {}
    for a, b, lab in rec["spans"]:
        gold[lab] = gold.get(lab, "") + " " + rec["text"][a:b]
    return gold


def _gold_text(s: str | None) -> str:
    # the gold is the text as printed; TeX in it is compared as Unicode, as
    # the evaluation's gold is
    return clean_text(s) if s else ""


def field_right(ref, gold: dict[str, str]) -> dict[str, bool]:
    """Field -> parsed value agrees with the line's gold, with the scoring
    conventions of bench/eval_refs.py (names: authors or else editors, family
    names in order; a series number counts as the volume when the line has
    no separate series number; pages as a range)."""
    out: dict[str, bool] = {}
    for lab in _SCORED:
        g = _gold_text(gold.get(lab))
        v = getattr(ref, lab)
        if lab == "volume" and v is None and ref.series_number and "series_number" not in gold:
            v = ref.series_number
        if lab == "pages":
            if v is not None and v.count:
                v = None
            if _PAGE_COUNT.search(g) or (g and not any(ch.isdigit() for ch in g)):
                # a book's page count ("xiv+316 pp.") is not a page range, and
                # the evaluation does not score it
                out[lab] = v is None
                continue
            gp = parse_pages(g) if g else None
            out[lab] = (fold(g) == fold(v.range_text()) or (gp is not None and gp.range_text() == v.range_text())) \
                if v is not None and g else (v is None and not fold(g))
            continue
        out[lab] = fold(g) == fold(v)
    gy = gold.get("date")
    out["date"] = (ref.year is not None and str(ref.year) in gy) if gy else ref.year is None
    role = "authors" if gold.get("authors") else "editors"
    names = ref.authors or ref.editors
    g = fold(_gold_text(gold.get(role)))
    out[role] = bool(g) == bool(names) and (not names or all(fold(n.family_full()) in g for n in names))
    if g and names:
        # in order, and as many as the line has (an author list split wrongly)
        pos, ok = 0, True
        for n in names:
            k = g.find(fold(n.family_full()), pos)
            ok = ok and k >= 0
            pos = k + 1 if k >= 0 else pos
        out[role] = out[role] and ok
    for lab in _IDS:
        g = gold.get(lab) or ""
        i = ref.ident(lab)
        p = fold(i.value) if i is not None else ""
        if lab == "arxiv":
            g = _ARXIV_CLASS.sub("", g)    # "1706.08077 [math.NT]": the class is no part of the id
        if lab == "mr":
            m = _DIGITS.search(g)           # "MR 203643 (1873f:39D46)": the number, without the review code
            g, p = (m.group().lstrip("0") if m else ""), p.lstrip("mr0")
        g = fold(g)
        out[lab] = g == p or (bool(g) and bool(p) and (g.endswith(p) or p.endswith(g)))
    return out


def collect(recs: list[dict], model=None):
    """Raw record scores (product rule), exact flags, and (field, confidence,
    right) triples, with the given field maps (None: raw field confidences)
    and no record map."""
    sink: list = []
    saved_sink, saved_model = confidence._SINK, confidence._model
    confidence._SINK = sink
    confidence._model = lambda: model
    xs, ys, fields, kinds = [], [], [], []
    try:
        for rec in recs:
            del sink[:]
            ref = parse_reference(rec["text"])
            right = field_right(ref, gold_of(rec))
            xs.append(sink[-1] if sink else 0.0)
            ys.append(int(all(right.values())))
            kinds.append(ref.kind.value)
            values = {"container_title": ref.container_title, "publisher": ref.publisher}
            for info in ref.provenance.fields:
                ok = right.get(info.field)
                if ok is not None:
                    fields.append((info.field, info.confidence, int(ok)))
                    key = confidence.field_key(info.field, values)
                    if key != info.field:
                        fields.append((key, info.confidence, int(ok)))
    finally:
        confidence._model, confidence._SINK = saved_model, saved_sink
    return np.array(xs, dtype=float), np.array(ys, dtype=float), fields, kinds


class _FieldsOnly:
    """Field maps, identity record map: the raw score after field calibration."""

    def __init__(self, fmaps: dict):
        self.field_maps = {f: confidence.knots(m) for f, m in fmaps.items()}
        self.record_map = ((0.0, 1.0), (0.0, 1.0))
        self.kinds = frozenset(k.value for k in Kind)


def wilson_high(k: float, n: float) -> float:
    """Upper end of the 95% Wilson interval of a rate k/n."""
    if n <= 0:
        return 1.0
    p = k / n
    d = 1 + Z * Z / n
    c = p + Z * Z / (2 * n)
    r = Z * math.sqrt(p * (1 - p) / n + Z * Z / (4 * n * n))
    return min(1.0, (c + r) / d)


def _pav(points: list[tuple[float, int]]) -> list[list[float]]:
    """Pool adjacent violators: blocks [x_min, x_max, right, n], rate non-decreasing in x."""
    blocks: list[list[float]] = []
    for x, y in sorted(points):
        blocks.append([x, x, float(y), 1.0])
        while len(blocks) > 1 and blocks[-2][2] / blocks[-2][3] >= blocks[-1][2] / blocks[-1][3]:
            b = blocks.pop()
            a = blocks.pop()
            blocks.append([a[0], b[1], a[2] + b[2], a[3] + b[3]])
    return blocks


def _thick(points: list[tuple[float, int]]) -> list[list[float]]:
    """Isotonic blocks merged upwards until each holds >= MIN_BLOCK values."""
    thick: list[list[float]] = []
    for b in _pav(points):
        if thick and thick[-1][3] < MIN_BLOCK:
            a = thick.pop()
            b = [a[0], b[1], a[2] + b[2], a[3] + b[3]]
        thick.append(b)
    if len(thick) > 1 and thick[-1][3] < MIN_BLOCK:
        b = thick.pop()
        a = thick.pop()
        thick.append([a[0], b[1], a[2] + b[2], a[3] + b[3]])
    return thick


def _steps(levels: list[tuple[float, float]]) -> tuple[list[float], list[float]]:
    """(threshold, value) pairs, ascending -> knots of a step function that is
    flat from each threshold to the next (never above the value earned),
    anchored at (0, 0)."""
    xs, ys = [0.0], [0.0]
    for x, y in levels:
        x = round(x, 6)
        if x <= xs[-1]:
            ys[-1] = max(ys[-1], round(y, 4)) if len(xs) > 1 else ys[-1]
            continue
        if len(xs) > 1:
            xs.append(round(x - 1e-6, 6))
            ys.append(ys[-1])
        xs.append(x)
        ys.append(round(max(y, ys[-1]), 4))
    if len(xs) < 2:
        xs, ys = [0.0, 1.0], [0.0, 0.0]
    return xs, ys


def field_map(points: list[tuple[float, int]]) -> dict:
    """Per-value map: each isotonic block at the lower end of the 95% Wilson
    interval of its rate of being right."""
    levels = [(x0, 1.0 - wilson_high(n - k, n)) for x0, _, k, n in _thick(points)]
    xs, ys = _steps(levels)
    return {"x": xs, "y": ys}


def record_map(points: list[tuple[float, int]], margin: float) -> dict:
    """Raw score -> record confidence: the smaller of
    * the per-record estimate: the isotonic block's rate of being right
      (lower end of its 95% Wilson interval), and
    * the review-threshold bound ``1 - margin * e(s)``, ``e(s)`` the upper
      end of the 95% Wilson interval of the error rate of all lines scoring
      >= s (on the isotonic fit: a higher threshold never has more errors
      per line), made non-decreasing by a running maximum.
    Step knots (flat up to the next threshold) keep it conservative between
    knots."""
    blocks = _thick(points)
    cum_err = cum_n = 0.0
    tops = []
    for x0, _, k, n in reversed(blocks):
        cum_err += n - k
        cum_n += n
        tops.append((x0, cum_err, cum_n))
    tops.reverse()
    levels = []
    best = 0.0
    for (x0, _, k, n), (_, e, m) in zip(blocks, tops):
        best = max(best, 1.0 - margin * wilson_high(e, m))
        levels.append((x0, min(best, k / n)))
    xs, ys = _steps(levels)
    return {"x": xs, "y": ys}


def coverage(scores, ys, cut: float) -> str:
    sel = scores >= cut
    n = int(sel.sum())
    prec = float(ys[sel].mean()) if n else float("nan")
    return f">= {cut}: {n / len(ys):.1%} of lines, {prec:.1%} exactly right"


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--lines", default=os.path.join(HERE, "..", "build", "refs-calib-heldout.jsonl"),
                    help="held-out synthetic lines (made with SYNTH_ARGS if missing)")
    ap.add_argument("--remake", action="store_true", help="make the held-out lines again")
    ap.add_argument("--out", default=os.path.join(HERE, "..", "normform", "data", "refs-calibration.json"))
    args = ap.parse_args(argv)
    if args.remake or not os.path.exists(args.lines):
        os.makedirs(os.path.dirname(args.lines), exist_ok=True)
        make_lines(args.lines)
    with open(args.lines, encoding="utf-8") as fh:
        recs = renoise([json.loads(line) for line in fh if line.strip()])
    half_a = [r for i, r in enumerate(recs) if i % 4 < 2]   # both halves get noisy and clean lines
    half_b = [r for i, r in enumerate(recs) if i % 4 >= 2]
    # 1. field maps on half A (raw field confidences)
    _, ya, fa, _ = collect(half_a)
    by_field: dict[str, list[tuple[float, int]]] = {}
    for f, c, ok in fa:
        by_field.setdefault(f, []).append((c, ok))
    fmaps = {f: field_map(pts) for f, pts in sorted(by_field.items()) if len(pts) >= 4 * MIN_BLOCK}
    # 2. record map on half B: the product rule over the calibrated fields
    xb, yb, fb, kb = collect(half_b, _FieldsOnly(fmaps))
    # only the twice-noised lines: the nearest synthetic stand-in for hand-typed ones
    noisy = np.array(["+noise" in r["src"] for r in half_b])
    rmap = record_map(list(zip(xb[noisy].tolist(), yb[noisy].astype(int).tolist())), RECORD_MARGIN)
    # the map is trusted only for kinds the fit saw often enough
    seen = Counter(k for k, z in zip(kb, noisy) if z)
    kinds = sorted(k for k, n in seen.items() if n >= MIN_KIND)
    data = {
        "about": "reference confidence fitted by scripts/calibrate_refs.py on held-out synthetic lines "
                 "(never on evaluation data); record: raw product-rule score -> confidence; "
                 "fields: labeler confidence -> confidence",
        "synth_args": SYNTH_ARGS, "noise_seed": NOISE_SEED, "lines": len(recs),
        "record": {"map": rmap, "margin": RECORD_MARGIN, "kinds": kinds,
                   "kind_lines": dict(sorted(seen.items()))},
        "fields": fmaps,
    }
    with open(args.out, "w", encoding="utf-8") as fh:
        json.dump(data, fh, indent=1)
        fh.write("\n")
    print(f"{len(recs)} held-out synthetic lines; exactly right {ya.mean():.1%} (half A), "
          f"{yb.mean():.1%} (half B) -> {args.out}", file=sys.stderr)
    k = confidence.knots(rmap)
    mapped = np.array([confidence.interp(k, p) if kind in kinds else min(p, confidence.interp(k, p))
                       for p, kind in zip(xb, kb)])
    print(f"  record map trusted for kinds {kinds}; lines per kind {dict(seen)}", file=sys.stderr)
    for cut in (0.8, 0.9, 0.95):
        print(f"  half B {coverage(mapped, yb, cut)}", file=sys.stderr)
    # field maps checked on the other half: mean confidence of right vs wrong values
    right = [c for f, c, ok in fb if ok and ":" not in f]
    wrong = [c for f, c, ok in fb if not ok and ":" not in f]
    print(f"  half B fields: mean confidence {np.mean(right):.3f} right ({len(right)}), "
          f"{np.mean(wrong):.3f} wrong ({len(wrong)})", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
