"""Speed of authority matching: 100,000 references against a 50,000-record library.

Target (issue 8): <= 2 minutes on one core.  Synthetic, invented records (a
Zipf-distributed vocabulary of generated words and family names); queries are
70 % damaged copies of library records (typos, dropped fields, abbreviated
venues, cut author lists) and 30 % records absent from the library.

Each query is rendered to a plain-text line (normform's house text style)
and matched as the parser hands records over: the damaged Reference with
that line as its raw text.  The parser's own cost is measured separately on
a sample of the lines (it belongs to the reference parser's bench) and
printed for the total.

Baseline named general-purpose library, measured in the same run:
``rapidfuzz.process.extractOne`` of each query title over all library titles
(no blocking), on a sample, extrapolated.

    python bench/bench_match.py [--library 50000] [--queries 100000]
"""

from __future__ import annotations

import argparse
import random
import time

from rapidfuzz import fuzz, process

from normform.model import Date, Kind, Name, Pages, Provenance, Reference
from normform.venues.match import AuthorityMatcher

SYLLABLES = ("ka lo mi ne ru sa ti vo ber den gar hul mar nor pel quin ros stra tel vin wer "
             "al an ar el en er il in or un ol ath eth ith oth").split()
VENUES = ["Transactions of the American Mathematical Society", "Journal of Algebra", "Discrete Mathematics",
          "Journal of Combinatorial Theory, Series A", "Advances in Mathematics", "Mathematische Annalen",
          "Journal of Number Theory", "European Journal of Combinatorics", "The Fibonacci Quarterly",
          "Journal of Integer Sequences", "Bulletin of the Quillfeather Society for Enumerative Mathematics"]
ABBREV = {"Transactions of the American Mathematical Society": "Trans. Amer. Math. Soc.",
          "Journal of Algebra": "J. Algebra", "Discrete Mathematics": "Discrete Math.",
          "Journal of Combinatorial Theory, Series A": "J. Combin. Theory Ser. A",
          "Advances in Mathematics": "Adv. Math.", "Mathematische Annalen": "Math. Ann.",
          "Journal of Number Theory": "J. Number Theory", "European Journal of Combinatorics": "European J. Combin.",
          "The Fibonacci Quarterly": "Fibonacci Quart.", "Journal of Integer Sequences": "J. Integer Seq.",
          "Bulletin of the Quillfeather Society for Enumerative Mathematics": "Bull. Quillfeather Soc. Enumer. Math."}


def _word(rng: random.Random, parts: int) -> str:
    return "".join(rng.choice(SYLLABLES) for _ in range(parts))


def _zipf_pick(rng: random.Random, items: list[str]) -> str:
    # rank ~ 1/u: a few very common items, a long tail of rare ones
    i = int(len(items) ** rng.random()) - 1
    return items[min(i, len(items) - 1)]


def make_world(seed: int, n_words: int = 30000, n_families: int = 15000):
    rng = random.Random(seed)
    words = list(dict.fromkeys(_word(rng, rng.randint(2, 4)) for _ in range(n_words * 2)))[:n_words]
    families = list(dict.fromkeys(_word(rng, rng.randint(2, 3)).capitalize() for _ in range(n_families * 2)))[:n_families]
    return rng, words, families


def make_record(rng, words, families, i: int) -> Reference:
    title = " ".join(_zipf_pick(rng, words) for _ in range(rng.randint(3, 9))).capitalize()
    authors = tuple(Name(family=_zipf_pick(rng, families), given=rng.choice("ABCDEFGHJKLMNPRST") + ".")
                    for _ in range(rng.randint(1, 4)))
    first = rng.randint(1, 900)
    return Reference(kind=Kind.ARTICLE, authors=authors, title=title, container_title=rng.choice(VENUES),
                     volume=str(rng.randint(1, 400)), pages=Pages(first=str(first), last=str(first + rng.randint(3, 40))),
                     date=Date(year=rng.randint(1900, 2025)), key=f"rec{i}")


def _typo(rng, text: str) -> str:
    if len(text) < 6:
        return text
    i = rng.randrange(1, len(text) - 1)
    return text[:i] + text[i + 1:] if rng.random() < 0.5 else text[:i - 1] + text[i] + text[i - 1] + text[i + 1:]


