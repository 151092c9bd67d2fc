#!/usr/bin/env python3
"""Throughput and memory of ``normform clean`` (a plain script, not a test).

    nice -n 10 python bench/bench_clean.py                 # 100,000 lines, 1 and 2 jobs
    nice -n 10 python bench/bench_clean.py --lines 1000000 --jobs 2
    nice -n 10 python bench/bench_clean.py --lines 20000 --cluster-quality   # clusters vs the truth

The input is the demo generator's invented legacy lines (fixed seed).  For
each run it prints wall time, lines/s, the speed-up from 1 to N jobs, and
peak memory: the largest single process (``ru_maxrss`` of the children)
and the sampled sum over the main process and its workers (psutil, when
installed).  On a shared machine wall time says little, so it also prints
the CPU seconds used (all processes) and lines per CPU-second, and the load
average during the run, and the worker's CPU per record split by stage (parser,
BibTeX, CSL-JSON, house style, report row, the rest).  As a yardstick from a general-purpose library measured in the
same run, it parses the produced ``references.bib`` with pybtex and prints
the ratio of clean's lines/s to pybtex's entries/s.
"""

from __future__ import annotations

import argparse
import importlib
import itertools
import json
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path.insert(0, str(ROOT / "scripts"))
sys.path.insert(0, str(ROOT / "bench"))


def make_input(path: Path, lines: int) -> None:
    """Generate the input in a child process.

    Building a million lines here would leave this process at ~600 MB, and
    Linux carries a process's pre-exec peak into the ``ru_maxrss`` of the
    children it starts, which then reported our own memory as clean's.
    """
    subprocess.run([sys.executable, str(ROOT / "scripts" / "make_demo_corpus.py"), "--lines", str(lines),
                    "--out", str(path)], check=True, stdout=subprocess.DEVNULL)


def _sample_rss(pid: int, stop: threading.Event, peak: list[int], cpu: dict) -> None:
    """Peak RSS (sum over the process tree, largest process) and the last CPU times seen per process."""
    try:
        import psutil
    except ImportError:
        return
    try:
        proc = psutil.Process(pid)
        while not stop.is_set():
            try:
                procs = [proc] + proc.children(recursive=True)
                sizes = []
                for p in procs:
                    try:
                        sizes.append(p.memory_info().rss)
                        times = p.cpu_times()
                        cpu[p.pid] = times.user + times.system
                    except psutil.Error:
                        pass
            except psutil.Error:
                break
            if sizes:
                peak[0] = max(peak[0], sum(sizes))
                peak[1] = max(peak[1], max(sizes))
            time.sleep(0.2)
    except psutil.Error:
        pass


def run_clean(src: Path, out: Path, jobs: int, engine_args: list[str]) -> dict:
    if out.exists():
        shutil.rmtree(out)
    usage0 = resource.getrusage(resource.RUSAGE_CHILDREN)
    before = usage0.ru_maxrss
    load0 = os.getloadavg()[0]
    cmd = [sys.executable, "-m", "normform.cli", "clean", str(src), "-o", str(out),
           "--jobs", str(jobs), "--quiet", *engine_args]
    start = time.perf_counter()
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True)
    stop, peak, cpu_seen = threading.Event(), [0, 0], {}
    sampler = threading.Thread(target=_sample_rss, args=(proc.pid, stop, peak, cpu_seen), daemon=True)
    sampler.start()
    stdout, stderr = proc.communicate()
    seconds = time.perf_counter() - start
    stop.set()
    sampler.join()
    if proc.returncode != 0:
        raise SystemExit(f"clean failed ({proc.returncode}):\n{stderr[-3000:]}")
    usage1 = resource.getrusage(resource.RUSAGE_CHILDREN)
    after = usage1.ru_maxrss
    cpu = (usage1.ru_utime + usage1.ru_stime) - (usage0.ru_utime + usage0.ru_stime)
    summary = json.loads((out / "summary.json").read_text())
    return {"jobs": jobs, "seconds": seconds, "records": summary["records"],
            "cpu_seconds": cpu, "load": (load0 + os.getloadavg()[0]) / 2,
            "finish_seconds": summary["run"].get("finish_seconds"),
            "finish_cpu": summary["run"].get("finish_cpu_seconds"),
            "main_cpu": cpu_seen.get(proc.pid),
            "worker_cpu": sum(v for k, v in cpu_seen.items() if k != proc.pid),
            "lines_per_s": summary["records"] / seconds,
            "max_process_rss_mb": max(after, before) / 1024,   # ru_maxrss is in KiB on Linux
            # ru_maxrss of the children is the max over every child so far: when this run's
            # processes stayed under an earlier child's peak (the input generator holds a whole
            # million-line input), it says nothing about this run
            "rss_hidden": after <= before,
            "sum_rss_mb": peak[0] / 2**20 if peak[0] else None,
            "largest_sampled_mb": peak[1] / 2**20 if peak[1] else None,
            "check": stdout.strip().splitlines()[0]}


