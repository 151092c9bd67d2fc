"""Zbl numbers of the zbMATH database (and JFM numbers it also hosts).

Forms (from memory of zbMATH citations):
* ``NNNN.NNNNN`` — reviewed documents, e.g. ``1127.11002``, ``0829.68111``;
  older prints drop the leading zero (``Zbl 512.10001``); compact pads it back;
* ``0NNNNNNN`` — eight-digit document numbers of items without a Zbl number yet;
* ``JFM VV.PPPP.NN`` — Jahrbuch über die Fortschritte der Mathematik, kept with its prefix.

No link template ships: users set ``[tool.normform.links] zbl = "...{id}..."``.
"""

from __future__ import annotations

import re

from normform.ids._common import InvalidIdentifier, link_from_config, passes

ZBL_RE = re.compile(r"(\d{3,4})\.(\d{5})")
DOC_RE = re.compile(r"0\d{7}")
JFM_RE = re.compile(r"(\d{1,2})\.(\d{4})\.(\d{2})")


def compact(s: str) -> str:
    text = s.strip()
    low = text.lower()
    if low.startswith("jfm"):
        body = text[3:].strip(" :")
        return "JFM " + body
    for prefix in ("zbl:", "zbl.", "zbl", "zbmath:", "an:", "an "):
        if low.startswith(prefix):
            text = text[len(prefix):].strip()
            break
    text = text.replace(" ", "")
    if text.lower().startswith("pre"):
        text = text[3:]
    m = ZBL_RE.fullmatch(text)
    if m:
        return f"{m.group(1).zfill(4)}.{m.group(2)}"
    return text


def validate(s: str) -> str:
    value = compact(s)
    if value.startswith("JFM "):
        if JFM_RE.fullmatch(value[4:]) is None:
            raise InvalidIdentifier("a JFM number reads VV.PPPP.NN", scheme="zbl", raw=value,
                                    column=5, expected=("VV.PPPP.NN",))
        return value
    if ZBL_RE.fullmatch(value) or DOC_RE.fullmatch(value):
        return value
    if not value:
        raise InvalidIdentifier("empty Zbl number", scheme="zbl", raw=s)
    bad = next((i for i, ch in enumerate(value) if not (ch.isdigit() or ch == ".")), None)
    if bad is not None:
        raise InvalidIdentifier("a Zbl number is digits with one dot", scheme="zbl", raw=value,
                                column=bad + 1, expected=("NNNN.NNNNN",))
    raise InvalidIdentifier("a Zbl number reads NNNN.NNNNN (or 8 digits 0NNNNNNN)", scheme="zbl",
                            raw=value, expected=("NNNN.NNNNN", "0NNNNNNN"))


def is_valid(s: str) -> bool:
    return passes(validate, s)


def format(s: str) -> str:  # noqa: A001
    value = compact(s)
    return value if value.startswith("JFM ") else "Zbl " + value


def link(s: str, config: dict | None = None) -> str | None:
    """Only from the user's template."""
    return link_from_config("zbl", compact(s), config)
