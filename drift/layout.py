"""Hole layout: placing and sizing side holes so that every fingering plays in tune.

A maker fixes the bore, the input end and the fingerings; :func:`tune_layout` moves and resizes
the holes (and, if asked, lengthens or shortens the bore) by nonlinear least squares
(``scipy.optimize.least_squares``, trust-region reflective with bounds) until the playing
frequency of every note (:func:`drift.pitch.note_frequencies`) matches its equal-tempered target
at the design condition. :func:`place_holes` gives a starting layout one hole at a time. The same
functions retune a layout for another design condition: pass another bore profile.
"""

from __future__ import annotations

import dataclasses
from dataclasses import dataclass

import numpy as np

from drift import pitch, thermal
from drift.bore_state import BoreProfile
from drift.instrument import Instrument
from drift.scale import cents, equal_temperament_hz
from drift.errors import DriftError


@dataclass(frozen=True)
class LayoutResult:
    """Outcome of :func:`tune_layout`.

    Attributes
    ----------
    instrument : drift.instrument.Instrument
        The instrument with the tuned holes (and bore length).
    deviations_cents : ndarray
        Each note's playing frequency relative to its target [cent], in note order.
    success : bool
    message : str
    evaluations : int
        Residual evaluations used.
    """

    instrument: Instrument
    deviations_cents: np.ndarray
    success: bool
    message: str
    evaluations: int

    @property
    def worst_cents(self) -> float:
        """Largest |deviation| [cent]."""
        return float(np.max(np.abs(self.deviations_cents)))


def _profile(instrument: Instrument, profile):
    return thermal.design_profile(instrument) if profile is None else profile


def _deviations_of(instrument: Instrument, frequencies_hz) -> np.ndarray:
    """:func:`deviations` from the notes' frequencies [Hz] (NaN -> +1200 cent)."""
    a4 = instrument.design.a4_hz
    target = np.array([equal_temperament_hz(n.name, a4) for n in instrument.notes])
    dev = cents(np.asarray(frequencies_hz, dtype=float), target)
    return np.where(np.isfinite(dev), dev, 1200.0)


def deviations(instrument: Instrument, profile: BoreProfile | None = None, **kwargs) -> np.ndarray:
    """Deviation [cent] of every named note from equal temperament at the design A4.

    ``profile`` defaults to the design condition (:func:`drift.thermal.design_profile`); NaN
    (a register out of reach) becomes +1200 cent so a solver sees it as badly out of tune.
    """
    res = pitch.note_frequencies(instrument, _profile(instrument, profile), **kwargs)
    dev = np.array([r.deviation_cents if r.deviation_cents is not None else np.nan for r in res])
    return np.where(np.isfinite(dev), dev, 1200.0)


def place_holes(instrument: Instrument, order, profile: BoreProfile | None = None, diameters_m=None,
                search_m=(0.0, None)):
    """Starting layout: place holes one at a time, each tuning the note it first opens.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    order : sequence of (hole name, note index)
        Holes in the order to place them (usually from the open end upwards) and, for each, the
        index of the note (register 1) it tunes: the fingering in which it is the highest open
        hole below the closed ones.
    profile : drift.bore_state.BoreProfile, optional
        Default: the design condition.
    diameters_m : dict, optional
        Diameters to give the holes [m] before placing them.
    search_m : (low, high)
        Positions [m] searched; high defaults to the bore length.

    Notes
    -----
    For each hole, the position where the note's frequency equals its target is found by
    ``scipy.optimize.brentq`` between the next hole placed below it (or the search limit) and
    the search low limit (a hole further up raises the note monotonically).
    """
    from scipy.optimize import brentq

    profile = _profile(instrument, profile)
    holes = {h.name: h for h in instrument.holes}
    if diameters_m:
        holes = {k: dataclasses.replace(h, diameter_m=diameters_m.get(k, h.diameter_m)) for k, h in holes.items()}
    ins = instrument.with_holes(holes[h.name] for h in instrument.holes)
    high = search_m[1] if search_m[1] is not None else instrument.length_m
    limit = high
    for name, note_index in order:
        note = ins.notes[note_index]
        target = equal_temperament_hz(note.name, ins.design.a4_hz)
        h0 = holes[name]

        def miss(x, name=name, note=note, target=target):
            trial = _move(ins, name, position_m=x)
            f = pitch.note_frequencies(trial, profile, notes=[note])[0].frequency_hz
            return cents(f, target)

        lo = search_m[0] + h0.diameter_m
        hi = limit - h0.diameter_m
        a, b = miss(lo), miss(hi)
        if a * b > 0:
            raise DriftError(f"hole {name}: note {note.name} cannot be tuned between {lo * 1e3:.1f} and "
                             f"{hi * 1e3:.1f} mm ({a:+.0f} and {b:+.0f} cent)")
        x = brentq(miss, lo, hi, xtol=1e-6)
        ins = _move(ins, name, position_m=x)
        limit = x
    return ins


