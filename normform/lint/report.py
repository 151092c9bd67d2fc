"""Print findings: compiler-style text, JSON, or SARIF 2.1.0."""

from __future__ import annotations

import json
import os
from typing import TextIO

from normform.lint.findings import Finding
from normform.lint.registry import Rule

_COLORS = {"error": "\033[1;31m", "warning": "\033[1;33m", "note": "\033[1;36m"}
_BOLD, _RESET, _GREEN = "\033[1m", "\033[0m", "\033[32m"


def use_color(stream: TextIO) -> bool:
    if os.environ.get("NO_COLOR"):
        return False
    isatty = getattr(stream, "isatty", None)
    return bool(isatty and isatty())


def text(findings: list[Finding], sources: dict[str, object], stream: TextIO, *, color: bool,
         summary: str) -> None:
    """``path:line:col: severity slug message``, then the line and a caret under the value."""
    for f in findings:
        sev = f"{_COLORS[f.severity]}{f.severity}{_RESET}" if color else f.severity
        head = f"{f.path}:{f.line}:{f.column}:"
        if color:
            head = f"{_BOLD}{head}{_RESET}"
        fixable = " [fixable]" if f.fix is not None else ""
        stream.write(f"{head} {sev} {f.slug} {f.message}{fixable}\n")
        where = sources.get(f.path)
        if where is not None and f.line <= where.line_count:
            line_text = where.line_text(f.line).replace("\t", " ")
            width = 1
            if f.end_line == f.line and f.end_column and f.end_column > f.column:
                width = f.end_column - f.column
            width = max(1, min(width, len(line_text) - f.column + 1))
            caret = " " * (f.column - 1) + "^" + "~" * (width - 1)
            if color:
                caret = f"{_GREEN}{caret}{_RESET}"
            stream.write(f"  {line_text}\n  {caret}\n")
    stream.write(summary + "\n")


def as_json(findings: list[Finding], stream: TextIO, *, files: int, skipped: dict[str, str],
            failed: dict[str, str] | None = None) -> None:
    counts = {s: sum(1 for f in findings if f.severity == s) for s in ("error", "warning", "note")}
    payload = {"files": files, "counts": counts, "findings": [f.to_dict() for f in findings],
               "skipped_rules": skipped, "failed_rules": failed or {}}
    json.dump(payload, stream, ensure_ascii=False, indent=2)
    stream.write("\n")


def _uri(path: str) -> str:
    from pathlib import PurePath
    from urllib.parse import quote

    return quote(PurePath(path).as_posix()) if not os.path.isabs(path) else PurePath(path).as_uri()


def _region(f_line, f_col, e_line, e_col) -> dict:
    region = {"startLine": f_line, "startColumn": f_col}
    if e_line is not None and e_col is not None and (e_line, e_col) > (f_line, f_col):
        region.update(endLine=e_line, endColumn=e_col)
    return region


def sarif(findings: list[Finding], rules: list[Rule], stream: TextIO, *, version: str,
          sources: dict[str, object], skipped: dict[str, str]) -> None:
    """A SARIF 2.1.0 log (OASIS Standard, errata 01) with one run."""
    index = {r.slug: i for i, r in enumerate(rules)}
    descriptors = [{
        "id": r.slug,
        "name": "".join(w.capitalize() for w in r.slug.split("-")),
        "shortDescription": {"text": r.summary},
        "defaultConfiguration": {"level": r.severity},
        "properties": {"category": r.category, "fixable": r.fixable},
    } for r in rules]
    results = []
    for f in findings:
        result = {
            "ruleId": f.slug,
            "level": f.severity,
            "message": {"text": f.message},
            "locations": [{"physicalLocation": {
                "artifactLocation": {"uri": _uri(f.path)},
                "region": _region(f.line, f.column, f.end_line, f.end_column),
            }}],
        }
        if f.slug in index:
            result["ruleIndex"] = index[f.slug]
        if f.related:
            result["relatedLocations"] = [{
                "id": i, "physicalLocation": {"artifactLocation": {"uri": _uri(p)},
                                              "region": {"startLine": l, "startColumn": c}},
            } for i, (p, l, c) in enumerate(f.related)]
        if f.fix is not None and f.path in sources:
            where = sources[f.path]
            replacements = []
            for e in f.fix.edits:
                sl, sc = where.line_col(e.start)
                el, ec = where.line_col(e.end)
                replacements.append({"deletedRegion": {"startLine": sl, "startColumn": sc,
                                                       "endLine": el, "endColumn": ec},
                                     "insertedContent": {"text": e.text}})
            result["fixes"] = [{"description": {"text": f.fix.description},
                                "artifactChanges": [{"artifactLocation": {"uri": _uri(f.path)},
                                                     "replacements": replacements}]}]
        results.append(result)
    run = {
        "tool": {"driver": {"name": "normform lint", "version": version, "rules": descriptors}},
        "columnKind": "unicodeCodePoints",
        "results": results,
    }
    if skipped:
        run["invocations"] = [{"executionSuccessful": True, "toolExecutionNotifications": [
            {"level": "note", "message": {"text": f"rule {slug} skipped: {why}"},
             "descriptor": {"id": slug}} for slug, why in skipped.items()]}]
    log = {"$schema": "https://docs.oasis-open.org/sarif/sarif/v2.1.0/errata01/os/schemas/sarif-schema-2.1.0.json",
           "version": "2.1.0", "runs": [run]}
    json.dump(log, stream, ensure_ascii=False, indent=2)
    stream.write("\n")
