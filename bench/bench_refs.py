#!/usr/bin/env python3
"""Throughput of the reference parser, and pybtex on the same records.

    python bench/bench_refs.py [--n 3000] [--file LINES.txt] [--stages] [--crfsuite]

Records are invented by ``scripts/synth_refs.py`` (fixed seed); each is
written once as a free-form line (legacy templates) and once as a BibTeX
entry.  We time ``normform.parse_references`` over the lines and pybtex's
BibTeX parser (``pybtex.database.parse_string``) over the same records,
in the same run, on one core, and print the ratio.  Memory: peak traced
allocation while streaming N and 4N lines through the generator -- flat
streaming means the two peaks are about equal.

``--stages`` also prints where the time goes per line (tokenizer, feature
strings, python-crfsuite, label repairs, assembly, checks), timed by
wrapping the parser's own stage functions, so the figures follow the real
pipeline.  ``--crfsuite`` splits python-crfsuite's own share call by call
(attribute lookup, Viterbi, marginals, probability) on the parser's real
feature lists: no parser built on it with these features can be faster.
"""

from __future__ import annotations

import argparse
import os
import random
import sys
import time
import tracemalloc

HERE = os.path.dirname(os.path.abspath(__file__))
sys.path.insert(0, os.path.join(HERE, ".."))
sys.path.insert(0, os.path.join(HERE, "..", "scripts"))


def make_corpus(n: int, seed: int = 99) -> tuple[list[str], str]:
    import synth_refs as synth
    from pybtex.database import BibliographyData, Entry, Person

    r = random.Random(seed)
    lines, entries = [], {}
    typ_map = {"article-journal": "article", "book": "book", "chapter": "incollection",
               "paper-conference": "inproceedings", "thesis": "phdthesis", "report": "techreport"}
    i = 0
    while len(lines) < n:
        i += 1
        rec = synth.make_record(r, i)
        if rec["type"] not in typ_map:
            continue
        text, _ = synth.pieces_to_spans(synth.render_template(rec, r))
        lines.append(text)
        fields = {"title": rec["title"], "year": str(rec["issued"]["date-parts"][0][0])}
        for k, bk in (("container-title", "journal"), ("volume", "volume"), ("issue", "number"),
                      ("page", "pages"), ("publisher", "publisher"), ("publisher-place", "address"),
                      ("DOI", "doi")):
            if k in rec:
                fields[bk] = rec[k]
        persons = {}
        for role in ("author", "editor"):
            if role in rec:
                persons[role] = [Person("{" + p["literal"] + "}") if "literal" in p else
                                 Person(first=p.get("given", ""), prelast=p.get("non-dropping-particle", ""),
                                        last=p["family"], lineage=p.get("suffix", "")) for p in rec[role]]
        entries[f"k{i}"] = Entry(typ_map[rec["type"]], fields=fields, persons=persons)
    return lines, BibliographyData(entries).to_string("bibtex")


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--n", type=int, default=3000)
    ap.add_argument("--file", help="time these lines instead (no pybtex ratio)")
    ap.add_argument("--stages", action="store_true", help="also print the time per line of each stage")
    ap.add_argument("--crfsuite", action="store_true",
                    help="also split python-crfsuite's own time (attribute lookup, Viterbi, marginals)")
    args = ap.parse_args(argv)
    try:
        os.sched_setaffinity(0, {sorted(os.sched_getaffinity(0))[0]})   # one core
    except (AttributeError, OSError):
        pass

    from pybtex.database import parse_string

    from normform.refs.api import parse_reference, parse_references

    if args.file:
        lines = [ln.rstrip("\n") for ln in open(args.file, encoding="utf-8")]
        bibtex = None
    else:
        lines, bibtex = make_corpus(args.n)
    # one-time start-up (model file, lark grammars) is timed on its own
    t0 = time.perf_counter()
    for line in lines[:50]:
        parse_reference(line)
    print(f"start-up + first 50 lines: {time.perf_counter() - t0:.2f}s")

    # Wall time, and CPU time of this process: on a shared, loaded machine
    # the CPU time is the steadier of the two (both are printed).
    t0, c0 = time.perf_counter(), time.process_time()
    for _ in parse_references(lines):
        pass
    ours, ours_cpu = time.perf_counter() - t0, time.process_time() - c0
    print(f"normform refs: {len(lines)} lines in {ours:.2f}s = {len(lines) / ours:,.0f} lines/s (one core); "
          f"CPU {ours_cpu:.2f}s = {len(lines) / ours_cpu:,.0f} lines/s")
    if bibtex is not None:
        t0, c0 = time.perf_counter(), time.process_time()
        parse_string(bibtex, "bibtex")
        theirs, theirs_cpu = time.perf_counter() - t0, time.process_time() - c0
        print(f"pybtex BibTeX parser: same {len(lines)} records in {theirs:.2f}s = {len(lines) / theirs:,.0f} "
              f"records/s; CPU {theirs_cpu:.2f}s = {len(lines) / theirs_cpu:,.0f} records/s")
        print(f"ratio normform / pybtex: {theirs / ours:.2f}x (wall), {theirs_cpu / ours_cpu:.2f}x (CPU)")

    if args.stages:
        stages(lines)
    if args.crfsuite:
        crfsuite_split(lines, theirs_cpu if bibtex is not None else None)

    # streaming memory: peak while streaming N lines vs 4N lines
    peaks = []
    for mult in (1, 4):
        stream = (lines[i % len(lines)] for i in range(len(lines) * mult))
        tracemalloc.start()
        for _ in parse_references(stream):
            pass
        peaks.append(tracemalloc.get_traced_memory()[1])
        tracemalloc.stop()
    print(f"peak traced memory streaming {len(lines)} lines: {peaks[0] / 1e6:.1f} MB; "
          f"{4 * len(lines)} lines: {peaks[1] / 1e6:.1f} MB")
    return 0


