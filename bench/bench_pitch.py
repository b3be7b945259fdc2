"""Speed and agreement of the resonance search: the current search against the reference search.

The reference below is the search as it was before the coarse-to-fine rewrite, kept as a
straightforward implementation of the same model: the impedance propagated segment by segment for
every frequency of a 25-cent logarithmic grid from 20 Hz (blocks up to 2.5, 6 and 15 kHz), each
sampled extremum refined by Chandrupatla's bracketed minimiser
(``scipy.optimize.elementwise.find_minimum``) on -log|Z| (log|Z| for a jet) to a relative
tolerance of 1e-7, every fingering and every climate searched on its own, and the joint change
found by Brent's method (``scipy.optimize.brentq``) to 1 um. Both use the same acoustic elements
(:mod:`drift.acoustics`), so they must agree: this script prints the speed of each and the
largest difference between them. tests/new_pitch_checks.py loads the reference from here.

Run: python bench/bench_pitch.py
"""

import math
import statistics
import time

import numpy as np

from drift import acoustics, chart, network, pitch, thermal
from drift.climate import bundled_climates
from drift.errors import OutOfRangeError
from drift.instrument import bundled_instruments, load_instrument
from drift.scale import cents

# --------------------------------------------------------------------------------------------
# The reference implementation
# --------------------------------------------------------------------------------------------

REFERENCE_GRID_STEP_OCTAVES = 1.0 / 48.0
REFERENCE_GRID_START_HZ = 20.0
REFERENCE_GRID_BLOCK_HZ = (2500.0, 6000.0, 15000.0)
REFERENCE_REFINE_XRTOL = 1e-7


class ReferenceNetwork:
    """The impedance of one bore state: all frequencies and fingerings through one loop over the
    segments, every fingering from the open end to the input (no sharing, no stacking)."""

    def __init__(self, segments, segment_air, lossless=False, radiation="norris-sheng-1989"):
        self.seg, self.air, self.lossless, self.radiation = segments, segment_air, lossless, radiation
        self.r_mean = 0.5 * (segments.radius_in_m + segments.radius_out_m)
        self.is_cone = np.abs(segments.radius_out_m - segments.radius_in_m) > 1e-9 * self.r_mean
        self.n_holes = len(segments.hole_segment)
        self.hole_air = network.take_segments(segment_air, segments.hole_segment) if self.n_holes else None
        self.holes_at = [[] for _ in range(segments.n)]
        for h, s in enumerate(segments.hole_segment):
            self.holes_at[int(s)].append(h)

    def _matrices(self, f):
        s, air = self.seg, self.air
        col = lambda v: np.asarray(v)[:, None]
        g, zc = acoustics.propagation_zk(f[None, :], col(self.r_mean), col(air.sound_speed), col(air.density),
                                         col(air.viscosity), col(air.conductivity), col(air.cp), col(air.gamma),
                                         lossless=self.lossless)
        a, b, c, d = acoustics.cylinder_matrix(g, zc, col(s.length_m))
        if np.any(self.is_cone):
            i = self.is_cone
            ca, cb, cc, cd = acoustics.cone_matrix(g[i], zc[i], col(s.radius_in_m[i]), col(s.radius_out_m[i]),
                                                   col(s.length_m[i]))
            a, b, c, d = a.copy(), b.copy(), c.copy(), d.copy()
            a[i], b[i], c[i], d[i] = ca, cb, cc, cd
        return a, b, c, d

    def impedance(self, frequency_hz, open_holes=None, paired=False):
        f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
        seg, air = self.seg, self.air
        nh = self.n_holes
        if open_holes is None:
            open_holes = np.ones((1 if not paired else len(f), nh), dtype=bool)
        open_holes = np.asarray(open_holes, dtype=bool)
        a, b, c, d = self._matrices(f)
        last = seg.n - 1
        zr = acoustics.radiation_unflanged(f, seg.radius_out_m[last], air.sound_speed[last], air.density[last],
                                           "levine-schwinger-1948" if self.lossless and self.radiation != "ideal"
                                           else self.radiation)
        if self.lossless:
            zr = 1j * zr.imag
        shape = (len(f),) if paired else (open_holes.shape[0], len(f))
        z = np.broadcast_to(zr, shape).astype(complex)
        if nh:
            zso, zsc, zao, zac = acoustics.hole_impedances(f, seg.hole_radius_m, seg.hole_bore_radius_m,
                                                           seg.hole_chimney_m, self.hole_air, self.lossless)
        for i in range(last, seg.n_cavity - 1, -1):
            z = (a[i] * z + b[i]) / (c[i] * z + d[i])
            for h in self.holes_at[i]:
                is_open = open_holes[:, h] if paired else open_holes[:, h][:, None]
                zs = np.where(is_open, zso[h], zsc[h])
                za = 0.5 * np.where(is_open, zao[h], zac[h])
                with np.errstate(divide="ignore", invalid="ignore"):
                    ys = np.where(np.isinf(zs), 0.0, 1.0 / zs)
                z = za + 1.0 / (ys + 1.0 / (z + za))
        i0 = seg.n_cavity
        rho0, c0 = air.density[i0], air.sound_speed[i0]
        omega = 2.0 * np.pi * f
        if seg.excitation in ("reed", "lips"):
            y_vol = 1j * omega * (seg.added_volume_m3 / (rho0 * c0**2) + seg.reed_compliance_m3_pa)
            return 1.0 / (1.0 / z + y_vol)
        return self._jet(f, z, a, b, c, d)

    def _jet(self, f, z_bore, a, b, c, d):
        seg, air = self.seg, self.air
        i0 = seg.n_cavity
        y = np.zeros(len(f), dtype=complex)
        for i in range(i0):
            y = (c[i] + a[i] * y) / (d[i] + b[i] * y)
        with np.errstate(divide="ignore", invalid="ignore"):
            y_total = y + 1.0 / z_bore
        z_par = 1.0 / y_total
        a_bore = seg.radius_in_m[i0]
        be, te = seg.embouchure_radius_m, seg.embouchure_chimney_m
        ti, tm, _, _ = acoustics.hole_corrections(be, a_bore, te)
        rho, c0 = float(air.density[i0]), float(air.sound_speed[i0])
        omega = 2.0 * np.pi * f
        se = np.pi * be**2
        g, zc = acoustics.propagation_zk(f, be, air.sound_speed[i0], air.density[i0], air.viscosity[i0],
                                         air.conductivity[i0], air.cp[i0], air.gamma[i0], lossless=self.lossless)
        ca, cb, cc, cd = acoustics.cylinder_matrix(g, zc, te + tm)
        load = z_par + 1j * omega * rho * ti / se
        z_hole = (ca * load + cb) / (cc * load + cd)
        to = seg.embouchure_outer_correction_m
        k = omega / c0
        zh = rho * c0 / se
        z_out = zh * (0.25 * (k * be) ** 2 * (0.0 if self.lossless else 1.0) + 1j * k * to)
        return z_hole + z_out


