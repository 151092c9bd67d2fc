"""Turn one chunk of :class:`~normform.batch.inputs.Item` s into output pieces.

This is the only code that runs on workers (local processes or Dask).  It
is a pure function of (items, settings): the same chunk always gives the
same bytes, which is what makes ``--jobs`` and ``--engine dask`` outputs
identical to a one-process run.  Results are plain dicts/strings so they
pickle cheaply.
"""

from __future__ import annotations

import json
import os
import sys
from dataclasses import dataclass, replace

from normform.batch import keys, rowhtml
from normform.batch.inputs import Item
from normform.batch.toolkit import DEFAULT, load

# Fields whose presence summary.json and the report chart count.
FIELDS = ("author", "title", "container", "year", "volume", "issue", "pages",
          "publisher", "place", "edition", "report number", "version", "accessed", "identifier")


JUNK_CONFIDENCE = 0.2


@dataclass(frozen=True)
class Settings:
    threshold: float = 0.9
    toolkit: str = DEFAULT
    report_rows: int = 20000       # first N records get a row in report.html
    against: str | None = None     # curated library for the matcher step


# One encoder for every call: ``json.dumps`` with keyword arguments builds a new
# JSONEncoder each time, a good part of the cost of the many small values here.
_ENCODER = json.JSONEncoder(ensure_ascii=False, sort_keys=True, separators=(",", ":"))
_encode = _ENCODER.encode
_encode_str = json.encoder.encode_basestring   # what JSONEncoder.encode does for a str


def dumps(obj) -> str:
    """The one JSON spelling used in every output file (stable bytes)."""
    if obj.__class__ is str:
        return _encode_str(obj)
    if obj is None:
        return "null"
    return _encode(obj)


_REVIEW_KEYS = ("confidence", "csl", "id", "origin", "reasons", "seq", "text")
# one member of a duplicate cluster in clusters.jsonl
_MEMBER_KEYS = ("confidence", "entry", "file", "house", "id", "line", "seq", "text")


def _joined(pieces: dict[str, str], names) -> str:
    """``dumps`` of a dict whose values are already serialised (keys are plain ASCII)."""
    return "{" + ",".join(f'"{k}":{pieces[k]}' for k in sorted(names)) + "}"


def _present(ref) -> list[str]:
    have = {
        "author": bool(ref.authors or ref.editors),
        "title": bool(ref.title),
        "container": bool(ref.container_title),
        "year": ref.year is not None,
        "volume": bool(ref.volume),
        "issue": bool(ref.issue),
        "pages": ref.pages is not None,
        "publisher": bool(ref.publisher),
        "place": bool(ref.place),
        "edition": bool(ref.edition),
        "report number": bool(ref.report_number),
        "version": bool(ref.version),
        "accessed": ref.accessed is not None,
        "identifier": bool(ref.identifiers),
    }
    return [name for name in FIELDS if have[name]]


def _record_id(ref, seq: int, author: str | None = None) -> str:
    author = (keys.author_key(ref) if author is None else author) or "anon"
    return f"{author[:24]}{ref.year or ''}-{seq}"


def _fallback_ref(text: str):
    from normform.model import Kind, Provenance, Reference

    return Reference(kind=Kind.OTHER, note=text, provenance=Provenance(raw=text, confidence=0.0))


def _structured(text: str):
    """A structured entry reference (a table) as a model record, read the lint area's way."""
    from normform.lint.refs_facts import _from_table

    return _from_table(json.loads(text))


def _round(x: float | None) -> float | None:
    return None if x is None else round(float(x), 4)


def _parse_one(item: Item, kit):
    """The item's Reference, or the exception its parsing raised."""
    try:
        return _structured(item.text) if item.flag("structured") else kit.parse(item.text)
    except Exception as exc:  # the parser failing on one line must not stop the batch
        return exc


def _batchable(item: Item) -> bool:
    # parse_references strips a line end that parse_reference keeps in the raw text
    return item.what == "ref" and not item.flag("structured") and not item.text.endswith(("\n", "\r"))


