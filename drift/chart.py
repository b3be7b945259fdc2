"""The drift chart: every note of an instrument across climates, and the tuning-joint setting.

For each climate: the thermal state of the bore (steady, or after ``minutes_played``), the air
along the bore, the playing frequency of every note; then the drift of each note against a
reference condition, its offset from equal temperament, and per climate the joint change that
brings the mean drift to zero (found by recomputing the notes with the changed bore, not by a
linear estimate), the spread left after it and the notes still beyond the tolerance.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

from drift import pitch, thermal
from drift.climate import Climate, Player
from drift.constants import A4_HZ, TOLERANCE_CENTS
from drift.errors import DriftError, OutOfRangeError
from drift.instrument import Instrument
from drift.scale import cents, equal_temperament_hz
#: Largest joint change the solver searches [m], either way; beyond the joint's own limits the
#: result is reported with a warning.
SEARCH_LIMIT_M = 0.06


@dataclass(frozen=True)
class DriftRow:
    """One note in one climate: frequency [Hz], drift against the reference [cent], offset from
    equal temperament at the chart's A4 [cent]."""

    note: str
    register: int
    climate: str
    frequency_hz: float
    drift_cents: float
    offset_from_equal_cents: float


@dataclass(frozen=True)
class ClimateSummary:
    """The drift of all notes in one climate and the joint setting that centres it.

    Drifts in cents; ``adjust_m`` [m] > 0 pulls the joint out (adds length), < 0 pushes it in;
    None when the instrument has no tuning joint. ``residual_spread_cents`` and
    ``out_of_tolerance`` are after that change. ``warning`` says when the change exceeds what the
    joint allows.
    """

    climate: str
    mean_drift_cents: float
    min_drift_cents: float
    max_drift_cents: float
    spread_cents: float
    adjust_m: float | None
    residual_spread_cents: float
    out_of_tolerance: list[str]
    adjusted_drift_cents: list[float]
    warning: str | None = None


@dataclass(frozen=True)
class Chart:
    """The drift chart of one instrument: a :class:`DriftRow` per note and climate, a
    :class:`ClimateSummary` per climate, and the chart's settings (A4 [Hz], reference climate,
    tolerance [cent])."""

    instrument: str
    a4_hz: float
    reference: str
    tolerance_cents: float
    climates: list[str]
    notes: list[str]
    rows: list[DriftRow]
    summary: list[ClimateSummary]


def design_climate(instrument: Instrument) -> Climate:
    """The instrument's ``[design]`` condition as a climate named "design"."""
    d = instrument.design
    return Climate("design", d.room(), Player(playing=d.playing),
                   description=f"design condition of {instrument.name}")


def frequencies(instrument: Instrument, profile: thermal.BoreProfile) -> np.ndarray:
    """Playing frequency [Hz] of every note of the instrument with the bore air of ``profile``."""
    return np.array([n.frequency_hz for n in pitch.note_frequencies(instrument, profile)])


def _free_joint(instrument: Instrument) -> Instrument:
    """The instrument with its joint free to move over the whole search range."""
    return dataclasses.replace(instrument, tuning=dataclasses.replace(
        instrument.tuning, min_change_m=-SEARCH_LIMIT_M, max_change_m=SEARCH_LIMIT_M))


def joint_change(instrument: Instrument, profile: thermal.BoreProfile, reference_hz: np.ndarray,
                 drift_cents: np.ndarray | None = None) -> float:
    """The joint change [m] that brings the mean drift of all notes against ``reference_hz`` to zero.

    Solved with Brent's method (scipy.optimize.brentq) on the mean drift of the instrument with
    the changed bore (:meth:`drift.instrument.Instrument.with_joint_change`), recomputed at every step,
    within +-:data:`SEARCH_LIMIT_M`. The bore's temperature profile is held as computed for the
    unchanged instrument: a few millimetres of tube more or less move the profile negligibly.
    ``drift_cents``, the notes' drift with the joint unchanged, saves recomputing it when known.
    Raises :class:`OutOfRangeError` when no change within the search range centres the notes.
    """
    from scipy.optimize import brentq

    free = _free_joint(instrument)

    known = {} if drift_cents is None else {0.0: float(np.nanmean(drift_cents))}

    def mean_drift(delta_m):
        # Brent's method asks again for the bracket ends found below: serve them from ``known``.
        if delta_m not in known:
            f = frequencies(free.with_joint_change(delta_m), profile)
            known[delta_m] = float(np.nanmean(cents(f, reference_hz)))
        return known[delta_m]

    start = mean_drift(0.0)
    if start == 0.0:
        return 0.0
    # A first step from the length of the bore (pitch ~ 1/L), then widen until the sign changes.
    step = math.copysign(max(abs(instrument.length_m * (2 ** (start / 1200) - 1)), 2e-4), start)
    a, fa = 0.0, start
    while True:
        b = max(-SEARCH_LIMIT_M, min(SEARCH_LIMIT_M, a + step))
        try:
            fb = mean_drift(b)
        except OutOfRangeError:
            fb = math.nan
        if math.isfinite(fb) and fb * fa <= 0:
            return float(brentq(mean_drift, min(a, b), max(a, b), xtol=1e-6))
        if not math.isfinite(fb) or abs(b) >= SEARCH_LIMIT_M:
            raise OutOfRangeError(
                f"{instrument.name}: no joint change within ±{SEARCH_LIMIT_M * 1e3:g} mm centres the notes"
            )
        a, fa, step = b, fb, step * 2


