"""Where the resonances of a bore network lie: the extrema of its input impedance, found and refined.

:func:`search_resonances` finds the first resonances of every fingering of a
:class:`drift.network.Network` (one bore state or several stacked): the extrema of |Z_in| are
bracketed on a 25-cent logarithmic grid that reaches only as far as the registers asked for need,
and refined by successive complex quadratic interpolation to within 0.0004 cent
(:func:`refine_extrema`), all fingerings and states at once. :func:`track_resonances` refines
resonances known to lie near given frequencies without the grid. :mod:`drift.pitch` turns them
into playing frequencies.

References
----------
Brent, R. P. (1973). Algorithms for Minimization without Derivatives. Prentice-Hall.
"""

from __future__ import annotations

import math

import numpy as np

from drift.network import Network

# --------------------------------------------------------------------------------------------
# Resonance search
# --------------------------------------------------------------------------------------------

#: The grid: 1/48 octave (25 cent) steps on the lattice 20 Hz * 2^(k/48), k = 0, 1, ..., up to
#: 15 kHz at most. Its extent is set by the bore and the registers asked for (see
#: :func:`search_resonances`); its points are those of every earlier version of the search, so
#: the same extrema are bracketed and the registers numbered alike.
GRID_STEP_OCTAVES = 1.0 / 48.0
GRID_START_HZ = 20.0
GRID_LIMIT_HZ = 15000.0
#: The first block of the grid reaches this times the highest register asked times c/2L: register
#: n of an air column down to half the bore's length (the span of a register's fingerings)
#: lies below 2n c/2L, for odd (closed cylinder) and all harmonics (cone, open pipe) alike.
GRID_FIRST_SPACINGS = 2
#: The lattice starts below 20 Hz when a quarter of c/2L is lower: the lowest resonance of a
#: closed-open bore is c/4L, half the spacing, and an added volume at the input lowers it further.
GRID_LOWEST_SPACING = 0.25
#: Relative tolerance of the refinement: the refined extremum is confirmed between points 1e-7 of
#: the frequency (0.0002 cent) to either side (see :func:`refine_extrema`).
REFINE_XRTOL = 1e-7
#: A model step this many tolerances long or shorter is evaluated with its two neighbours -+ tol.
REFINE_CONFIRM = 30.0
#: Refinement steps before giving up on a bracket (never reached by the bundled instruments).
REFINE_MAX_STEPS = 60
_GOLDEN = 0.3819660112501051


def _objective(z, minima):
    """W = Z (dips) or 1/Z (peaks): the extremum sought is the minimum of |W| on the real axis."""
    with np.errstate(divide="ignore", invalid="ignore"):
        return z if minima else 1.0 / z


