"""Speed of the thermal layer: steady states, timelines and a warm-up in pitch.

Run: python bench/bench_thermal.py
"""

import time

import numpy as np

from drift import heat_balance, thermal, warmup
from drift.climate import Room, default_blowing, parse_plan
from drift.instrument import load_instrument
from drift.segments import instrument_wall


def timed(label, function, repeat=5):
    function()  # first call loads CoolProp and fills the air layer's cache
    start = time.perf_counter()
    for _ in range(repeat):
        function()
    print(f"{label}: {(time.perf_counter() - start) / repeat * 1e3:.1f} ms")


def main():
    room = Room(293.15, 101325.0, 0.5)
    plan = parse_plan("play:10,rest:5,play:10")
    times = np.arange(0.0, 25.01, 0.5) * 60.0
    for name in ("cylindrical-reed", "conical-reed", "side-blown-flute"):
        instrument = load_instrument(name)
        wall = instrument_wall(instrument)
        blowing = default_blowing(instrument.excitation)
        layers = heat_balance.radial_layers(wall)
        print(f"{name}: {wall.positions_m.size} segments x {layers} layers")
        timed("  steady state", lambda: thermal.steady_state(wall, room, blowing))
        timed("  25 min timeline, 51 states", lambda: thermal.timeline(wall, room, plan, times, blowing))
    instrument = load_instrument("cylindrical-reed")
    start = time.perf_counter()
    warmup.warmup_timeline(instrument, room, "play:20", 30.0)
    print(f"cylindrical-reed warm-up in pitch, play:20 every 30 s: {time.perf_counter() - start:.1f} s")


if __name__ == "__main__":
    main()
