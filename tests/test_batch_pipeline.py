"""The batch pipeline's plumbing, with test doubles for the parser and exporters."""

from __future__ import annotations

import hashlib
import json
import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FAKE, FIXTURES, outputs, records, write_lines  # noqa: E402

from normform.batch import command  # noqa: E402
from normform.batch.runner import CleanError, clean  # noqa: E402


def test_every_line_becomes_one_record_in_order(tmp_path):
    src = write_lines(tmp_path / "in.txt", 1200, extra=[b"", b"   ", b"EXPLODE, the parser fails here"])
    result = clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1, quiet=True, chunk_size=100)
    recs = records(tmp_path / "out")
    assert result.lines_in == 1203 and result.blank == 2
    assert result.references_read == result.records == len(recs) == 1201
    assert [r["origin"]["line"] for r in recs] == list(range(1, 1201)) + [1203]
    assert [r["seq"] for r in recs] == list(range(1, 1202))
    # the line the parser choked on is kept, flagged and sent to review
    last = recs[-1]
    assert last["text"] == "EXPLODE, the parser fails here"
    assert any(r.startswith("parser error: RuntimeError") for r in last["reasons"])
    review = [json.loads(x) for x in (tmp_path / "out" / "needs-review.jsonl").read_text().splitlines()]
    assert [r["seq"] for r in review] == [r["seq"] for r in recs if r["needs_review"]]
    assert all(r["reasons"] for r in review)


def test_threshold_decides_review(tmp_path):
    src = write_lines(tmp_path / "in.txt", 300)
    clean([str(src)], tmp_path / "a", toolkit=FAKE, jobs=1, quiet=True, threshold=0.0)
    clean([str(src)], tmp_path / "b", toolkit=FAKE, jobs=1, quiet=True, threshold=0.75)
    assert not any(r["needs_review"] for r in records(tmp_path / "a"))
    b = records(tmp_path / "b")
    assert [r["needs_review"] for r in b] == [r["confidence"] < 0.75 for r in b]
    assert 0 < sum(r["needs_review"] for r in b) < len(b)
    assert all(any("below threshold 0.75" in why for why in r["reasons"]) for r in b if r["needs_review"])


def test_invalid_utf8_is_kept_with_byte_offset(tmp_path, capsys):
    src = tmp_path / "in.txt"
    src.write_bytes(b"Ashgrove, Good line, J. X, 1990\nErd\xf6s, Latin-1 line, 1960\n")
    clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1)
    rec = records(tmp_path / "out")[1]
    offset = len(b"Ashgrove, Good line, J. X, 1990\n") + 3      # the 0xF6 byte
    assert rec["flags"] == {"invalid_utf8": offset}
    assert rec["text"] == "Erd\ufffds, Latin-1 line, 1960"
    assert rec["needs_review"]
    assert f"in.txt:2: invalid UTF-8 at byte offset {offset}" in capsys.readouterr().err
    summary = json.loads((tmp_path / "out" / "summary.json").read_text())
    assert summary["invalid_utf8"] == [{"file": str(src), "line": 2, "byte_offset": offset}]


def test_input_is_never_modified_and_no_temp_files_remain(tmp_path):
    src = write_lines(tmp_path / "in.txt", 500)
    before = hashlib.sha256(src.read_bytes()).hexdigest()
    clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=2, quiet=True)
    assert hashlib.sha256(src.read_bytes()).hexdigest() == before
    names = sorted(p.name for p in (tmp_path / "out").iterdir())
    assert names == sorted(["records.jsonl", "references.bib", "needs-review.jsonl", "clusters.jsonl",
                            "summary.json", "report.html"])


def test_refuses_to_write_over_an_input(tmp_path):
    out = tmp_path / "out"
    out.mkdir()
    src = write_lines(out / "records.jsonl", 3)
    with pytest.raises(CleanError, match="also an output"):
        clean([str(src)], out, toolkit=FAKE, jobs=1, quiet=True)


def test_jobs_give_identical_outputs(tmp_path):
    src = write_lines(tmp_path / "in.txt", 2500)
    clean([str(src)], tmp_path / "one", toolkit=FAKE, jobs=1, quiet=True, chunk_size=200)
    clean([str(src)], tmp_path / "two", toolkit=FAKE, jobs=2, quiet=True, chunk_size=130)
    assert outputs(tmp_path / "one") == outputs(tmp_path / "two")


def test_jsonl_and_entry_inputs(tmp_path):
    jl = tmp_path / "refs.jsonl"
    jl.write_text('{"id": "x1", "text": "Ormsby, A title, J. Y, 1977"}\n'
                  "not json at all, 1999\n"
                  '{"id": "Q000200", "references": ["Wendlow, Entry ref, 2001"], "formulas": ["n + 1"]}\n',
                  encoding="utf-8")
    result = clean([str(jl), str(FIXTURES / "entries")], tmp_path / "out", toolkit=FAKE, jobs=1,
                   quiet=True)
    recs = records(tmp_path / "out")
    assert result.records == len(recs) == 3 + 4
    assert recs[0]["origin"]["entry"] == "x1"
    assert any("not a text record" in why for why in recs[1]["reasons"])
    assert recs[2]["origin"] == {"file": str(jl), "line": 3, "entry": "Q000200", "index": 0}
    # entry files: sorted paths, references with their line in the file
    toml = [r for r in recs if r["origin"]["entry"] == "Q000101"]
    assert [r["origin"]["line"] for r in toml] == [9, 10]
    summary = json.loads((tmp_path / "out" / "summary.json").read_text())
    assert summary["formulas"] == 1 + 2 + 1 and summary["entry_files"] == 2


