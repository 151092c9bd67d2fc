"""The exporters' speed-ups (memos per distinct string, fast paths) change no output."""

from __future__ import annotations

import json
import re

from hypothesis import given, settings, strategies as st

from normform import capitals
from normform.export.bibtex import BibtexExporter, encode_verbatim
from normform.model import Name, Reference


def _verbatim_by_the_letter(text: str, ascii: bool = False) -> str:
    # the plain spelling of encode_verbatim, without its fast paths
    out = json.dumps(text, ensure_ascii=ascii)[1:-1]
    out = out.replace("{", "\\u007b").replace("}", "\\u007d")
    out = re.sub(r"[^\S ]", lambda m: f"\\u{ord(m.group()):04x}", out)
    return re.sub(r" (?= )|^ | $", r"\\u0020", out)


@settings(max_examples=300, deadline=None)
@given(st.text(alphabet=st.sampled_from(list("ab {}\\\"\t\n\u00a0\u2009\u3000\x85é—")), max_size=30),
       st.booleans())
def test_encode_verbatim_fast_paths_agree_with_the_plain_spelling(text, ascii):
    assert encode_verbatim(text, ascii) == _verbatim_by_the_letter(text, ascii)


def test_memoised_intervals_hand_out_fresh_lists():
    title = "On the Riemann hypothesis for GL(2)"
    first = capitals.intervals(title, ("Riemann",))
    first.append((0, 1))
    assert capitals.intervals(title, ("Riemann",)) == capitals.intervals(title, ["Riemann"]) == first[:-1]


def test_unicode_and_ascii_exports_are_memoised_apart():
    ref = Reference(title="Sur les polynômes de Göttingen", authors=(Name(family="Émery", given="Zoé"),),
                    container_title="Birkhäuser", key="k")
    plain, tex = BibtexExporter(), BibtexExporter(unicode=False)
    for _ in range(2):   # the second round is served from the memos
        assert "Göttingen" in plain.entry(ref) and "Birkhäuser" in plain.entry(ref)
        assert tex.entry(ref).isascii() and '{\\"o}' in tex.entry(ref)
