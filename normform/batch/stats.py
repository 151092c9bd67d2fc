"""Running totals for ``summary.json``, mergeable and JSON-serialisable.

The totals live in the checkpoint, so they must survive a round trip
through JSON and be updated in input order only (never double counted on
resume: a chunk's results are added in the same transaction that marks it
done).
"""

from __future__ import annotations

from normform.batch.process import FIELDS

BINS = 10   # confidence histogram: [0, .1), [.1, .2) ... [.9, 1.0]


def empty() -> dict:
    return {
        "records": 0, "needs_review": 0, "errors": 0, "invalid_utf8": 0,
        "no_confidence": 0, "formulas": 0, "formulas_failed": 0,
        "kinds": {}, "fields": {name: 0 for name in FIELDS},
        "histogram": [0] * BINS, "identifiers": {}, "invalid_identifiers": {},
    }


def add(totals: dict, result: dict) -> None:
    if result["what"] == "formula":
        totals["formulas"] += 1
        totals["formulas_failed"] += 0 if result["ok"] else 1
        return
    stat = result["stat"]
    totals["records"] += 1
    totals["needs_review"] += int(stat["review"])
    totals["errors"] += int(stat["error"])
    totals["invalid_utf8"] += int(stat["invalid_utf8"])
    kinds = totals["kinds"]
    kinds[stat["kind"]] = kinds.get(stat["kind"], 0) + 1
    for name in stat["fields"]:
        totals["fields"][name] += 1
    conf = stat["confidence"]
    if conf is None:
        totals["no_confidence"] += 1
    else:
        totals["histogram"][min(int(conf * BINS), BINS - 1)] += 1
    for scheme, valid in stat["ids"]:
        totals["identifiers"][scheme] = totals["identifiers"].get(scheme, 0) + 1
        if not valid:
            bad = totals["invalid_identifiers"]
            bad[scheme] = bad.get(scheme, 0) + 1


def merge(totals: dict, part: dict) -> None:
    """Add the totals of one chunk (built on the worker) to the running ``totals``."""
    for name in ("records", "needs_review", "errors", "invalid_utf8", "no_confidence",
                 "formulas", "formulas_failed"):
        totals[name] += part[name]
    for name in ("kinds", "fields", "identifiers", "invalid_identifiers"):
        into = totals[name]
        for key, count in part[name].items():
            into[key] = into.get(key, 0) + count
    totals["histogram"] = [a + b for a, b in zip(totals["histogram"], part["histogram"])]


def summary(totals: dict, *, lines_in: int, blank: int, clusters: int, clustered: int,
            threshold: float, inputs: list[str], seconds: float) -> dict:
    n = totals["records"] or 1
    return {
        "inputs": inputs,
        "lines_in": lines_in, "blank_lines": blank, "records": totals["records"],
        "needs_review": totals["needs_review"], "threshold": threshold,
        "errors": totals["errors"], "invalid_utf8_lines": totals["invalid_utf8"],
        "kinds": dict(sorted(totals["kinds"].items())),
        "field_completeness": {k: round(v / n, 4) for k, v in totals["fields"].items()},
        "field_counts": totals["fields"],
        "confidence_histogram": {
            "bins": [[round(i / BINS, 1), round((i + 1) / BINS, 1)] for i in range(BINS)],
            "counts": totals["histogram"], "no_confidence": totals["no_confidence"]},
        "identifiers": {"found": dict(sorted(totals["identifiers"].items())),
                        "invalid": dict(sorted(totals["invalid_identifiers"].items()))},
        "clusters": clusters, "records_in_clusters": clustered,
        "formulas": totals["formulas"], "formulas_failed": totals["formulas_failed"],
        # The only part that differs between runs of the same input.
        "run": run_block(totals["records"], seconds, 0.0),
    }


def run_block(records: int, seconds: float, finish: float, finish_cpu: float | None = None) -> dict:
    block = {"seconds": round(seconds, 3), "finish_seconds": round(finish, 3),
             "lines_per_second": round(records / seconds, 1) if seconds > 0 else None}
    if finish_cpu is not None:   # CPU of the one-process clustering and report step
        block["finish_cpu_seconds"] = round(finish_cpu, 3)
    return block