def damage(rng, ref: Reference) -> Reference:
    changes = {"key": None}
    if rng.random() < 0.5:
        changes["title"] = _typo(rng, ref.title)
    if rng.random() < 0.3:
        changes["title"] = (changes.get("title") or ref.title).lower()
    if rng.random() < 0.5:
        changes["container_title"] = ABBREV[ref.container_title]
    elif rng.random() < 0.2:
        changes["container_title"] = None
    if rng.random() < 0.3:
        changes["pages"] = None
    if rng.random() < 0.2:
        changes["volume"] = None
    if rng.random() < 0.1:
        changes["date"] = None
    if len(ref.authors) > 1 and rng.random() < 0.2:
        changes["authors"] = ref.authors[:1]
    if rng.random() < 0.2:
        a = list(changes.get("authors", ref.authors))
        a[0] = Name(family=_typo(rng, a[0].family), given=a[0].given)
        changes["authors"] = tuple(a)
    return ref.replace(**changes)


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--library", type=int, default=50_000)
    ap.add_argument("--queries", type=int, default=100_000)
    ap.add_argument("--baseline-sample", type=int, default=200)
    ap.add_argument("--parse-sample", type=int, default=300)
    args = ap.parse_args()

    rng, words, families = make_world(20261202)
    library = [make_record(rng, words, families, i) for i in range(args.library)]
    queries: list[tuple[str | None, Reference]] = []
    for _ in range(args.queries):
        if rng.random() < 0.7:
            src = rng.choice(library)
            queries.append((src.key, damage(rng, src)))
        else:
            queries.append((None, make_record(rng, words, families, -1).replace(key=None)))

    from normform.export.registry import get_exporter

    text = get_exporter("text")
    queries = [(k, q.replace(provenance=Provenance(raw=text.format(q)))) for k, q in queries]

    t0, c0 = time.perf_counter(), time.process_time()
    matcher = AuthorityMatcher(library)
    t_index, c_index = time.perf_counter() - t0, time.process_time() - c0

    t0, c0 = time.perf_counter(), time.process_time()
    made = correct = related = false_unrelated = 0
    for truth, q in queries:
        r = matcher.match(q)
        related += truth is not None
        if r.matched:
            made += 1
            if truth is not None and r.record.key == truth:
                correct += 1
            elif truth is None:
                false_unrelated += 1
    t_match, c_match = time.perf_counter() - t0, time.process_time() - c0

    # baseline: all-pairs title search with rapidfuzz.process.extractOne
    titles = [r.title for r in library]
    sample = [q for _, q in queries[: args.baseline_sample]]
    c0 = time.process_time()
    for q in sample:
        process.extractOne(q.title, titles, scorer=fuzz.ratio)
    c_base = (time.process_time() - c0) / len(sample) * len(queries)

    # the parser's share, for the whole "lines in, matches out" figure
    t_parse = None
    try:
        from normform import parse_reference

        lines = [q.provenance.raw for _, q in queries[: args.parse_sample]]
        c0 = time.process_time()
        for line in lines:
            parse_reference(line)
        t_parse = (time.process_time() - c0) / len(lines) * len(queries)
    except Exception as exc:  # the parser or exporter is another area's; report, don't fail
        print(f"parser timing skipped: {exc}")

    print(f"library {len(library):,} records, {len(queries):,} queries (one process; CPU seconds, wall in brackets)")
    print(f"index build      {c_index:7.1f} s  [{t_index:.1f}]")
    print(f"matching         {c_match:7.1f} s  [{t_match:.1f}]   {len(queries) / c_match:,.0f} queries/CPU-s   "
          f"(target <= 120 s incl. index: {'met' if c_match + c_index <= 120 else 'MISSED'})")
    print(f"precision {correct / made if made else 1:.4f}   recall {correct / related:.4f}   "
          f"unrelated matched {false_unrelated} of {len(queries) - related}")
    print(f"baseline rapidfuzz.process.extractOne all-pairs (extrapolated from {len(sample)}): "
          f"{c_base:7.1f} s   ratio baseline/ours = {c_base / c_match:.1f}x")
    if t_parse is not None:
        print(f"parse_reference on rendered lines (extrapolated from {args.parse_sample}): {t_parse:7.1f} s "
              f"-> lines in, matches out: {t_parse + c_index + c_match:7.1f} s")


if __name__ == "__main__":
    main()