def search_resonances(network: Network, open_holes, counts, minima: bool = False) -> list:
    """The first resonances [Hz] of each fingering of a :class:`drift.network.Network`.

    Parameters
    ----------
    network : drift.network.Network
        One bore state, or several (:meth:`drift.network.Network.stack`) searched together.
    open_holes : bool array (F, H)
    counts : sequence of int (F,)
        How many resonances to find for each fingering.
    minima : bool
        Find minima of |Z| (jet) instead of maxima (reed, lips).

    Returns
    -------
    list of F arrays, ascending [Hz]; shorter than asked when the search range (up to 15 kHz)
    holds fewer resonances. For a stacked network, a list of such lists, one per state.

    Notes
    -----
    Coarse to fine. |Z| is sampled on the 25-cent lattice 20 Hz * 2^(k/48)
    (:data:`GRID_STEP_OCTAVES`), first up to 2n c/2L for the highest register n asked (c/2L from
    :meth:`drift.network.Network.resonance_spacing_hz`: the whole bore with the input's added
    volume, at its lowest speed of sound), then an octave at a time, only for the fingerings
    still short of resonances, up to 15 kHz; every state and fingering in one impedance
    evaluation per block. Every interior local extremum of the samples (lower than the sample
    below, not higher than the one above) gives a three-point bracket holding an extremum of the
    smooth |Z|; resonances are numbered in order of frequency. The samples are those of the
    earlier fixed 20 Hz - 2.5 kHz sweep, so the same extrema are bracketed: a coarser grid (steps
    of a fraction of c/2L) misses pairs of extrema closer than its step, which cross fingerings,
    small holes and mouthpieces make, and would number the registers differently. Each bracket is
    then refined by :func:`refine_extrema`, all fingerings and states at once.
    """
    b = network.n_states
    rows = np.asarray(open_holes, dtype=bool)
    counts = np.broadcast_to(np.asarray(counts, dtype=int), (len(rows),))
    last = math.ceil(math.log2(GRID_LIMIT_HZ / GRID_START_HZ) / GRID_STEP_OCTAVES)   # lattice index
    spacing = network.resonance_spacing_hz()
    top = GRID_FIRST_SPACINGS * int(counts.max(initial=0)) * float(spacing.max())
    # a bore so long that its lowest resonance may fall below 20 Hz: the lattice reaches down to
    # GRID_LOWEST_SPACING c/2L (the same points below 20 Hz; nothing changes above)
    lowest = GRID_LOWEST_SPACING * float(spacing.min())
    first = min(0, math.floor(math.log2(lowest / GRID_START_HZ) / GRID_STEP_OCTAVES))
    end = min(last, max(2, math.ceil(math.log2(max(top, GRID_START_HZ) / GRID_START_HZ) / GRID_STEP_OCTAVES)))
    found = [[[] for _ in rows] for _ in range(b)]
    short = np.broadcast_to(counts > 0, (b, len(rows))).copy()
    start = first
    while short.any():
        f = GRID_START_HZ * 2.0 ** (GRID_STEP_OCTAVES * np.arange(start, end + 1))
        todo = np.nonzero(short.any(axis=0))[0]
        z = network.impedance(f, rows[todo]) if network.batched else network.impedance(f, rows[todo])[None]
        w = _objective(z, minima)                                             # (B, F', N)
        g = np.abs(w) ** 2
        inner = (g[..., 1:-1] < g[..., :-2]) & (g[..., 1:-1] <= g[..., 2:]) & short[:, todo, None]
        for s, k, i in zip(*np.nonzero(inner)):
            j = todo[k]
            if len(found[s][j]) < counts[j]:
                found[s][j].append((s, j, f[i:i + 3], w[s, k, i:i + 3]))
        short = np.array([[len(found[s][j]) < counts[j] for j in range(len(rows))] for s in range(b)])
        if end >= last:
            break
        # next block: one octave more, the last two points again (so no centre is missed)
        start, end = end - 1, min(last, end + round(1.0 / GRID_STEP_OCTAVES))
    brackets = [x for per_state in found for per_note in per_state for x in per_note]
    out = [[np.zeros(0) for _ in rows] for _ in range(b)]
    if brackets:
        state = np.array([x[0] for x in brackets])
        note = np.array([x[1] for x in brackets])
        refined = _refine(network, state, rows[note], np.array([x[2] for x in brackets]),
                          np.array([x[3] for x in brackets]), minima)
        for s in range(b):
            for j in range(len(rows)):
                out[s][j] = np.sort(refined[(state == s) & (note == j)])
    return out if network.batched else out[0]


def refine_extrema(network: Network, open_rows, x1, x2, x3, minima: bool = False,
                   state=None) -> np.ndarray:
    """Refine extrema of |Z| [Hz] inside brackets x1 < x2 < x3 (one fingering row per bracket).

    Parameters
    ----------
    network : drift.network.Network
    open_rows : bool array (K, H)
        The fingering of each bracket.
    x1, x2, x3 : arrays (K,) [Hz]
        Brackets: |Z| at x2 above (maxima) or below (minima) its values at x1 and x3.
    minima : bool
        Refine minima of |Z| (jet) instead of maxima.
    state : int array (K,), optional
        The bore state of each bracket in a stacked network (default 0).

    Returns
    -------
    ndarray (K,) [Hz]

    Notes
    -----
    Successive complex quadratic interpolation, safeguarded and confirmed. Near a resonance
    W = 1/Z (a peak of |Z|) or W = Z (a dip) is a smooth complex function of frequency whose
    nearest poles are the neighbouring dips (peaks), so the quadratic q through three of its
    complex values approximates it with an error of third order in the distances between them.
    Each step takes the minimum of |q(f)|^2 on the real axis (Newton's method on
    Re(conj(q) q') = 0, started from the minimum of the linear part), evaluates W there and drops
    the worst of the three points (the interpolation of Muller's method: the points approach the
    extremum superlinearly). A bracket lo < mid < hi with |W(mid)| lowest is kept up to date; a
    step that would leave it, or is not shorter than half the step before last, is replaced by a
    golden-section step into its larger side (the safeguard of Brent 1973, Ch. 5). Once a
    step is within 30 tolerances tol = :data:`REFINE_XRTOL` f (1e-7 of the frequency, 0.0002
    cent), W is evaluated at it and at -+ tol around it; when the bracket has shrunk to 2.5 tol,
    an extremum of |Z| is certain to lie in it, and the result is the quadratic's minimum there
    (else its best point): at most 2.5e-7 of the frequency (0.0004 cent) from the extremum, in
    practice far less. A small model step alone is not trusted: with distant points the
    quadratic can be stationary away from the extremum. The bundled instruments take 4 to 5
    evaluations per bracket after the grid, in 3 to 4 rounds; all brackets advance together,
    one impedance evaluation per round.
    """
    x = np.stack([np.asarray(v, dtype=float) for v in (x1, x2, x3)], axis=1)
    rows = np.asarray(open_rows, dtype=bool)
    state = np.zeros(len(x), dtype=int) if state is None else np.asarray(state, dtype=int)
    z = network.impedance(x.ravel(), np.repeat(rows, 3, axis=0), paired=True,
                          state=None if network.n_states == 1 else np.repeat(state, 3))
    return _refine(network, state, rows, x, _objective(z, minima).reshape(x.shape), minima)


