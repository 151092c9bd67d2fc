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


def to_csl(ref, index: int) -> dict:
    """CSL-JSON object of one parsed line, via the project's exporter."""
    try:
        from normform.export.csljson import CslJsonExporter
    except ImportError:  # exporter not installed in this tree yet
        CslJsonExporter = None
    if CslJsonExporter is not None:
        item = CslJsonExporter().item(ref) if hasattr(CslJsonExporter, "item") else CslJsonExporter().export(ref)
        if isinstance(item, str):
            item = json.loads(item)
        if isinstance(item, list):
            item = item[0] if item else {}
    else:
        item = _minimal_csl(ref)
    item = dict(item)
    item.setdefault("id", f"line{index}")
    custom = dict(item.get("custom") or {})
    custom.update(custom_block(ref))
    item["custom"] = custom
    return item


def _minimal_csl(ref) -> dict:
    # Used only while normform.export.csljson is missing from the tree.
    types = {"article": "article-journal", "book": "book", "chapter": "chapter", "paper": "paper-conference",
             "thesis": "thesis", "report": "report", "webpage": "webpage", "software": "software",
             "unpublished": "manuscript", "other": "document"}
    item: dict = {"type": types.get(ref.kind.value, "document")}

    def names(ns):
        out = []
        for n in ns:
            if n.literal:
                out.append({"literal": n.literal})
                continue
            d = {k: v for k, v in (("family", n.family), ("given", n.given),
                                   ("non-dropping-particle", n.particle), ("suffix", n.suffix)) if v}
            out.append(d)
        return out
    if ref.authors:
        item["author"] = names(ref.authors)
    if ref.editors:
        item["editor"] = names(ref.editors)
    for key, val in (("title", ref.title), ("container-title", ref.container_title),
                     ("collection-title", ref.series), ("collection-number", ref.series_number),
                     ("volume", ref.volume), ("issue", ref.issue), ("publisher", ref.publisher),
                     ("publisher-place", ref.place), ("edition", ref.edition), ("genre", ref.genre),
                     ("note", ref.note)):
        if val:
            item[key] = val
    if ref.pages:
        if ref.pages.count:
            item["number-of-pages"] = ref.pages.count
        elif ref.pages.range_text():
            item["page"] = ref.pages.range_text()
    if ref.date and ref.date.year:
        item["issued"] = {"date-parts": [[p for p in (ref.date.year, ref.date.month, ref.date.day) if p]]}
    elif ref.date and ref.date.literal:
        item["issued"] = {"literal": ref.date.literal}
    for scheme, key in (("doi", "DOI"), ("isbn", "ISBN"), ("issn", "ISSN"), ("url", "URL")):
        ident = ref.ident(scheme)
        if ident is not None:
            item[key] = ident.value
    return item


def _lines(path: str):
    if path == "-":
        yield from sys.stdin
        return
    try:
        fh = open(path, encoding="utf-8", errors="replace")
    except OSError as exc:
        from normform.cli import UsageError
        raise UsageError(f"cannot read {path}: {exc.strerror}") from exc
    with fh:
        yield from fh


def run(args: argparse.Namespace) -> int:
    from normform.refs.api import parse_references

    out = sys.stdout
    if args.to == "csl-json":
        for n, ref in enumerate(parse_references(_lines(args.file)), 1):
            out.write(json.dumps(to_csl(ref, n), ensure_ascii=False) + "\n")
        return 0
    if args.to == "bibtex":
        from normform.export.bibtex import BibtexExporter
        exporter = BibtexExporter()
        for n, ref in enumerate(parse_references(_lines(args.file)), 1):
            if ref.key is None:
                ref = ref.replace(key=f"line{n}")
            text = exporter.export([ref]) if hasattr(exporter, "export") else exporter.entry(ref)
            out.write(text.rstrip("\n") + "\n\n")
        return 0
    from normform.export.text import HouseStyle
    style = HouseStyle()
    for ref in parse_references(_lines(args.file)):
        text = style.render(ref) if hasattr(style, "render") else style.format(ref)
        out.write(" ".join(str(text).split()) + "\n")
    return 0
