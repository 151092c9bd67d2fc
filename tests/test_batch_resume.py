"""Kill a run mid-way, resume it, and get exactly the outputs of an uninterrupted run."""

from __future__ import annotations

import json
import os
import signal
import sqlite3
import subprocess
import sys
import time
from pathlib import Path

import pytest

HERE = Path(__file__).parent / "fixtures" / "batch"
sys.path.insert(0, str(HERE))
from batch_helpers import FAKE, outputs, records, write_lines  # noqa: E402

from normform.batch.runner import CleanError, clean  # noqa: E402

# The child restores Python's Ctrl-C handler: CI may start the suite with SIGINT
# ignored (a background job), and an ignored signal stays ignored across exec.
SCRIPT = ("import signal, sys; signal.signal(signal.SIGINT, signal.default_int_handler); "
          "from normform.batch import command; "
          f"sys.exit(command.main(sys.argv[1:], toolkit={FAKE!r}))")


def _start(src: Path, out: Path, jobs: int, *extra: str) -> subprocess.Popen:
    env = dict(os.environ, FAKE_DELAY="0.002",
               PYTHONPATH=os.pathsep.join([str(HERE), os.environ.get("PYTHONPATH", "")]))
    return subprocess.Popen([sys.executable, "-c", SCRIPT, str(src), "-o", str(out), "--jobs", str(jobs),
                             "--chunk-size", "50", "--quiet", *extra],
                            env=env, stdout=subprocess.PIPE, stderr=subprocess.PIPE)


def _items_done(out: Path) -> int:
    db = out / ".normform-work" / "state.sqlite"
    if not db.exists():
        return 0
    try:
        con = sqlite3.connect(f"file:{db}?mode=ro", uri=True, timeout=1)
        row = con.execute("SELECT v FROM state WHERE k='checkpoint'").fetchone()
        con.close()
    except sqlite3.Error:
        return 0
    return json.loads(row[0])["items_done"] if row else 0


def _kill_mid_way(proc: subprocess.Popen, out: Path, sig: int, at: int) -> int:
    deadline = time.monotonic() + 60
    while _items_done(out) < at:
        assert proc.poll() is None, proc.stderr.read().decode()
        assert time.monotonic() < deadline, "the run made no progress"
        time.sleep(0.02)
    children = _children(proc.pid)
    proc.send_signal(sig)
    proc.wait(timeout=30)
    # worker processes must not outlive the killed run
    deadline = time.monotonic() + 10
    while any(_alive(pid) for pid in children):
        assert time.monotonic() < deadline, f"orphaned workers: {children}"
        time.sleep(0.05)
    return _items_done(out), children


def _children(pid: int) -> list[int]:
    try:
        return [int(x) for x in Path(f"/proc/{pid}/task/{pid}/children").read_text().split()]
    except OSError:
        return []


def _alive(pid: int) -> bool:
    try:
        status = Path(f"/proc/{pid}/status").read_text()
    except OSError:
        return False
    return "\nState:\tZ" not in status


@pytest.mark.parametrize("sig,jobs", [(signal.SIGKILL, 1), (signal.SIGKILL, 2), (signal.SIGINT, 2), (signal.SIGTERM, 2)])
def test_killed_run_resumes_to_identical_outputs(tmp_path, sig, jobs):
    n = 2000
    src = write_lines(tmp_path / "in.txt", n, extra=[b"", b"Bad \xff byte, still kept, 1999"])
    reference = tmp_path / "ref"
    clean([str(src)], reference, toolkit=FAKE, jobs=1, quiet=True)

    out = tmp_path / "out"
    proc = _start(src, out, jobs)
    done, children = _kill_mid_way(proc, out, sig, at=400)
    assert len(children) == (jobs if jobs > 1 else 0)      # the workers we checked for orphans
    assert proc.returncode != 0
    assert 400 <= done < n + 1, "the kill must land mid-way"
    assert not (out / "records.jsonl").exists()      # nothing half-finished in place

    result = clean([str(src)], out, toolkit=FAKE, jobs=jobs, quiet=True, resume=True)
    assert result.resumed
    assert result.records == result.references_read == n + 1
    assert outputs(out) == outputs(reference)
    seqs = [r["seq"] for r in records(out)]
    assert seqs == sorted(set(seqs)) == list(range(1, n + 2))   # no duplicate, no gap


def test_resume_refuses_changed_inputs(tmp_path):
    src = write_lines(tmp_path / "in.txt", 1500)
    out = tmp_path / "out"
    proc = _start(src, out, 1)
    _kill_mid_way(proc, out, signal.SIGKILL, at=200)
    write_lines(src, 1600)          # the input changed since the checkpoint
    with pytest.raises(CleanError, match=r"changed since its checkpoint: the inputs \(path, size"):
        clean([str(src)], out, toolkit=FAKE, jobs=1, quiet=True, resume=True)
    # without --resume it starts again and finishes
    assert clean([str(src)], out, toolkit=FAKE, jobs=1, quiet=True).records == 1600