def _move(instrument: Instrument, name, position_m=None, diameter_m=None):
    holes = []
    for h in instrument.holes:
        if h.name == name:
            h = dataclasses.replace(h, position_m=h.position_m if position_m is None else position_m,
                                    diameter_m=h.diameter_m if diameter_m is None else diameter_m)
        holes.append(h)
    return instrument.with_holes(holes)


def tune_layout(instrument: Instrument, profile: BoreProfile | None = None, holes=None,
                vary_diameters=True, diameter_bounds_m=None, position_bounds_m=None, length_change_at_m=None,
                length_change_bounds_m=(-0.05, 0.05),
                min_gap_m=2e-3, diameter_weight=0.02, max_nfev=60, verbose=0, progress=None, ftol=1e-8,
                xtol=1e-8, batch_jacobian=False) -> LayoutResult:
    """Tune hole positions and diameters (and the bore length) to equal temperament.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
        Starting layout; every named note is a target (register 1, 2, ... as in the file).
    profile : drift.bore_state.BoreProfile, optional
        Bore air and wall of the design condition (default :func:`drift.thermal.design_profile`).
    holes : sequence of str, optional
        Holes to adjust (default: all).
    vary_diameters : bool
        Adjust diameters as well as positions.
    diameter_bounds_m : (low, high) or dict name -> (low, high), optional
        Diameter limits [m] (default: 0.2 to 0.85 times the local bore diameter).
    position_bounds_m : dict name -> (low, high), optional
        Position limits [m] (default: anywhere along the bore, inside the joint/embouchure).
    length_change_at_m : float, optional
        If given, also insert or remove bore length at this position [m] (within
        ``length_change_bounds_m``), which moves everything below it.
    min_gap_m : float
        Smallest wall left between neighbouring holes [m]; closer holes are penalised.
    diameter_weight : float
        Weight of a regularisation residual pulling each diameter to its starting value, in
        cent per 1 % change: keeps the problem well posed when notes underdetermine sizes.
    max_nfev : int
        Limit on least-squares iterations.
    ftol, xtol : float
        Relative tolerances of ``scipy.optimize.least_squares`` on the cost and the variables.
    progress : callable, optional
        Called with the number of layouts evaluated (1 by default) after each evaluation.
    batch_jacobian : bool
        Compute the finite-difference Jacobian with every perturbed layout searched in one batch
        (:func:`drift.pitch.state_frequencies`; the same differences, about a quarter faster)
        instead of one layout at a time.

    Returns
    -------
    LayoutResult

    Notes
    -----
    Residuals are the notes' deviations from equal temperament [cent]
    (:func:`deviations`), the diameter regularisation, and a penalty of 100 cent per mm of
    overlap below ``min_gap_m``. Minimised by ``scipy.optimize.least_squares`` (method "trf",
    two-point finite-difference Jacobian); variables are in mm.
    """
    from scipy.optimize import least_squares

    profile = _profile(instrument, profile)
    names = list(holes) if holes is not None else list(instrument.hole_names)
    by_name = {h.name: h for h in instrument.holes}
    lo_pos = instrument.input_end.embouchure_position_m if instrument.excitation == "jet" else 0.0
    x0, lb, ub, kinds = [], [], [], []
    for n in names:
        h = by_name[n]
        pb = (position_bounds_m or {}).get(n, (lo_pos + h.diameter_m, instrument.length_m - h.diameter_m))
        x0.append(h.position_m * 1e3); lb.append(pb[0] * 1e3); ub.append(pb[1] * 1e3); kinds.append(("p", n))
        if vary_diameters:
            local = float(instrument.diameter_at(h.position_m))
            if isinstance(diameter_bounds_m, dict):
                db = diameter_bounds_m.get(n, (0.2 * local, 0.85 * local))
            elif diameter_bounds_m is not None:
                db = diameter_bounds_m
            else:
                db = (0.2 * local, 0.85 * local)
            x0.append(h.diameter_m * 1e3); lb.append(db[0] * 1e3); ub.append(db[1] * 1e3); kinds.append(("d", n))
    if length_change_at_m is not None:
        # offset by 100 mm so the relative finite-difference step is not vanishingly small
        x0.append(100.0); lb.append(100.0 + length_change_bounds_m[0] * 1e3)
        ub.append(100.0 + length_change_bounds_m[1] * 1e3)
        kinds.append(("L", None))
    x0 = np.clip(np.array(x0), np.array(lb) + 1e-9, np.array(ub) - 1e-9)
    d0 = {n: by_name[n].diameter_m for n in names}
    count = [0]

    def build(x):
        ins = instrument
        delta = 0.0
        for (kind, n), v in zip(kinds, x):
            if kind == "L":
                delta = (v - 100.0) * 1e-3
        holes_new = []
        values = dict(((k, n), v) for (k, n), v in zip(kinds, x))
        for h in instrument.holes:
            if ("p", h.name) in values:
                h = dataclasses.replace(h, position_m=values[("p", h.name)] * 1e-3)
            if ("d", h.name) in values:
                h = dataclasses.replace(h, diameter_m=values[("d", h.name)] * 1e-3)
            holes_new.append(h)
        ins = ins.with_holes(holes_new)
        if delta:
            ins = ins.with_length_change(length_change_at_m, delta)
        return ins

    def residuals_of(ins, dev):
        reg = [diameter_weight * 100.0 * (h.diameter_m / d0[h.name] - 1.0)
               for h in ins.holes if h.name in d0] if vary_diameters else []
        ordered = sorted(ins.holes, key=lambda h: h.position_m)
        gaps = [max(0.0, min_gap_m - (b.position_m - a.position_m - (a.diameter_m + b.diameter_m) / 2)) * 1e5
                for a, b in zip(ordered[:-1], ordered[1:])]
        return np.concatenate([dev, reg, gaps])

    last = {}            # the last residuals computed, and where
    diff_step = 1e-5     # relative finite-difference step

    def residuals(x):
        count[0] += 1
        ins = build(x)
        dev = deviations(ins, profile)
        if progress is not None:
            progress()
        last.update(x=np.array(x), r=residuals_of(ins, dev))
        return last["r"]

    def batched_jacobian(x):
        # scipy's two-point differences (step diff_step * max(1, |x|), turned back at an upper
        # bound), every perturbed layout searched in one batch
        f0 = last["r"] if "x" in last and np.array_equal(last["x"], x) else residuals(x)
        steps = diff_step * np.maximum(1.0, np.abs(x))
        steps = np.where(x + steps > np.array(ub), -steps, steps)
        trials = [build(x + np.eye(len(x))[i] * steps[i]) for i in range(len(x))]
        found = pitch.state_frequencies(trials, [profile] * len(trials))
        count[0] += len(trials)
        if progress is not None:
            progress(len(trials))
        columns = [(residuals_of(ins, _deviations_of(ins, f)) - f0) / h
                   for ins, f, h in zip(trials, found, steps)]
        return np.array(columns).T

    sol = least_squares(residuals, x0, bounds=(lb, ub), method="trf", diff_step=diff_step,
                        jac=batched_jacobian if batch_jacobian else "2-point",
                        x_scale=1.0, max_nfev=max_nfev, verbose=verbose, ftol=ftol, xtol=xtol)
    tuned = build(sol.x)
    dev = deviations(tuned, profile)
    return LayoutResult(tuned, dev, bool(sol.success), str(sol.message), count[0])