def stages(lines: list[str]) -> None:
    """CPU time per line of each parser stage (wrapped stage functions)."""
    from normform.refs import api, assemble, kinds, labeler, relabel, validate

    from cputimer import timed

    spent: dict[str, float] = {}

    saved = [(api, "tokenize"), (labeler, "sequence_features"), (labeler, "label"), (relabel, "repair"),
             (assemble, "assemble"), (kinds, "details"), (validate, "review")]
    originals = [(mod, name, getattr(mod, name)) for mod, name in saved]
    names = {"tokenize": "tokenizer", "sequence_features": "feature strings", "label": "labeler (all)",
             "repair": "label repairs", "assemble": "assembly + repairs", "details": "kind details",
             "review": "validation"}
    try:
        for mod, name, fn in originals:
            setattr(mod, name, timed(spent, names[name], fn))
        c0 = time.process_time()
        for line in lines:
            api.parse_reference(line)
        total = time.process_time() - c0
    finally:
        for mod, name, fn in originals:
            setattr(mod, name, fn)
    n = len(lines)
    spent["python-crfsuite (labeler minus features)"] = spent.pop("labeler (all)") - spent["feature strings"]
    spent["rest (hygiene, records)"] = total - sum(spent.values())
    print(f"per line, CPU ({n} lines, {total / n * 1e6:.0f} us in all):")
    for name, sec in sorted(spent.items(), key=lambda kv: -kv[1]):
        print(f"  {name:42s} {sec / n * 1e6:7.1f} us  {100 * sec / total:5.1f} %")


def crfsuite_split(lines: list[str], pybtex_cpu: float | None) -> None:
    """python-crfsuite's own CPU per line, call by call, on the parser's real
    feature lists: the floor under any parser built on it with these features."""
    from normform.refs import features, labeler
    from normform.refs.tokens import tokenize

    tagger = labeler._tagger()
    xs = [features.sequence_features(toks, line) for line in lines if (toks := tokenize(line))]
    n = len(xs)
    attrs = sum(len(f) for x in xs for f in x)
    spent = {}
    c0 = time.process_time()
    for x in xs:
        tagger.set(x)
    spent["set (attribute strings -> model ids)"] = time.process_time() - c0
    for x in xs:
        tagger.set(x)
        c0 = time.process_time()
        y = tagger.tag()
        c1 = time.process_time()
        for i, lab in enumerate(y):
            tagger.marginal(lab, i)
        c2 = time.process_time()
        tagger.probability(y)
        c3 = time.process_time()
        spent["tag (Viterbi)"] = spent.get("tag (Viterbi)", 0.0) + c1 - c0
        spent["marginals (forward-backward)"] = spent.get("marginals (forward-backward)", 0.0) + c2 - c1
        spent["sequence probability"] = spent.get("sequence probability", 0.0) + c3 - c2
    total = sum(spent.values())
    print(f"python-crfsuite alone ({n} lines, {sum(map(len, xs)) / n:.1f} tokens and {attrs / n:.0f} "
          f"attributes a line): {total / n * 1e6:.0f} us a line = at most {n / total:,.0f} lines/s")
    for name, sec in spent.items():
        print(f"  {name:42s} {sec / n * 1e6:7.1f} us")
    if pybtex_cpu:
        print(f"pybtex needs {pybtex_cpu / len(lines) * 1e6:.0f} us a record: python-crfsuite alone "
              f"allows at most {pybtex_cpu / len(lines) / (total / n):.2f}x pybtex")


if __name__ == "__main__":
    sys.exit(main())
