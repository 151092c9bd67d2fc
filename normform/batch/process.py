"""Turn one chunk of :class:`~normform.batch.inputs.Item` s into output pieces.

This is the only code that runs on workers (local processes or Dask).  It
is a pure function of (items, settings): the same chunk always gives the
same bytes, which is what makes ``--jobs`` and ``--engine dask`` outputs
identical to a one-process run.  Results are plain dicts/strings so they
pickle cheaply.
"""

from __future__ import annotations

import json
from dataclasses import dataclass, replace

from normform.batch import keys, rowhtml
from normform.batch.inputs import Item
from normform.batch.toolkit import DEFAULT, load

# Fields whose presence summary.json and the report chart count.
FIELDS = ("author", "title", "container", "year", "volume", "issue", "pages",
          "publisher", "place", "edition", "identifier")


JUNK_CONFIDENCE = 0.2


@dataclass(frozen=True)
class Settings:
    threshold: float = 0.9
    toolkit: str = DEFAULT
    report_rows: int = 20000       # first N records get a row in report.html
    against: str | None = None     # curated library for the matcher step


def dumps(obj) -> str:
    """The one JSON spelling used in every output file (stable bytes)."""
    return json.dumps(obj, ensure_ascii=False, sort_keys=True, separators=(",", ":"))


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
        "identifier": bool(ref.identifiers),
    }
    return [name for name in FIELDS if have[name]]


def _record_id(ref, seq: int) -> str:
    author = keys.author_key(ref) or "anon"
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


def process_ref(item: Item, seq: int, settings: Settings, kit) -> dict:
    reasons: list[str] = []
    try:
        ref = _structured(item.text) if item.flag("structured") else kit.parse(item.text)
    except Exception as exc:  # the parser failing on one line must not stop the batch
        reasons.append(f"parser error: {type(exc).__name__}: {exc}")
        ref = _fallback_ref(item.text)
    matched = None
    if settings.against and kit.match is not None:
        try:
            ref, notes, matched = kit.match(ref, settings.against)
            reasons.extend(notes)
        except Exception as exc:
            reasons.append(f"matcher error: {type(exc).__name__}: {exc}")

    rid = _record_id(ref, seq)
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
    record = {
        "id": rid, "seq": seq,
        "origin": {"file": item.file, "line": item.line, "entry": item.entry, "index": item.index},
        "text": item.text, "confidence": confidence, "kind": ref.kind.value,
        "csl": csl, "house": house, "needs_review": needs_review, "reasons": reasons,
    }
    if flags:
        record["flags"] = flags
    if matched is not None:
        record["library"] = matched
    line = dumps(record)
    # Lines the parser calls junk, and bare titles with no author, year or
    # identifier ("REFS CONT'D ON NEXT PAGE"), take no part in duplicate clustering.
    clusterable = ((confidence is None or confidence >= JUNK_CONFIDENCE)
                   and bool(ref.authors or ref.editors or ref.year or ref.identifiers))
    out = {
        "what": "ref", "record": line, "bib": bib,
        "review": dumps({"id": rid, "seq": seq, "origin": record["origin"], "text": item.text,
                         "confidence": confidence, "reasons": reasons, "csl": csl}) if needs_review else None,
        "key": [keys.author_key(ref) if clusterable else "", ref.year,
                keys.title_key(ref.title) if clusterable else "",
                keys.title_prefix(ref.title) if clusterable else "",
                confidence if confidence is not None else 0.0, len(_present(ref))],
        "stat": {"kind": ref.kind.value, "fields": _present(ref), "confidence": confidence,
                 "ids": [[i.scheme, bool(i.valid)] for i in ref.identifiers],
                 "invalid_utf8": item.flag("invalid_utf8") is not None,
                 "error": any(r.startswith(("parser error", "CSL-JSON export", "BibTeX export")) for r in reasons),
                 "review": needs_review},
        "textkey": keys.text_key(item.text, ref) if clusterable else "",
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


def process_chunk(items: list[Item], first_seq: int, settings: Settings) -> list[dict]:
    """Results for ``items``; reference items are numbered from ``first_seq``."""
    kit = load(settings.toolkit)
    out = []
    seq = first_seq
    for item in items:
        if item.what == "ref":
            out.append(process_ref(item, seq, settings, kit))
            seq += 1
        else:
            out.append(process_formula(item, settings, kit))
    return out
