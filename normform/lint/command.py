"""``normform lint PATH...``: lint catalogue entries before they are accepted."""

from __future__ import annotations

import argparse
import sys

SEVERITY_CHOICES = ("error", "warning", "note")


def configure(parser: argparse.ArgumentParser) -> None:
    parser.description = ("Lint catalogue entry files (TOML or JSON; directories are searched). "
                          "Exit code: 0 clean, 1 findings at or above --fail-on, 2 usage or I/O errors.")
    parser.add_argument("paths", nargs="*", metavar="PATH", help="entry files or directories")
    parser.add_argument("--format", choices=("text", "json", "sarif"), default="text",
                        help="output format (default: text)")
    parser.add_argument("--fix", action="store_true", help="apply safe fixes to the files")
    parser.add_argument("--no-backup", action="store_true", help="with --fix: keep no FILE.orig copy")
    parser.add_argument("--diff", action="store_true", help="print the safe fixes as a diff; change nothing")
    parser.add_argument("--select", action="append", default=[], metavar="RULES",
                        help="only these rules or categories (comma-separated; repeatable)")
    parser.add_argument("--ignore", action="append", default=[], metavar="RULES",
                        help="skip these rules or categories (comma-separated; repeatable)")
    parser.add_argument("--fail-on", choices=SEVERITY_CHOICES, default=None,
                        help="lowest severity that makes the exit code 1 (default: warning, or the fail-on setting)")
    parser.add_argument("--list-rules", action="store_true", help="list every rule and exit")
    parser.add_argument("--color", choices=("auto", "always", "never"), default="auto",
                        help="colour text output (default: auto, only on a terminal)")


def _names(values: list[str]) -> list[str]:
    return [name.strip() for value in values for name in value.split(",") if name.strip()]


def _list_rules(rules, stream) -> int:
    width = max(len(r.slug) for r in rules)
    category = None
    for r in rules:
        if r.category != category:
            category = r.category
            stream.write(f"{category}:\n")
        fix = " (fixable)" if r.fixable else ""
        stream.write(f"  {r.slug:<{width}}  {r.severity:<7}  {r.summary}{fix}\n")
    return 0


def _known_ids(files: list[str], pattern: str) -> dict[str, str]:
    """Ids of entry files beside the linted ones (by file name) -> their paths."""
    import re
    from pathlib import Path

    from normform.lint.entry import ENTRY_SUFFIXES

    out: dict[str, str] = {}
    for folder in sorted({Path(f).parent for f in files}):
        try:
            for child in sorted(folder.iterdir()):
                if child.suffix.lower() in ENTRY_SUFFIXES and re.fullmatch(pattern, child.stem):
                    out.setdefault(child.stem, str(child))
        except OSError:
            continue
    return out


def run(args: argparse.Namespace) -> int:
    from normform.cli import UsageError
    from normform.lint.registry import all_rules, select_rules
    from normform.lint.settings import load_settings

    try:
        settings = load_settings()
    except (ValueError, OSError) as exc:
        raise UsageError(f"bad configuration: {exc}") from None
    if args.list_rules:
        return _list_rules(all_rules(), sys.stdout)
    if not args.paths:
        raise UsageError("name at least one entry file or directory (or use --list-rules)")
    select = _names(args.select) or settings.select
    ignore = _names(args.ignore) + list(settings.ignore)
    try:
        rules = select_rules(select, ignore)
    except KeyError as exc:
        raise UsageError(f"unknown rule or category {exc.args[0]!r}; see `normform lint --list-rules`") from None
    for slug, sev in settings.severity.items():
        if sev not in SEVERITY_CHOICES:
            raise UsageError(f"severity setting for {slug!r} must be one of {', '.join(SEVERITY_CHOICES)}")
    fail_on = args.fail_on or settings.fail_on
    if fail_on not in SEVERITY_CHOICES:
        raise UsageError(f"fail-on must be one of {', '.join(SEVERITY_CHOICES)}, not {fail_on!r}")
    return _lint(args, settings, rules, fail_on)


