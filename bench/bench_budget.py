"""Calibration of the time budget (drift/budget.py): whole processes of every computing command
on bores from 0.6 to 10 m (wooden: four wall layers; brass: one) and on the bundled instruments,
their measured CPU time (user + system of the child) beside the estimate made before the run.

``--fit`` refits the constants (drift.budget.WEIGHTS) by non-negative least squares on the
relative error (each run weighed by 1 / its measured time) and prints them; the table then shows
the estimate with the fitted constants. ``--save FILE`` keeps the measurements (JSON),
``--load FILE`` takes the measured times from such a file instead of running the commands (the
estimates are made afresh); with ``--missing`` it runs those the file lacks. ``--held-out`` also
runs seven commands left out of the fit and shows them with the constants. The runs take about
10 minutes (the held-out ones 2 more).

Run from the project's folder:  python bench/bench_budget.py [--fit] [--held-out] [--save runs.json]
"""

from __future__ import annotations

import argparse
import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

import numpy as np

ROOT = Path(__file__).resolve().parents[1]
sys.path.insert(0, str(ROOT))

from drift import budget  # noqa: E402
from drift.climate import bundled_climates, load_climate, parse_plan  # noqa: E402
from drift.instrument import load_instrument  # noqa: E402

#: Bore lengths of the test pipes [m] (a bore file allows up to 10 m).
LENGTHS = (0.6, 2.4, 5.0, 10.0)
#: (wall material, wall thickness [mm], label): four radial layers, and one.
WALLS = (("tropical_hardwood", 6.0, "wood"), ("yellow_brass", 0.5, "metal"))


def pipe_text(length_m: float, material: str, wall_mm: float) -> str:
    """An invented reed pipe: a cylinder (15 mm, wider as sqrt(length) beyond 1 m), two holes,
    three notes and a tuning joint."""
    d = 15.0 if length_m <= 1.0 else 15.0 * length_m ** 0.5
    x = length_m * 1000.0
    return (f'name = "pipe {length_m:g} m"\nexcitation = "reed"\nmaterial = "{material}"\nwall_mm = {wall_mm}\n'
            f"[bore]\nstations_mm = [[0, {d:.3f}], [{x:.1f}, {d:.3f}]]\n"
            f'[[hole]]\nname = "h1"\nposition_mm = {0.8 * x:.1f}\ndiameter_mm = {0.6 * d:.3f}\n'
            f'[[hole]]\nname = "h2"\nposition_mm = {0.7 * x:.1f}\ndiameter_mm = {0.6 * d:.3f}\n'
            '[[note]]\nname = "D3"\nclosed = ["h1", "h2"]\n[[note]]\nname = "E3"\nclosed = ["h2"]\n'
            f'[[note]]\nname = "F3"\nclosed = []\n[tuning]\nposition_mm = {0.1 * x:.1f}\n')


NAMES = ("C", "C#", "D", "D#", "E", "F", "F#", "G", "G#", "A", "A#", "B")


def named_pipe(path: Path, length_m: float, material: str, wall_mm: float):
    """The pipe written to ``path`` with each note named after its playing frequency at the design
    room (played to the steady state), and the A4 that puts their mean offset at zero there (so
    that a design study finds its design temperature)."""
    from drift.pitch import frequencies_hz
    from drift.thermal import design_profile

    text = pipe_text(length_m, material, wall_mm) + "[design]\nplaying = true\n"
    path.write_text(text, encoding="utf-8")
    ins = load_instrument(str(path))
    played = frequencies_hz(ins, [design_profile(ins)])[0]
    exact = 69 + 12 * np.log2(played / 440.0)
    midi = np.round(exact).astype(int)
    for old, m in zip(("D3", "E3", "F3"), midi):
        text = text.replace(f'"{old}"', f'"{NAMES[m % 12]}{m // 12 - 1}"')
    text += f"a4_hz = {440.0 * 2 ** (np.mean(exact - midi) / 12):.4f}\n"
    path.write_text(text, encoding="utf-8")
    return load_instrument(str(path))


