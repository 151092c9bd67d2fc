"""The other areas' functions the batch pipeline calls, behind one object.

The shipped pipeline always uses :func:`default`, which calls the real
reference parser, exporters and formula engine.  The toolkit is named by a
``"module:attribute"`` string rather than passed as an object so that it
travels to worker processes and Dask workers as plain text; tests name
their own doubles this way.
"""

from __future__ import annotations

import importlib
from dataclasses import dataclass
from functools import lru_cache
from typing import Any, Callable, Iterable

DEFAULT = "normform.batch.toolkit:default"


@dataclass(frozen=True)
class Toolkit:
    parse: Callable[[str], Any]               # text -> normform.model.Reference
    csl: Callable[[Any], dict]                # Reference -> CSL-JSON record
    bibtex: Callable[[list], str]             # [Reference] -> BibTeX text
    house: Callable[[Any], str]               # Reference -> house-style line
    formula: Callable[[str], tuple[str, str]] # text -> (MathML, canonical ASCII)
    # Optional enrichment against a curated library:
    # (ref, library path) -> (ref, review notes, match summary dict)
    match: Callable[[Any, str], tuple[Any, list[str], dict]] | None = None
    # [text] -> [Reference], same records as ``parse`` one by one; the real parser
    # decodes a whole chunk in one batch.  None: ``parse`` mapped over the texts
    # (resolved at call time, so ``dataclasses.replace(kit, parse=...)`` stays consistent).
    parse_many: Callable[[list[str]], Iterable[Any]] | None = None

    def parse_all(self, texts: list[str]) -> list:
        """The records of ``texts``, through ``parse_many`` when there is one."""
        if self.parse_many is None:
            return [self.parse(text) for text in texts]
        return list(self.parse_many(texts))


def default() -> Toolkit:
    """The real implementations, imported on first use (in each worker)."""
    import normform
    from normform.export.bibtex import BibtexExporter
    from normform.export.csljson import CslJsonExporter
    from normform.export.text import HouseStyle

    csl = CslJsonExporter()
    bib = BibtexExporter()
    house = HouseStyle()

    def formula(text: str) -> tuple[str, str]:
        parsed = normform.parse_formula(text)
        return parsed.to_mathml(), parsed.to_ascii()

    from normform.batch import against

    return Toolkit(parse=normform.parse_reference, csl=csl.record, bibtex=bib.dumps,
                   house=house.format, formula=formula, match=against.match,
                   parse_many=lambda texts: list(normform.parse_references(texts)))


@lru_cache(maxsize=8)
def load(spec: str) -> Toolkit:
    """Resolve ``"module:attribute"``; a callable attribute is called once (per process)."""
    module_name, _, attr = spec.partition(":")
    value = getattr(importlib.import_module(module_name), attr or "default")
    return value() if callable(value) and not isinstance(value, Toolkit) else value
