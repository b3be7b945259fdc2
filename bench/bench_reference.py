"""Speed-up and agreement of drift's computation against a straightforward reference.

The reference, kept here and not in the package, computes the same model the plain way:
- gas properties through CoolProp, one call per state, for every acoustic segment of every bore
  state (drift: the shipped gas table, evaluated at the thermal model's samples and interpolated);
- the input impedance one frequency at a time, a Python loop over frequencies (drift: every
  frequency, fingering and bore state in one pass along the bore);
- each note's resonance searched on its own over the full 25-cent grid from 20 Hz with
  Chandrupatla's refinement (``bench_pitch.reference_search_resonances``; drift: all notes and
  states at once, a grid set by the bore's length, a few parabolic steps);
- the joint change by Brent's method from a wide bracket (drift: a few secant steps, all
  climates together);
- a warm-up's pitch by one full search per note and row (drift: a few checked knots per phase).
The heat balance of the played bore is the same code in both. The script prints the time of each
side, the speed-up and the largest difference in cents.

Run from the repository root:  python bench/bench_reference.py   (about four minutes)
"""

from __future__ import annotations

import math
import time

import numpy as np
from scipy.optimize import brentq

import bench_pitch as ref
from drift import air, chart, thermal, warmup
from drift.climate import load_climate
from drift.errors import OutOfRangeError
from drift.instrument import load_instrument
from drift.scale import cents
from drift.segments import expanded_segments

INSTRUMENT = "cylindrical-reed"
CLIMATES = ["winter-church", "sunny-lawn"]
PLAN = "play:5,rest:2"
STEP_S = 60.0


class LoopNetwork(ref.ReferenceNetwork):
    """The reference network evaluated one frequency at a time."""

    def impedance(self, frequency_hz, open_holes=None, paired=False):
        f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
        if paired:
            return np.concatenate([super(LoopNetwork, self).impedance(f[i:i + 1], open_holes[i:i + 1], True)
                                   for i in range(f.size)])
        return np.concatenate([super(LoopNetwork, self).impedance(f[i:i + 1], open_holes) for i in range(f.size)],
                              axis=1)


def reference_network(instrument, profile):
    """The bore expanded by its wall temperature, each segment's gas straight from CoolProp."""
    segs = expanded_segments(instrument, profile.wall_temperature_at)
    mid = np.clip(segs.midpoints_m, 0.0, None)
    t = np.interp(mid, profile.positions_m, profile.temperature_k)
    phi = np.clip(np.interp(mid, profile.positions_m, profile.breath_fraction), 0.0, 1.0)
    room = profile.room
    states = [air.air_state(ti, room.pressure_pa, room.temperature_k, room.relative_humidity, room.co2_fraction,
                            pi, profile.breath) for ti, pi in zip(t, phi)]
    props = air.GasProperties(*(np.array([float(getattr(s.properties, name)) for s in states])
                                for name in air.GasProperties.__dataclass_fields__))
    return LoopNetwork(segs, props)


def reference_frequencies(instrument, profile):
    """Every note searched on its own [Hz]."""
    net = reference_network(instrument, profile)
    notes = instrument.fingerings()
    mask = instrument.open_mask(notes)
    out = []
    for i, note in enumerate(notes):
        found = ref.reference_search_resonances(net, mask[i:i + 1], [note.register],
                                                minima=instrument.excitation == "jet")[0]
        out.append(float(found[note.register - 1]) if len(found) >= note.register else math.nan)
    return np.array(out)


def reference_joint_change(instrument, profile, reference_hz, start):
    free = chart.free_joint(instrument)

    def mean_drift(delta_m):
        return float(np.nanmean(cents(reference_frequencies(free.with_joint_change(delta_m), profile),
                                      reference_hz)))

    step = math.copysign(max(abs(instrument.length_m * (2 ** (start / 1200) - 1)), 2e-4), start)
    a, fa = 0.0, start
    while True:
        b = a + step
        fb = mean_drift(b)
        if fb * fa <= 0:
            return float(brentq(mean_drift, min(a, b), max(a, b), xtol=1e-6))
        if abs(b) >= chart.SEARCH_LIMIT_M:
            raise OutOfRangeError("no joint change")
        a, fa, step = b, fb, step * 2


def reference_chart(instrument, climates):
    reference_hz = reference_frequencies(instrument, thermal.climate_profile(instrument, chart.design_climate(instrument)))
    rows, joints = [], []
    for c in climates:
        profile = thermal.climate_profile(instrument, c)
        drift = cents(reference_frequencies(instrument, profile), reference_hz)
        rows.append(drift)
        joints.append(reference_joint_change(instrument, profile, reference_hz, float(np.nanmean(drift))))
    return np.array(rows), np.array(joints)


def reference_warmup(instrument, room, plan, step_s):
    """One full search per row; in a rest, the row is the first note had playing resumed then
    (the warm-up's rows say so, :meth:`drift.thermal.Trajectory.resumed`)."""
    phases = warmup.parse_plan(plan)
    times = warmup.sample_times(phases, step_s)
    trajectory = thermal.instrument_trajectory(instrument, room, phases)
    reference_hz = reference_frequencies(instrument, thermal.design_profile(instrument))

    def profile(t):
        resting = phases[trajectory.phase_of(t)].state == "rest"
        return (trajectory.resumed(t) if resting else trajectory.state(t)).profile
    return np.array([cents(reference_frequencies(instrument, profile(t)), reference_hz) for t in times])


def timed(function):
    start = time.perf_counter()
    value = function()
    return value, time.perf_counter() - start


def main():
    instrument = load_instrument(INSTRUMENT)
    climates = [load_climate(name) for name in CLIMATES]
    room = instrument.design.room()
    # Load both property sources and fill the thermal model's caches before timing anything.
    air.set_property_source("coolprop")
    air.air_properties(room)
    air.set_property_source("table")
    chart.drift_chart(instrument, climates[:1])

    fast, t_fast = timed(lambda: chart.drift_chart(instrument, climates))
    air.set_property_source("coolprop")
    (slow_rows, slow_joints), t_slow = timed(lambda: reference_chart(instrument, climates))
    air.set_property_source("table")
    fast_rows = np.array([[r.drift_cents for r in fast.rows if r.climate == c.name] for c in climates])
    fast_joints = np.array([s.adjust_m for s in fast.summary])
    print(f"chart, {instrument.name} x {len(climates)} climates: drift {t_fast:.2f} s, reference {t_slow:.1f} s, "
          f"speed-up {t_slow / t_fast:.0f}x; largest difference {np.max(np.abs(fast_rows - slow_rows)):.4f} cent, "
          f"joint {np.max(np.abs(fast_joints - slow_joints)) * 1e6:.2f} um", flush=True)

    fast, t_fast = timed(lambda: warmup.warmup_timeline(instrument, room, PLAN, STEP_S))
    air.set_property_source("coolprop")
    slow, t_slow = timed(lambda: reference_warmup(instrument, room, PLAN, STEP_S))
    air.set_property_source("table")
    print(f"warm-up {PLAN} every {STEP_S:g} s ({len(fast.times_s)} rows): drift {t_fast:.2f} s (settle times "
          f"included), reference {t_slow:.1f} s (rows only), speed-up {t_slow / t_fast:.0f}x; largest difference "
          f"{np.max(np.abs(fast.drift_cents - slow)):.4f} cent", flush=True)


if __name__ == "__main__":
    main()