def runs(folder: Path) -> list[tuple[list[str], budget.Estimate]]:
    """(arguments of ``drift``, the estimate) of every calibration run."""
    three = ["tuning-room", "sunny-lawn", "frozen-parade"]
    out = []
    for length in LENGTHS:
        for material, wall, label in WALLS:
            path = folder / f"{label}-{length:g}.toml"
            ins = named_pipe(path, length, material, wall)
            out.append((["warmup", str(path), "--plan", "play:2", "--step", "60"],
                        budget.warmup_cost(ins, parse_plan("play:2"), 60.0)))
            out.append((["warmup", str(path)], budget.warmup_cost(ins, parse_plan("play:20"), 30.0)))
            if length == 10.0:      # a long plan: the rows of a long bore
                out.append((["warmup", str(path), "--plan", "play:600", "--step", "10"],
                            budget.warmup_cost(ins, parse_plan("play:600"), 10.0)))
            climates = [load_climate(c) for c in three]
            out.append((["chart", str(path), *[a for c in three for a in ("--climate", c)]],
                        budget.chart_cost(ins, climates)))
            if length <= 5.0:
                out.append((["design", str(path)], budget.design_cost(ins, [])))
            if label == "wood" and length in (2.4, 5.0):
                log = folder / f"{label}-{length:g}.csv"
                names = [n.name for n in ins.notes]
                log.write_text("minute,note,cents\n" + "".join(f"{m},{names[m % 2]},{m - 3}\n" for m in range(1, 7)),
                               encoding="utf-8")
                plan = "play:3,rest:1,play:2"
                out.append((["fit", str(log), str(path), "--plan", plan],
                            budget.fit_cost(ins, parse_plan(plan), 6, names[:2])))
    for name in ("cylindrical-reed", "conical-reed", "side-blown-flute", "double-reed", "duct-flute",
                 "valved-brass", "slide-brass"):
        ins = load_instrument(name)
        out.append((["warmup", name, "--plan", "play:8,rest:3", "--step", "60"],
                    budget.warmup_cost(ins, parse_plan("play:8,rest:3"), 60.0)))
    cyl = load_instrument("cylindrical-reed")
    out.append((["chart"], budget.chart_cost(cyl, bundled_climates())))
    for plan, step in (("play:60", 10.0), ("play:60", 60.0), ("play:600", 10.0)):
        out.append((["warmup", "--plan", plan, "--step", f"{step:g}"], budget.warmup_cost(cyl, parse_plan(plan), step)))
    evening = load_climate("hillside-evening")
    gig = parse_plan("play:10,rest:5,play:45,rest:20,play:45")
    trio = [load_instrument(n) for n in ("side-blown-flute", "cylindrical-reed", "conical-reed")]
    out.append((["advise", "side-blown-flute", "cylindrical-reed", "conical-reed", "--climate", "hillside-evening"],
                budget.advise_cost(trio, gig, len(evening.schedule().times_s) - 1)))
    out.append((["advise", "valved-brass", "--climate", "hillside-evening"],
                budget.advise_cost([load_instrument("valved-brass")], gig, len(evening.schedule().times_s) - 1)))
    for name in ("conical-reed", "cylindrical-reed"):
        out.append((["design", name], budget.design_cost(load_instrument(name), [])))
        out.append((["retune", name, "--room-temp", "16", "--output", str(folder / f"{name}-16.toml")],
                    budget.retune_cost(load_instrument(name))))
    log = ROOT / "docs" / "examples" / "practice-log.csv"
    from drift.fit import log_plan, read_tuner_log

    tuner = read_tuner_log(log)
    out.append((["fit", str(log), "cylindrical-reed"],
                budget.fit_cost(cyl, log_plan(tuner), len(tuner.cents), tuner.notes)))
    for name in ("valved-brass", "slide-brass"):      # the same log, read on brass notes
        brass_log = folder / f"{name}.csv"
        brass_log.write_text(log.read_text(encoding="utf-8").replace("A4", "F4").replace("E5", "Bb3"), encoding="utf-8")
        read = read_tuner_log(brass_log)
        out.append((["fit", str(brass_log), name], budget.fit_cost(load_instrument(name), log_plan(read),
                                                                     len(read.cents), read.notes)))
    return out


def held_out(folder: Path) -> list[tuple[list[str], budget.Estimate]]:
    """Runs left out of the fit, to check the constants on work they were not fitted to (the pipes
    written by :func:`runs` first)."""
    wood5, wood10, metal10 = (load_instrument(str(folder / f"{n}.toml")) for n in ("wood-5", "wood-10", "metal-10"))
    climates = bundled_climates()
    two = [load_climate("winter-church"), load_climate("sunny-lawn")]
    evening = load_climate("hillside-evening")
    gig = parse_plan("play:10,rest:10,play:45,rest:20,play:45")
    return [
        (["chart", str(folder / "wood-10.toml")], budget.chart_cost(wood10, climates)),
        (["design", str(folder / "wood-5.toml"), "--climate", "winter-church", "--climate", "sunny-lawn"],
         budget.design_cost(wood5, two)),
        (["warmup", str(folder / "metal-10.toml"), "--plan", "play:10,rest:5,play:10", "--step", "20"],
         budget.warmup_cost(metal10, parse_plan("play:10,rest:5,play:10"), 20.0)),
        (["advise", str(folder / "wood-5.toml"), "--climate", "hillside-evening"],
         budget.advise_cost([wood5], gig, len(evening.schedule().times_s) - 1)),
        (["warmup", "valved-brass"], budget.warmup_cost(load_instrument("valved-brass"), parse_plan("play:20"), 30.0)),
        (["retune", "side-blown-flute", "--room-temp", "16", "--output", str(folder / "flute-16.toml")],
         budget.retune_cost(load_instrument("side-blown-flute"))),
        (["chart", "slide-brass", "--climate", "frozen-parade", "--climate", "lit-stage"],
         budget.chart_cost(load_instrument("slide-brass"), [load_climate("frozen-parade"), load_climate("lit-stage")])),
    ]


