"""--engine dask on a dask.distributed LocalCluster gives byte-identical outputs."""

from __future__ import annotations

import sys
from pathlib import Path

import pytest

sys.path.insert(0, str(Path(__file__).parent / "fixtures" / "batch"))
from batch_helpers import FAKE, outputs, write_lines  # noqa: E402

from normform.batch.runner import clean  # noqa: E402

distributed = pytest.importorskip("distributed", reason="dask is an optional extra: pip install 'normform[dask]'")


def test_dask_engine_matches_local(tmp_path):
    src = write_lines(tmp_path / "in.txt", 1500, extra=[b"", b"Odd \xfe byte, 2001"])
    clean([str(src)], tmp_path / "local", toolkit=FAKE, jobs=1, quiet=True)
    # Loopback only; threads in this process so the test doubles are importable.
    with distributed.LocalCluster(n_workers=1, threads_per_worker=2, processes=False, protocol="tcp",
                                  host="127.0.0.1", dashboard_address=None) as cluster:
        result = clean([str(src)], tmp_path / "dask", toolkit=FAKE, engine="dask",
                       scheduler=cluster.scheduler_address, quiet=True, chunk_size=97)
    assert result.records == 1501
    assert outputs(tmp_path / "dask") == outputs(tmp_path / "local")


def test_dask_is_not_imported_by_the_local_engine(tmp_path):
    import subprocess

    src = write_lines(tmp_path / "in.txt", 20)
    code = ("import sys; sys.path.insert(0, %r); from normform.batch.runner import clean; "
            "clean([%r], %r, toolkit=%r, jobs=1, quiet=True); "
            "print('dask' in sys.modules or 'distributed' in sys.modules)"
            % (str(Path(__file__).parent / "fixtures" / "batch"), str(src), str(tmp_path / "o"), FAKE))
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False"


def test_unreachable_scheduler_is_a_clear_error(tmp_path):
    import socket

    from normform.batch.engines import EngineError

    with socket.socket() as sock:          # a free loopback port nobody listens on
        sock.bind(("127.0.0.1", 0))
        port = sock.getsockname()[1]
    src = write_lines(tmp_path / "in.txt", 5)
    with pytest.raises(EngineError, match=f"cannot reach the Dask scheduler at tcp://127.0.0.1:{port}"):
        clean([str(src)], tmp_path / "o", toolkit=FAKE, engine="dask", scheduler=f"tcp://127.0.0.1:{port}",
              quiet=True, dask_timeout=2)


def _start_scheduler():
    """A dask scheduler in its own process on a free loopback port; (process, address)."""
    import subprocess
    import time

    proc = subprocess.Popen([sys.executable, "-m", "distributed.cli.dask_scheduler", "--host", "127.0.0.1",
                             "--port", "0", "--no-dashboard"], stdout=subprocess.DEVNULL,
                            stderr=subprocess.PIPE, text=True)
    deadline = time.monotonic() + 60
    for line in proc.stderr:
        if "Scheduler at:" in line:
            return proc, line.split("Scheduler at:")[1].strip()
        if time.monotonic() > deadline:
            break
    proc.kill()
    pytest.fail("the dask scheduler did not start")


def _start_worker(address):
    import os
    import subprocess

    env = dict(os.environ, FAKE_DELAY="0.002",
               PYTHONPATH=os.pathsep.join([str(Path(__file__).parent / "fixtures" / "batch"),
                                           str(Path(__file__).parent.parent)]))
    return subprocess.Popen([sys.executable, "-m", "distributed.cli.dask_worker", address, "--nthreads", "1",
                             "--no-dashboard"], env=env, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL)


def test_scheduler_death_is_one_clear_line_and_resume_finishes(tmp_path):
    """Kill the scheduler mid-run: the command says so in one line naming
    --resume, with none of distributed's reconnect tracebacks; a new cluster
    then finishes the run with the outputs of an uninterrupted local run."""
    import os
    import subprocess
    import threading
    import time

    src = write_lines(tmp_path / "in.txt", 2500)
    clean([str(src)], tmp_path / "local", toolkit=FAKE, jobs=1, quiet=True)
    procs = []
    try:
        sched, address = _start_scheduler()
        procs += [sched, _start_worker(address)]

        def kill_when_started():
            # after the first checkpointed chunk: the run is under way
            part = tmp_path / "dask" / ".normform-work" / "records.part"
            deadline = time.monotonic() + 60
            while time.monotonic() < deadline and not (part.exists() and part.stat().st_size):
                time.sleep(0.05)
            time.sleep(0.5)
            sched.kill()

        killer = threading.Thread(target=kill_when_started, daemon=True)
        killer.start()
        # the command in its own process, as a user runs it (distributed logs to that stderr)
        code = ("import sys; from normform.batch.command import main; "
                "sys.exit(main(sys.argv[1:], toolkit=%r))" % FAKE)
        env = dict(os.environ, PYTHONPATH=os.pathsep.join([str(Path(__file__).parent / "fixtures" / "batch"),
                                                           str(Path(__file__).parent.parent)]))
        run = subprocess.run([sys.executable, "-c", code, str(src), "-o", str(tmp_path / "dask"), "--quiet",
                              "--engine", "dask", "--scheduler", address, "--chunk-size", "50"],
                             capture_output=True, text=True, env=env, timeout=180)
        killer.join()
        assert run.returncode != 0
        assert "the Dask cluster failed" in run.stderr and "--resume" in run.stderr
        assert "Traceback" not in run.stderr, run.stderr
        assert len(run.stderr.strip().splitlines()) <= 3, run.stderr
        assert not (tmp_path / "dask" / "records.jsonl").exists()

        sched2, address2 = _start_scheduler()
        procs += [sched2, _start_worker(address2)]
        result = clean([str(src)], tmp_path / "dask", toolkit=FAKE, engine="dask", scheduler=address2,
                       quiet=True, chunk_size=50, resume=True)
        assert result.records == 2500
        assert outputs(tmp_path / "dask") == outputs(tmp_path / "local")
    finally:
        for proc in procs:
            proc.kill()
            proc.wait()
