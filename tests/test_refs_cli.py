"""`normform refs`: one JSON object per input line, in order, with custom keys."""

import io
import json
import sys

from normform.cli import main

LINES = [
    "A. Quill and B. Fenwick, Counting trees, J. Quill. Math. 3 (1999), 1-9. arXiv:1501.00001 MR1234567",
    "",
    "\x00\x01junk",
    "Quill, A. (2001). Lectures on plane partitions. Quillfeather Press, Utrecht.",
]


def test_csl_json_lines(tmp_path, capsys):
    path = tmp_path / "refs.txt"
    path.write_text("\n".join(LINES) + "\n", encoding="utf-8")
    assert main(["refs", str(path), "--to", "csl-json"]) == 0
    out = capsys.readouterr().out.splitlines()
    assert len(out) == len(LINES)
    objs = [json.loads(line) for line in out]
    for obj, line in zip(objs, LINES):
        assert obj["custom"]["raw"] == line
        assert 0.0 <= obj["custom"]["confidence"] <= 1.0
        assert isinstance(obj["custom"]["field_confidence"], dict)
    assert objs[0]["custom"]["arxiv"] == "1501.00001"
    assert objs[0]["custom"]["mr"].lstrip("0") == "1234567"
    assert objs[1]["custom"]["confidence"] == 0.0


def test_stdin(monkeypatch, capsys):
    monkeypatch.setattr(sys, "stdin", io.StringIO(LINES[0] + "\n"))
    assert main(["refs", "-"]) == 0
    assert len(capsys.readouterr().out.splitlines()) == 1


def test_missing_file_is_usage_error(tmp_path, capsys):
    assert main(["refs", str(tmp_path / "nope.txt")]) == 2
