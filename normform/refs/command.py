"""``normform refs [FILE|-] --to {csl-json,bibtex,text}``: one record per input line.

With ``--to csl-json`` the output is JSON Lines: object N belongs to input
line N (an empty or junk line still gives an object, with low confidence).
Each object carries ``custom``: the raw line, the record confidence, the
per-field confidences, and the arXiv / MR / Zbl identifiers.
"""

from __future__ import annotations

import argparse
import json
import sys


def configure(parser: argparse.ArgumentParser) -> None:
    parser.add_argument("file", nargs="?", default="-", help="input file, one reference per line ('-' = stdin)")
    parser.add_argument("--to", choices=("csl-json", "bibtex", "text"), default="csl-json",
                        help="output format (default: csl-json, one JSON object per line)")


def custom_block(ref) -> dict:
    prov = ref.provenance
    out: dict = {"raw": prov.raw if prov else None,
                 "confidence": prov.confidence if prov else None,
                 "field_confidence": {f.field: f.confidence for f in prov.fields} if prov else {}}
    for scheme in ("arxiv", "mr", "zbl"):
        ident = ref.ident(scheme)
        if ident is not None:
            out[scheme] = ident.value
    return out


def to_csl(ref, index: int, exporter=None) -> dict:
    """CSL-JSON object of one parsed line (the project's CSL-JSON exporter)
    with our ``custom`` block merged in."""
    if exporter is None:
        from normform.export.csljson import CslJsonExporter
        exporter = CslJsonExporter()
    item = dict(exporter.record(ref, f"line{index}"))
    custom = dict(item.get("custom") or {})
    custom.update(custom_block(ref))
    item["custom"] = custom
    return item


def _lines(path: str, problems: list):
    """Decoded lines; invalid UTF-8 is kept (replacement characters) and reported."""
    from normform.textlines import decode_line, physical_lines

    if path == "-":
        handle = getattr(sys.stdin, "buffer", None)
        if handle is None:  # a text stream without bytes underneath (embedding, tests)
            for line in sys.stdin:
                yield line.rstrip("\r\n")
            return
    else:
        try:
            handle = open(path, "rb")
        except OSError as exc:
            from normform.cli import UsageError
            raise UsageError(f"cannot read {path}: {exc.strerror}") from exc
    name = "<stdin>" if path == "-" else path
    try:
        for lineno, offset, raw in physical_lines(handle):
            text, bad = decode_line(raw, offset)
            if bad is not None:
                problems.append(lineno)
                print(f"{name}:{lineno}: invalid UTF-8 at byte offset {bad}; kept, decoded with "
                      "replacement characters", file=sys.stderr)
            yield text
    finally:
        if path != "-":
            handle.close()


def run(args: argparse.Namespace) -> int:
    from normform.refs.api import parse_references

    out = sys.stdout
    problems: list[int] = []
    lines = _lines(args.file, problems)
    if args.to == "csl-json":
        from normform.export.csljson import CslJsonExporter
        exporter = CslJsonExporter()
        for n, ref in enumerate(parse_references(lines), 1):
            out.write(json.dumps(to_csl(ref, n, exporter), ensure_ascii=False) + "\n")
        return 1 if problems else 0
    if args.to == "bibtex":
        from normform.export.bibtex import BibtexExporter
        exporter = BibtexExporter()
        for n, ref in enumerate(parse_references(lines), 1):
            out.write(exporter.record(ref, f"line{n}").rstrip("\n") + "\n\n")
        return 1 if problems else 0
    from normform.export.text import HouseStyle
    style = HouseStyle()
    for ref in parse_references(lines):
        # one output line per input line, even when the record is empty
        out.write(" ".join(style.record(ref).split()) + "\n")
    return 1 if problems else 0
