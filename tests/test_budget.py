"""The time budget (drift/budget.py): the estimate made before any heavy work, and the refusal of a
run over ``--max-minutes``.

These check the program's own contract (the refusal, the message, the ordering of the estimate,
the bundled runs within the default budget); how close the estimate comes to measured times is
measured in bench/bench_budget.py (docs/performance.md, "Time budget"), not asserted here.
"""

from __future__ import annotations

import json
import re
from pathlib import Path

import pytest
from conftest import BUNDLED, assert_refused, make_instrument

from drift import budget
from drift.climate import bundled_climates, load_climate, parse_plan
from drift.constants import GIG_PLAN, MAX_MINUTES

#: A 10 m wooden bore (the longest a bore file allows): 500 segments of 4 wall layers.
LONG_WOODEN_BORE = """name = "long pipe"
excitation = "reed"
material = "tropical_hardwood"
wall_mm = 6.0
[bore]
stations_mm = [[0, 47], [10000, 47]]
[[hole]]
name = "h1"
position_mm = 8000.0
diameter_mm = 28.0
[[note]]
name = "C1"
closed = ["h1"]
[[note]]
name = "D1"
closed = []
"""


def pipe(length_mm: float, material: str = "tropical_hardwood"):
    """A cylinder of 20 mm and ``length_mm`` with one hole and two notes."""
    return make_instrument([[0, 20], [length_mm, 20]],
                           [{"name": "h", "position_mm": 0.8 * length_mm, "diameter_mm": 10.0}],
                           note=[{"name": "C4", "closed": ["h"]}, {"name": "D4", "closed": []}],
                           material=material, wall_mm=6.0 if material == "tropical_hardwood" else 0.5)


def test_wall_nodes_follow_the_thermal_model():
    # Segments of at most 20 mm (drift.constants.SEGMENT_LENGTH_M), four radial layers for a wooden
    # wall of 6 mm (Biot number 10 x 0.006 / 0.29 = 0.2, over 0.1) and one for 0.5 mm of brass.
    wood = budget.bore_of(pipe(1000.0))
    metal = budget.bore_of(pipe(1000.0, "yellow_brass"))
    assert (wood.segments, wood.layers, wood.nodes) == (50, 4, 200)
    assert (metal.segments, metal.layers, metal.nodes) == (50, 1, 50)


def test_brass_counts_every_played_path(bundled_instruments):
    # The notes grouped by the valves pressed and the slide's travel, as drift.pitch.played_paths
    # groups them: one search per group.
    from drift.bore_state import BoreProfile
    from drift.climate import Room
    from drift.pitch import played_paths

    for name in ("valved-brass", "slide-brass"):
        ins = bundled_instruments[name]
        groups = played_paths(ins, ins.fingerings(), BoreProfile.uniform(Room(293.15)))
        assert budget.bore_of(ins).paths == len(groups) > 1


@pytest.mark.parametrize("length_mm", [300.0, 1000.0, 3000.0])
def test_estimate_grows_with_nodes_rows_and_climates(length_mm):
    plan = parse_plan("play:10")
    climates = bundled_climates()
    ins, longer = pipe(length_mm), pipe(length_mm * 2)
    chart = [budget.chart_cost(ins, climates[:k]).seconds for k in range(1, len(climates) + 1)]
    assert all(b > a for a, b in zip(chart, chart[1:]))
    warm = [budget.warmup_cost(ins, plan, step).seconds for step in (600.0, 60.0, 10.0, 1.0)]
    assert all(b > a for a, b in zip(warm, warm[1:]))
    assert budget.warmup_cost(longer, plan, 60.0).seconds > budget.warmup_cost(ins, plan, 60.0).seconds
    assert budget.chart_cost(longer, climates).seconds > budget.chart_cost(ins, climates).seconds
    metal = pipe(length_mm, "yellow_brass")
    assert budget.bore_of(metal).nodes < budget.bore_of(ins).nodes
    assert budget.design_cost(metal, []).seconds < budget.design_cost(ins, []).seconds
    phases = [budget.warmup_cost(ins, parse_plan(",".join(["play:5", "rest:5"] * k)), 60.0).seconds
              for k in (1, 2, 4)]
    assert phases[0] < phases[1] < phases[2]