def parser_rate(src: Path, lines: int = 2000) -> float:
    """The reference parser's own speed on the same input, so parser and pipeline effects separate."""
    import normform

    texts = [t for t in src.read_bytes().decode("utf-8", "replace").splitlines()[:lines] if t.strip()]
    for text in texts[:50]:
        normform.parse_reference(text)   # warm-up: model loading
    start = time.process_time()
    for text in texts:
        normform.parse_reference(text)
    return len(texts) / (time.process_time() - start)


STAGE_CPU: dict[str, float] = {}


def _timed(name: str, fn):
    from cputimer import timed
    return timed(STAGE_CPU, name, fn)


def timed_toolkit():
    """The shipped toolkit with a CPU timer around each collaborator (for ``stage_split``)."""
    import dataclasses

    from normform.batch.toolkit import default

    kit = default()
    return dataclasses.replace(kit, parse_many=_timed("parser (parse_many)", kit.parse_many),
                               csl=_timed("CSL-JSON record", kit.csl), bibtex=_timed("BibTeX", kit.bibtex),
                               house=_timed("house style", kit.house))


def stage_split(src: Path, lines: int = 3000) -> tuple[float, dict[str, float]]:
    """Worker CPU per record by stage, on the first ``lines`` lines, in this process.

    The first 500 lines warm up (model loading, memo caches) and are not counted.
    """
    from normform.batch import process, rowhtml
    from normform.batch.inputs import ReadStats, expand, iter_items

    # the toolkit is named by "module:attr"; run as a script this file is __main__, and
    # process_chunk imports it again as bench_clean: use that module's timers throughout
    bench = importlib.import_module("bench_clean")
    items = list(itertools.islice(iter_items(expand([str(src)]), ReadStats()), lines + 500))
    settings = process.Settings(toolkit="bench_clean:timed_toolkit")
    process.process_chunk(items[:500], 1, settings)
    record_row = rowhtml.record_row
    rowhtml.record_row = bench._timed("report row (diff)", record_row)
    bench.STAGE_CPU.clear()
    start = time.process_time()
    for first in range(500, len(items), 500):
        process.process_chunk(items[first:first + 500], first + 1, settings)
    total = time.process_time() - start
    rowhtml.record_row = record_row
    counted = len(items) - 500
    per = {name: cpu / counted * 1e6 for name, cpu in bench.STAGE_CPU.items()}
    per["rest (JSON, keys, reasons, packing)"] = total / counted * 1e6 - sum(per.values())
    return total / counted * 1e6, per


def pybtex_rate(bib: Path, limit: int = 20000) -> float:
    from pybtex.database import parse_string

    text = bib.read_text("utf-8")
    # the first `limit` entries keep the yardstick short
    cut = 0
    for _ in range(limit):
        nxt = text.find("\n@", cut + 1)
        if nxt < 0:
            cut = len(text)
            break
        cut = nxt
    sample = text[:cut]
    start = time.perf_counter()
    db = parse_string(sample, "bibtex")
    return len(db.entries) / (time.perf_counter() - start)


