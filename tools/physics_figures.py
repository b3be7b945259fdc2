"""Recompute the model-measured figures of docs/physics.md, section 3 "Thermal state of the played bore".

Prints, as markdown table rows:

1. "Steady-state and warm-up figures": plain 0.66 m cylinders in a 20 degC, 50 % RH room at sea
   level (``thermal.steady_state`` and ``thermal.timeline``). Air excess averaged over the first
   10 cm, then at the middle segment and the last segment; wall excess (the segment's mean wall
   temperature) at the first and last segment; breath heat and its latent share; condensate;
   air excess after 5 min of playing from cold (first 10 cm / last segment); t63, the time to
   63 % of the steady stored heat warming from cold and cooling (at rest) from steady.
   "Exits" spreads 19 fingerings' exits evenly from 0.25 m to the end.
2. The bundled instruments in the same room: air and wall excess at the inlet segment (where the
   flow enters) and the last segment, heat, air excess after 5 min, steady drift against the same
   bore at rest full of 20 degC room air (lowest note, and min to max over the notes), and the
   settle time from cold (``warmup.settle_from_cold``). The drift and settle columns depend on the
   acoustics and the instrument files too.
3. Loose figures of the text: the energy balance over a play:10,rest:5,play:10 plan for the
   bundled instruments (every 30 s, relative to the breath heat); the lowest note of the
   cylindrical-reed over a rest after steady playing; the steady state against the 10 h transient;
   the first 10 cm of the hardwood cylinder with a breath at 33 degC; w^2 rho c / k of an 8 mm
   hardwood wall; and, for section 4 "The drift chart", the mean pitch change per micrometre at
   each instrument's tuning joint (from a 1 mm change).
4. Section 2 "Acoustics": the outer end correction of the bundled instruments' holes in hole radii
   (``acoustics.outer_end_correction``), and the flute's notes at its design room against its own
   tuning when the lip covers 0, 15, 35 or 45 % of the embouchure hole instead of the file's.
5. "Outdoors, and weather that changes": the bundled instruments' steady state in sun and wind.

Only table 1 and the thermal loose figures feed the doc as they are; the bundled-instrument table,
the rest behaviour and the joint figure also depend on the acoustics and the instrument files.

Run from the repository root:  PYTHONPATH=. python tools/physics_figures.py
Uses only public functions of drift; takes about 30 s on one core.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from drift import acoustics, chart, pitch, segments, thermal
from drift.bore_state import BoreProfile
from drift.climate import Breath, Phase, Room, default_blowing
from drift.instrument import bundled_instruments, load_instrument
from drift.materials import material
from drift.scale import cents
from drift.segments import flow_fraction_from_exits, instrument_wall, wall_from_stations
from drift.warmup import settle_from_cold

ROOM = Room(293.15, 101325.0, 0.5)
LENGTH_M = 0.66

#: (label, material, wall [mm], bore [mm], excitation, exits?) as in the table.
CYLINDERS = [
    ("hardwood 8 mm", "tropical_hardwood", 8.0, 15.0, "reed", False),
    ("hardwood 8 mm, exits", "tropical_hardwood", 8.0, 15.0, "reed", True),
    ("ebonite 6 mm, exits", "ebonite", 6.0, 15.0, "reed", True),
    ("yellow brass 0.5 mm", "yellow_brass", 0.5, 15.0, "reed", False),
    ("yellow brass 0.5 mm", "yellow_brass", 0.5, 12.0, "lips", False),
    ("sterling silver 0.4 mm", "sterling_silver", 0.4, 19.0, "jet", False),
    ("nickel silver 0.4 mm, exits", "nickel_silver", 0.4, 19.0, "jet", True),
]


def fmt(x: float) -> str:
    """Temperatures [K], as the doc prints them: one decimal."""
    return f"{x:.1f}"


def fmt_w(x: float) -> str:
    """Heat [W]: one decimal, two significant figures below 1 W."""
    return f"{x:.2f}" if abs(x) < 1.0 else f"{x:.1f}"


def fmt_min(seconds: float) -> str:
    """Minutes: whole minutes from 5 min up, else one decimal."""
    m = seconds / 60.0
    return f"{m:.0f}" if m >= 5.0 else f"{m:.1f}"


def cylinder_wall(mat: str, wall_mm: float, bore_mm: float, exits: bool):
    stations = np.array([[0.0, bore_mm * 1e-3], [LENGTH_M, bore_mm * 1e-3]])
    share = None
    if exits:
        exit_m = np.linspace(0.25, LENGTH_M, 19)
        share = lambda x: flow_fraction_from_exits(x, exit_m)  # noqa: E731
    return wall_from_stations(stations, wall_mm * 1e-3, material(mat), flow_fraction=share)


def crossing_time(times, values, level) -> float:
    """First time ``values`` reaches ``level`` (linear interpolation between samples)."""
    v = np.asarray(values)
    sign = np.sign(v[0] - level)
    i = int(np.argmax(np.sign(v - level) != sign))
    if i == 0:
        return math.nan
    t0, t1, v0, v1 = times[i - 1], times[i], v[i - 1], v[i]
    return float(t0 + (level - v0) * (t1 - t0) / (v1 - v0))


def t63(wall, blowing, steady) -> tuple[float, float]:
    """Times [s] to 63 % of the steady stored heat: warming from cold, cooling from steady."""
    for span in (1800.0, 4 * 3600.0):
        times = np.linspace(0.0, span, 3601)
        warm = thermal.timeline(wall, ROOM, (Phase("play", span),), times, blowing)
        cool = thermal.timeline(wall, ROOM, (Phase("rest", span),), times, blowing, initial=steady)
        tw = crossing_time(times, [s.stored_j for s in warm], 0.63 * steady.stored_j)
        tc = crossing_time(times, [s.stored_j for s in cool], 0.37 * steady.stored_j)
        if math.isfinite(tw) and math.isfinite(tc):
            return tw, tc
    return tw, tc


def excess(profile_values):
    return np.asarray(profile_values) - ROOM.temperature_k


def cylinder_rows() -> list[str]:
    rows = []
    for label, mat, wall_mm, bore_mm, excitation, exits in CYLINDERS:
        wall = cylinder_wall(mat, wall_mm, bore_mm, exits)
        blowing = default_blowing(excitation)
        steady = thermal.steady_state(wall, ROOM, blowing)
        x = wall.positions_m
        first = x < 0.1
        mid = len(x) // 2
        air = excess(steady.profile.temperature_k)
        wallk = excess(steady.profile.wall_temperature_k)
        five = thermal.timeline(wall, ROOM, (Phase("play", 300.0),), [300.0], blowing)[0]
        air5 = excess(five.profile.temperature_k)
        warm, cool = t63(wall, blowing, steady)
        rows.append(
            f"| {label} | {bore_mm:.0f} mm, {excitation} | {fmt(air[first].mean())} / {fmt(air[mid])} / "
            f"{fmt(air[-1])} | {fmt(wallk[0])} / {fmt(wallk[-1])} | {fmt_w(steady.breath_heat_w)} "
            f"({100 * steady.latent_w / steady.breath_heat_w:.0f} %) | "
            f"{steady.condensation_kg_s * 3.6e6:.1f} g/h | {fmt(air5[first].mean())} / {fmt(air5[-1])} | "
            f"{fmt_min(warm)} / {fmt_min(cool)} min |")
    return rows


def signed(x: float) -> str:
    return f"{x:+.1f}"


def instrument_rows() -> tuple[list[str], list[str]]:
    rows, loose = [], []
    order = {"cylindrical-reed": 0, "conical-reed": 1, "side-blown-flute": 2}
    for instrument in sorted(bundled_instruments(), key=lambda i: order.get(i.name, 9)):
        wall = instrument_wall(instrument)
        inlet = int(np.argmax(np.asarray(wall.flow_fraction) > 0.0))
        steady = thermal.instrument_steady_state(instrument, ROOM)
        air = excess(steady.profile.temperature_k)
        wallk = excess(steady.profile.wall_temperature_k)
        five = thermal.instrument_timeline(instrument, ROOM, (Phase("play", 300.0),), [300.0])[0]
        air5 = excess(five.profile.temperature_k)
        cold = thermal.bore_profile(instrument, ROOM, playing=False)
        f_cold = chart.frequencies(instrument, cold)
        f_steady = chart.frequencies(instrument, steady.profile)
        drift = cents(f_steady, f_cold)
        names = [(n.name or "?").replace("b", "\u266d") for n in instrument.fingerings()]
        low = int(np.argmin(f_cold))
        settle = settle_from_cold(instrument, ROOM, f_steady)
        mat = instrument.wall_material.name.replace("_", " ").replace("tropical ", "")
        rows.append(
            f"| {instrument.name} | {mat} {instrument.wall_thickness_m * 1e3:g} mm | {fmt(air[inlet])} / "
            f"{fmt(air[-1])} | {fmt(wallk[inlet])} / {fmt(wallk[-1])} | {fmt_w(steady.breath_heat_w)} "
            f"({100 * steady.latent_w / steady.breath_heat_w:.0f} %) | {fmt(air5[inlet])} / {fmt(air5[-1])} | "
            f"{signed(drift[low])} ({names[low]}) / {signed(drift.min())} to {signed(drift.max())} | "
            f"{settle / 60:.1f} min |")
        # Energy balance over play:10,rest:5,play:10: breath heat = stored + lost, relative to the
        # breath heat, every 30 s of the plan and at its end.
        plan = (Phase("play", 600.0), Phase("rest", 300.0), Phase("play", 600.0))
        states = thermal.instrument_timeline(instrument, ROOM, plan, np.arange(30.0, 1500.1, 30.0))
        closure = [abs(s.breath_heat_j - s.stored_j - s.room_loss_j) / s.breath_heat_j for s in states]
        loose.append(f"{instrument.name}: energy balance over play:10,rest:5,play:10 closes to "
                     f"{max(closure):.2g} (largest every 30 s), {closure[-1]:.2g} at the end")
        # Chart: cents of mean drift per micrometre of joint change, at the steady state (from a
        # 1 mm change, the drift being close to linear in it).
        if instrument.tuning is not None:
            longer = chart.frequencies(instrument.with_joint_change(1e-3), steady.profile)
            loose.append(f"{instrument.name}: 1 um at the joint moves the mean pitch by "
                         f"{np.mean(cents(longer, f_steady)) / 1000:+.4f} cents")
        if instrument.name == "cylindrical-reed":
            # The lowest note over a rest after steady playing: its largest rise above the start.
            times = np.linspace(0.0, 600.0, 121)
            states = thermal.instrument_timeline(instrument, ROOM, (Phase("rest", 600.0),), times,
                                                 initial=steady)
            f_rest = np.array([chart.frequencies(instrument, s.profile)[low] for s in states])
            shift = cents(f_rest, f_steady[low])
            k = int(np.argmax(shift))
            loose.append(f"{instrument.name}: lowest note ({names[low]}) in a rest after steady playing, against "
                         f"its playing pitch: {shift[0]:+.2f} cents as the rest begins, highest {shift[k]:+.2f} "
                         f"cents at {times[k]:.0f} s, {shift[-1]:+.2f} cents at 10 min")
    return rows, loose


def outdoor_rows() -> list[str]:
    """Section "Outdoors, and weather that changes": the bundled instruments played to steady
    state at 25 degC, 50 % RH, sea level, in the shade, in 600 W/m2 of sun, and in that sun with a
    3 m/s wind: mean wall excess over the air, and mean drift against the shade."""
    rows = []
    for instrument in bundled_instruments():
        cells, shade_hz = [], None
        for sun, wind in ((0.0, 0.0), (600.0, 0.0), (600.0, 3.0)):
            room = Room(298.15, 101325.0, 0.5, sun_w_m2=sun, wind_m_s=wind)
            steady = thermal.instrument_steady_state(instrument, room)
            f = chart.frequencies(instrument, steady.profile)
            shade_hz = f if shade_hz is None else shade_hz
            wall = f"{float(np.mean(steady.wall_k)) - 298.15:+.1f} K"
            cells.append(wall if sun == 0.0 else f"{wall}, {float(np.nanmean(cents(f, shade_hz))):+.1f} cents")
        m = instrument.wall_material
        rows.append(f"| {instrument.name} ({m.name.replace('_', ' ')}, {m.solar_absorptance:g}) | "
                    + " | ".join(cells) + " |")
    return rows


def main() -> None:
    print("Steady-state and warm-up figures (plain 0.66 m cylinders):")
    for row in cylinder_rows():
        print(row)
    wall = cylinder_wall("tropical_hardwood", 8.0, 15.0, False)
    blowing = default_blowing("reed")
    steady = thermal.steady_state(wall, ROOM, blowing)
    long = thermal.timeline(wall, ROOM, (Phase("play", 36000.0),), [36000.0], blowing)[0]
    gap = np.max(np.abs(long.wall_k - steady.wall_k))
    print()
    print("Bundled instruments, 20 degC 50 % RH room:")
    rows, loose = instrument_rows()
    for row in rows:
        print(row)
    print()
    print("Loose figures:")
    for line in loose:
        print(line)
    print(f"hardwood 8 mm cylinder: steady state against the 10 h transient, largest wall gap {gap:.2g} K")
    cooler = thermal.steady_state(wall, ROOM, blowing, Breath(temperature_k=306.15))
    first = wall.positions_m < 0.1
    print(f"hardwood 8 mm cylinder, breath at 33 degC: air excess over the first 10 cm "
          f"{excess(cooler.profile.temperature_k)[first].mean():.1f} K")
    wood = material("tropical_hardwood")
    crossing = 0.008**2 * wood.volumetric_heat_capacity / wood.conductivity_across
    print(f"8 mm hardwood wall: w^2 rho c / k (across the grain) = {crossing / 60:.1f} min")
    print()
    print("Acoustics:")
    for line in acoustic_lines():
        print(line)
    print()
    print("Outdoors: steady playing at 25 degC, 50 % RH; shade, sun 600 W/m2, sun and 3 m/s wind:")
    for row in outdoor_rows():
        print(row)


def acoustic_lines() -> list[str]:
    lines = []
    for ins in bundled_instruments():
        if not ins.holes:
            continue
        segs = segments.discretise(ins)
        ratio = acoustics.outer_end_correction(segs.hole_radius_m, segs.hole_bore_radius_m,
                                               segs.hole_chimney_m) / segs.hole_radius_m
        lines.append(f"{ins.name}: hole outer end corrections {ratio.min():.3f} to {ratio.max():.3f} hole radii")
    flute = load_instrument("side-blown-flute")
    profile = BoreProfile.uniform(flute.design.room())

    def played(cover):
        changed = dataclasses.replace(flute, input_end=dataclasses.replace(flute.input_end, lip_cover=cover))
        return np.array([n.frequency_hz for n in pitch.note_frequencies(changed, profile)])
    base = played(flute.input_end.lip_cover)
    for cover in (0.0, 0.15, 0.35, 0.45):
        d = cents(played(cover), base)
        lines.append(f"side-blown-flute, lip cover {cover:.0%} instead of {flute.input_end.lip_cover:.0%}: "
                     f"mean {d.mean():+.2f} cents, lowest note {d[0]:+.2f}, range {d.min():+.2f} to {d.max():+.2f}")
    return lines


if __name__ == "__main__":
    main()
