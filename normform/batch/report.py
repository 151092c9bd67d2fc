"""Write ``report.html``: one self-contained static page for reviewers.

No server, no network: the CSS and JS (``report.css``, ``report.js`` next
to this module) are inlined, the charts are inline SVG, formulas are native
MathML.  The page is written by streaming the row fragments the workers
produced, so a large run never holds its table in memory.
"""

from __future__ import annotations

import json
from html import escape
from importlib import resources
from pathlib import Path

from normform.batch.rowhtml import diff_html, visible

CLUSTER_LIMIT = 5000      # cluster sections in the page (all are in clusters.jsonl)
MEMBER_LIMIT = 50         # rows shown per cluster section

KIND_ORDER = ("article", "book", "chapter", "paper", "thesis", "report", "webpage",
              "software", "unpublished", "other")


def _asset(name: str) -> str:
    return resources.files("normform.batch").joinpath(name).read_text("utf-8")


def histogram_svg(counts: list[int], no_conf: int, threshold: float = 0.9) -> str:
    width, height, pad = 420, 180, 28
    peak = max(counts + [1])
    bar = (width - 2 * pad) / len(counts)
    parts = [f'<svg class="chart" id="chart-confidence" role="img" viewBox="0 0 {width} {height}" '
             f'width="{width}" height="{height}" aria-labelledby="hist-title">'
             '<title id="hist-title">Records by parser confidence</title>',
             f'<line x1="{pad}" y1="{height - pad}" x2="{width - pad}" y2="{height - pad}" class="axis"/>']
    for i, count in enumerate(counts):
        h = (height - 2 * pad) * count / peak
        x = pad + i * bar
        y = height - pad - h
        parts.append(f'<rect x="{x + 2:.1f}" y="{y:.1f}" width="{bar - 4:.1f}" height="{h:.1f}" '
                     f'class="{"low" if (i + 1) / len(counts) <= threshold + 1e-9 else "high"}"><title>{i / 10:.1f}–{(i + 1) / 10:.1f}: '
                     f'{count}</title></rect>')
        parts.append(f'<text x="{x + bar / 2:.1f}" y="{y - 3:.1f}" class="val">{count}</text>')
        parts.append(f'<text x="{x + bar / 2:.1f}" y="{height - pad + 13}" class="tick">{i / 10:.1f}</text>')
    parts.append(f'<text x="{width / 2}" y="{height - 3}" class="label">confidence'
                 f'{f" (no confidence: {no_conf})" if no_conf else ""}</text></svg>')
    return "".join(parts)


def completeness_svg(shares: dict[str, float]) -> str:
    row, label_w, bar_w = 18, 90, 260
    height = row * len(shares) + 10
    width = label_w + bar_w + 50
    parts = [f'<svg class="chart" id="chart-fields" role="img" viewBox="0 0 {width} {height}" '
             f'width="{width}" height="{height}" aria-labelledby="fields-title">'
             '<title id="fields-title">Share of records having each field</title>']
    for i, (name, share) in enumerate(shares.items()):
        y = 5 + i * row
        parts.append(f'<text x="{label_w - 6}" y="{y + 12}" class="name">{escape(name)}</text>')
        parts.append(f'<rect x="{label_w}" y="{y + 2}" width="{bar_w}" height="{row - 6}" class="track"/>')
        parts.append(f'<rect x="{label_w}" y="{y + 2}" width="{bar_w * share:.1f}" height="{row - 6}" '
                     f'class="fill"><title>{escape(name)}: {100 * share:.1f}%</title></rect>')
        parts.append(f'<text x="{label_w + bar_w + 6}" y="{y + 12}" class="pct">{100 * share:.0f}%</text>')
    parts.append("</svg>")
    return "".join(parts)


def _cards(summary: dict) -> str:
    items = [("lines in", summary["lines_in"]), ("records", summary["records"]),
             ("needs review", summary["needs_review"]), ("clusters", summary["clusters"]),
             ("invalid UTF-8 lines", summary["invalid_utf8_lines"]),
             ("invalid identifiers", sum(summary["identifiers"]["invalid"].values()))]
    if summary["formulas"]:
        items.append(("formulas", summary["formulas"]))
    return "".join(f'<div class="card"><b>{value:,}</b><span>{escape(label)}</span></div>'
                   for label, value in items)


def _kinds(summary: dict) -> str:
    kinds = sorted(summary["kinds"], key=lambda k: (KIND_ORDER.index(k) if k in KIND_ORDER else 99, k))
    return "".join(f'<option value="{escape(k)}">{escape(k)} ({summary["kinds"][k]:,})</option>' for k in kinds)


def _copy(handle, path: Path) -> None:
    if path.exists():
        with open(path, "r", encoding="utf-8") as src:
            while block := src.read(1 << 20):
                handle.write(block)