def cluster_quality(lines: int, jobs: int = 2) -> int:
    """Pairwise precision and recall of ``clusters.jsonl`` against the generator's truth.

    Every two lines made from one invented work are a true pair
    (``make_demo_corpus.build_with_truth``); junk lines belong to no work.
    """
    import itertools
    from collections import defaultdict

    from make_demo_corpus import build_with_truth

    data = build_with_truth(lines)
    truth = defaultdict(list)
    for number, (_, work) in enumerate(data, start=1):
        if work is not None:
            truth[work].append(number)
    gold = {p for members in truth.values() for p in itertools.combinations(members, 2)}
    with tempfile.TemporaryDirectory(prefix="bench-clusters-") as tmp:
        src, out = Path(tmp) / "legacy.txt", Path(tmp) / "out"
        src.write_bytes(b"\n".join(line for line, _ in data) + b"\n")
        subprocess.run([sys.executable, "-m", "normform.cli", "clean", str(src), "-o", str(out),
                        "--jobs", str(jobs), "--quiet"], check=True, stdout=subprocess.DEVNULL)
        found: set[tuple[int, int]] = set()
        largest, works_in_largest = 0, 0
        with open(out / "clusters.jsonl", encoding="utf-8") as handle:
            for row in handle:
                members = sorted(m["line"] for m in json.loads(row)["members"])
                found |= set(itertools.combinations(members, 2))
                if len(members) > largest:
                    largest = len(members)
                    works_in_largest = len({data[n - 1][1] for n in members})
    hits = len(found & gold)
    print(f"clusters on {lines:,} generated lines: pairwise precision {hits / max(len(found), 1):.4f}, "
          f"recall {hits / max(len(gold), 1):.4f} ({len(found):,} pairs found, {len(gold):,} true); "
          f"largest cluster {largest} lines from {works_in_largest} invented works")
    return 0


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--lines", type=int, default=100_000)
    parser.add_argument("--jobs", type=int, nargs="+", default=[1, 2])
    parser.add_argument("--cluster-quality", action="store_true",
                        help="instead: precision/recall of the duplicate clusters on --lines generated lines")
    args = parser.parse_args()
    if args.cluster_quality:
        return cluster_quality(args.lines, args.jobs[-1])
    with tempfile.TemporaryDirectory(prefix="bench-clean-") as tmp:
        tmp = Path(tmp)
        src = tmp / "legacy.txt"
        t = time.perf_counter()
        make_input(src, args.lines)
        print(f"input: {args.lines:,} generated lines ({src.stat().st_size / 2**20:.1f} MiB) "
              f"in {time.perf_counter() - t:.1f}s")
        runs = []
        for jobs in args.jobs:
            r = run_clean(src, tmp / f"out{jobs}", jobs, [])
            runs.append(r)
            sums = (f", sampled: largest process {r['largest_sampled_mb']:.0f} MB, sum over processes "
                    f"{r['sum_rss_mb']:.0f} MB" if r["sum_rss_mb"] else "")
            print(f"jobs={jobs}: {r['records']:,} records in {r['seconds']:.1f}s = "
                  f"{r['lines_per_s']:,.0f} lines/s ({r['lines_per_s'] / jobs:,.0f} per job); "
                  + (f"ru_maxrss: hidden by an earlier child's peak ({r['max_process_rss_mb']:.0f} MB: the input "
                     f"generator or an earlier run){sums}" if r["rss_hidden"] else
                     f"peak RSS (ru_maxrss, max over all runs so far) {r['max_process_rss_mb']:.0f} MB{sums}"))
            print(f"         CPU {r['cpu_seconds']:.0f}s = {r['records'] / r['cpu_seconds']:,.0f} lines per CPU-second; "
                  f"clustering+report {r['finish_seconds']}s (CPU {r['finish_cpu']}s); machine load average ~{r['load']:.1f}")
            if r["main_cpu"] is not None:
                # Amdahl: the main process's CPU is the serial part, the workers' CPU splits over jobs
                main, work = r["main_cpu"], r["worker_cpu"] if jobs > 1 else 0.0
                print(f"         CPU split (sampled): main process {main:.0f}s, workers {work:.0f}s")
            print(f"         {r['check']}")
        if len(runs) > 1:
            print(f"speed-up {runs[0]['jobs']} -> {runs[-1]['jobs']} jobs: "
                  f"{runs[-1]['lines_per_s'] / runs[0]['lines_per_s']:.2f}x")
        if runs[0]["jobs"] == 1 and runs[0]["main_cpu"]:
            serial = runs[0]["finish_cpu"] or runs[0]["finish_seconds"] or 0.0
            total = runs[0]["main_cpu"]
            for n in (2, 4):
                print(f"Amdahl bound from the 1-job CPU ({total:.0f}s, of which clustering+report "
                      f"{serial:.1f}s run in one process): {n} jobs on {n} idle cores <= "
                      f"{total / ((total - serial) / n + serial):.2f}x")
        total, per = stage_split(src)
        print(f"worker CPU by stage (this process, lines 501-3,500 of the input; every record gets a "
              f"report row here, in a run only the first --report-rows do): {total:,.0f} us/record")
        for name, us in sorted(per.items(), key=lambda kv: -kv[1]):
            print(f"         {name:38s} {us:7,.0f} us  ({us / total:5.1%})")
        parsed = parser_rate(src)
        print(f"parser alone (normform.parse_reference, same input, first 2,000 lines, this process): "
              f"{parsed:,.0f} lines per CPU-second")
        rate = pybtex_rate(tmp / f"out{args.jobs[0]}" / "references.bib")
        print(f"yardstick: pybtex parses the produced BibTeX at {rate:,.0f} entries/s; "
              f"clean (jobs={runs[0]['jobs']}) / pybtex parse = {runs[0]['lines_per_s'] / rate:.2f}")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
