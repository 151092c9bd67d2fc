"""Cross-area checks found during integration (QA area)."""

from __future__ import annotations

import pytest

from normform.export.text import HouseStyle
from normform.model import Date, Kind, Name, Reference


def _book(edition: str) -> Reference:
    return Reference(kind=Kind.BOOK, authors=(Name(family="Pell", given="Ada"),),
                     title="Counting with Fibonacci", publisher="Quillton Press",
                     date=Date(year=1999), edition=edition)


@pytest.mark.parametrize("edition, shown", [
    ("2", "ed. 2"),            # a bare number: the house style's own spelling
    ("2nd", "2nd ed."),        # a bare ordinal used to print as a stray "2nd"
    ("second", "second ed."),
    ("2nd ed.", "2nd ed."),    # already says edition: kept as written
    ("Second edition", "Second edition"),
])
def test_house_style_edition_reads_as_an_edition(edition, shown):
    text = HouseStyle().format(_book(edition))
    assert f", {shown}," in text, text
    assert "ed. ed." not in text
