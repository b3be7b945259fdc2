"""Speed of fitting a player to a tuner log: the example log of docs/guide.md (12 readings of the
cylindrical-reed, docs/examples/practice-log.csv), fitted in this process several times.

Prints, per run, the wall and CPU time of :func:`drift.fit.fit_player` (which includes the fitted
curve for the picture), the model evaluations it took, and the time of one evaluation (a thermal
timeline over the plan and a resonance search of the notes read at every reading) measured alone.

Run from the repository root:  PYTHONPATH=. python bench/bench_fit.py [--repeat 3]
"""

from __future__ import annotations

import argparse
import statistics
import time
from pathlib import Path

from drift import fit
from drift.climate import load_climate, parse_plan
from drift.instrument import load_instrument

EXAMPLES = Path(__file__).resolve().parent.parent / "docs" / "examples"


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--repeat", type=int, default=3, help="fits to time (median reported)")
    repeat = parser.parse_args().repeat
    inst = load_instrument("cylindrical-reed")
    room = load_climate(EXAMPLES / "attic-study.toml").room
    log = fit.read_tuner_log(EXAMPLES / "practice-log.csv")
    plan = parse_plan("play:12,rest:4,play:6")
    fit.fit_player(inst, room, log, plan)  # warm-up run: imports, gas table
    walls, cpus = [], []
    for _ in range(repeat):
        wall, cpu = time.perf_counter(), time.process_time()
        result = fit.fit_player(inst, room, log, plan)
        walls.append(time.perf_counter() - wall)
        cpus.append(time.process_time() - cpu)
        print(f"fit of {len(log.notes)} readings: wall {walls[-1]:.2f} s, cpu {cpus[-1]:.2f} s, "
              f"{result.evaluations} model evaluations", flush=True)
    model = fit.LogModel(inst, room, log, plan)
    wall, cpu = time.perf_counter(), time.process_time()
    model(model.start())
    print(f"one model evaluation: wall {time.perf_counter() - wall:.2f} s, cpu {time.process_time() - cpu:.2f} s")
    print(f"median fit: wall {statistics.median(walls):.2f} s, cpu {statistics.median(cpus):.2f} s")


if __name__ == "__main__":
    main()