def parse_items(items: list[Item], kit) -> list:
    """Reference (or the exception raised) per item, None for formula items.

    The plain-text items of a chunk go to the parser in one ``parse_many``
    call (one batched decode); when that call fails, each of them is parsed
    on its own so that one bad line costs only its own record.
    """
    out: list = [None] * len(items)
    batch = [i for i, item in enumerate(items) if _batchable(item)]
    if batch:
        try:
            parsed = kit.parse_all([items[i].text for i in batch])
            if len(parsed) != len(batch):
                raise ValueError(f"parse_many gave {len(parsed)} records for {len(batch)} texts")
        except Exception:
            parsed = [_parse_one(items[i], kit) for i in batch]
        for i, ref in zip(batch, parsed):
            out[i] = ref
    for i, item in enumerate(items):
        if item.what == "ref" and out[i] is None:
            out[i] = _parse_one(item, kit)
    return out


def process_ref(item: Item, seq: int, settings: Settings, kit, parsed=None) -> dict:
    """One reference item's outputs; ``parsed`` is its Reference (or parse exception) when known."""
    reasons: list[str] = []
    ref = _parse_one(item, kit) if parsed is None else parsed
    if isinstance(ref, BaseException):
        reasons.append(f"parser error: {type(ref).__name__}: {ref}")
        ref = _fallback_ref(item.text)
    matched = None
    if settings.against and kit.match is not None:
        try:
            ref, notes, matched = kit.match(ref, settings.against)
            reasons.extend(notes)
        except Exception as exc:
            reasons.append(f"matcher error: {type(exc).__name__}: {exc}")

    author = keys.author_key(ref)
    rid = _record_id(ref, seq, author)
    origin = f"{item.file}:{item.line}" if item.line is not None else item.file
    if item.entry:
        origin = f"{origin} ({item.entry})"
    prov = ref.provenance
    if prov is None:
        from normform.model import Provenance
        prov = Provenance(raw=item.text)
    ref = ref.replace(key=rid, provenance=replace(prov, origin=origin, raw=prov.raw or item.text))

    confidence = _round(ref.confidence)
    if confidence is None:
        reasons.append("parser gave no confidence")
    elif confidence < settings.threshold:
        reasons.append(f"confidence {confidence:.2f} below threshold {settings.threshold:g}")
        # the weak fields say where to look; on their own they send nothing
        # to review (the record confidence already accounts for them)
        for info in ref.provenance.fields:
            if info.confidence < settings.threshold:
                reasons.append(f"low confidence in {info.field} ({info.confidence:.2f})")
    bad_ids = [f"{i.scheme}:{i.value}" for i in ref.identifiers if not i.valid]
    reasons.extend(f"invalid identifier {b}" for b in bad_ids)
    if item.flag("invalid_utf8") is not None:
        reasons.append(f"invalid UTF-8 at byte offset {item.flag('invalid_utf8')} (decoded with replacement)")
    if item.flag("bad_json") is not None:
        reasons.append(f"JSON Lines input line is not a text record ({item.flag('bad_json')})")
    if item.flag("bad_entry_value") is not None:
        reasons.append(str(item.flag("bad_entry_value")))
    if not ref.title and ref.kind.value not in ("unpublished",):
        reasons.append("no title found")

    try:
        csl = dict(kit.csl(ref))
    except Exception as exc:
        reasons.append(f"CSL-JSON export error: {type(exc).__name__}: {exc}")
        csl = {"type": "document", "note": item.text}
    csl["id"] = rid
    try:
        bib = kit.bibtex([ref])
    except Exception as exc:
        reasons.append(f"BibTeX export error: {type(exc).__name__}: {exc}")
        try:
            bib = kit.bibtex([_fallback_ref(item.text).replace(key=rid)])
        except Exception:
            bib = f"% {rid}: BibTeX export failed; see records.jsonl\n"
    if not bib.endswith("\n"):
        bib += "\n"
    try:
        house = kit.house(ref)
    except Exception as exc:
        reasons.append(f"house-style error: {type(exc).__name__}: {exc}")
        house = item.text

    flags = {k: v for k, v in item.flags}
    needs_review = bool(reasons)
    # Each value is serialised once; the record, review and cluster-member
    # lines are joined from the same pieces (same bytes as dumps() of each dict).
    file, line_no, entry = dumps(item.file), dumps(item.line), dumps(item.entry)
    origin_json = f'{{"entry":{entry},"file":{file},"index":{dumps(item.index)},"line":{line_no}}}'
    piece = {"id": dumps(rid), "seq": str(seq), "origin": origin_json, "text": dumps(item.text),
             "confidence": dumps(confidence), "kind": dumps(ref.kind.value), "csl": dumps(csl),
             "house": dumps(house), "needs_review": "true" if needs_review else "false",
             "reasons": dumps(reasons)}
    if flags:
        piece["flags"] = dumps(flags)
    if matched is not None:
        piece["library"] = dumps(matched)
    line = _joined(piece, piece)
    review = _joined(piece, _REVIEW_KEYS) if needs_review else None
    piece.update(file=file, line=line_no, entry=entry)
    member = _joined(piece, _MEMBER_KEYS)
    # Lines the parser calls junk, and bare titles with no author, year or
    # identifier ("REFS CONT'D ON NEXT PAGE"), take no part in duplicate clustering.
    clusterable = ((confidence is None or confidence >= JUNK_CONFIDENCE)
                   and bool(ref.authors or ref.editors or ref.year or ref.identifiers))
    present = _present(ref)
    title_key = keys.title_key(ref.title) if clusterable else ""
    out = {
        "what": "ref", "record": line, "bib": bib, "review": review, "member": member,
        "key": [author if clusterable else "", ref.year, title_key, keys.prefix_of_key(title_key),
                confidence if confidence is not None else 0.0, len(present)],
        "stat": {"kind": ref.kind.value, "fields": present, "confidence": confidence,
                 "ids": [[i.scheme, bool(i.valid)] for i in ref.identifiers],
                 "invalid_utf8": item.flag("invalid_utf8") is not None,
                 "error": any(r.startswith(("parser error", "CSL-JSON export", "BibTeX export")) for r in reasons),
                 "review": needs_review},
        "textkey": keys.text_key(item.text, ref) if clusterable else "",
        "locator": keys.locator(ref) if clusterable else "",
        "idkeys": keys.identifier_keys(ref),
        "row": None,
    }
    if seq <= settings.report_rows:
        out["row"] = rowhtml.record_row(seq, rid, item, house, ref.kind.value, confidence,
                                        reasons, bool(bad_ids), origin)
    return out


