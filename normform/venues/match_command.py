"""``normform match INPUT --against LIBRARY``: find each line's record in the curated library.

INPUT holds one free-form reference per line (or CSL-JSON records as JSON
Lines when its suffix is ``.jsonl``/``.json``).  Each line is parsed, matched,
and written as one JSON object: the match, its score, the field-by-field
conflicts, ``record`` (enriched when matched, else the line's own parse) and,
below the threshold, ``best_candidate`` for review.  ``--to bibtex`` writes the enriched
bibliography instead (every line, enriched where it matched).
"""

from __future__ import annotations

import argparse
import json
import sys
from pathlib import Path


def configure(parser: argparse.ArgumentParser) -> None:
    from normform.venues.settings import DEFAULT_THRESHOLD

    parser.add_argument("input", metavar="INPUT", help="reference lines (text), or CSL-JSON records (.jsonl)")
    parser.add_argument("--against", required=True, metavar="LIBRARY", help="the curated library: BibTeX (.bib) or CSL-JSON")
    parser.add_argument("--to", choices=("jsonl", "bibtex"), default="jsonl", help="output: match records (default) or the enriched BibTeX")
    parser.add_argument("--threshold", type=float, default=DEFAULT_THRESHOLD, metavar="T",
                        help=f"minimum score (0..1) to accept a match and enrich (default {DEFAULT_THRESHOLD})")
    parser.add_argument("-o", "--output", metavar="OUT", help="output file (default: standard output)")


def _queries(path: Path, text: str):
    """(line number, raw text, Reference) for each non-blank input line."""
    if path.suffix.lower() in (".jsonl", ".json"):
        from normform.venues.library import csl_objects, from_csl

        for n, item in enumerate(csl_objects(text, str(path)), start=1):
            yield n, None, from_csl(item)
        return
    from normform import parse_reference

    for n, line in enumerate(text.splitlines(), start=1):
        if line.strip():
            yield n, line, parse_reference(line)


def result_object(n: int, raw: str | None, result) -> dict:
    """The JSON Lines record of one match."""
    from normform.venues.library import to_csl

    return {
        "line": n,
        "text": raw,
        "matched": result.matched,
        "score": round(result.score, 4),
        "library_key": result.record.key if result.record is not None else None,
        "field_scores": {name: round(s, 3) for name, s in result.field_scores},
        "rejected": result.rejected,
        "conflicts": [{"field": c.field, "line": c.line, "library": c.library} for c in result.conflicts],
        "kept_from_line": [{"field": c.field, "line": c.line, "library": c.library} for c in result.kept],
        "enriched_fields": list(result.enriched),
        "record": to_csl(result.reference),
        "best_candidate": to_csl(result.record) if result.record is not None and not result.matched else None,
    }


def run(args: argparse.Namespace) -> int:
    from normform.cli import UsageError
    from normform.errors import PositionedError
    from normform.venues.library import to_bibtex
    from normform.venues.command import read_input
    from normform.venues.match import AuthorityMatcher

    if not 0.0 <= args.threshold <= 1.0:
        raise UsageError(f"--threshold must be between 0 and 1, not {args.threshold}")
    from normform.safety import refuse_overwrite

    src = Path(args.input)
    refuse_overwrite([("-o", args.output)], [("INPUT", args.input), ("--against", args.against)])
    text = read_input(args.input)
    skipped: list[PositionedError] = []

    def skip(exc: PositionedError) -> None:
        # a malformed library entry costs that entry only: warn where it is, go on
        skipped.append(exc)
        print(f"normform match: warning: {exc.describe()}", file=sys.stderr)

    try:
        matcher = AuthorityMatcher.from_file(args.against, threshold=args.threshold, on_error=skip)
    except PositionedError as exc:
        print(f"normform match: {exc.describe()}", file=sys.stderr)
        return 2
    lines = matched = conflicted = 0
    out_parts: list[str] = []
    enriched = []
    try:
        for n, raw, ref in _queries(src, text):
            result = matcher.match(ref)
            lines += 1
            matched += result.matched
            conflicted += bool(result.conflicts)
            if args.to == "bibtex":
                enriched.append(result.reference)
            else:
                out_parts.append(json.dumps(result_object(n, raw, result), ensure_ascii=False))
    except PositionedError as exc:
        print(f"normform match: {exc.describe()}", file=sys.stderr)
        return 1
    out = to_bibtex(enriched) if args.to == "bibtex" else "\n".join(out_parts) + ("\n" if out_parts else "")
    if args.output:
        Path(args.output).write_text(out, "utf-8")
    else:
        sys.stdout.write(out)
    print(f"match: {lines} lines against {len(matcher)} library records: {matched} matched "
          f"(threshold {args.threshold}), {lines - matched} unchanged, {conflicted} with conflicts"
          + (f"; {len(skipped)} malformed library entries skipped" if skipped else ""),
          file=sys.stderr)
    return 1 if conflicted or skipped else 0