def _summary(instrument: Instrument, climate: Climate, profile, drift, reference_hz, names, tolerance) -> ClimateSummary:
    warning = None
    adjust_m = None
    adjusted = drift
    if instrument.tuning is None:
        warning = "the instrument has no tuning joint; the drift stands as shown"
    else:
        try:
            adjust_m = joint_change(instrument, profile, reference_hz, drift)
        except OutOfRangeError as error:
            warning = str(error)
        if adjust_m is not None:
            adjusted = cents(frequencies(_free_joint(instrument).with_joint_change(adjust_m), profile),
                              reference_hz)
            t = instrument.tuning
            if not t.min_change_m <= adjust_m <= t.max_change_m:
                warning = (f"the needed change of {adjust_m * 1e3:+.1f} mm exceeds what the joint allows "
                           f"({t.min_change_m * 1e3:+.1f} to {t.max_change_m * 1e3:+.1f} mm)")
    return ClimateSummary(
        climate=climate.name,
        mean_drift_cents=float(np.nanmean(drift)),
        min_drift_cents=float(np.nanmin(drift)),
        max_drift_cents=float(np.nanmax(drift)),
        spread_cents=float(np.nanmax(drift) - np.nanmin(drift)),
        adjust_m=adjust_m,
        residual_spread_cents=float(np.nanmax(adjusted) - np.nanmin(adjusted)),
        out_of_tolerance=[n for n, d in zip(names, adjusted) if not abs(d) <= tolerance],
        adjusted_drift_cents=[float(d) for d in adjusted],
        warning=warning,
    )


def drift_chart(instrument: Instrument, climates: list[Climate], reference: Climate | None = None,
                a4_hz: float = A4_HZ, tolerance_cents: float = TOLERANCE_CENTS, progress=None) -> Chart:
    """Compute the drift chart of ``instrument`` over ``climates``.

    Parameters
    ----------
    instrument : drift.instrument.Instrument
    climates : list of Climate
    reference : Climate, optional
        The condition drift is measured from (default: :func:`design_climate`).
    a4_hz : float
        Reference pitch for the offset from equal temperament [Hz].
    tolerance_cents : float
        Notes whose drift after the joint change exceeds this [cent] are listed.
    progress : callable, optional
        Called with no argument after each climate is done (and once for the reference).

    Returns
    -------
    Chart
        A :class:`DriftRow` per note and climate (frequency [Hz], drift against the reference
        and offset from equal temperament [cent]) and a :class:`ClimateSummary` per climate
        (mean, spread, the joint change [m] that centres the mean, what stays out of tune).

    Raises
    ------
    drift.errors.DriftError
        When the instrument file names no notes.

    Notes
    -----
    Each climate's bore state comes from :func:`drift.thermal.climate_profile`, each note's
    frequency from :func:`drift.pitch.note_frequencies`; the joint change from
    :func:`joint_change`.

    Examples
    --------
    >>> from drift import drift_chart, load_climate, load_instrument
    >>> chart = drift_chart(load_instrument("cylindrical-reed"), [load_climate("sunny-lawn")])
    >>> chart.summary[0].mean_drift_cents > 0
    True
    """
    if not instrument.notes:
        raise DriftError(f"{instrument.name}: the instrument file has no [[note]]; a chart needs named notes")
    reference = reference or design_climate(instrument)
    names = [n.name for n in instrument.notes]
    equal = np.array([equal_temperament_hz(n, a4_hz) for n in names])
    reference_hz = frequencies(instrument, thermal.climate_profile(instrument, reference))
    if progress:
        progress()
    rows, summary = [], []
    for c in climates:
        profile = thermal.climate_profile(instrument, c)
        f = frequencies(instrument, profile)
        drift = cents(f, reference_hz)
        offset = cents(f, equal)
        for note, value, d, o in zip(instrument.notes, f, drift, offset):
            rows.append(DriftRow(note.name, note.register, c.name, float(value), float(d), float(o)))
        summary.append(_summary(instrument, c, profile, drift, reference_hz, names, tolerance_cents))
        if progress:
            progress()
    return Chart(instrument.name, a4_hz, reference.name, tolerance_cents, [c.name for c in climates],
                 names, rows, summary)
