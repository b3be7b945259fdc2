"""Pictures of results: the chart as a heat map, the warm-up and the fitted warm-up as curves.

Each picture is drawn from the same plain document (boundary units) that :mod:`drift.render`
shows as a table, by one function ``document -> matplotlib Figure``; :func:`write_picture` saves it
as PNG or SVG (by the file's suffix), atomically. matplotlib is the optional ``plot`` extra: it is
imported only here, inside the functions, with the Agg canvas (no window, no global pyplot state).
"""

from __future__ import annotations

import math
import os
from pathlib import Path

from drift.errors import DriftError
from drift.files import write_file

#: Picture formats by file suffix.
FORMATS = {".png": "png", ".svg": "svg"}
#: The line naming the extra when matplotlib is missing.
MISSING = "--plot needs matplotlib, the plot extra: pip install '.[plot]'"
#: Resolution of PNG pictures [dots per inch].
DPI = 120
#: Colour of the rest phases.
REST_COLOUR = "0.88"


class PlotError(DriftError):
    """A picture cannot be made (matplotlib missing, or a file suffix it cannot write)."""


def picture_format(path: str | os.PathLike) -> str:
    """'png' or 'svg' from the suffix of ``path``; else PlotError naming the allowed suffixes."""
    suffix = Path(path).suffix.lower()
    if suffix not in FORMATS:
        raise PlotError(f"--plot {path}: the picture's name must end in .png or .svg")
    return FORMATS[suffix]


def _matplotlib():
    """The matplotlib package; PlotError with :data:`MISSING` without it."""
    try:
        import matplotlib
    except ImportError:
        raise PlotError(MISSING) from None
    return matplotlib


def _figure(width_in: float, height_in: float):
    """A matplotlib Figure on the Agg canvas."""
    _matplotlib()
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    figure = Figure(figsize=(width_in, height_in), layout="constrained")
    FigureCanvasAgg(figure)
    return figure


def write_picture(draw, doc: dict, path: str | os.PathLike) -> None:
    """Draw ``doc`` with ``draw`` (document -> Figure) and save it to ``path`` as PNG or SVG, through
    a temporary file in the same folder (:func:`drift.files.write_file`)."""
    fmt = picture_format(path)
    matplotlib = _matplotlib()
    figure = draw(doc)
    # SVG text stays text (searchable and smaller), drawn by the viewer in the named font.
    with matplotlib.rc_context({"svg.fonttype": "none"}):
        write_file(path, lambda stream: figure.savefig(stream, format=fmt, dpi=DPI))


def _shade_rests(ax, plan: list[dict]) -> None:
    """Grey bands over the rest phases of a plan (``[{"state", "minutes"}]``), labelled once."""
    start, labelled = 0.0, False
    for phase in plan:
        end = start + phase["minutes"]
        if phase["state"] == "rest":
            ax.axvspan(start, end, color=REST_COLOUR, zorder=0, label=None if labelled else "resting")
            labelled = True
        start = end


def chart(doc: dict):
    """The ``drift chart`` document as a heat map: notes (rows, in pitch order, lowest at the
    bottom) by climates (columns), drift in cents on a diverging scale centred on zero; under it
    the joint change and the spread before and after it for each climate."""
    import numpy as np

    order = sorted(doc["reference_notes"], key=lambda r: (r["frequency_hz"] is None, r["frequency_hz"] or 0.0))
    notes = [r["note"] for r in order]
    climates = doc["climates"]
    drift = {(r["note"], r["climate"]): r["drift_cents"] for r in doc["rows"]}
    grid = np.array([[np.nan if drift.get((n, c)) is None else drift[(n, c)] for c in climates] for n in notes],
                    dtype=float)
    reach = max(1.0, float(np.nanmax(np.abs(grid))) if np.any(np.isfinite(grid)) else 1.0)
    width = max(6.0, 1.0 + 0.8 * len(climates))
    height = 2.6 + 0.26 * len(notes)
    figure = _figure(width, height)
    ax, below = figure.subplots(2, 1, height_ratios=[len(notes), 3.2], sharex=True)
    image = ax.imshow(grid, cmap="RdBu_r", vmin=-reach, vmax=reach, aspect="auto", origin="lower")
    figure.colorbar(image, ax=[ax, below], label="drift [cents]  (+ sharp, − flat)", shrink=0.8)
    ax.set_yticks(range(len(notes)), notes)
    ax.set_ylabel("note")
    size = 7 if len(climates) <= 10 else 6
    for (i, j), value in np.ndenumerate(grid):
        if math.isfinite(value):
            ax.text(j, i, f"{value:+.0f}", ha="center", va="center", fontsize=size,
                    color="white" if abs(value) > 0.6 * reach else "black")
    ax.set_title(f"{doc['instrument']}: drift against {doc['reference']} (A4 = {doc['a4_hz']:g} Hz)",
                 fontsize=10)
    summary = {s["climate"]: s for s in doc["summary"]}
    lines = (("joint [mm]", "adjust_mm", "{:+.1f}"), ("spread [¢]", "spread_cents", "{:.1f}"),
             ("spread after [¢]", "residual_spread_cents", "{:.1f}"))
    for row, (label, key, fmt) in enumerate(lines):
        for j, c in enumerate(climates):
            value = summary[c][key]
            below.text(j, 2 - row, "—" if value is None else fmt.format(value), ha="center", va="center",
                       fontsize=size + 1)
    below.set_ylim(-0.5, 2.5)
    below.set_yticks([2, 1, 0], [label for label, _, _ in lines])
    below.tick_params(axis="y", length=0)
    below.set_xticks(range(len(climates)), climates, rotation=35, ha="right")
    below.set_xlabel("climate")
    for side in ("top", "right", "left"):
        below.spines[side].set_visible(False)
    return figure


