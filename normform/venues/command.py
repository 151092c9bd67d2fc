"""``normform venues INPUT --to {abbreviated,full}``: one form for every venue name.

Rewrites ``container-title`` of CSL-JSON records (JSON Lines) or ``journal`` of
BibTeX entries, and reports each mapping applied with its count.  The input is
never overwritten; records and text the command does not understand pass
through unchanged.
"""

from __future__ import annotations

import argparse
import json
import sys
from collections import Counter
from pathlib import Path

FORMS = ("abbreviated", "full")


def configure(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("input", metavar="INPUT", help="CSL-JSON records (JSON Lines or one array), or a BibTeX file")
    parser.add_argument("--to", required=True, choices=FORMS, help="write every venue abbreviated (ISO 4) or in full")
    parser.add_argument("-o", "--output", metavar="OUT", help="output file (default: standard output)")
    parser.add_argument("--report", metavar="FILE", help="write the mapping report here (.json for JSON) instead of stderr")
    parser.add_argument("--table", metavar="FILE", help="the collection's own abbreviation table (TSV or JSON); overrides the shipped one")
    parser.add_argument("--format", choices=("jsonl", "bibtex"), help="input format (default: from the file suffix)")


def _format_of(path: str, given: str | None) -> str:
    if given:
        return given
    return "bibtex" if Path(path).suffix.lower() in (".bib", ".bibtex") else "jsonl"


def house_table_path(explicit: str | None, start: Path | None = None) -> Path | None:
    """Where the collection's own table is: ``--table`` wins, then ``[tool.normform.venues] table``."""
    if explicit:
        return Path(explicit)
    try:
        from normform.config import find_config, load_config
    except ImportError:
        return None
    base = start or Path.cwd()
    section = (load_config(base) or {}).get("venues") or {}
    name = section.get("table") if isinstance(section, dict) else None
    if not name:
        return None
    found = find_config(base)
    root = Path(found).parent if found else base
    return root / name


def config_path(start: Path | None = None) -> str | None:
    """The configuration file the command reads, if any (an input too: never written)."""
    try:
        from normform.config import find_config
    except ImportError:
        return None
    found = find_config(start or Path.cwd())
    return str(found) if found else None


def _bib_decode(value: str) -> str:
    if "\\" not in value and "{" not in value:
        return value
    from pylatexenc.latex2text import LatexNodes2Text

    return LatexNodes2Text().latex_to_text(value)


def _bib_encode(value: str, original: str) -> str:
    if value.isascii() or not original.isascii():
        return value
    from pylatexenc.latexencode import unicode_to_latex

    return unicode_to_latex(value, non_ascii_only=True)


def _count(n: int, noun: str) -> str:
    return f"{n} {noun}{'' if n == 1 else 's'}"


class Run:
    """Counts and findings of one rewrite."""

    def __init__(self, style, to: str) -> None:
        self.style, self.to = style, to
        self.cache: dict[str, object] = {}
        self.applied: Counter = Counter()        # (original, result, how) -> count
        self.left: Counter = Counter()           # (name, how, candidates) -> count
        self.records = 0
        self.fields = 0
        self.errors: list[str] = []
        self.notes: list[str] = []
        self.not_journal: Counter = Counter()    # CSL type -> records whose container is not a journal

    def rewrite(self, name: str) -> str:
        self.fields += 1
        done = self.cache.get(name)
        if done is None:
            done = self.cache[name] = self.style.rewrite(name, self.to)
        if done.changed:
            self.applied[(done.original, done.result, done.how)] += 1
        elif done.how in ("ambiguous", "unknown"):
            self.left[(done.original, done.how, done.candidates)] += 1
        return done.result

    def report(self) -> dict:
        return {
            "records": self.records,
            "venue_fields": self.fields,
            "rewritten": sum(self.applied.values()),
            "mappings": [{"from": a, "to": b, "how": how, "count": n}
                         for (a, b, how), n in self.applied.most_common()],
            "left_as_written": [{"name": a, "why": how, "candidates": list(c), "count": n}
                                for (a, how, c), n in self.left.most_common()],
            "errors": self.errors,
            "notes": self.notes + [f"{n} {t} record(s): container-title is not a journal title; not rewritten"
                                   for t, n in sorted(self.not_journal.items())],
        }

    def report_text(self) -> str:
        r = self.report()
        amb = sum(x["count"] for x in r["left_as_written"] if x["why"] == "ambiguous")
        unk = sum(x["count"] for x in r["left_as_written"] if x["why"] == "unknown")
        lines = [f"venues --to {self.to}: {_count(r['records'], 'record')}, "
                 f"{_count(r['venue_fields'], 'venue field')}, "
                 f"{r['rewritten']} rewritten by {_count(len(r['mappings']), 'mapping')}, "
                 f"{amb} ambiguous, {unk} unknown"]
        for m in r["mappings"]:
            lines.append(f"  {m['count']:>5}  {m['from']}  ->  {m['to']}  [{m['how']}]")
        for x in r["left_as_written"]:
            extra = ": " + " | ".join(x["candidates"]) if x["candidates"] else ""
            lines.append(f"  {x['count']:>5}  {x['name']}  left as written ({x['why']}){extra}")
        lines += [f"  error: {e}" for e in r["errors"]]
        lines += [f"  note: {e}" for e in r["notes"]]
        return "\n".join(lines) + "\n"


# CSL types whose container-title is a journal (the ISO 4 rewrite applies to
# serial titles only; a chapter's container is a book title, kept as written).
JOURNAL_TYPES = frozenset({"article-journal", "article-magazine", "article-newspaper", "periodical"})


def _journal_venue(item: dict, run: "Run") -> str | None:
    """The item's container-title when the item is journal-like; else None (counted)."""
    venue = item.get("container-title")
    if not isinstance(venue, str) or not venue.strip():
        return None
    if item.get("type") not in JOURNAL_TYPES:
        run.not_journal[str(item.get("type") or "no type")] += 1
        return None
    return venue


def _csl_array(text: str, run: Run, path: str) -> str:
    """A CSL-JSON array file: rewrite in place, write the array back."""
    try:
        items = json.loads(text)
    except json.JSONDecodeError as exc:
        from normform.venues.errors import VenueTableError

        raise VenueTableError(f"not JSON: {exc.msg}", line=exc.lineno, column=exc.colno,
                              source=text, path=path) from None
    run.style.learn_collection(i.get("container-title") for i in items
                               if isinstance(i, dict) and isinstance(i.get("container-title"), str)
                               and i.get("type") in JOURNAL_TYPES)
    for item in items:
        if not isinstance(item, dict):
            continue
        run.records += 1
        venue = _journal_venue(item, run)
        if venue is not None:
            item["container-title"] = run.rewrite(venue)
    return json.dumps(items, ensure_ascii=False, indent=2) + "\n"


def _jsonl(text: str, run: Run, path: str) -> str:
    if text.lstrip().startswith("["):
        return _csl_array(text, run, path)
    records = []
    for number, line in enumerate(text.splitlines(), start=1):
        if not line.strip():
            records.append((line, None))
            continue
        try:
            obj = json.loads(line)
        except json.JSONDecodeError as exc:
            run.errors.append(f"{path}:{number}:{exc.colno}: not a JSON object ({exc.msg}); line kept as is")
            records.append((line, None))
            continue
        if not isinstance(obj, dict):
            run.errors.append(f"{path}:{number}:1: expected a JSON object; line kept as is")
            records.append((line, None))
            continue
        records.append((line, obj))
    names = [o.get("container-title") for _, o in records
             if o and isinstance(o.get("container-title"), str) and o.get("type") in JOURNAL_TYPES]
    run.style.learn_collection(names)
    out = []
    for line, obj in records:
        if obj is None:
            out.append(line)
            continue
        run.records += 1
        venue = _journal_venue(obj, run)
        if venue is not None:
            new = run.rewrite(venue)
            if new != venue:
                obj["container-title"] = new
                line = json.dumps(obj, ensure_ascii=False)
        out.append(line)
    return "\n".join(out) + ("\n" if out else "")


def _bibtex(text: str, run: Run, path: str) -> str:
    from normform.venues.bibfields import fields, replace_values

    def broken(exc) -> None:
        # one broken entry costs that entry only: the rest is still rewritten
        exc.path = path
        run.errors.append(f"{exc.describe()}; entry left as written")

    found = list(fields(text, on_error=broken))
    run.records = len({f.entry_key for f in found})
    journals = [f for f in found if f.name == "journal"]
    decoded = {f.start: _bib_decode(f.text) for f in journals if f.delimited}
    run.style.learn_collection(decoded.values())
    changes: dict[int, str] = {}
    for f in journals:
        if not f.delimited:
            run.notes.append(f"{path}:{f.line}: journal of {f.entry_key!r} is a macro or concatenation; not rewritten")
            continue
        old = decoded[f.start]
        new = run.rewrite(old)
        if new != old:
            changes[f.start] = _bib_encode(new, f.text)
    return replace_values(text, changes) if changes else text


def read_input(path: str) -> str:
    """The text of INPUT (the commands refuse outputs on their inputs first, with
    :func:`normform.safety.refuse_overwrite`)."""
    from normform.cli import UsageError

    try:
        return Path(path).read_text("utf-8")
    except OSError as exc:
        raise UsageError(f"cannot read {path}: {exc.strerror}") from None


def run(args: argparse.Namespace) -> int:
    from normform.errors import PositionedError
    from normform.safety import refuse_overwrite
    from normform.venues.style import VenueStyle
    from normform.venues.table import load_table

    src = Path(args.input)
    try:
        table, config = house_table_path(args.table), config_path()
    except PositionedError as exc:
        print(f"normform venues: {exc}", file=sys.stderr)
        return 2
    refuse_overwrite([("-o", args.output), ("--report", args.report)],
                     [("INPUT", args.input), ("--table", str(table) if table else None),
                      ("configuration file", config)])
    text = read_input(args.input)
    try:
        style = VenueStyle(house=load_table(table) if table is not None else None)
    except PositionedError as exc:
        print(f"normform venues: {exc}", file=sys.stderr)
        return 2
    job = Run(style, args.to)
    try:
        out = _bibtex(text, job, str(src)) if _format_of(args.input, args.format) == "bibtex" \
            else _jsonl(text, job, str(src))
    except PositionedError as exc:
        exc.path = exc.path or str(src)
        print(f"normform venues: {exc.describe()}\n{exc.excerpt()}", file=sys.stderr)
        return 1
    if args.output:
        Path(args.output).write_text(out, "utf-8")
    else:
        sys.stdout.write(out)
    if args.report:
        rp = Path(args.report)
        rp.write_text(json.dumps(job.report(), ensure_ascii=False, indent=1) + "\n" if rp.suffix == ".json"
                      else job.report_text(), "utf-8")
    else:
        sys.stderr.write(job.report_text())
    ambiguous = any(how == "ambiguous" for (_, how, _) in job.left)
    return 1 if job.errors or ambiguous else 0
