#!/usr/bin/env python3
"""Train the reference labeler (python-crfsuite) on synthetic lines.

    python scripts/synth_refs.py --out build/refs-synth.jsonl --n 20000
    nice -n 10 python scripts/train_refs.py build/refs-synth.jsonl

Writes ``normform/data/refs-crf.crfsuite``.  A fixed share of the synthetic
lines (chosen by a fixed seed) is held out and scored per label, so a run
reports how well it learned -- on synthetic data only; the evaluation
corpora are measured separately with ``bench/eval_refs.py`` and never used
here.
"""

from __future__ import annotations

import argparse
import json
import os
import random
import sys
import time
from collections import Counter

sys.path.insert(0, os.path.join(os.path.dirname(__file__), ".."))

import pycrfsuite  # noqa: E402

from normform.refs.features import sequence_features  # noqa: E402
from normform.refs.tokens import tokenize  # noqa: E402


def token_labels(text: str, spans, tokens) -> list[str]:
    out = []
    k = 0
    spans = sorted(spans)
    for tok in tokens:
        if tok.ident is not None:
            out.append(tok.ident.scheme)
            continue
        lab = "O"
        while k < len(spans) and spans[k][1] <= tok.start:
            k += 1
        if k < len(spans) and spans[k][0] <= tok.start < spans[k][1]:
            lab = spans[k][2]
        out.append(lab)
    return out


def load(path: str):
    with open(path, encoding="utf-8") as fh:
        for line in fh:
            rec = json.loads(line)
            text = rec["text"]
            tokens = tokenize(text)
            if not tokens:
                continue
            yield sequence_features(tokens, text), token_labels(text, rec["spans"], tokens)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("data", help="synthetic JSON Lines from scripts/synth_refs.py")
    ap.add_argument("--model", default=os.path.join(os.path.dirname(__file__), "..", "normform", "data",
                                                    "refs-crf.crfsuite"))
    ap.add_argument("--seed", type=int, default=7)
    ap.add_argument("--holdout", type=float, default=0.04)
    ap.add_argument("--iterations", type=int, default=120)
    ap.add_argument("--c1", type=float, default=0.05)
    ap.add_argument("--c2", type=float, default=0.01)
    args = ap.parse_args(argv)

    r = random.Random(args.seed)
    t0 = time.time()
    trainer = pycrfsuite.Trainer(verbose=False)
    held = []
    n = 0
    for xseq, yseq in load(args.data):
        if r.random() < args.holdout:
            held.append((xseq, yseq))
            continue
        trainer.append(xseq, yseq)
        n += 1
    print(f"{n} training sequences, {len(held)} held out; features in {time.time() - t0:.1f}s", file=sys.stderr)
    trainer.set_params({
        "c1": args.c1, "c2": args.c2, "max_iterations": args.iterations,
        "feature.possible_transitions": True, "feature.minfreq": 2,
    })
    t1 = time.time()
    tmp = args.model + ".tmp"
    trainer.train(tmp)
    os.replace(tmp, args.model)
    print(f"trained in {time.time() - t1:.1f}s; model {os.path.getsize(args.model) / 1e6:.2f} MB", file=sys.stderr)

    tagger = pycrfsuite.Tagger()
    tagger.open(args.model)
    # the attribute list lets the runtime drop features the model never uses
    attrs_path = os.path.join(os.path.dirname(args.model), "refs-crf.attrs.txt")
    with open(attrs_path, "w", encoding="utf-8") as fh:
        fh.write("\n".join(sorted(tagger.info().attributes)))
    tp, fp, fn = Counter(), Counter(), Counter()
    seq_ok = 0
    for xseq, yseq in held:
        pred = tagger.tag(xseq)
        seq_ok += pred == yseq
        for p, g in zip(pred, yseq):
            if p == g:
                tp[g] += 1
            else:
                fp[p] += 1
                fn[g] += 1
    print(f"held-out synthetic: {seq_ok}/{len(held)} sequences fully right", file=sys.stderr)
    for lab in sorted(set(tp) | set(fn)):
        p = tp[lab] / max(1, tp[lab] + fp[lab])
        rc = tp[lab] / max(1, tp[lab] + fn[lab])
        print(f"  {lab:16s} P={p:.3f} R={rc:.3f} n={tp[lab] + fn[lab]}", file=sys.stderr)
    return 0


if __name__ == "__main__":
    sys.exit(main())
