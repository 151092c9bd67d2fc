"""The demo collection is reproducible from its generator and has the mess it promises."""

from __future__ import annotations

import re
import sys
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))

from make_demo_corpus import JUNK, build_with_truth  # noqa: E402


def test_generator_reproduces_the_shipped_file():
    data = build_with_truth(2400)
    shipped = (ROOT / "corpus_demo" / "legacy-references.txt").read_bytes()
    assert b"\n".join(line for line, _ in data) + b"\n" == shipped


def test_demo_has_the_promised_mess():
    data = build_with_truth(2400)
    lines = [line for line, _ in data]
    text = [line.decode("utf-8", "replace") for line in lines]
    assert len(lines) >= 2000
    assert sum(1 for line in lines if _bad(line)) == 3
    assert sum(1 for t in text if t in JUNK) >= 20
    works = [w for _, w in data if w is not None]
    assert len(works) - len(set(works)) >= 300                 # duplicates cited differently
    for pattern in (r"\*\*\d+\*\*", r"\bVol\. \d", r"\bpp\. \d", r"\bMR ?\d{6,7}", r"doi", r"arXiv:",
                    r"to appear", r"personal communication", r"thesis", r"\d(nd|rd) ed\."):
        assert any(re.search(pattern, t) for t in text), pattern


def _bad(raw: bytes) -> bool:
    try:
        raw.decode("utf-8")
    except UnicodeDecodeError:
        return True
    return False
