"""``normform clean INPUT... -o OUTDIR``: batch-clean a legacy collection."""

from __future__ import annotations

import argparse
import os
import sys


def configure(parser: argparse.ArgumentParser) -> None:
    parser.description = (
        "Clean legacy references into records.jsonl, references.bib, needs-review.jsonl, "
        "clusters.jsonl, summary.json and report.html in OUTDIR. Inputs are plain text "
        "(one reference per line), JSON Lines ({\"id\", \"text\"} or entries), or catalogue "
        "entry files (.toml/.json) and directories of them. Inputs are never modified.")
    parser.add_argument("inputs", nargs="+", metavar="INPUT", help="input files or entry directories")
    parser.add_argument("-o", "--output", required=True, metavar="OUTDIR", help="output directory")
    parser.add_argument("--threshold", type=float, default=0.9,
                        help="records below this confidence go to needs-review.jsonl (default 0.9)")
    parser.add_argument("--jobs", type=int, default=None, metavar="N",
                        help="worker processes (default: all cores)")
    parser.add_argument("--resume", action="store_true",
                        help="continue an interrupted run from its checkpoint in OUTDIR")
    parser.add_argument("--quiet", action="store_true", help="no progress output")
    parser.add_argument("--engine", choices=("local", "dask"), default="local",
                        help="local processes (default) or an existing Dask cluster")
    parser.add_argument("--scheduler", metavar="ADDRESS",
                        help="Dask scheduler address for --engine dask, e.g. tcp://10.0.0.5:8786")
    parser.add_argument("--against", metavar="LIBRARY",
                        help="match every record against this curated bibliography and enrich it")
    parser.add_argument("--chunk-size", type=int, default=500, metavar="N",
                        help="references per work unit and per checkpoint (default 500)")
    parser.add_argument("--report-rows", type=int, default=20000, metavar="N",
                        help="records shown in report.html (default 20000; all go to records.jsonl)")
    parser.add_argument("--similarity", type=float, default=90.0, metavar="S",
                        help="title similarity 0-100 for duplicate clusters (default 90)")


def run(args: argparse.Namespace, *, toolkit: str | None = None) -> int:
    from normform.batch.engines import EngineError
    from normform.batch.runner import CleanError, clean
    from normform.cli import UsageError

    if args.jobs is not None and args.jobs < 1:
        raise UsageError("--jobs must be at least 1")
    if args.scheduler and args.engine != "dask":
        raise UsageError("--scheduler is only used with --engine dask")
    try:
        result = clean(args.inputs, args.output, threshold=args.threshold, jobs=args.jobs,
                       engine=args.engine, scheduler=args.scheduler, resume=args.resume,
                       quiet=args.quiet, chunk_size=args.chunk_size, report_rows=args.report_rows,
                       similarity=args.similarity, against=args.against, toolkit=toolkit)
    except CleanError as exc:
        raise UsageError(str(exc)) from None
    except EngineError as exc:
        after = ("; progress so far is checkpointed: run the same command with --resume to continue"
                 if exc.started else "; nothing was written")
        print(f"normform clean: {exc}{after}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        # caught here, not only by the dispatcher, so that the way back is named
        print("normform clean: interrupted; progress so far is checkpointed: run the same command "
              "with --resume to continue", file=sys.stderr)
        return 130
    except OSError as exc:
        print(f"normform clean: {exc}", file=sys.stderr)
        return 2
    check = "OK" if result.ok else "MISMATCH"
    entries = f"entry files: {result.entry_files:,}; " if result.entry_files else ""
    print(f"{entries}lines in: {result.lines_in:,} ({result.blank:,} blank); references read: "
          f"{result.references_read:,}; records out: {result.records:,}: {check}")
    rate = result.records / result.seconds if result.seconds > 0 else 0.0
    print(f"needs review: {result.needs_review:,}; duplicate clusters: {result.clusters:,}; "
          f"{result.seconds:.1f}s ({rate:,.0f} lines/s){'; resumed' if result.resumed else ''}")
    print(f"outputs in {os.path.normpath(args.output)}{os.sep}: records.jsonl references.bib "
          "needs-review.jsonl clusters.jsonl summary.json report.html")
    if not result.ok:
        print("normform clean: records out do not match references read", file=sys.stderr)
        return 1
    if result.unreadable:
        # named here too: with --quiet the per-file messages above are not printed
        shown = ", ".join(result.unreadable[:5]) + (", ..." if len(result.unreadable) > 5 else "")
        print(f"normform clean: {len(result.unreadable)} entry file(s) could not be read: {shown} "
              "(line and column in summary.json \"problems\"); fix them and run again", file=sys.stderr)
        return 1
    return 0


def main(argv: list[str] | None = None, *, toolkit: str | None = None) -> int:
    """Entry point with an injectable toolkit (tests run the command with doubles)."""
    from normform.cli import UsageError

    parser = argparse.ArgumentParser(prog="normform clean")
    configure(parser)
    args = parser.parse_args(argv)
    try:
        return run(args, toolkit=toolkit)
    except UsageError as exc:
        print(f"normform clean: {exc}", file=sys.stderr)
        return 2
    except KeyboardInterrupt:
        print("normform clean: interrupted; run again with --resume to continue", file=sys.stderr)
        return 130
