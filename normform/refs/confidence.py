"""Record and field confidence for a parsed reference line.

The labeler gives each token a marginal probability and the whole labeling a
sequence probability; assembly turns runs of tokens into fields (each with
the lowest marginal of its run) and multiplies in penalties for repairs and
for words it could not place.  Those numbers rank records well but are no
probabilities of being right: a product over seven fields of 0.97 each is
0.81 although such a record is nearly always right.

Two monotone maps, fitted on held-out *synthetic* lines by
``scripts/calibrate_refs.py`` and shipped as
``normform/data/refs-calibration.json``, turn them into confidences:

* per field (container titles split into known journal / known series /
  unknown name, publishers into known / unknown), the labeler's confidence
  -> a conservative estimate (the lower end of a 95% interval) of how often
  such a field is right, never above the labeler's own figure (which
  carries assembly's validation doubts);
* per record, the product rule over those field confidences -> at most the
  held-out rate of being right at that score, and at most ``1 - 3 e`` where
  ``e`` bounds (95%) the error rate of all held-out records scoring as high
  or higher.  So confidence >= 0.9 means at most 1 record in 30 needs
  fixing: the contract editors rely on to skip review.  Records without a
  title, and kinds the fit saw too rarely, are never lifted above the raw
  score.

Without the data file the raw product rule is used (uncalibrated).
"""

from __future__ import annotations

import unicodedata
from bisect import bisect_right
from functools import lru_cache

from normform.model import FieldInfo, Kind
from normform.refs.labeler import ID_LABEL_SET

# What a record of each kind needs before an editor can use it as it is.
_NEEDED = {Kind.ARTICLE: ("volume", "date"), Kind.BOOK: ("publisher", "date"),
           Kind.CHAPTER: ("container_title", "date"), Kind.PAPER: ("container_title", "date")}

CALIBRATE = True            # False: raw field confidences and the raw product rule
_SINK: list | None = None   # the fitting script collects the raw record scores here

Knots = tuple[tuple[float, ...], tuple[float, ...]]


def record_confidence(values: dict, infos: list[FieldInfo], seq_prob: float, penalty: float,
                      kind: Kind) -> float:
    """The record confidence in [0, 1].  Also replaces the field
    confidences in ``infos`` (in place) by calibrated ones."""
    model = _model() if CALIBRATE else None
    if model is not None:
        maps = model.field_maps
        for i, info in enumerate(infos):
            fmap = maps.get(field_key(info.field, values)) or maps.get(info.field)
            if fmap is not None:
                # only ever lowered: a validation doubt (a reversed page
                # range, an unparsed date) stays a doubt
                c = info.confidence
                m = interp(fmap, c)
                if m < c:
                    infos[i] = FieldInfo(info.field, round(m, 4), info.span)
    raw = product_rule(values, infos, seq_prob, penalty, kind)
    if _SINK is not None:
        _SINK.append(raw)
    if model is None:
        return raw
    conf = interp(model.record_map, raw)
    if not values.get("title") or kind.value not in model.kinds:
        # no title (a bare DOI or URL, an author-only fragment, junk): no
        # usable record, whatever the held-out lines say; and a kind the fit
        # saw too rarely is not extrapolated to -- neither is lifted
        conf = min(conf, raw)
    return max(0.0, min(1.0, conf))


def field_key(field: str, values: dict) -> str:
    """The field's map name: a journal name, a book series or an unknown
    venue (a known name was cut where it should be) are right at different
    rates, and so are known and unknown publishers."""
    if field == "container_title" or field == "publisher":
        v = values.get(field)
        if isinstance(v, str):
            return _name_class(field, v)
    return field


@lru_cache(maxsize=4096)
def _name_class(field: str, name: str) -> str:
    # venue and publisher names recur across a batch: fold each once
    journals, series, publishers = _known_names()
    f = _fold(name)
    if field == "publisher":
        return "publisher:known" if f in publishers else "publisher:unknown"
    return "container_title:" + ("journal" if f in journals else "series" if f in series else "unknown")