def test_bad_entry_file_is_reported_with_position(tmp_path):
    d = tmp_path / "entries"
    d.mkdir()
    (d / "Q1.toml").write_text('id = "Q1"\nreferences = ["Abernathy-Cole, T, 1990"\n', encoding="utf-8")
    (d / "Q2.toml").write_text('id = "Q2"\nreferences = ["Foxwell, Fine, 1991"]\n', encoding="utf-8")
    result = clean([str(d)], tmp_path / "out", toolkit=FAKE, jobs=1, quiet=True)
    assert result.records == 1
    assert any("Q1.toml:3:" in p and "TOML" in p for p in result.problems), result.problems
    assert result.unreadable == [str(d / "Q1.toml")]
    assert command.main([str(d), "-o", str(tmp_path / "o2"), "--quiet"], toolkit=FAKE) == 1


def test_command_prints_the_count_check(tmp_path, capsys):
    src = write_lines(tmp_path / "in.txt", 40, extra=[b""])
    code = command.main([str(src), "-o", str(tmp_path / "out"), "--quiet", "--jobs", "1"], toolkit=FAKE)
    out = capsys.readouterr().out
    assert code == 0
    assert "lines in: 41 (1 blank); references read: 40; records out: 40: OK" in out


def test_command_usage_errors(tmp_path, capsys):
    assert command.main([str(tmp_path / "missing.txt"), "-o", str(tmp_path / "o")], toolkit=FAKE) == 2
    assert "no such file" in capsys.readouterr().err
    src = write_lines(tmp_path / "in.txt", 3)
    assert command.main([str(src), "-o", str(tmp_path / "o"), "--engine", "dask"], toolkit=FAKE) == 2
    assert "--scheduler" in capsys.readouterr().err


def test_plain_log_lines_when_not_a_tty(tmp_path):
    import io

    src = write_lines(tmp_path / "in.txt", 600)
    err = io.StringIO()
    clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1, chunk_size=50, err=err,
          progress_interval=0.0)
    lines = [x for x in err.getvalue().splitlines() if x.startswith("clean: ")]
    assert len(lines) >= 10 and "of 600" in lines[-1] and "items/s" in lines[-1]
    quiet = io.StringIO()
    clean([str(src)], tmp_path / "out", toolkit=FAKE, jobs=1, chunk_size=50, err=quiet,
          progress_interval=0.0, quiet=True)
    assert quiet.getvalue() == ""


def test_progress_bar_on_a_terminal(tmp_path):
    import os
    import pty
    import subprocess

    src = write_lines(tmp_path / "in.txt", 300)
    here = str(FIXTURES)
    code = ("import sys; sys.path.insert(0, %r); from normform.batch import command; "
            "sys.exit(command.main(sys.argv[1:], toolkit=%r))" % (here, FAKE))
    import fcntl
    import struct
    import termios

    leader, follower = pty.openpty()
    fcntl.ioctl(follower, termios.TIOCSWINSZ, struct.pack("HHHH", 24, 100, 0, 0))   # 24x100 terminal
    proc = subprocess.Popen([sys.executable, "-c", code, str(src), "-o", str(tmp_path / "out"),
                             "--jobs", "1", "--chunk-size", "50"],
                            stdout=subprocess.DEVNULL, stderr=follower, stdin=subprocess.DEVNULL)
    os.close(follower)
    chunks = []
    while True:
        try:
            data = os.read(leader, 4096)
        except OSError:        # EIO once the child closed the terminal
            break
        if not data:
            break
        chunks.append(data)
    proc.wait(timeout=60)
    os.close(leader)
    screen = b"".join(chunks).decode("utf-8", "replace")
    assert proc.returncode == 0
    assert "300/300" in screen and "lines/s" in screen     # tqdm's bar: count and rate


def test_chunk_totals_merge_like_record_totals():
    from normform.batch import stats

    results = [{"what": "ref", "stat": {"kind": k, "fields": f, "confidence": c, "ids": i,
                                        "invalid_utf8": u, "error": e, "review": r}}
               for k, f, c, i, u, e, r in [("article", ["title", "year"], 0.95, [["doi", True]], False, False, False),
                                           ("book", ["title"], None, [], True, False, True),
                                           ("article", [], 0.1, [["mr", False]], False, True, True)]]
    results.append({"what": "formula", "ok": False})
    one = stats.empty()
    for result in results:
        stats.add(one, result)
    merged = stats.empty()
    for part in (results[:2], results[2:]):
        chunk = stats.empty()
        for result in part:
            stats.add(chunk, result)
        stats.merge(merged, chunk)
    assert merged == one and one["records"] == 3 and one["formulas_failed"] == 1


def test_resume_refuses_a_checkpoint_of_another_format_version(tmp_path):
    from normform.batch.store import VERSION, ResumeError, Store

    identity = {"inputs": [], "settings": {}, "similarity": 90.0}
    store, resumed = Store.open(tmp_path, identity, resume=False)
    assert not resumed
    store.state["version"] = VERSION - 1          # as an older normform would have written it
    store.set_phase("running")
    store.close_parts()
    store.db.close()
    with pytest.raises(ResumeError, match="another normform version"):
        Store.open(tmp_path, identity, resume=True)
