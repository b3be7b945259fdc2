"""Speed of the thermal layer: steady states, timelines and a warm-up in pitch.

Run: python bench/bench_thermal.py
"""

import time

import numpy as np

from drift import air, bore, thermal


def timed(label, function, repeat=5):
    function()  # first call loads CoolProp and fills the air layer's cache
    start = time.perf_counter()
    for _ in range(repeat):
        function()
    print(f"{label}: {(time.perf_counter() - start) / repeat * 1e3:.1f} ms")


def main():
    room = air.Room(293.15, 101325.0, 0.5)
    plan = thermal.parse_plan("play:10,rest:5,play:10")
    times = np.arange(0.0, 25.01, 0.5) * 60.0
    for name in ("cylindrical-reed", "conical-reed", "side-blown-flute"):
        instrument = bore.load_instrument(name)
        wall = thermal.instrument_wall(instrument)
        blowing = thermal.instrument_blowing(instrument)
        layers = thermal._auto_layers(wall)
        print(f"{name}: {wall.positions_m.size} segments x {layers} layers")
        timed("  steady state", lambda: thermal.steady_state(wall, room, blowing))
        timed("  25 min timeline, 51 states", lambda: thermal.timeline(wall, room, plan, times, blowing))
    instrument = bore.load_instrument("cylindrical-reed")
    start = time.perf_counter()
    thermal.warmup(instrument, room, thermal.parse_plan("play:20"), 30.0)
    print(f"cylindrical-reed warm-up in pitch, play:20 every 30 s: {time.perf_counter() - start:.1f} s")


if __name__ == "__main__":
    main()