def reference_grid(f_lo, f_hi):
    n = int(math.ceil(math.log2(f_hi / f_lo) / REFERENCE_GRID_STEP_OCTAVES))
    return f_lo * 2.0 ** (REFERENCE_GRID_STEP_OCTAVES * np.arange(n + 1))


def reference_search_resonances(network, open_holes, counts, minima=False):
    """The reference search: 25-cent grid, then Chandrupatla's minimiser on each bracket."""
    open_holes = np.asarray(open_holes, dtype=bool)
    nf = open_holes.shape[0]
    counts = np.asarray(counts, dtype=int)
    sign = 1.0 if minima else -1.0
    brackets = [[] for _ in range(nf)]
    lo = REFERENCE_GRID_START_HZ
    prev_tail = None
    for hi in REFERENCE_GRID_BLOCK_HZ:
        f = reference_grid(lo, hi)
        if lo > REFERENCE_GRID_START_HZ:
            f = np.concatenate([prev_tail, f[1:]])
        val = sign * np.log(np.abs(network.impedance(f, open_holes)))
        inner = (val[:, 1:-1] < val[:, :-2]) & (val[:, 1:-1] <= val[:, 2:])
        for i in range(nf):
            if len(brackets[i]) >= counts[i]:
                continue
            for j in np.nonzero(inner[i])[0]:
                bracket = (f[j], f[j + 1], f[j + 2])
                if not brackets[i] or bracket[1] > brackets[i][-1][1] * (1 + 1e-9):
                    brackets[i].append(bracket)
        if all(len(brackets[i]) >= counts[i] for i in range(nf)):
            break
        prev_tail = f[-2:]
        lo = f[-1]
    rows, x1, x2, x3 = [], [], [], []
    for i in range(nf):
        for bracket in brackets[i][: counts[i]]:
            rows.append(i)
            x1.append(bracket[0]); x2.append(bracket[1]); x3.append(bracket[2])
    out = [np.zeros(0) for _ in range(nf)]
    if not rows:
        return out
    rows = np.asarray(rows)
    refined = reference_refine_extrema(network, open_holes[rows], np.array(x1), np.array(x2), np.array(x3), minima)
    for i in range(nf):
        out[i] = np.sort(refined[rows == i])
    return out