def warmup(doc: dict):
    """The ``drift warmup`` document as curves: drift [cents] of the notes the table shows against
    minutes, rests shaded, each play phase's settle moment (within the tolerance of the steady
    state: the moment to tune) marked."""
    notes = doc["key_notes"]
    figure = _figure(7.5, 4.2)
    ax = figure.subplots()
    _shade_rests(ax, doc["plan"])
    for note in notes:
        points = [(r["minute"], r["drift_cents"]) for r in doc["rows"] if r["note"] == note
                  and r["drift_cents"] is not None and math.isfinite(r["drift_cents"])]
        ax.plot([p[0] for p in points], [p[1] for p in points], label=note, lw=1.6)
    labelled = False
    for s in doc["settle"]:
        if s["settled_minute"] is not None:
            ax.axvline(s["settled_minute"], color="0.3", ls="--", lw=1,
                       label=None if labelled else f"within {doc['tolerance_cents']:g} ¢ of steady: tune")
            labelled = True
    ax.axhline(0.0, color="0.5", lw=0.6)
    ax.set_xlabel("time since the start [min]")
    ax.set_ylabel(f"drift against {doc['reference']} [cents]", fontsize=9)
    ax.set_title(f"{doc['instrument']} warming up in {doc['climate']}", fontsize=10)
    ax.legend(fontsize=8, loc="best")
    ax.grid(alpha=0.3)
    return figure


def fit(doc: dict):
    """The ``drift fit`` document: the tuner readings (points) and the fitted warm-up of each note
    read (lines, as the tuner would show it), rests shaded, the fitted values in the title."""
    figure = _figure(7.5, 4.4)
    ax = figure.subplots()
    _shade_rests(ax, doc["plan"])
    notes = list(dict.fromkeys(r["note"] for r in doc["rows"]))
    for k, note in enumerate(notes):
        colour = f"C{k % 10}"
        curve = [(r["minute"], r["fitted_cents"]) for r in doc["curve"] if r["note"] == note
                 and r["fitted_cents"] is not None]
        ax.plot([c[0] for c in curve], [c[1] for c in curve], color=colour, lw=1.5, label=f"{note} fitted")
        read = [(r["minute"], r["reading_cents"]) for r in doc["rows"] if r["note"] == note]
        ax.plot([r[0] for r in read], [r[1] for r in read], "o", color=colour, ms=5, mec="black", mew=0.5,
                label=f"{note} read")
    p = doc["player"]
    ax.set_title(f"{doc['instrument']}: breath {p['breath_flow_l_s']:.3f} L/s at "
                 f"{p['breath_temperature_c']:.1f} °C, heat exchange ×{p['heat_exchange_factor']:.2f}; "
                 f"RMS {doc['rms_cents']:.2f} ¢", fontsize=9)
    ax.set_xlabel("time since the start [min]")
    ax.set_ylabel(f"tuner reading [cents] (A4 = {doc['a4_hz']:g} Hz)")
    ax.legend(fontsize=8, ncols=2, loc="best")
    ax.grid(alpha=0.3)
    return figure