def _quadratic_minimum(p, w):
    """Offset t [Hz] from p[:, 0] of the minimum over real t of |q(t)|^2, q the complex quadratic
    through (p[:, i], w[:, i]), i = 0..2."""
    d01 = (w[:, 1] - w[:, 0]) / (p[:, 1] - p[:, 0])
    d02 = (w[:, 2] - w[:, 0]) / (p[:, 2] - p[:, 0])
    w2 = (d02 - d01) / (p[:, 2] - p[:, 1])
    w1 = d01 - w2 * (p[:, 1] - p[:, 0])
    w0 = w[:, 0]
    t = -(w0.conjugate() * w1).real / np.abs(w1) ** 2
    for _ in range(4):
        q = w0 + t * (w1 + t * w2)
        dq = w1 + 2.0 * t * w2
        slope = (q.conjugate() * dq).real
        curve = np.abs(dq) ** 2 + 2.0 * (q.conjugate() * w2).real
        t = np.where(curve > 0, t - slope / curve, t)
    return t


def _refine(network, state, rows, x, w, minima):
    """Refine brackets x (K, 3) [Hz] with W values w (K, 3) (see :func:`refine_extrema`)."""
    with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
        return _refine_steps(network, state, rows, x, w, minima)


def _refine_steps(network, state, rows, x, w, minima):
    g = np.abs(w) ** 2
    lo, mid, hi = x[:, 0].copy(), x[:, 1].copy(), x[:, 2].copy()
    glo, gmid, ghi = g[:, 0].copy(), g[:, 1].copy(), g[:, 2].copy()
    pts, vals, gp = x.copy(), w.copy(), g.copy()     # the model's three points
    out = mid.copy()
    live = np.arange(len(x))
    last, before = hi - lo, hi - lo                  # the last two step lengths (Brent's safeguard)
    for _ in range(REFINE_MAX_STEPS):
        tol = REFINE_XRTOL * mid[live]
        done = hi[live] - lo[live] <= 2.5 * tol
        order = np.argsort(gp[live], axis=1)
        p = np.take_along_axis(pts[live], order, axis=1)
        t = _quadratic_minimum(p, np.take_along_axis(vals[live], order, axis=1))
        new = p[:, 0] + t
        a, m, c = lo[live], mid[live], hi[live]
        inside = np.isfinite(new) & (new > a) & (new < c)
        out[live[done]] = np.where(inside, new, m)[done]
        keep = ~done
        live, new, inside, tol, t, a, m, c = (v[keep] for v in (live, new, inside, tol, t, a, m, c))
        if not live.size:
            break
        # a model step, with the two points -+ tol around it once it is small (to confirm the
        # extremum between them); a golden-section step into the larger side when it leaves the
        # bracket or is not shorter than half the step before last (Brent 1973, Ch. 5)
        inside &= np.abs(t) < 0.5 * before[live]
        right = (c - m) > (m - a)
        golden = np.where(right, m + _GOLDEN * (c - m), m - _GOLDEN * (m - a))
        step = np.where(inside, new, golden)
        before[live] = np.where(inside, last[live], np.maximum(c - m, m - a))
        last[live] = np.abs(step - m)
        confirm = inside & (np.abs(t) <= REFINE_CONFIRM * tol) & (new - tol > a) & (new + tol < c)
        which = np.concatenate([live, live[confirm], live[confirm]])
        trial = np.concatenate([step, (new - tol)[confirm], (new + tol)[confirm]])
        z = network.impedance(trial, rows[which], paired=True,
                              state=None if network.n_states == 1 else state[which])
        wn = _objective(z, minima)
        gn = np.abs(wn) ** 2
        n = len(live)
        for part in (slice(0, n), slice(n, n + confirm.sum()), slice(n + confirm.sum(), None)):
            # the new points, at most one per bracket in each part: the bracket kept around the
            # best point, and the new point in place of the model's worst
            r, xn, zn, gv = which[part], trial[part], wn[part], gn[part]
            better, left = gv < gmid[r], xn < mid[r]
            i = better & left
            hi[r[i]], ghi[r[i]] = mid[r[i]], gmid[r[i]]
            i = better & ~left
            lo[r[i]], glo[r[i]] = mid[r[i]], gmid[r[i]]
            mid[r[better]], gmid[r[better]] = xn[better], gv[better]
            i = ~better & left
            lo[r[i]], glo[r[i]] = xn[i], gv[i]
            i = ~better & ~left
            hi[r[i]], ghi[r[i]] = xn[i], gv[i]
            worst = np.argmax(gp[r], axis=1)
            pts[r, worst], vals[r, worst], gp[r, worst] = xn, zn, gv
    out[live] = mid[live]
    return out