def test_every_bundled_run_is_far_within_the_default_budget(bundled_instruments):
    # "Normal bundled-instrument runs must stay far below it": every computing command with its
    # defaults, on every bundled instrument, over every bundled climate, at most a fifth of it
    # (the estimate gave 0.44 to 1.63 times the measured time in bench/bench_budget.py).
    # A fit depends on the player's log: the guide's plan and 12 readings, every note of the
    # instrument read (the most played paths) at most half of it.
    from drift.fit import log_plan, read_tuner_log

    climates = bundled_climates()
    gig = parse_plan(GIG_PLAN)
    log = read_tuner_log(Path(__file__).resolve().parents[1] / "docs" / "examples" / "practice-log.csv")
    budget_s = MAX_MINUTES * 60.0
    runs, fits = {}, {}
    for name in BUNDLED:
        ins = bundled_instruments[name]
        runs.update({(name, "chart"): budget.chart_cost(ins, climates),
                     (name, "warmup"): budget.warmup_cost(ins, parse_plan("play:20"), 30.0),
                     (name, "design"): budget.design_cost(ins, climates),
                     (name, "retune"): budget.retune_cost(ins)})
        runs.update({(name, f"advise {c.name}"): budget.advise_cost([ins], gig, len(c.schedule().times_s) - 1)
                     for c in climates})
        fits[name] = budget.fit_cost(ins, log_plan(log), len(log.times_s))
    runs["all seven, advise"] = budget.advise_cost([bundled_instruments[n] for n in BUNDLED], gig, 3)
    worst = max(runs, key=lambda k: runs[k].seconds)
    assert runs[worst].seconds < budget_s / 5, (worst, runs[worst].seconds)
    worst = max(fits, key=lambda k: fits[k].seconds)
    assert fits[worst].seconds < budget_s / 2, (worst, fits[worst].seconds)


def test_long_bore_refused_before_the_work(cli, write_toml):
    # A fit of a 10 m wooden bore over ten phases: 2000 wall nodes, a trajectory of each phase at
    # each of the fit's evaluations. Refused at once: nothing is computed (the estimate reads the
    # files and counts).
    path = write_toml(LONG_WOODEN_BORE, "long.toml")
    readings = "".join(f"{m},{('C1', 'D1')[m % 2]},{m - 20}\n" for m in range(1, 24, 3))
    log = write_toml("minute,note,cents\n" + readings, "log.csv")
    result = cli("fit", log, path, "--plan", ",".join(["play:30,rest:30"] * 5), code=None)
    assert_refused(result, "--max-minutes", "2000 wall nodes (500 segments x 4 layers)", "fewer phases")
    assert "over the limit of --max-minutes 5" in result.stderr


def test_a_run_allowed_by_the_option(cli, two_hole_pipe):
    # A cheap run refused under a tiny budget, then run with the value the message offers.
    args = ["chart", two_hole_pipe, "--climate", "tuning-room", "--format", "json"]
    refused = cli(*args, "--max-minutes", "0.005", code=None)
    assert_refused(refused, "over the limit of --max-minutes 0.005", "fewer climates")
    offered = re.search(r"allow it with --max-minutes (\S+)", refused.stderr).group(1)
    assert json.loads(cli(*args, "--max-minutes", offered).stdout)["climates"] == ["tuning-room"]


@pytest.mark.parametrize("value", ["nan", "-1", "0", "inf", "soon"])
def test_bad_max_minutes(cli, value):
    assert_refused(cli("warmup", "--max-minutes", value, code=None), "--max-minutes")


def test_estimate_takes_no_thermal_or_acoustic_work(monkeypatch, bundled_instruments):
    # The estimate reads and counts: no heat balance is built, no bore searched.
    from drift import heat_balance, pitch

    def forbidden(*args, **kwargs):
        raise AssertionError("heavy work in the estimate")

    monkeypatch.setattr(heat_balance.HeatBalance, "__init__", forbidden)
    monkeypatch.setattr(pitch, "search_resonances", forbidden)
    for ins in bundled_instruments.values():
        budget.warmup_cost(ins, parse_plan("play:20"), 30.0)
        budget.chart_cost(ins, [load_climate("frozen-parade")])