def reference_refine_extrema(network, open_rows, x1, x2, x3, minima=False):
    """Chandrupatla's bracketed minimisation of -log|Z| (or log|Z|), xrtol 1e-7."""
    from scipy.optimize import elementwise

    sign = 1.0 if minima else -1.0
    open_rows = np.asarray(open_rows, dtype=bool)

    def objective(x, rows):
        shape = np.shape(x)
        xs = np.asarray(x, dtype=float).ravel()
        idx = np.broadcast_to(rows, shape).ravel().astype(int)
        z = network.impedance(xs, open_rows[idx], paired=True)
        return (sign * np.log(np.abs(z))).reshape(shape)

    rows = np.arange(len(x1))
    res = elementwise.find_minimum(objective, (x1, x2, x3), args=(rows,),
                                   tolerances=dict(xrtol=REFERENCE_REFINE_XRTOL, xatol=0.0, fatol=0.0, frtol=0.0),
                                   maxiter=200)
    return np.asarray(res.x, dtype=float)


def reference_network(instrument, profile, lossless=False, radiation="norris-sheng-1989"):
    net = pitch.bore_network(instrument, profile, lossless, radiation=radiation)
    return ReferenceNetwork(net.seg, net.air, lossless, radiation)


def reference_resonances(instrument, profile, count, lossless=False, radiation="norris-sheng-1989", minima=None):
    """The first ``count`` resonances [Hz] of every fingering, by the reference search."""
    notes = instrument.fingerings()
    minima = instrument.excitation == "jet" if minima is None else minima
    return reference_search_resonances(reference_network(instrument, profile, lossless, radiation),
                                       instrument.open_mask(notes), [count] * len(notes), minima)


def reference_frequencies(instrument, profile):
    """Playing frequency [Hz] of every fingering, by the reference search."""
    notes = instrument.fingerings()
    found = reference_search_resonances(reference_network(instrument, profile), instrument.open_mask(notes),
                                        [n.register for n in notes], minima=instrument.excitation == "jet")
    return np.array([float(r[n.register - 1]) if len(r) >= n.register else math.nan for n, r in zip(notes, found)])


def reference_joint_change(instrument, profile, reference_hz, drift_cents):
    """The reference joint change [m]: Brent's method on the mean drift, to 1 um."""
    from scipy.optimize import brentq

    free = chart.free_joint(instrument)
    known = {0.0: float(np.nanmean(drift_cents))}

    def mean_drift(delta_m):
        if delta_m not in known:
            known[delta_m] = float(np.nanmean(cents(reference_frequencies(free.with_joint_change(delta_m), profile),
                                                    reference_hz)))
        return known[delta_m]

    start = mean_drift(0.0)
    if start == 0.0:
        return 0.0
    step = math.copysign(max(abs(instrument.length_m * (2 ** (start / 1200) - 1)), 2e-4), start)
    a, fa = 0.0, start
    while True:
        b = max(-chart.SEARCH_LIMIT_M, min(chart.SEARCH_LIMIT_M, a + step))
        try:
            fb = mean_drift(b)
        except OutOfRangeError:
            fb = math.nan
        if math.isfinite(fb) and fb * fa <= 0:
            return float(brentq(mean_drift, min(a, b), max(a, b), xtol=1e-6))
        if not math.isfinite(fb) or abs(b) >= chart.SEARCH_LIMIT_M:
            raise OutOfRangeError(
                f"{instrument.name}: no joint change within ±{chart.SEARCH_LIMIT_M * 1e3:g} mm centres the notes")
        a, fa, step = b, fb, step * 2


def reference_drift_chart(instrument, climates):
    """The reference chart's numbers, climate by climate: frequencies [Hz], joint change [m] (or
    None) and the drift after it [cent]."""
    reference_hz = reference_frequencies(instrument, thermal.climate_profile(instrument, chart.design_climate(instrument)))
    out = []
    for c in climates:
        profile = thermal.climate_profile(instrument, c)
        f = reference_frequencies(instrument, profile)
        drift = cents(f, reference_hz)
        adjust, adjusted = None, drift
        if instrument.tuning is not None:
            try:
                adjust = reference_joint_change(instrument, profile, reference_hz, drift)
                adjusted = cents(reference_frequencies(chart.free_joint(instrument).with_joint_change(adjust), profile),
                                 reference_hz)
            except OutOfRangeError:
                pass
        out.append((f, adjust, adjusted))
    return out


# --------------------------------------------------------------------------------------------
# Measurements
# --------------------------------------------------------------------------------------------


def best_of(function, repeat=7):
    times = []
    for _ in range(repeat):
        start = time.perf_counter()
        function()
        times.append(time.perf_counter() - start)
    return min(times)