def _cluster_sections(handle, clusters: Path, row_limit: int) -> dict[int, int]:
    """Write one section per cluster from the digest; return record number -> cluster (table rows)."""
    where: dict[int, int] = {}
    if not clusters.exists():
        return where
    with open(clusters, encoding="utf-8") as src:
        for line in src:
            cluster = json.loads(line)     # a digest: first members only, "linked" table rows
            n = cluster["cluster"]
            for seq in cluster["linked"]:
                where[seq] = n
            if n > CLUSTER_LIMIT:
                continue
            canon = cluster["canonical"]
            handle.write(f'<section class="cluster" id="c{n}" aria-labelledby="c{n}-h">'
                         f'<h3 id="c{n}-h">Cluster {n}: {cluster["size"]} citations of one work</h3>'
                         f'<p class="canon"><span class="tag">canonical</span> {visible(canon["house"])}</p>'
                         '<table><thead><tr><th scope="col">origin</th><th scope="col">as typed</th>'
                         '<th scope="col">cleaned</th><th scope="col">confidence</th></tr></thead><tbody>')
            for m in cluster["members"][:MEMBER_LIMIT]:
                left, right = diff_html(m["text"], m["house"])
                conf = "–" if m["confidence"] is None else f'{m["confidence"]:.2f}'
                origin = f'{m["file"]}:{m["line"]}' if m["line"] is not None else m["file"]
                origin = origin.rsplit("/", 1)[-1]
                mark = ' class="is-canon"' if m["seq"] == canon["seq"] else ""
                handle.write(f'<tr{mark}><td class="n"><a href="#r{m["seq"]}">{escape(origin)}</a></td>'
                             f'<td class="orig">{left}</td><td class="clean">{right}</td>'
                             f'<td class="conf">{conf}</td></tr>')
            if cluster["size"] > MEMBER_LIMIT:
                handle.write(f'<tr><td colspan="4" class="note">… and {cluster["size"] - MEMBER_LIMIT:,} more '
                             'members in clusters.jsonl</td></tr>')
            handle.write("</tbody></table></section>\n")
    return where


def write(path: Path, summary: dict, *, rows: Path, formulas: Path, clusters: Path,
          row_limit: int) -> None:
    shown = min(summary["records"], row_limit)
    with open(path, "w", encoding="utf-8") as out:
        out.write('<!DOCTYPE html>\n<html lang="en"><head><meta charset="utf-8">'
                  '<meta name="viewport" content="width=device-width, initial-scale=1">'
                  '<title>normform clean — review report</title>'
                  f'<style>{_asset("report.css")}</style></head><body>'
                  '<a class="skip" href="#records">Skip to the records</a>'
                  '<header><h1>Review report</h1>'
                  f'<p class="inputs">Inputs: {escape(", ".join(summary["inputs"]))} · threshold '
                  f'{summary["threshold"]:g}</p></header><main>'
                  f'<section id="summary" aria-label="Summary"><div class="cards">{_cards(summary)}</div>'
                  '<div class="charts"><figure>'
                  f'{histogram_svg(summary["confidence_histogram"]["counts"], summary["confidence_histogram"]["no_confidence"], summary["threshold"])}'
                  '<figcaption>Confidence histogram</figcaption></figure><figure>'
                  f'{completeness_svg(summary["field_completeness"])}'
                  '<figcaption>Field completeness</figcaption></figure></div></section>')
        out.write('<section id="records" aria-label="Records"><h2>Records</h2>'
                  '<form class="filters" role="search" onsubmit="return false">'
                  '<label><input type="checkbox" id="f-review"> needs review</label>'
                  '<label><input type="checkbox" id="f-badid"> invalid identifiers</label>'
                  '<label>kind <select id="f-kind"><option value="">all</option>'
                  f'{_kinds(summary)}</select></label>'
                  '<label>search <input type="search" id="f-text" placeholder="text in either column" '
                  'accesskey="s"></label><output id="f-count" aria-live="polite"></output>'
                  '<span class="keys">keys: <kbd>/</kbd> search, <kbd>j</kbd>/<kbd>k</kbd> next/previous row'
                  '</span></form>')
        if shown < summary["records"]:
            out.write(f'<p class="note">Showing the first {shown:,} of {summary["records"]:,} records '
                      '(a sample, to keep the page light); every record is in records.jsonl and all '
                      f'{summary["needs_review"]:,} records that need review are in needs-review.jsonl.</p>')
        out.write('<table id="table"><thead><tr><th scope="col">origin</th><th scope="col">as typed</th>'
                  '<th scope="col">cleaned (house style)</th><th scope="col">kind</th>'
                  '<th scope="col">confidence</th><th scope="col">why review</th></tr></thead><tbody>')
        _copy(out, rows)
        out.write("</tbody></table></section>")
        if summary["formulas"]:
            out.write('<section id="formulas" aria-label="Formulas"><h2>Formulas</h2>'
                      '<table id="formula-table"><thead><tr><th scope="col">entry</th>'
                      '<th scope="col">as typed</th><th scope="col">rendered (MathML)</th>'
                      '<th scope="col">canonical ASCII</th></tr></thead><tbody>')
            _copy(out, formulas)
            out.write("</tbody></table></section>")
        out.write(f'<section id="clusters" aria-label="Duplicate clusters"><h2>Duplicate clusters '
                  f'({summary["clusters"]:,})</h2>')
        if summary["clusters"] > CLUSTER_LIMIT:
            out.write(f'<p class="note">Showing the first {CLUSTER_LIMIT:,} clusters; all are in '
                      'clusters.jsonl.</p>')
        where = _cluster_sections(out, clusters, row_limit)
        out.write("</section></main>")
        # record -> cluster, so the table can link each row to its cluster page
        out.write('<script type="application/json" id="cluster-of">'
                  + json.dumps({str(k): v for k, v in sorted(where.items())}).replace("</", "<\\/")
                  + "</script>")
        out.write(f"<script>{_asset('report.js')}</script></body></html>\n")

