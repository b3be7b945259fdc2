"""Whole-process speed of the command line: each command run several times in a fresh process.

Prints, per command, the median (and range) of the wall time and of the CPU time (user + system
of the child process), and how the time of `drift chart` and `drift warmup` grows with notes x
climates and with time steps, and `drift design` and `drift retune` on every bundled instrument.

Run from anywhere with drift installed:  python bench/bench_commands.py [--repeat 5] [--desk]
"""

from __future__ import annotations

import argparse
import os
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

COMMANDS = [
    ["--help"],
    ["air"],
    ["resonances"],
    ["chart"],
    ["warmup"],
    ["warmup", "--plan", "play:60", "--step", "10"],
    ["advise", "side-blown-flute", "--climate", "hillside-evening"],
    ["advise", "side-blown-flute", "cylindrical-reed", "conical-reed", "--climate", "hillside-evening"],
    ["chart", "valved-brass"],
    ["warmup", "valved-brass"],
    ["warmup", "slide-brass"],
    ["advise", "valved-brass", "--climate", "hillside-evening"],
]


def run(args: list[str]) -> tuple[float, float]:
    """(wall [s], CPU [s]) of one run of ``python -m drift ARGS`` with its output discarded."""
    before = os.times()
    start = time.perf_counter()
    subprocess.run([sys.executable, "-m", "drift", *args], stdout=subprocess.DEVNULL, check=True)
    wall = time.perf_counter() - start
    after = os.times()
    cpu = (after.children_user - before.children_user) + (after.children_system - before.children_system)
    return wall, cpu


def measure(args: list[str], repeat: int) -> str:
    runs = [run(args) for _ in range(repeat)]
    walls = [w for w, _ in runs]
    cpus = [c for _, c in runs]
    return (f"drift {' '.join(args):<38} wall {statistics.median(walls):6.2f} s "
            f"({min(walls):.2f}-{max(walls):.2f})  cpu {statistics.median(cpus):6.2f} s")


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=5, help="runs per command (median reported)")
    parser.add_argument("--desk", action="store_true", help="only drift design and drift retune")
    options = parser.parse_args()
    repeat = options.repeat
    print(f"python {sys.version.split()[0]}, {os.cpu_count()} cores, median of {repeat} runs")
    if options.desk:
        desk(repeat)
        return
    for args in COMMANDS:
        print(measure(args, repeat), flush=True)
    print("growth with climates (drift chart, cylindrical-reed, 18 notes):")
    names = ["tuning-room", "winter-church", "sunny-lawn", "tent-evening", "cooled-hall", "lit-stage",
             "mountain-festival", "frozen-parade", "cold-rehearsal"]
    for k in (1, 3, 9):
        args = ["chart"] + [a for name in names[:k] for a in ("--climate", name)]
        print("  " + measure(args, repeat).replace(" ".join(args), f"chart with {k} climate(s)"), flush=True)
    print("growth with time steps (drift warmup --plan play:60):")
    for step in ("60", "20", "10"):
        print("  " + measure(["warmup", "--plan", "play:60", "--step", step], repeat), flush=True)
    desk(repeat)


def desk(repeat: int) -> None:
    """`drift design` (alone and with two climates) and `drift retune` on every bundled instrument."""
    print("the maker's desk, every bundled instrument:")
    output = Path(tempfile.mkdtemp()) / "retuned.toml"
    for name in ("conical-reed", "cylindrical-reed", "side-blown-flute"):
        print("  " + measure(["design", name], repeat), flush=True)
        print("  " + measure(["design", name, "--climate", "winter-church", "--climate", "sunny-lawn"], repeat),
              flush=True)
        print("  " + measure(["retune", name, "--room-temp", "16", "--output", str(output)], repeat)
              .replace(str(output), "FILE"), flush=True)


if __name__ == "__main__":
    main()