def process_formula(item: Item, settings: Settings, kit) -> dict:
    try:
        mathml, ascii_form = kit.formula(item.text)
        error = None
    except Exception as exc:  # a bad formula is reported, not fatal
        mathml, ascii_form = None, None
        error = getattr(exc, "describe", lambda: f"{type(exc).__name__}: {exc}")()
    return {"what": "formula", "ok": error is None,
            "row": rowhtml.formula_row(item, mathml, ascii_form, error)}


def process_chunk(items: list[Item], first_seq: int, settings: Settings) -> dict:
    """One chunk's outputs, rendered and packed on the worker.

    Reference items are numbered from ``first_seq``.  The main process only
    appends the byte blobs to the part files and stores the key rows, so
    the result is a few large strings and small tuples (cheap to pickle)
    and the main process does no per-record rendering.
    """
    from normform.batch import stats

    kit = load(settings.toolkit)
    parsed = parse_items(items, kit)
    parts: dict[str, list[str]] = {name: [] for name in PART_NAMES}
    key_rows: list[tuple] = []
    id_rows: list[tuple] = []
    totals = stats.empty()
    rec_off = mem_off = 0
    seq = first_seq
    for item, ref in zip(items, parsed):
        if item.what != "ref":
            result = process_formula(item, settings, kit)
            stats.add(totals, result)
            parts["formulas"].append(result["row"])
            continue
        result = process_ref(item, seq, settings, kit, ref)
        stats.add(totals, result)
        record = result["record"] + "\n"
        member = result["member"] + "\n"
        rec_len, mem_len = _utf8_len(record), _utf8_len(member)
        parts["records"].append(record)
        parts["members"].append(member)
        parts["bib"].append(result["bib"] + "\n")
        if result["review"] is not None:
            parts["review"].append(result["review"] + "\n")
        if result["row"] is not None:
            parts["rows"].append(result["row"])
        author, year, title, prefix, conf, nfields = result["key"]
        key_rows.append((seq, author, year, title, prefix, result["textkey"], conf, nfields,
                         rec_off, rec_len, mem_off, mem_len, result["locator"]))
        id_rows.extend((seq, ident) for ident in result["idkeys"])
        rec_off += rec_len
        mem_off += mem_len
        seq += 1
    bound_caches()
    return {"records": seq - first_seq,
            "blobs": {name: "".join(texts).encode("utf-8") for name, texts in parts.items()},
            "keys": key_rows, "ids": id_rows, "totals": totals}


