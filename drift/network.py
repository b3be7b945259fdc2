"""The input impedance of a whole bore: its segments and holes chained as 2x2 transfer matrices.

Every segment is a matrix [p_in, U_in] = [[A, B], [C, D]] [p_out, U_out] (lossy cylinders and
cones, :mod:`drift.acoustics`); a load impedance Z_out seen through a segment becomes
Z_in = (A Z_out + B) / (C Z_out + D). Side holes are T-networks (two half series impedances and a
shunt, :func:`drift.acoustics.hole_impedances`) at segment junctions; the open end radiates as an
unflanged pipe; the input end is a reed's compliance and cavity, a lip mouthpiece's cup, or a
flute's embouchure hole with the closed cavity behind it. Time convention exp(+j omega t); SI
units throughout.

References: those of :mod:`drift.acoustics`; the chain of matrices as in Chaigne, A., Kergomard,
J. (2016). Acoustics of Musical Instruments. Springer, Ch. 7.
"""

from __future__ import annotations

import bisect
import dataclasses
import types

import numpy as np

from drift.acoustics import (AIR_FIELDS, cone_matrix, cylinder_matrix,
                             hole_corrections, hole_impedances, propagation_zk, radiation_unflanged)


def take_segments(props, index):
    """The per-segment properties (a :class:`drift.air.GasProperties` of arrays) at ``index``."""
    return type(props)(*(np.asarray(getattr(props, f.name))[index] for f in dataclasses.fields(props)))


def _product(p, q):
    """The 2x2 matrix product p q of two (A, B, C, D) tuples of arrays."""
    pa, pb, pc, pd = p
    qa, qb, qc, qd = q
    return pa * qa + pb * qc, pa * qb + pb * qd, pc * qa + pd * qc, pc * qb + pd * qd


