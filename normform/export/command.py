"""``normform convert INPUT --to {bibtex,csl-json,text} [--style NAME] [-o OUT] [--latex]``.

Reads ``.bib`` or ``.json`` (CSL-JSON) files, or ``-`` for standard input
(BibTeX unless it starts with ``[`` or ``{``).  Malformed entries are
reported with file, line and column; the others are still converted.
Exit 0 clean, 1 data errors, 2 usage or I/O errors.  Never overwrites its input.
"""

from __future__ import annotations

import argparse
import sys


def configure(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("input", help="a .bib or .json / .jsonl (CSL-JSON) file, or - for standard input")
    parser.add_argument("--to", required=True, choices=("bibtex", "csl-json", "text"), help="output format")
    parser.add_argument("--style", help="CSL style name for --to text (default: the house style)")
    parser.add_argument("-o", "--output", help="output file (default: standard output)")
    parser.add_argument("--latex", action="store_true", help="BibTeX output in ASCII with TeX accents")
    parser.add_argument("--from", dest="source_format", choices=("bibtex", "csl-json"),
                        help="input format when the file name does not say")


def run(args: argparse.Namespace) -> int:
    from normform.cli import UsageError
    from normform.errors import PositionedError

    if args.style and args.to != "text":
        raise UsageError("--style applies only to --to text")
    if args.latex and args.to != "bibtex":
        raise UsageError("--latex applies only to --to bibtex")
    from normform.safety import refuse_overwrite

    refuse_overwrite([("-o", args.output)], [("INPUT", args.input)])
    if args.input == "-":
        text, path = sys.stdin.read(), "<stdin>"
    else:
        path = args.input
        try:
            with open(path, encoding="utf-8") as handle:
                text = handle.read()
        except (OSError, UnicodeDecodeError) as exc:
            print(f"normform convert: cannot read {path}: {exc}", file=sys.stderr)
            return 2
    fmt = args.source_format
    if fmt is None:
        if path.lower().endswith((".json", ".jsonl")):
            fmt = "csl-json"
        elif path.lower().endswith(".bib") or path == "<stdin>":
            fmt = "csl-json" if path == "<stdin>" and text.lstrip()[:1] in ("[", "{") else "bibtex"
        else:
            raise UsageError(f"cannot tell the format of {path}; use --from bibtex|csl-json")
    errors: list[PositionedError] = []
    preamble: list[str] = []
    if fmt == "bibtex":
        from normform.readers.bibtex import read_bibtex
        result = read_bibtex(text, path)
        records, errors, preamble = result.records, list(result.errors), result.preamble
    else:
        from normform.readers.csljson import read_csljson_all
        try:
            records, found = read_csljson_all(text, path)
            errors = list(found)
        except PositionedError as exc:  # the JSON itself is broken
            records, errors = [], [exc]
    from normform.export.registry import get_exporter
    try:
        exporter = get_exporter(args.to, style=args.style, latex=args.latex)
    except KeyError as exc:
        raise UsageError(str(exc.args[0])) from None
    output = exporter.dumps(records, preamble) if args.to == "bibtex" and preamble else exporter.dumps(records)
    for err in errors:
        print(f"normform convert: {err}", file=sys.stderr)
        excerpt = err.excerpt()
        if excerpt:
            print("  " + excerpt.replace("\n", "\n  "), file=sys.stderr)
    if args.output:
        try:
            with open(args.output, "w", encoding="utf-8") as handle:
                handle.write(output)
        except OSError as exc:
            print(f"normform convert: cannot write {args.output}: {exc}", file=sys.stderr)
            return 2
    else:
        sys.stdout.write(output)
    return 1 if errors else 0
