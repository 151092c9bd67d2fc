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
from typing import Any, Callable

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
                   house=house.format, formula=formula, match=against.match)


@lru_cache(maxsize=8)
def load(spec: str) -> Toolkit:
    """Resolve ``"module:attribute"``; a callable attribute is called once (per process)."""
    module_name, _, attr = spec.partition(":")
    value = getattr(importlib.import_module(module_name), attr or "default")
    return value() if callable(value) and not isinstance(value, Toolkit) else value
