"""Lint speed: 1,000 demo-size entries on one core, and one entry cold (process start included).

Targets (issue 6): 1,000 entries <= 10 s on one core; one entry cold <= 0.5 s.
The comparison library is tomlkit (a general-purpose TOML reader), timed on the
same files in the same run, so the ratio says how many "TOML parses" a lint costs.

    nice -n 10 python bench/bench_lint.py [--count 1000] [--cold-runs 5]
"""

from __future__ import annotations

import argparse
import os
import re
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parent.parent
DEMO = REPO / "corpus_demo" / "entries"


def make_corpus(folder: Path, count: int) -> list[Path]:
    """``count`` entries derived from the demo ones: new ids, and numbers in titles and references varied."""
    sources = sorted(DEMO.iterdir())
    out = []
    for i in range(count):
        src = sources[i % len(sources)]
        text = src.read_text("utf-8")
        new_id = f"Q{200000 + i:06d}"
        text = re.sub(r'"Q\d{6}"', lambda m: f'"Q{200000 + (int(m.group()[2:-1]) * 7 + i) % count:06d}"', text)
        text = re.sub(r'^(\s*"?id"?\s*[=:]\s*)"Q\d{6}"', lambda m: f'{m.group(1)}"{new_id}"', text, count=1,
                      flags=re.M)
        # vary years and volumes so no reference line repeats verbatim across the corpus
        text = re.sub(r"\((\d{4})\)", lambda m: f"({1950 + (int(m.group(1)) + i) % 70})", text)
        text = re.sub(r"(Math\.|Quart\.|Monthly|Seq\.|Combin\.) (\d+)", lambda m: f"{m.group(1)} {int(m.group(2)) + i % 50}", text)
        path = folder / f"{new_id}{src.suffix}"
        path.write_text(text, "utf-8")
        out.append(path)
    return out


def bench_batch(files: list[Path]) -> tuple[float, float, int]:
    import tomlkit

    from normform.lint.engine import Context, lint
    from normform.lint.entry import read_entry
    from normform.lint.registry import select_rules
    from normform.lint.settings import LintSettings

    rules = select_rules()
    # warm up: load the reference model, grammars and tables once (a long batch pays this once too)
    warm = [read_entry(str(p)) for p in files[:20]]
    lint(warm, rules, Context(LintSettings()))

    t0, c0 = time.perf_counter(), time.process_time()
    entries = [read_entry(str(p)) for p in files]
    ctx = Context(LintSettings())
    findings = lint(entries, rules, ctx)
    lint_s, lint_cpu = time.perf_counter() - t0, time.process_time() - c0
    if ctx.skipped or ctx.failed:
        print(f"  note: skipped {sorted(ctx.skipped)} failed {sorted(ctx.failed)}")

    t0 = time.perf_counter()
    for p in files:
        if p.suffix == ".toml":
            tomlkit.parse(p.read_text("utf-8"))
    toml_files = sum(1 for p in files if p.suffix == ".toml")
    tomlkit_s = (time.perf_counter() - t0) * len(files) / max(toml_files, 1)
    return lint_s, lint_cpu, tomlkit_s, len(findings)


def _child_cpu() -> float:
    import resource

    usage = resource.getrusage(resource.RUSAGE_CHILDREN)
    return usage.ru_utime + usage.ru_stime


def bench_cold(path: Path, runs: int, env: dict | None = None) -> tuple[float, float, float]:
    cli = [sys.executable, "-c", "import sys; from normform.cli import main; sys.exit(main())", "lint", str(path)]
    base = [sys.executable, "-c", "import tomlkit"]

    cpu: list[float] = []

    def timed(cmd):
        t0, c0 = time.perf_counter(), _child_cpu()
        subprocess.run(cmd, stdout=subprocess.DEVNULL, stderr=subprocess.DEVNULL, check=False, env=env)
        cpu.append(_child_cpu() - c0)
        return time.perf_counter() - t0

    timed(cli)   # fill the OS file cache once
    wall = statistics.median(timed(cli) for _ in range(runs))
    cli_cpu = statistics.median(cpu[1:])
    return wall, cli_cpu, statistics.median(timed(base) for _ in range(runs))


def main() -> int:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--count", type=int, default=1000)
    parser.add_argument("--cold-runs", type=int, default=5)
    args = parser.parse_args()
    if hasattr(os, "sched_setaffinity"):
        os.sched_setaffinity(0, {sorted(os.sched_getaffinity(0))[0]})   # one core, children too
    with tempfile.TemporaryDirectory() as tmp:
        files = make_corpus(Path(tmp), args.count)
        lint_s, lint_cpu, tomlkit_s, n = bench_batch(files)
        print(f"batch: {len(files)} entries linted in {lint_s:.2f} s wall, {lint_cpu:.2f} s CPU on one core "
              f"({len(files) / lint_s:.0f} entries/s, {n} findings); target <= 10 s: "
              f"{'met' if lint_s <= 10 else 'NOT met'}")
        print(f"  tomlkit.parse of the same files: {tomlkit_s:.2f} s; lint / tomlkit = {lint_s / tomlkit_s:.1f}x")
        # An installed package has its bytecode compiled (pip does it at install time); an
        # environment with PYTHONDONTWRITEBYTECODE recompiles every module of ours at each
        # start. Time the installed case with a private bytecode cache (nothing is written
        # into the source tree), and the environment as it is when it differs.
        modes = [("installed (bytecode cached)", dict(os.environ, PYTHONPYCACHEPREFIX=str(Path(tmp) / "pyc")))]
        modes[0][1].pop("PYTHONDONTWRITEBYTECODE", None)
        if os.environ.get("PYTHONDONTWRITEBYTECODE") or sys.dont_write_bytecode:
            modes.append(("this environment (PYTHONDONTWRITEBYTECODE: no bytecode cache)", None))
        for label, env in modes:
            cold, cold_cpu, base = bench_cold(DEMO / "Q000001.toml", args.cold_runs, env)
            print(f"cold, {label}: one entry (Q000001.toml), process start included: {cold:.3f} s wall, "
                  f"{cold_cpu:.3f} s CPU (medians of {args.cold_runs}); target <= 0.5 s: "
                  f"{'met' if cold <= 0.5 else 'NOT met'}")
            print(f"  `python -c 'import tomlkit'` cold: {base:.3f} s; ratio {cold / base:.1f}x")
    return 0


if __name__ == "__main__":
    sys.exit(main())
