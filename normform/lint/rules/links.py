"""Rules about ``links``: well-formed, not repeated, not repeating a reference."""

from __future__ import annotations

from normform.lint import services
from normform.lint.refs_facts import reference_ids
from normform.lint.registry import rule


def _links(entry):
    links = entry.data.get("links")
    if not isinstance(links, list):
        return
    for i, item in enumerate(links):
        if isinstance(item, dict) and isinstance(item.get("url"), str):
            yield i, item["url"]


@rule("url-malformed", "links", "error", "a link's URL is not a well-formed absolute URL")
def url_malformed(entry, ctx):
    url = None
    for i, value in _links(entry):
        url = url or services.ident_module("url")
        try:
            url.validate(value)
        except ValueError as exc:
            path = ("links", i, "url")
            message = getattr(exc, "message", str(exc))
            column = getattr(exc, "column", 1)
            offset = max(0, value.find(url.compact(value))) + column - 1 if column > 1 else 0
            yield entry.finding(url_malformed.rule, f"fix this URL: {message}", path,
                                span=entry.string_span(path, offset))


def link_key(value: str) -> str:
    """Comparison form of a URL: scheme and host folded, no trailing slash or fragment."""
    from urllib.parse import urlsplit

    try:
        parts = urlsplit(value.strip())
    except ValueError:
        return value.strip()
    host = parts.netloc.lower().removeprefix("www.")
    return f"{host}{parts.path.rstrip('/')}?{parts.query}"


@rule("link-duplicate", "links", "warning", "the same URL is linked twice")
def link_duplicate(entry, ctx):
    seen: dict[str, int] = {}
    for i, value in _links(entry):
        key = link_key(value)
        if key in seen:
            first = entry.where.line_col(entry.where.span(("links", seen[key], "url"))[0])[0]
            yield entry.finding(link_duplicate.rule, f"this URL is already linked on line {first}; "
                                "remove one of the two links", ("links", i, "url"))
        else:
            seen[key] = i


def _link_target(value: str) -> tuple[str, str] | None:
    """``("doi", value)`` / ``("arxiv", value)`` when the URL is a resolver link."""
    from urllib.parse import unquote, urlsplit

    try:
        parts = urlsplit(value.strip())
    except ValueError:
        return None
    host = parts.netloc.lower().removeprefix("www.")
    path = unquote(parts.path)
    if host in ("doi.org", "dx.doi.org") and path.startswith("/10."):
        return "doi", path[1:].lower()
    if host in ("arxiv.org", "export.arxiv.org"):
        for prefix in ("/abs/", "/pdf/"):
            if path.startswith(prefix):
                ident = path[len(prefix):].removesuffix(".pdf")
                return "arxiv", ident.split("v")[0] if ident[:4].isdigit() else ident
    return None


@rule("link-repeats-reference", "links", "note", "a link only repeats the DOI or arXiv id of a reference")
def link_repeats_reference(entry, ctx):
    targets = [(i, _link_target(v)) for i, v in _links(entry)]
    targets = [(i, t) for i, t in targets if t]
    if not targets:
        return
    known = {}
    for ref_path, ident, _span in reference_ids(entry):
        value = ident.value.lower()
        if ident.scheme == "arxiv" and value[:4].isdigit():
            value = value.split("v")[0]
        known.setdefault((ident.scheme, value), ref_path)
    for i, target in targets:
        ref_path = known.get(target)
        if ref_path is not None:
            line = entry.where.line_col(entry.where.span(ref_path)[0])[0]
            yield entry.finding(link_repeats_reference.rule,
                                f"the reference on line {line} already gives this "
                                f"{'DOI' if target[0] == 'doi' else 'arXiv id'}; remove the link",
                                ("links", i, "url"))
