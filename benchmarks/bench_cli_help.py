"""Wall time of `halosift --help` (target: under 0.3 s), against a bare Python start, in one run.

    python benchmarks/bench_cli_help.py [--runs N]

Each figure is the median of N whole-process runs (default 15), alternated so
that drift in the machine's speed touches both alike. Also printed: the same for
`halosift completion bash` and `halosift screen --help`, and what `--help` adds
to a bare interpreter. tests/test_cli.py holds what keeps --help fast (no heavy
module is imported); this script only measures.
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import time
from pathlib import Path

TARGET_S = 0.3
ROOT = Path(__file__).resolve().parents[1]


def _once(args: list[str]) -> float:
    env = {**os.environ, "PYTHONPATH": str(ROOT) + os.pathsep + os.environ.get("PYTHONPATH", "")}
    start = time.perf_counter()
    subprocess.run([sys.executable, *args], check=True, stdout=subprocess.DEVNULL, env=env, cwd=ROOT)
    return time.perf_counter() - start


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--runs", type=int, default=15)
    runs = parser.parse_args().runs
    cases = {
        "python -c pass": ["-c", "pass"],
        "halosift --help": ["-m", "halosift", "--help"],
        "halosift screen --help": ["-m", "halosift", "screen", "--help"],
        "halosift completion bash": ["-m", "halosift", "completion", "bash"],
    }
    times: dict[str, list[float]] = {name: [] for name in cases}
    for _ in range(runs):
        for name, args in cases.items():
            times[name].append(_once(args))
    medians = {name: statistics.median(t) for name, t in times.items()}
    base = medians["python -c pass"]
    print(f"{runs} runs each, medians (min–max), {os.cpu_count()} cores, Python {sys.version.split()[0]}")
    for name, t in times.items():
        extra = "" if name == "python -c pass" else f"  (+{medians[name] - base:.3f} s over bare Python)"
        print(f"  {name:26s} {medians[name]:.3f} s ({min(t):.3f}–{max(t):.3f}){extra}")
    help_s = medians["halosift --help"]
    verdict = "met" if help_s < TARGET_S else "NOT met"
    print(f"halosift --help: {help_s:.3f} s; target < {TARGET_S} s: {verdict} (ratio {help_s / TARGET_S:.2f} of target)")


if __name__ == "__main__":
    main()