def _lint(args, settings, rules, fail_on: str) -> int:
    from pathlib import Path

    from normform.lint import report
    from normform.lint.engine import Context, lint
    from normform.lint.entry import EntrySyntaxError, entry_files, read_entry
    from normform.lint.findings import RANK, Finding
    from normform.lint.positions import Located
    from normform.lint.registry import _RULES

    io_errors = 0
    files: list[str] = []
    for path in args.paths:
        if not Path(path).exists():
            print(f"normform lint: {path}: no such file or directory", file=sys.stderr)
            io_errors += 1
            continue
        files.extend(entry_files([path]))
    if io_errors and not files:
        return 2        # nothing was linted: the error on stderr is the whole answer
    selected = {r.slug for r in rules}
    entries, findings = [], []
    syntax_sources: dict[str, Located] = {}   # for the excerpt under a syntax error
    syntax_rule = _RULES["file-syntax"]
    for path in files:
        try:
            entries.append(read_entry(path))
        except EntrySyntaxError as exc:
            if syntax_rule.slug in selected:
                findings.append(Finding(syntax_rule.slug, syntax_rule.severity,
                                        f"{exc.message}" + (f"; expected {', '.join(exc.expected)}" if exc.expected else ""),
                                        path, exc.line, exc.column, category=syntax_rule.category))
                if exc.source is not None:
                    syntax_sources[path] = Located(exc.source, "toml")
        except OSError as exc:
            print(f"normform lint: {path}: cannot read: {exc}", file=sys.stderr)
            io_errors += 1
    ctx = Context(settings, known_ids=_known_ids(files, settings.id_pattern))
    findings.extend(lint(entries, rules, ctx))
    sources = {**syntax_sources, **{e.path: e.where for e in entries}}

    if args.fix or args.diff:
        findings, sources, io_errors = _fix(args, entries, rules, ctx, findings, sources, io_errors)

    findings.sort(key=Finding.sort_key)
    out = sys.stdout
    if args.format == "json":
        report.as_json(findings, out, files=len(files), skipped=ctx.skipped, failed=ctx.failed)
    elif args.format == "sarif":
        from normform import __version__

        report.sarif(findings, rules, out, version=__version__, sources=sources, skipped=ctx.skipped)
    elif not args.diff:
        color = args.color == "always" or (args.color == "auto" and report.use_color(out))
        report.text(findings, sources, out, color=color, summary=_summary(findings, len(files)))
    for slug, why in ctx.skipped.items():
        print(f"normform lint: rule {slug} skipped: {why}", file=sys.stderr)
    for slug, why in ctx.failed.items():
        print(f"normform lint: rule {slug} failed (please report): {why}", file=sys.stderr)
    if io_errors:
        return 2
    return 1 if any(RANK[f.severity] >= RANK[fail_on] for f in findings) else 0


def _summary(findings, files: int) -> str:
    counts = {s: sum(1 for f in findings if f.severity == s) for s in ("error", "warning", "note")}
    fixable = sum(1 for f in findings if f.fix is not None)
    parts = [f"{n} {s}{'s' if n != 1 else ''}" for s, n in counts.items()]
    tail = f" ({fixable} fixable with --fix)" if fixable else ""
    return f"{', '.join(parts)} in {files} file{'s' if files != 1 else ''}{tail}"


def _fix(args, entries, rules, ctx, findings, sources, io_errors):
    import os

    from normform.lint.engine import lint
    from normform.lint.entry import parse_entry
    from normform.lint.fixing import FixRefused, fix_text, unified_diff

    per_entry = [r for r in rules if r.scope == "entry" and r.fixable]
    fixable_paths = {f.path for f in findings if f.fix is not None}
    changed: dict[str, str] = {}
    for entry in entries:
        if entry.path not in fixable_paths:
            continue
        try:
            new_text, count = fix_text(entry, lambda e: [f for f in lint([e], per_entry, ctx) if f.fix])
        except FixRefused as exc:
            print(f"normform lint: {entry.path}: {exc}", file=sys.stderr)
            continue
        if new_text != entry.text:
            changed[entry.path] = new_text
    if args.diff:
        for entry in entries:
            if entry.path in changed:
                sys.stdout.write(unified_diff(entry.path, entry.text, changed[entry.path]))
        print(f"normform lint: fixes would change {len(changed)} file(s)", file=sys.stderr)
        return findings, sources, io_errors
    from normform.safety import refuse_overwrite

    # FILE.orig and FILE.tmp-normform must not be (links to) another linted file: never overwrite an input
    targets = [e.path for e in entries if e.path in changed]
    refuse_overwrite([("the backup", p + ".orig") for p in targets if not args.no_backup]
                     + [("the temporary file", p + ".tmp-normform") for p in targets],
                     [("PATH", p) for p in sources])   # every file read, broken ones too
    for entry in entries:
        new_text = changed.get(entry.path)
        if new_text is None:
            continue
        try:
            if not args.no_backup:
                with open(entry.path + ".orig", "w", encoding="utf-8", newline="") as fh:
                    fh.write(entry.text)
            tmp = entry.path + ".tmp-normform"
            with open(tmp, "w", encoding="utf-8", newline="") as fh:
                fh.write(new_text)
            os.replace(tmp, entry.path)
        except OSError as exc:
            print(f"normform lint: {entry.path}: cannot write: {exc}", file=sys.stderr)
            io_errors += 1
    if changed:
        print(f"normform lint: fixed {len(changed)} file(s)", file=sys.stderr)
        # report what is left
        fresh = [parse_entry(e.path, changed.get(e.path, e.text)) for e in entries]
        kept = [f for f in findings if f.slug == "file-syntax"]
        findings = kept + lint(fresh, rules, ctx)
        sources = {**sources, **{e.path: e.where for e in fresh}}
    return findings, sources, io_errors
