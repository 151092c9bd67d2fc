"""Identifier schemes, one module each with ``compact/validate/is_valid/format/link``.

``make(scheme, raw)`` turns a raw string into a :class:`normform.model.Identifier`
(kept with ``valid=False`` when it fails, never dropped); ``find_all(text)``
finds identifiers anywhere in a free-form reference line.
"""

from __future__ import annotations

import importlib
from types import ModuleType

from normform.ids._common import InvalidIdentifier
from normform.model import Identifier, Span

SCHEMES: tuple[str, ...] = ("doi", "arxiv", "isbn", "issn", "mr", "zbl", "handle", "url")


def module(scheme: str) -> ModuleType:
    """The module implementing ``scheme`` (``normform.ids.doi`` ...)."""
    if scheme not in SCHEMES:
        raise KeyError(f"unknown identifier scheme {scheme!r}; known: {', '.join(SCHEMES)}")
    return importlib.import_module(f"normform.ids.{scheme}")


def make(scheme: str, raw: str, detail: str | None = None) -> Identifier:
    """Identifier for ``raw``: compact value, validity, scheme extras in ``detail``.

    The MR review code of ``"MR1234567 (2006j:05214)"`` and the subject class of
    ``"arXiv:1006.0367v3 [math.CO]"`` land in ``detail``.
    """
    mod = module(scheme)
    if scheme in ("mr", "arxiv"):
        value, extra = mod.split(raw)  # review code / subject class
        detail = detail if detail is not None else extra
    else:
        value = mod.compact(raw)
    return Identifier(scheme, value, valid=mod.is_valid(raw), detail=detail)


def validate(scheme: str, raw: str) -> str:
    return module(scheme).validate(raw)


def link(ident: Identifier, config: dict | None = None) -> str | None:
    """Resolver link of an identifier, using the user's templates for MR and Zbl."""
    fn = getattr(module(ident.scheme), "link", None)
    return fn(ident.value, config) if fn else None


def find_all(text: str) -> list[tuple[Identifier, Span]]:
    """Identifiers in a free-form line, each with the span of its whole mention."""
    from normform.ids.find import find_all as _find_all
    return _find_all(text)


__all__ = ["SCHEMES", "InvalidIdentifier", "module", "make", "validate", "link", "find_all"]
