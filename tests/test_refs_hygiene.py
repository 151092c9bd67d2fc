"""Text hygiene before labeling: TeX accents inside words, control characters.

Lines are invented (Quillfeather Society scenario).  The TeX accent commands
and their Unicode results are those of pylatexenc's latex2text (the reference
library the issue names for TeX -> Unicode); the "control word eats the
following space" rule is TeX's own (The TeXbook, ch. 3, from memory).
"""

from __future__ import annotations

import time

import pytest

from normform import parse_reference
from normform.refs.tokens import tokenize


@pytest.mark.parametrize("typed, word", [
    (r'Qu\"{o}llmann', "Quöllmann"),
    (r'Qu{\"o}llmann', "Quöllmann"),
    (r"Erd{\H o}s", "Erdős"),
    (r"Erd\H{o}s", "Erdős"),
    (r"\'Etienne", "Étienne"),
    (r"Stra\ss e", "Straße"),
    (r"M\o ller", "Møller"),
    (r"\v{S}ilhav\'y", "Šilhavý"),
])
def test_accented_word_is_one_token_with_its_unicode_spelling(typed, word):
    from pylatexenc.latex2text import LatexNodes2Text
    assert LatexNodes2Text().latex_to_text(typed) == word      # the outside reference
    toks = tokenize(f"A. {typed}, On quills")
    assert toks[1].text == word and toks[1].kind == "word"
    assert (toks[1].start, toks[1].end) == (3, 3 + len(typed))   # offsets stay in the typed text


def test_markup_commands_stay_separate_tokens():
    kinds = [(t.text, t.kind) for t in tokenize(r"{\em Quill walks} \textit{nibs}")]
    assert ("\\em", "tex") in kinds and ("\\textit", "tex") in kinds and ("Quill", "word") in kinds


def test_braced_accent_does_not_split_the_family_name():
    ref = parse_reference(r'K. Qu\"{o}llmann and P. Erd{\H o}s, Ink flows on quill surfaces, '
                          r"Discrete Math. 45 (1999), 1--9.")
    assert [a.family for a in ref.authors] == ["Quöllmann", "Erdős"]
    assert ref.title == "Ink flows on quill surfaces"


def test_control_character_inside_a_word_and_terminal_colour_codes():
    line = "A. B. Feather\x01stone, On \x1b[31mquill\x1b[0m walks, Discrete Math. 45 (1999) 1-9."
    ref = parse_reference(line)
    assert [a.family for a in ref.authors] == ["Featherstone"]
    assert ref.title == "On quill walks"
    assert ref.provenance.raw == line          # the typed line is kept as it was


@pytest.mark.parametrize("junk", ["a\\'a" * 25000, "{\\H o}" * 16000, "\\ss " * 25000, "\x1b[" * 30000])
def test_adversarial_tex_runs_stay_fast(junk):
    t0 = time.process_time()
    ref = parse_reference(junk)
    assert time.process_time() - t0 < 1.5
    assert ref.provenance.raw == junk and ref.provenance.confidence < 0.5