def _fold(s: str) -> str:
    """Lower-case letters and digits only, accents dropped: "J. Combin."
    and "J Combin" are one name."""
    s = unicodedata.normalize("NFKD", s.lower())
    return "".join(ch for ch in s if ch.isalnum() and not unicodedata.combining(ch))


@lru_cache(maxsize=1)
def _known_names() -> tuple[frozenset[str], frozenset[str], frozenset[str]]:
    from normform.refs import lexicon as lx
    journals = {_fold(n) for pair in lx.JOURNALS for n in pair}
    series = {_fold(n) for n in lx.SERIES}
    for kind, full, other in lx.venue_rows():
        (series if kind == "series" else journals).update(_fold(n) for n in (full, *other))
    publishers = {_fold(p) for p, _ in lx.PUBLISHERS}
    return frozenset(journals - series), frozenset(series), frozenset(publishers)


def product_rule(v: dict, infos: list[FieldInfo], seq_prob: float, penalty: float, kind: Kind) -> float:
    """The raw record score: the record is right only if every field is, so
    the field confidences multiply (identifiers do not count); then the
    labeling's overall probability and the validation penalties (repairs,
    leftover words, no title, no names, an incomplete record for its kind).
    A record with no fields at all scores 0."""
    if not infos:
        return 0.0
    conf = 1.0
    for info in infos:
        # identifiers are checked by their own grammar and check digits, not by the labeler
        if info.field not in ID_LABEL_SET:
            conf *= info.confidence
    conf = min(conf, seq_prob ** 0.5 if seq_prob > 0 else 0.0) * penalty
    if not v.get("title"):
        conf *= 0.5
    if not v.get("authors") and not v.get("editors"):
        conf *= 0.7
    if kind is Kind.OTHER:
        conf *= 0.8
    for key in _NEEDED.get(kind, ()):
        if not v.get(key):
            conf *= 0.85
    return max(0.0, min(1.0, conf))


class _Model:
    __slots__ = ("record_map", "field_maps", "kinds")

    def __init__(self, data: dict):
        self.record_map = knots(data["record"]["map"])
        self.kinds = frozenset(data["record"].get("kinds", [k.value for k in Kind]))
        self.field_maps = {k: knots(v) for k, v in data.get("fields", {}).items()}


def knots(m: dict) -> Knots:
    """A map's knots, checked: at least two, both coordinates non-decreasing."""
    xs, ys = tuple(float(x) for x in m["x"]), tuple(float(y) for y in m["y"])
    if len(xs) != len(ys) or len(xs) < 2 or any(b < a for a, b in zip(xs, xs[1:])) \
            or any(b < a for a, b in zip(ys, ys[1:])) or not all(0.0 <= y <= 1.0 for y in ys):
        raise ValueError("a calibration map must be monotone, in [0, 1], with at least two knots")
    return xs, ys


@lru_cache(maxsize=1)
def _model() -> _Model | None:
    import json

    from normform.resources import data_path
    try:
        with open(data_path("refs-calibration.json"), encoding="utf-8") as fh:
            return _Model(json.load(fh))
    except (OSError, ValueError, KeyError, TypeError):
        return None


def interp(k: Knots, x: float) -> float:
    """Piecewise-linear monotone map; flat outside the knots."""
    xs, ys = k
    if x <= xs[0]:
        return ys[0]
    if x >= xs[-1]:
        return ys[-1]
    i = bisect_right(xs, x)
    x0, x1, y0, y1 = xs[i - 1], xs[i], ys[i - 1], ys[i]
    return y0 + (y1 - y0) * (x - x0) / (x1 - x0) if x1 > x0 else y1


def calibrated(raw: float) -> float:
    """The record map applied to a raw product-rule score (identity without
    a fitted model)."""
    model = _model() if CALIBRATE else None
    return raw if model is None else interp(model.record_map, raw)
