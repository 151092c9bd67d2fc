"""Shared helper for reference-parser tests that set labels by hand, so a
repair is tested without depending on what the trained model says."""

from __future__ import annotations

from normform.refs.assemble import assemble
from normform.refs.tokens import tokenize


def labelled(text: str, spec: list[tuple[str, str]]):
    """Tokens of ``text`` and their labels: ``spec`` lists (substring, label)
    in order of appearance; tokens inside no listed substring are ``O``."""
    toks = tokenize(text)
    labels = ["O"] * len(toks)
    pos = 0
    for sub, lab in spec:
        a = text.index(sub, pos)
        b = a + len(sub)
        pos = b
        for i, t in enumerate(toks):
            if a <= t.start and t.end <= b:
                labels[i] = lab
    return toks, labels


def assemble_labelled(text: str, spec: list[tuple[str, str]], conf: float = 0.99):
    """The Reference assembled from hand-set labels, every marginal ``conf``."""
    toks, labels = labelled(text, spec)
    return assemble(text, toks, labels, [conf] * len(toks), conf)


def families(names) -> list[str]:
    """The family names of a name list, in order (what the tests compare)."""
    return [n.family for n in names]


def leaves_alone(repair, text: str, spec: list[tuple[str, str]]) -> bool:
    """Does ``repair(tokens, labels)`` leave the hand-set labels of ``text`` as they were?"""
    toks, labels = labelled(text, spec)
    before = list(labels)
    repair(toks, labels)
    return labels == before
