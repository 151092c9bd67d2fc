"""Record and field confidence (normform.refs.confidence) with the shipped
calibration file.  Invented Quillfeather Society lines only."""

import importlib.resources
import json

import pytest

from normform import parse_reference
from normform.refs import confidence

CLEAN = [
    "M. Quillfeather and T. Inkwell, Enumeration of quill walks, J. Combin. Theory Ser. A 112 (2005), 45--67.",
    "Quillfeather M, Inkwell T (2005) Enumeration of quill walks. Discrete Math 112:45–67",
    "M. Quillfeather and T. Inkwell. Enumeration of quill walks. Discrete Mathematics, 112(3):45–67, 2005.",
]
LOW = ["", "   ", "zzzz qqqq 1234 ####", "\x00\x01PK\x03\x04", "doi:10.1000/182",
       "https://example.org/quillfeather/Q000123", "M. Quillfeather and T. Inkwell", "Quillfeather, M."]


def _data() -> dict:
    # read through the installed package, as a user's install would
    ref = importlib.resources.files("normform.data").joinpath("refs-calibration.json")
    return json.loads(ref.read_text(encoding="utf-8"))


def test_calibration_file_ships_and_loads():
    data = _data()
    assert "record" in data and data["fields"]
    confidence._model.cache_clear()
    assert confidence._model() is not None


def test_maps_are_monotone_and_in_range():
    data = _data()
    for m in [data["record"]["map"], *data["fields"].values()]:
        xs, ys = confidence.knots(m)
        assert all(0.0 <= y <= 1.0 for y in ys)
        grid = [i / 200 for i in range(201)]
        vals = [confidence.interp((xs, ys), x) for x in grid]
        assert all(b >= a for a, b in zip(vals, vals[1:]))


def test_a_non_monotone_map_is_refused():
    with pytest.raises(ValueError):
        confidence.knots({"x": [0.0, 0.5, 1.0], "y": [0.0, 0.9, 0.8]})
    with pytest.raises(ValueError):
        confidence.knots({"x": [0.0], "y": [0.5]})


@pytest.mark.parametrize("line", CLEAN + LOW + [
    "C. D. Inkwell, Enumerative quills, Springer, New York, 2001. ISBN 978-0-387-95385-5",
    "A. Quill, Counting trees, J. Quill. Math. 3 (1999), 90-12."])
def test_confidences_are_probabilities(line):
    ref = parse_reference(line)
    assert 0.0 <= (ref.confidence or 0.0) <= 1.0
    assert all(0.0 <= f.confidence <= 1.0 for f in ref.provenance.fields)


@pytest.mark.parametrize("line", CLEAN)
def test_clean_journal_line_needs_no_review(line):
    ref = parse_reference(line)
    assert ref.title == "Enumeration of quill walks"
    assert ref.confidence >= 0.9


@pytest.mark.parametrize("line", LOW)
def test_junk_empty_and_fragment_lines_stay_low(line):
    assert (parse_reference(line).confidence or 0.0) < 0.5


def test_invalid_isbn_stays_under_review():
    # python-stdnum rejects this check digit (see test_refs_qa_fixes.py)
    ref = parse_reference("C. D. Inkwell, Enumerative quills, Springer, New York, 2001. ISBN 978-0-387-95385-5")
    assert ref.ident("isbn") is not None and not ref.ident("isbn").valid
    assert ref.confidence < 0.9


def test_field_confidence_tells_the_doubtful_field():
    # a reversed page range is doubted by assembly; the calibration never lifts it
    ref = parse_reference("M. Quillfeather and T. Inkwell, Enumeration of quill walks, "
                          "J. Combin. Theory Ser. A 112 (2005), 67--45.")
    prov = ref.provenance
    assert prov.confidence_of("pages") < 0.5
    assert prov.confidence_of("authors") > 0.9 and prov.confidence_of("date") > 0.9
    assert ref.confidence < 0.9


def test_calibration_only_lowers_field_confidence():
    line = CLEAN[0]
    calibrated = parse_reference(line).provenance
    confidence.CALIBRATE = False
    try:
        raw = parse_reference(line).provenance
    finally:
        confidence.CALIBRATE = True
    for f in raw.fields:
        assert calibrated.confidence_of(f.field) <= f.confidence + 1e-9


def test_record_map_is_monotone_in_the_raw_score():
    # a line that scores higher before calibration never scores lower after it
    lines = CLEAN + ["Quillfeather, M. Enumeration of quill walks. Math. Comp. **62** (1989) 812-837.",
                     "M. Quillfeather, T. Inkwell, Enumeration of quill walks, Discrete Math. 112 (2005) 45–67."]
    confidence.CALIBRATE = False
    try:
        raw = [parse_reference(x).confidence for x in lines]
    finally:
        confidence.CALIBRATE = True
    cal = [confidence.calibrated(r) for r in raw]
    pairs = sorted(zip(raw, cal))
    assert all(b[1] >= a[1] for a, b in zip(pairs, pairs[1:]))