#: Half-width of the window :func:`track_resonances` samples around each known frequency, in
#: lattice steps of :data:`GRID_STEP_OCTAVES` (6: 150 cents to either side).
TRACK_STEPS = 6


def track_resonances(network: Network, open_rows, near_hz, minima: bool = False, state=None) -> np.ndarray:
    """The resonance [Hz] of each fingering row that lies near a known frequency, without the grid.

    Parameters
    ----------
    network : drift.network.Network
        One bore state or several stacked.
    open_rows : bool array (K, H)
        The fingering of each query.
    near_hz : array (K,) [Hz]
        Where each resonance is expected: the same register found by :func:`search_resonances`
        in a nearby state of the same bore (the same instrument warmer or cooler).
    minima : bool
        Minima of |Z| (jet) instead of maxima.
    state : int array (K,), optional
        The bore state of each query in a stacked network (default 0).

    Returns
    -------
    ndarray (K,) [Hz]; NaN where the window does not hold exactly one extremum (the caller then
    searches in full).

    Notes
    -----
    |Z| is sampled at the :data:`TRACK_STEPS` points of the search's own lattice
    20 Hz * 2^(k/48) to either side of the lattice point nearest ``near_hz`` (150 cents each way,
    more than a bore's pitch moves between the states it is used for), and where the samples hold
    exactly one interior extremum it is refined from its three-point bracket by
    :func:`refine_extrema`'s steps. A full search brackets that extremum with the same lattice
    points, so the two agree to the refinement's tolerance (0.0004 cent); the register is the
    one of ``near_hz``, kept as long as no other extremum comes within the window.
    """
    near = np.asarray(near_hz, dtype=float)
    rows = np.asarray(open_rows, dtype=bool)
    state = np.zeros(len(near), dtype=int) if state is None else np.asarray(state, dtype=int)
    out = np.full(len(near), np.nan)
    ok = np.isfinite(near) & (near > 0)
    if not np.any(ok):
        return out
    centre = np.round(np.log2(near[ok] / GRID_START_HZ) / GRID_STEP_OCTAVES)
    k = centre[:, None] + np.arange(-TRACK_STEPS, TRACK_STEPS + 1)[None, :]
    f = GRID_START_HZ * 2.0 ** (GRID_STEP_OCTAVES * k)
    width = f.shape[1]
    rows_ok, state_ok = rows[ok], state[ok]
    z = network.impedance(f.ravel(), np.repeat(rows_ok, width, axis=0), paired=True,
                          state=None if network.n_states == 1 else np.repeat(state_ok, width))
    w = _objective(z, minima).reshape(f.shape)
    g = np.abs(w) ** 2
    inner = (g[:, 1:-1] < g[:, :-2]) & (g[:, 1:-1] <= g[:, 2:])
    single = np.flatnonzero(inner.sum(axis=1) == 1)
    if single.size:
        i = np.argmax(inner[single], axis=1)
        take = i[:, None] + np.arange(3)[None, :]
        x = np.take_along_axis(f[single], take, axis=1)
        wb = np.take_along_axis(w[single], take, axis=1)
        found = _refine(network, state_ok[single], rows_ok[single], x, wb, minima)
        out[np.flatnonzero(ok)[single]] = found
    return out