# Memory budget of a process running chunks.  The parser and exporters keep
# lru caches of up to 10^5..2x10^5 entries each; over a million distinct lines
# they fill to hundreds of MB per worker.  Past the budget a worker empties
# the normform caches (pure memoisation: results do not change, only warm-up
# is repeated), so memory stays flat in the input size.
CACHE_BUDGET_MB = 100
# Emptied caches hand their memory back to Python's allocator, not to the
# system: resident memory stays near the budget, and refilling the caches
# reuses it.  So resident memory cannot tell when to empty them again (a
# rule "grown N MB past the level after emptying" ratcheted up by N MB at
# every emptying: workers crept from 80 to 125 MB over 400,000 lines).
# What can tell is the count of live objects: when the budget is first
# reached, the count of allocated blocks is noted, and from then on the
# caches are emptied whenever the live blocks are back at that count --
# the caches hold as much as they did when the budget was reached, no more.
_blocks_at_budget: int | None = None


def _resident_mb() -> float | None:
    try:
        with open("/proc/self/statm", "rb") as handle:
            return int(handle.read().split()[1]) * os.sysconf("SC_PAGE_SIZE") / 2**20
    except (OSError, ValueError, IndexError, AttributeError):   # not Linux
        return None


def bound_caches(budget_mb: float | None = None) -> int:
    """Empty every memo ``functools.lru_cache`` in normform modules when over
    ``budget_mb``; with no argument, when over the budget the first time and
    then whenever the live objects are back at their count of that moment.
    Returns how many caches were emptied."""
    global _blocks_at_budget
    if budget_mb is None and _blocks_at_budget is not None:
        if sys.getallocatedblocks() < _blocks_at_budget:
            return 0
    else:
        resident = _resident_mb()
        if resident is None or resident <= (CACHE_BUDGET_MB if budget_mb is None else budget_mb):
            return 0
        if budget_mb is None:
            _blocks_at_budget = sys.getallocatedblocks()
    cleared = 0
    for name, module in list(sys.modules.items()):
        if not (name == "normform" or name.startswith("normform.")) or module is None:
            continue
        for value in list(vars(module).values()):
            if callable(getattr(value, "cache_clear", None)) and hasattr(value, "cache_info"):
                if not _memo_cache(value):
                    continue
                value.cache_clear()
                cleared += 1
    return cleared


def _memo_cache(cached) -> bool:
    """A per-string memo that grows with the input, not a loader of one model/grammar/encoder.

    Loaders (``maxsize`` None or a handful) hold a few fixed objects; emptying
    them would only rebuild those (grammars, the CRF's attribute set, the
    toolkit) after every chunk once a worker sits above the budget.
    """
    params = getattr(cached, "cache_parameters", None)
    maxsize = params().get("maxsize") if callable(params) else 1 << 30
    return maxsize is not None and maxsize > 64


# part files a chunk appends to (see normform.batch.store)
PART_NAMES = ("records", "bib", "review", "rows", "formulas", "members")


def _utf8_len(text: str) -> int:
    return len(text) if text.isascii() else len(text.encode("utf-8"))