class Network:
    """A bore with its air, ready to give its input impedance at any frequencies.

    Build once per geometry and air (:class:`drift.segments.Segments` and a
    :class:`drift.air.GasProperties` of arrays with one entry per segment); then :meth:`impedance`
    evaluates many frequencies and fingerings. :meth:`stack` joins several bore states of one
    topology (the same segments and holes, each state with its own dimensions, for example
    expanded by its own wall temperature, and its own air) into one network whose
    :meth:`impedance` evaluates them all in one pass along the bore.

    Attributes: ``seg`` and ``air``, the first state's Segments and GasProperties; ``n_states``
    (1 unless built by :meth:`stack`); ``batched``, True for a network built by :meth:`stack`
    (:meth:`impedance` then has a leading state axis).
    """

    def __init__(self, segments, segment_air, lossless: bool = False,
                 radiation: str = "norris-sheng-1989"):
        self.lossless, self.radiation, self.batched = lossless, radiation, False
        self._build((segments,), (segment_air,))

    @classmethod
    def stack(cls, networks) -> "Network":
        """One network of the bore states of ``networks`` (same topology, losses and radiation).

        Raises ValueError when the networks differ in topology (:attr:`topology`), losses or
        radiation model.
        """
        networks = list(networks)
        first = networks[0]
        if any((n.lossless, n.radiation) != (first.lossless, first.radiation) for n in networks):
            raise ValueError("stacked networks must share their loss and radiation models")
        net = cls.__new__(cls)
        net.lossless, net.radiation, net.batched = first.lossless, first.radiation, True
        net._build(tuple(s for n in networks for s in n.states_segments),
                   tuple(a for n in networks for a in n.states_air))
        return net

    @property
    def topology(self) -> tuple:
        """What networks must share to be stacked: segment count, cavity, excitation, hole
        segments and which segments are cones."""
        s = self.seg
        return (s.n, s.n_cavity, s.excitation, tuple(int(h) for h in s.hole_segment),
                tuple(bool(c) for c in self.is_cone))

    def _build(self, segments, airs):
        s0 = segments[0]
        self.seg, self.air = s0, airs[0]
        self.states_segments, self.states_air = segments, airs
        self.n_states = len(segments)

        def stack(values):
            return np.array([np.asarray(v, dtype=float) for v in values])

        self._len = stack([s.length_m for s in segments])            # (B, n) [m]
        self._r_in = stack([s.radius_in_m for s in segments])
        self._r_out = stack([s.radius_out_m for s in segments])
        self._r_mean = 0.5 * (self._r_in + self._r_out)
        cone = np.abs(self._r_out - self._r_in) > 1e-9 * self._r_mean
        self.r_mean, self.is_cone = self._r_mean[0], cone[0]
        self._air = {k: stack([getattr(a, k) for a in airs]) for k in AIR_FIELDS}
        hs = np.asarray(s0.hole_segment, dtype=int)
        self.n_holes = len(hs)
        if np.any(cone != cone[0]) or any((s.n, s.n_cavity, s.excitation) != (s0.n, s0.n_cavity, s0.excitation)
                                          or not np.array_equal(s.hole_segment, hs) for s in segments[1:]):
            raise ValueError("stacked bore states must share their segments, holes and cones")
        self._hole = {k: stack([getattr(s, k) for s in segments])
                      for k in ("hole_radius_m", "hole_chimney_m", "hole_bore_radius_m")}
        self._hole_air = {k: v[:, hs] for k, v in self._air.items()}
        self.hole_air = take_segments(airs[0], hs) if self.n_holes else None
        self._volume = stack([s.added_volume_m3 for s in segments])
        self._compliance = stack([s.reed_compliance_m3_pa for s in segments])
        self._emb_radius = stack([s.embouchure_radius_m for s in segments])
        self._emb_chimney = stack([s.embouchure_chimney_m for s in segments])
        self._emb_outer = stack([s.embouchure_outer_correction_m for s in segments])
        # holes sitting at the start of each segment
        self.holes_at = [[] for _ in range(s0.n)]
        for h, s in enumerate(hs):
            self.holes_at[int(s)].append(h)

    def resonance_spacing_hz(self) -> np.ndarray:
        """c / 2L [Hz] per state, the spacing of the resonances of the whole closed bore: L every
        segment plus the input's added volume as bore of the input's cross-section, c the lowest
        speed of sound along the bore (a shorter air column spaces its resonances wider)."""
        i0 = self.seg.n_cavity
        stiffness = self._air["density"][:, i0] * self._air["sound_speed"][:, i0] ** 2
        extra = (self._volume + self._compliance * stiffness) / (np.pi * self._r_in[:, i0] ** 2)
        return self._air["sound_speed"].min(axis=1) / (2.0 * (self._len.sum(axis=1) + extra))

    def _point_matrices(self, state, f):
        """(A, B, C, D) of every segment, each (n, P), for state[p] at frequency f[p]."""
        def col(v):
            return v[state].T

        air = {k: col(v) for k, v in self._air.items()}
        g, zc = propagation_zk(f[None, :], col(self._r_mean), **air, lossless=self.lossless)
        length = col(self._len)
        cone = self.is_cone
        if not np.any(cone):
            return cylinder_matrix(g, zc, length)
        out = [np.empty(g.shape, dtype=complex) for _ in range(4)]
        for where, values in ((~cone, cylinder_matrix(g[~cone], zc[~cone], length[~cone])),
                              (cone, cone_matrix(g[cone], zc[cone], col(self._r_in)[cone], col(self._r_out)[cone],
                                                 length[cone]))):
            for m, v in zip(out, values):
                m[where] = v
        return tuple(out)

    def impedance(self, frequency_hz, open_holes=None, paired: bool = False, state=None):
        """Input impedance [Pa s/m^3] at the input end (reed, lips) or as seen by the jet.

        Parameters
        ----------
        frequency_hz : (N,) [Hz], or (B, N) for a stacked network of B states
        open_holes : bool array (F, H) or None (all open)
            True where a hole is open. With ``paired`` False, every fingering is evaluated at
            every frequency: result (F, N), or (B, F, N) for a stacked network (each state at
            its own row of ``frequency_hz``, or all at one (N,) row). With ``paired`` True, row i
            of ``open_holes`` goes with frequency i: (N, H) -> result (N,).
        state : (N,) int, optional
            With ``paired``: the bore state of each frequency (default 0; required when the
            network holds several states).

        Notes
        -----
        Z is propagated from the radiation load at the open end to the input through every
        segment (Z <- (A Z + B)/(C Z + D)) and every hole (Z <- Za/2 + 1/(1/Zs + 1/(Z + Za/2))).
        Unpaired, with several fingerings, the closed bore above each fingering's first open
        hole is common to them: its matrix product (a closed hole as the matrix [[1 + Za Ys/2,
        Za (1 + Za Ys/4)], [Ys, 1 + Za Ys/2]], Ys = 1/Zs) is formed once per frequency and each
        fingering propagated only up to its first open hole (:meth:`_shared_upper_bore`). All
        states and frequencies go through one loop over the segments. Reed and lips: the
        admittance j omega (V/(rho c^2) + C) in parallel at the input, V the geometric volume
        (mouthpiece cavity, missing cone tip, lip cup) and C the reed's compliance [m^3/Pa]. The
        reed acts as the volume gamma p C of the air at the input (Nederveen 1998, Sec. 9,
        from memory), which with rho c^2 = gamma p (ideal gas) is the admittance j omega C: a
        volume that shrinks with the pressure. Jet: the embouchure hole's chimney (with inner and outer end
        corrections, :func:`hole_impedances`) loads the parallel combination of the stopped
        cavity and the bore, and its outer radiation impedance is in series; the minima of this
        impedance are the jet's resonances (Fletcher & Rossing 1998 [9], Sec. 16.3).
        """
        nh = self.n_holes
        if paired:
            f = np.atleast_1d(np.asarray(frequency_hz, dtype=float))
            if state is None and self.n_states > 1:
                raise ValueError("a paired evaluation of several bore states needs their state indices")
            st = np.zeros(f.shape, dtype=int) if state is None else np.broadcast_to(np.asarray(state, dtype=int), f.shape)
            rows = np.ones((len(f), nh), dtype=bool) if open_holes is None else np.asarray(open_holes, dtype=bool)
            if rows.shape != (len(f), nh):
                raise ValueError(f"open_holes must have shape ({len(f)}, {nh})")
            return self._evaluate(st, f, rows, paired=True)
        f = np.asarray(frequency_hz, dtype=float)
        b = self.n_states
        f = np.broadcast_to(f, (b, f.shape[-1])) if self.batched else np.atleast_1d(f)[None, :]
        rows = np.ones((1, nh), dtype=bool) if open_holes is None else np.asarray(open_holes, dtype=bool)
        if rows.ndim != 2 or rows.shape[1] != nh:
            raise ValueError(f"open_holes must have shape (F, {nh})")
        n = f.shape[1]
        z = self._evaluate(np.repeat(np.arange(f.shape[0]), n), f.ravel(), rows, paired=False)
        return z.reshape(len(rows), f.shape[0], n).transpose(1, 0, 2) if self.batched else z

    def _evaluate(self, st, f, rows, paired):
        if not paired and len(rows) == 1:        # one fingering: nothing to share
            return self._evaluate(st, f, np.broadcast_to(rows, (len(f), self.n_holes)), True)[None]
        seg = self.seg
        last, n_cav = seg.n - 1, seg.n_cavity
        a, b, c, d = self._point_matrices(st, f)
        air = self._air
        zr = radiation_unflanged(f, self._r_out[st, last], air["sound_speed"][st, last], air["density"][st, last],
                                 "levine-schwinger-1948" if self.lossless and self.radiation != "ideal"
                                 else self.radiation)
        if self.lossless:
            zr = 1j * zr.imag
        if self.n_holes:
            hole_air = types.SimpleNamespace(**{k: v[st].T for k, v in self._hole_air.items()})
            zso, zsc, zao, zac = hole_impedances(f, self._hole["hole_radius_m"][st].T,
                                                 self._hole["hole_bore_radius_m"][st].T,
                                                 self._hole["hole_chimney_m"][st].T, hole_air, self.lossless)
            zao, zac = 0.5 * zao, 0.5 * zac                  # half series impedances
            with np.errstate(divide="ignore", invalid="ignore"):
                yso, ysc = 1.0 / zso, np.where(np.isinf(zsc), 0.0, 1.0 / zsc)
        if paired:
            if self.n_holes:
                ys, za = np.where(rows.T, yso, ysc), np.where(rows.T, zao, zac)
            z = zr.astype(complex)
            for i in range(last, n_cav - 1, -1):
                z = (a[i] * z + b[i]) / (c[i] * z + d[i])
                for h in self.holes_at[i]:
                    z = za[h] + 1.0 / (ys[h] + 1.0 / (z + za[h]))
        else:
            z = self._shared_upper_bore(rows, f, zr, (a, b, c, d),
                                        (yso, ysc, zao, zac) if self.n_holes else None)
        i0 = n_cav
        rho0, c0 = air["density"][st, i0], air["sound_speed"][st, i0]
        omega = 2.0 * np.pi * f
        if seg.excitation in ("reed", "lips"):
            y_vol = 1j * omega * (self._volume[st] / (rho0 * c0**2) + self._compliance[st])
            return 1.0 / (1.0 / z + y_vol)
        return self._jet(st, f, z, a, b, c, d)

    def _shared_upper_bore(self, rows, f, zr, matrices, holes):
        """Z (F, P) of fingerings ``rows`` (F, H) at frequencies f (P,): each from the open end up
        to its first open hole, then through the closed bore above it as one matrix product,
        formed once per frequency for all fingerings (down to where at least three fingerings
        still use it; the others go on with the propagation of Z)."""
        seg = self.seg
        last, n_cav = seg.n - 1, seg.n_cavity
        a, b, c, d = matrices
        hs = np.asarray(seg.hole_segment, dtype=int)
        first = np.where(rows, hs[None, :], last + 1).min(axis=1) if self.n_holes else np.full(len(rows), last + 1)
        order = np.argsort(first, kind="stable")
        # the shared product reaches segment m: the third-highest first open hole
        m = int(np.sort(first)[-min(3, len(first))])
        first = [max(n_cav, min(int(v), m)) for v in first[order]]
        ordered = rows[order]
        z = np.empty((len(rows), len(f)), dtype=complex)
        z[:] = zr
        for i in range(last, first[0] - 1, -1):
            k = bisect.bisect_right(first, i)      # rows still below their first open hole
            zk = (a[i] * z[:k] + b[i]) / (c[i] * z[:k] + d[i])
            for h in self.holes_at[i]:
                is_open = ordered[:k, h][:, None]
                ys, za = np.where(is_open, holes[0][h], holes[1][h]), np.where(is_open, holes[2][h], holes[3][h])
                zk = za + 1.0 / (ys + 1.0 / (zk + za))
            z[:k] = zk
        product = None
        for i in range(n_cav, first[-1] + 1):
            lo, hi = bisect.bisect_left(first, i), bisect.bisect_right(first, i)
            if hi > lo and product is not None:
                pa, pb, pc, pd = product
                z[lo:hi] = (pa * z[lo:hi] + pb) / (pc * z[lo:hi] + pd)
            if i == first[-1]:
                break
            step = (a[i], b[i], c[i], d[i])
            for h in self.holes_at[i]:                                     # closed
                ys, za = holes[1][h], holes[3][h]
                ah = 1.0 + za * ys
                step = _product((ah, za * (1.0 + ah), ys, ah), step)
            product = step if product is None else _product(product, step)
        return z[np.argsort(order, kind="stable")]

    def _jet(self, st, f, z_bore, a, b, c, d):
        seg, air = self.seg, self._air
        i0 = seg.n_cavity
        # cavity seen from the embouchure: from the stopped end (U = 0) back to the embouchure;
        # a reversed segment swaps A and D.
        y = np.zeros(len(f), dtype=complex)  # admittance at the stopped end
        for i in range(i0):
            # looking from the embouchure side towards position 0 through segment i reversed:
            # Z_in = (D Z + B) / (C Z + A); in admittance form Y_in = (C + A Y) / (D + B Y)
            y = (c[i] + a[i] * y) / (d[i] + b[i] * y)
        with np.errstate(divide="ignore", invalid="ignore"):
            y_total = y + 1.0 / z_bore
        z_par = 1.0 / y_total
        a_bore = self._r_in[st, i0]
        be, te = self._emb_radius[st], self._emb_chimney[st]
        ti, tm, _, _ = hole_corrections(be, a_bore, te)
        props = {k: v[st, i0] for k, v in air.items()}
        rho, c0 = props["density"], props["sound_speed"]
        omega = 2.0 * np.pi * f
        se = np.pi * be**2
        g, zc = propagation_zk(f, be, **props, lossless=self.lossless)
        ca, cb, cc, cd = cylinder_matrix(g, zc, te + tm)
        load = z_par + 1j * omega * rho * ti / se
        z_hole = (ca * load + cb) / (cc * load + cd)
        k = omega / c0
        zh = rho * c0 / se
        z_out = zh * (0.25 * (k * be) ** 2 * (0.0 if self.lossless else 1.0) + 1j * k * self._emb_outer[st])
        return z_hole + z_out
