"""arXiv identifiers (scheme documented at arxiv.org/help/arxiv_identifier; from memory).

* new scheme (from April 2007): ``YYMM.NNNN`` until 1412, ``YYMM.NNNNN`` from 1501,
  with an optional version ``vN``;
* old scheme (1991 to March 2007): ``archive(.SUBJECT)/YYMMNNN``, e.g. ``math/0701168``
  or ``math.CO/0701168``.

The compact form keeps the version when present; :func:`base` drops it.
"""

from __future__ import annotations

import re

from normform.ids._common import InvalidIdentifier, link_from_config, strip_prefix, passes

# Archives of the old scheme (from memory of the arXiv identifier documentation).
ARCHIVES = frozenset("""
acc-phys adap-org alg-geom ao-sci astro-ph atom-ph bayes-an chao-dyn chem-ph cmp-lg comp-gas
cond-mat cs dg-ga funct-an gr-qc hep-ex hep-lat hep-ph hep-th math math-ph mtrl-th nlin nucl-ex
nucl-th patt-sol physics plasm-ph q-alg q-bio quant-ph solv-int supr-con
""".split())

NEW_RE = re.compile(r"(\d{2})(\d{2})\.(\d{4,5})(v\d+)?")
OLD_RE = re.compile(r"([a-z]+(?:-[a-z]+)?)(\.[A-Za-z]{2})?/(\d{2})(\d{2})(\d{3})(v\d+)?")
_PREFIXES = (
    "https://arxiv.org/abs/", "http://arxiv.org/abs/", "https://arxiv.org/pdf/",
    "http://arxiv.org/pdf/", "arxiv.org/abs/", "arxiv.org/pdf/", "arxiv:", "arxiv ",
)
RESOLVER = "https://arxiv.org/abs/"


_CLASS_RE = re.compile(r"\s*\[([A-Za-z-]+(?:\.[A-Za-z-]+)?)\]$")


def split(s: str) -> tuple[str, str | None]:
    """``"arXiv:1006.0367v3 [math.CO]"`` -> ``("1006.0367v3", "math.CO")``."""
    m = _CLASS_RE.search(s.strip())
    if m is None:
        return compact(s), None
    return compact(s.strip()[:m.start()]), m.group(1)


def compact(s: str) -> str:
    text = _CLASS_RE.sub("", s.strip())
    text = strip_prefix(text, _PREFIXES).strip()
    if text.lower().endswith(".pdf"):
        text = text[:-4]
    return text


def validate(s: str) -> str:
    value = compact(s)
    m = NEW_RE.fullmatch(value)
    if m:
        yy, mm, num = int(m.group(1)), int(m.group(2)), m.group(3)
        if not 1 <= mm <= 12:
            raise InvalidIdentifier(f"arXiv month {m.group(2)} is not 01..12", scheme="arxiv",
                                    raw=value, column=3)
        if yy < 7 or (yy == 7 and mm < 4):
            raise InvalidIdentifier("new-style arXiv numbers start in April 2007 (0704)",
                                    scheme="arxiv", raw=value)
        want = 4 if yy < 15 else 5
        if len(num) != want:
            raise InvalidIdentifier(f"arXiv numbers from {m.group(1)}{m.group(2)} have {want} "
                                    f"digits after the dot, not {len(num)}", scheme="arxiv",
                                    raw=value, column=6)
        return value
    m = OLD_RE.fullmatch(value)
    if m:
        if m.group(1) not in ARCHIVES:
            raise InvalidIdentifier(f"unknown arXiv archive {m.group(1)!r}", scheme="arxiv",
                                    raw=value, expected=("an archive such as math, hep-th",))
        yy, mm = int(m.group(3)), int(m.group(4))
        if not 1 <= mm <= 12:
            raise InvalidIdentifier(f"arXiv month {m.group(4)} is not 01..12", scheme="arxiv",
                                    raw=value, column=m.start(4) + 1)
        if not (yy >= 91 or yy <= 7):
            raise InvalidIdentifier("old-style arXiv numbers run from 1991 to 2007",
                                    scheme="arxiv", raw=value, column=m.start(3) + 1)
        return value
    raise InvalidIdentifier("not an arXiv identifier", scheme="arxiv", raw=value,
                            expected=("YYMM.NNNNN[vN]", "archive/YYMMNNN[vN]"))


def is_valid(s: str) -> bool:
    return passes(validate, s)


def base(s: str) -> str:
    """The identifier without its version suffix."""
    value = compact(s)
    return re.sub(r"v\d+$", "", value)


def version(s: str) -> int | None:
    m = re.search(r"v(\d+)$", compact(s))
    return int(m.group(1)) if m else None


def format(s: str) -> str:  # noqa: A001
    return "arXiv:" + compact(s)


def link(s: str, config: dict | None = None) -> str:
    value = compact(s)
    return link_from_config("arxiv", value, config) or RESOLVER + value


ARXIV_DOI_PREFIX = "10.48550/arxiv."  # arXiv's own DOIs, registered since 2022 (from memory)


def from_doi(doi: str) -> str | None:
    """The arXiv id inside an arXiv DOI: ``10.48550/arXiv.1805.11451`` -> ``1805.11451``."""
    from normform.ids import doi as _doi
    value = _doi.compact(doi)
    if not value.lower().startswith(ARXIV_DOI_PREFIX):
        return None
    candidate = value[len(ARXIV_DOI_PREFIX):]
    return candidate if is_valid(candidate) else None
