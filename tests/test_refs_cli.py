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


def test_refs_command_strips_a_bom_and_reports_invalid_utf8(tmp_path):
    import subprocess
    import sys

    src = tmp_path / "in.txt"
    src.write_bytes(b"\xef\xbb\xbfA. Quill, On zigzags, Math. Mag. 79 (2006), 1-9.\nB. Pell, Caf\xe9 numbers.\n")
    proc = subprocess.run([sys.executable, "-m", "normform", "refs", str(src), "--to", "csl-json"],
                          capture_output=True, text=True)
    rows = [json.loads(line) for line in proc.stdout.splitlines()]
    assert len(rows) == 2                                   # nothing dropped
    assert rows[0]["custom"]["raw"].startswith("A. Quill")   # no BOM in the raw text
    assert "\ufffd" in rows[1]["custom"]["raw"]               # kept, with a replacement character
    assert f"{src}:2: invalid UTF-8 at byte offset" in proc.stderr
    assert proc.returncode == 1
