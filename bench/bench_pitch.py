"""Speed of the acoustics and pitch layers: resonance searches of the bundled instruments.

Run: python bench/bench_pitch.py
"""

import time

import numpy as np

from drift import pitch
from drift.climate import Room
from drift.instrument import bundled_instruments, load_instrument
from drift.bore_state import BoreProfile


def best_of(function, repeat=7):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    room = Room(295.15, relative_humidity=0.45)
    uniform = BoreProfile.uniform(room)
    pitch.note_frequencies(load_instrument("cylindrical-reed"), uniform)  # loads CoolProp
    for ins in bundled_instruments():
        net = pitch.bore_network(ins, uniform)
        notes = ins.fingerings()
        one = best_of(lambda: pitch.note_frequencies(ins, uniform, notes=notes[:1], network=net))
        every = best_of(lambda: pitch.note_frequencies(ins, uniform, network=net))
        whole = best_of(lambda: pitch.note_frequencies(ins, uniform))
        print(f"{ins.name} ({net.seg.n} segments, {len(ins.holes)} holes, {len(notes)} notes):")
        print(f"  one fingering's search          {one * 1e3:6.1f} ms")
        print(f"  all {len(notes):2d} fingerings at once      {every * 1e3:6.1f} ms")
        print(f"  with discretisation and air     {whole * 1e3:6.1f} ms (uniform air, cached state)")
    # A bore profile with a temperature gradient: every segment a new CoolProp state
    ins = load_instrument("cylindrical-reed")
    x = np.linspace(0.0, ins.length_m, 8)
    t = np.linspace(305.0, 296.0, 8) + np.random.default_rng(1).uniform(0, 1e-3)
    profile = BoreProfile(room, x, t, np.linspace(0.9, 0.3, 8), t)
    start = time.perf_counter()
    pitch.note_frequencies(ins, profile)
    cold = time.perf_counter() - start
    warm = best_of(lambda: pitch.note_frequencies(ins, profile))
    print(f"cylindrical-reed, warm breath-filled profile: first {cold * 1e3:.0f} ms "
          f"(new air states), then {warm * 1e3:.0f} ms")


if __name__ == "__main__":
    main()
