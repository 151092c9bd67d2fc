"""Token labels: the trained CRF (python-crfsuite), with a small rule-based
fallback used only when the model file is missing (a bare checkout before
``scripts/train_refs.py`` has run).

Labels are the model's field names (``authors``, ``title``,
``container_title`` ...) plus ``O`` for connectors and punctuation; tokens
that are identifiers keep their scheme as a fixed label.
"""

from __future__ import annotations

import re
import threading
from functools import lru_cache

from normform.refs.features import sequence_features
from normform.refs.tokens import Token

MODEL_NAME = "refs-crf.crfsuite"

FIELD_LABELS = (
    "authors", "editors", "translators", "title", "container_title", "series", "series_number",
    "volume", "issue", "pages", "date", "publisher", "place", "edition", "genre", "note", "O",
)
ID_LABELS = ("doi", "arxiv", "mr", "zbl", "isbn", "issn", "url", "handle")
ID_LABEL_SET = frozenset(ID_LABELS)   # identifier tokens keep these labels; they are no text field

_local = threading.local()


@lru_cache(maxsize=1)
def model_path() -> str | None:
    from normform.resources import data_path
    path = data_path(MODEL_NAME)
    return str(path) if path.exists() and path.stat().st_size > 0 else None


ATTRS_NAME = "refs-crf.attrs.txt"


@lru_cache(maxsize=1)
def _load_known() -> None:
    """Tell the feature extractor which attributes the model knows."""
    from normform.refs import features
    from normform.resources import data_path
    path = data_path(ATTRS_NAME)
    if path.exists():
        features.set_known(frozenset(path.read_text("utf-8").split("\n")))


def _tagger():
    tagger = getattr(_local, "tagger", None)
    if tagger is None:
        import pycrfsuite
        tagger = pycrfsuite.Tagger()
        tagger.open(model_path())
        _local.tagger = tagger
        _load_known()
    return tagger


def label(tokens: list[Token], text: str) -> tuple[list[str], list[float], float]:
    """Labels, per-token marginal confidence, and the sequence probability."""
    if not tokens:
        return [], [], 0.0
    if model_path() is None:
        labels = heuristic_labels(tokens)
        return labels, [0.5] * len(labels), 0.3
    tagger = _tagger()
    xseq = sequence_features(tokens, text)
    labels = tagger.tag(xseq)
    marg = [tagger.marginal(y, i) for i, y in enumerate(labels)]
    prob = tagger.probability(labels)
    for i, tok in enumerate(tokens):
        if tok.ident is not None:
            labels[i] = tok.ident.scheme
            marg[i] = 1.0
    return labels, marg, prob


_YEAR = re.compile(r"(?:1[5-9]|20)\d\d\Z")


def heuristic_labels(tokens: list[Token]) -> list[str]:
    """Rule-of-thumb labels: authors up to the first sentence break, then the
    title, then the venue; numbers by shape.  Only a fallback."""
    labels: list[str] = []
    segment = 0
    for i, tok in enumerate(tokens):
        if tok.ident is not None:
            labels.append(tok.ident.scheme)
            continue
        t = tok.text
        if tok.kind == "num" and _YEAR.match(t):
            labels.append("date")
        elif tok.kind == "num" and i + 2 < len(tokens) and tokens[i + 1].kind == "dash":
            labels.append("pages")
        elif tok.kind == "num" and i >= 2 and tokens[i - 1].kind == "dash" and labels[i - 2] == "pages":
            labels.append("pages")
        elif tok.kind == "dash" and labels and labels[-1] == "pages":
            labels.append("pages")
        elif tok.kind == "num":
            labels.append("volume")
        elif tok.kind == "punct":
            labels.append("O")
        else:
            labels.append(("authors", "title", "container_title")[min(segment, 2)])
        if tok.kind == "punct" and t in ".," and i > 0 and tokens[i - 1].kind not in ("initial",) \
                and (t == "." or segment == 0 and i + 1 < len(tokens)
                     and tokens[i + 1].kind == "word" and labels[-2] == "authors"
                     and len(tokens[i - 1].text) > 2 and i > 3 and t == "." ):
            segment += 1
    return labels