def cpu_of(args: list[str], limit: list[str]) -> float | None:
    """CPU time [s] (user + system) of ``python -m drift ARGS``; None when the run fails (a test
    pipe's design study may find no design temperature in its range: it is left out)."""
    before = os.times()
    done = subprocess.run([sys.executable, "-m", "drift", *args, *limit], stdout=subprocess.DEVNULL,
                          stderr=subprocess.DEVNULL, cwd=ROOT, env={**os.environ, "PYTHONPATH": str(ROOT)})
    after = os.times()
    if done.returncode != 0:
        return None
    return (after.children_user - before.children_user) + (after.children_system - before.children_system)


def fit_weights(records: list[dict]) -> dict[str, float]:
    """Non-negative least squares of the relative error: sum over runs (estimate / measured - 1)^2."""
    from scipy.optimize import nnls

    keys = list(budget.WEIGHTS)
    a = np.array([[r["units"][k] for k in keys] for r in records]) / np.array([[r["cpu_s"]] for r in records])
    scale = np.max(a, axis=0)
    scale[scale == 0.0] = 1.0
    w, _ = nnls(a / scale, np.ones(len(records)))
    return {k: float(v / s) for k, v, s in zip(keys, w, scale)}


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--fit", action="store_true", help="refit drift.budget.WEIGHTS")
    parser.add_argument("--save", default=None, help="write the measurements to this JSON file")
    parser.add_argument("--load", default=None, help="read the measurements from this JSON file, run nothing")
    parser.add_argument("--missing", action="store_true", help="with --load: run the commands the file lacks")
    parser.add_argument("--held-out", action="store_true",
                        help="also run the held-out commands (not fitted) and show them with the constants")
    options = parser.parse_args()
    measured = {r["command"]: r["cpu_s"] for r in json.loads(Path(options.load).read_text())} if options.load else {}
    limit = []
    if not options.load or options.missing:
        helps = subprocess.run([sys.executable, "-m", "drift", "chart", "--help"], capture_output=True, text=True,
                               cwd=ROOT, env={**os.environ, "PYTHONPATH": str(ROOT)}).stdout
        limit = ["--max-minutes", "10000"] if "--max-minutes" in helps else []
    records, checks = [], []
    with tempfile.TemporaryDirectory() as folder:
        for args, estimate in runs(Path(folder)):
            shown = " ".join(a if "/" not in a else Path(a).name for a in args)
            if shown in measured:
                cpu = measured[shown]
            else:
                cpu = cpu_of(args, limit) if not options.load or options.missing else None
            if cpu is None:
                print(f"{shown:80s} failed or not measured: left out", flush=True)
                continue
            records.append({"command": shown, "cpu_s": cpu, "units": estimate.units,
                            "nodes": estimate.largest.nodes, "estimate_s": estimate.seconds})
            print(f"{shown:80s} {estimate.largest.nodes:5d} nodes  {cpu:7.2f} s  estimate {estimate.seconds:7.2f} s",
                  flush=True)
        if options.held_out:
            limit = ["--max-minutes", "10000"]
            for args, estimate in held_out(Path(folder)):
                shown = " ".join(a if "/" not in a else Path(a).name for a in args)
                cpu = cpu_of(args, limit)
                if cpu is not None:
                    checks.append({"command": shown, "cpu_s": cpu, "units": estimate.units,
                                   "nodes": estimate.largest.nodes})
                print(f"held out: {shown:70s} {cpu} s  estimate {estimate.seconds:7.2f} s", flush=True)
    if options.save:
        Path(options.save).write_text(json.dumps(records, indent=1))
    weights = fit_weights(records) if options.fit else budget.WEIGHTS
    if options.fit:
        print("WEIGHTS = {" + ", ".join(f'"{k}": {v:.3g}' for k, v in weights.items()) + "}")
    print("\n| command | wall nodes | measured CPU | estimate | ratio |\n| --- | --- | --- | --- | --- |")
    ratios = []
    for r in records:
        estimate = sum(weights[k] * v for k, v in r["units"].items())
        ratios.append(estimate / r["cpu_s"])
        print(f"| `drift {r['command']}` | {r['nodes']} | {r['cpu_s']:.1f} s | {estimate:.1f} s | {ratios[-1]:.2f} |")
    print(f"\nratio estimate / measured: {min(ratios):.2f} to {max(ratios):.2f} over {len(ratios)} runs")
    if checks:
        print("\nheld out (not fitted):\n\n| command | wall nodes | measured CPU | estimate | ratio |\n"
              "| --- | --- | --- | --- | --- |")
        for r in checks:
            estimate = sum(weights[k] * v for k, v in r["units"].items())
            print(f"| `drift {r['command']}` | {r['nodes']} | {r['cpu_s']:.1f} s | {estimate:.1f} s | "
                  f"{estimate / r['cpu_s']:.2f} |")


if __name__ == "__main__":
    main()