def main():
    climates = bundled_climates()
    pitch.note_frequencies(load_instrument("cylindrical-reed"),
                           thermal.climate_profile(load_instrument("cylindrical-reed"), climates[0]))  # loads CoolProp
    print("Full search (all fingerings, one bore state: the design condition; network prebuilt), best of 7,")
    print("and the same for the first fingering alone:")
    print(f"  {'instrument':18s} {'segments':>8s} {'notes':>5s} {'reference':>10s} {'new':>8s} {'speed-up':>8s}"
          f" {'one: ref.':>10s} {'new':>8s}")
    for ins in bundled_instruments():
        profile = thermal.climate_profile(ins, chart.design_climate(ins))
        net = pitch.bore_network(ins, profile)
        old_net = ReferenceNetwork(net.seg, net.air)
        notes = ins.fingerings()
        mask, regs, jet = ins.open_mask(notes), [n.register for n in notes], ins.excitation == "jet"
        t_old = best_of(lambda: reference_search_resonances(old_net, mask, regs, jet))
        t_new = best_of(lambda: pitch.search_resonances(net, mask, regs, jet))
        one_old = best_of(lambda: reference_search_resonances(old_net, mask[:1], regs[:1], jet))
        one_new = best_of(lambda: pitch.search_resonances(net, mask[:1], regs[:1], jet))
        print(f"  {ins.name:18s} {net.seg.n:8d} {len(notes):5d} {t_old * 1e3:7.1f} ms {t_new * 1e3:5.1f} ms "
              f"{t_old / t_new:7.1f}x {one_old * 1e3:7.1f} ms {one_new * 1e3:5.1f} ms")

    print("Every note of every bundled instrument, in every bundled climate and the design condition:")
    worst, where, n_notes, t_old, t_new = 0.0, "", 0, 0.0, 0.0
    for ins in bundled_instruments():
        states = [chart.design_climate(ins), *climates]
        profiles = [thermal.climate_profile(ins, c) for c in states]
        for p in profiles:
            p.sampled_air  # the CoolProp states, outside the timing
        start = time.perf_counter()
        old = [reference_frequencies(ins, p) for p in profiles]
        t_old += time.perf_counter() - start
        start = time.perf_counter()
        new = pitch.state_frequencies([ins] * len(profiles), profiles)
        t_new += time.perf_counter() - start
        for c, a, b in zip(states, new, old):
            if not np.array_equal(np.isnan(a), np.isnan(b)):
                raise SystemExit(f"{ins.name}, {c.name}: the searches disagree on which registers are in reach")
            d = np.abs(cents(a, b))
            n_notes += int(np.sum(np.isfinite(d)))
            if np.nanmax(d) > worst:
                worst, where = float(np.nanmax(d)), f"{ins.name}, {c.name}"
    print(f"  {n_notes} notes: largest difference new - reference {worst:.5f} cent ({where})")
    print(f"  all of them: reference {t_old:.2f} s (one search per state), new {t_new:.2f} s "
          f"(states stacked per instrument), {t_old / t_new:.1f}x")

    ins = load_instrument("cylindrical-reed")
    print(f"drift_chart({ins.name}, {len(climates)} bundled climates), in process, CoolProp loaded, "
          "median of 3:")
    chart.drift_chart(ins, climates)  # every CoolProp state of the chart, cached from here on
    t_ref = statistics.median(best_of(lambda: reference_drift_chart(ins, climates), 1) for _ in range(3))
    t_cur = statistics.median(best_of(lambda: chart.drift_chart(ins, climates), 1) for _ in range(3))
    print(f"  before (reference) {t_ref:.2f} s, after {t_cur:.2f} s, {t_ref / t_cur:.1f}x")
    print("Charts of every bundled instrument over every bundled climate, new against reference:")
    for ins in bundled_instruments():
        ref = reference_drift_chart(ins, climates)
        cur = chart.drift_chart(ins, climates)
        if any((s.adjust_m is None) != (r[1] is None) for s, r in zip(cur.summary, ref)):
            raise SystemExit(f"{ins.name}: the charts disagree on where the joint can centre the notes")
        frequency = max(np.nanmax(np.abs(cents([row.frequency_hz for row in cur.rows if row.climate == c.name], r[0])))
                        for c, r in zip(climates, ref))
        joint = max((abs(s.adjust_m - r[1]) for s, r in zip(cur.summary, ref) if s.adjust_m is not None), default=0.0)
        adjusted = max(np.nanmax(np.abs(np.array(s.adjusted_drift_cents) - r[2])) for s, r in zip(cur.summary, ref))
        print(f"  {ins.name:18s} notes {frequency:.5f} cent, joint change {joint * 1e6:.2f} um, "
              f"drift after the change {adjusted:.4f} cent (largest differences)")


if __name__ == "__main__":
    main()
