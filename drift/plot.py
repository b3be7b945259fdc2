"""Pictures of results: the chart as a heat map, the warm-up and the fitted warm-up as curves,
the design study as bars of each note's sensitivities, the gig plan as the evening's curves.

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


def _pitch_order(names: list) -> list[int]:
    """Indices of note names from the lowest to the highest (scientific pitch notation); names
    that are not notes (unnamed fingerings) keep their order after the named ones."""
    from drift.scale import note_to_midi

    def key(i):
        try:
            return (0, note_to_midi(names[i]), i)
        except ValueError:
            return (1, 0, i)

    return sorted(range(len(names)), key=key)


def _span_at_least(get, set_, span: float) -> None:
    """Widen an axis (its ``get_xlim``/``set_xlim`` or y pair) to at least ``span`` about its
    middle, so that next to no change is drawn as such, not magnified to fill the panel."""
    low, high = get()
    if high - low < span:
        middle = 0.5 * (low + high)
        set_(middle - 0.5 * span, middle + 0.5 * span)


#: The panels of the design picture: document key and axis label.
SENSITIVITY_PANELS = (("cents_per_k", "per K of room\ntemperature [cents]"),
                      ("cents_per_10pct_rh", "per 10 % of relative\nhumidity [cents]"),
                      ("cents_per_km_altitude", "per km of altitude\n[cents]"),
                      ("cents_per_pct_co2", "per % of CO2 in\nthe breath [cents]"))


def design(doc: dict):
    """The ``drift design`` document as bars: how each note (rows, in pitch order, lowest at the
    bottom) moves at the design temperature per K, per 10 % RH, per km of altitude and per % of
    breath CO2, one panel each; with climates, under them each climate's mean offset from equal
    temperament (bars) and its worst note (a point), designed at the design temperature."""
    import numpy as np

    rows = [doc["sensitivity"][i] for i in _pitch_order([s["note"] for s in doc["sensitivity"]])]
    notes = [str(s["note"]) for s in rows]
    climates = doc["climates"]
    height = 1.6 + 0.22 * len(notes) + (0.9 + 0.3 * len(climates) if climates else 0.0)
    figure = _figure(9.0, height)
    layout = [[key for key, _ in SENSITIVITY_PANELS]] + ([["climates"] * 4] if climates else [])
    ratios = [len(notes) + 2] + ([len(climates) + 2.5] if climates else [])
    axes = figure.subplot_mosaic(layout, height_ratios=ratios)
    y = np.arange(len(notes))
    for k, (key, label) in enumerate(SENSITIVITY_PANELS):
        ax = axes[key]
        values = np.array([np.nan if s[key] is None else s[key] for s in rows], dtype=float)
        ax.barh(y, np.where(np.isfinite(values), values, 0.0), color=np.where(values >= 0, "C3", "C0"),
                height=0.7)
        ax.axvline(0.0, color="0.3", lw=0.6)
        ax.set_yticks(y, notes if k == 0 else [])
        ax.set_ylim(-0.6, len(notes) - 0.4)
        _span_at_least(ax.get_xlim, ax.set_xlim, 1.0)
        ax.set_xlabel(label, fontsize=9)
        ax.tick_params(labelsize=8)
        ax.grid(axis="x", alpha=0.3)
    axes[SENSITIVITY_PANELS[0][0]].set_ylabel("note")
    figure.suptitle(f"{doc['instrument']}: how each note moves at its design temperature, "
                    f"{doc['design_temperature_c']:.2f} °C ({doc['relative_humidity_pct']:g} % RH, "
                    f"A4 = {doc['a4_hz']:g} Hz); + sharper", fontsize=10)
    if climates:
        ax = axes["climates"]
        y = np.arange(len(climates))[::-1]
        means = [c["mean_offset_cents"] for c in climates]
        ax.barh(y, means, height=0.6, color=["C3" if m >= 0 else "C0" for m in means], label="mean of the notes")
        ax.plot([c["worst_offset_cents"] for c in climates], y, "D", color="0.2", ms=5, label="worst note")
        for yi, c in zip(y, climates):
            ax.annotate(c["worst_note"], (c["worst_offset_cents"], yi), xytext=(5, 0), textcoords="offset points",
                        va="center", fontsize=8)
        ax.axvline(0.0, color="0.3", lw=0.6)
        ax.set_yticks(y, [c["climate"] for c in climates], fontsize=8)
        ax.set_ylim(-0.7, len(climates) - 0.3)
        ax.set_xlabel(f"offset from equal temperament, designed at {doc['design_temperature_c']:.2f} °C [cents]"
                      f"; compromise design temperature {doc['compromise_temperature_c']:.2f} °C", fontsize=9)
        ax.tick_params(axis="x", labelsize=8)
        ax.margins(x=0.12)
        ax.legend(fontsize=8, loc="best")
        ax.grid(axis="x", alpha=0.3)
    return figure


def advise(doc: dict):
    """The ``drift advise`` document over the evening: each instrument's mean drift at the plan's
    moments, under it (for an ensemble) the widest gap between two instruments and the air
    temperature at those moments; rests shaded, the moments named along the top. The dotted
    lines only join the moments (the document holds nothing between them)."""
    moments = doc["moments"]
    minutes = [m["minute"] for m in moments]
    ensemble = len(doc["instruments"]) > 1
    ratios = [3.2, 1.2, 1.2] if ensemble else [3.2, 1.2]
    figure = _figure(8.0, 2.0 + 0.8 * sum(ratios))
    axes = figure.subplots(len(ratios), 1, sharex=True, height_ratios=ratios)
    ax, air = axes[0], axes[-1]
    for panel in axes:
        _shade_rests(panel, doc["plan"])
        panel.grid(alpha=0.3)
        panel.tick_params(labelsize=8)
    joined = {"ls": ":", "lw": 1.0, "ms": 5}
    for k, name in enumerate(doc["instruments"]):
        drift = [next(s["mean_drift_cents"] for s in m["instruments"] if s["instrument"] == name) for m in moments]
        ax.plot(minutes, drift, "o", color=f"C{k % 10}", label=name, **joined)
    ax.axhline(0.0, color="0.5", lw=0.6)
    ax.set_ylabel("mean drift [cents]\n(+ sharp, − flat)", fontsize=9)
    ax.legend(fontsize=8, loc="best", ncols=1 if len(doc["instruments"]) <= 4 else 2)
    top = ax.secondary_xaxis("top")
    top.set_xticks(minutes, [m["label"] for m in moments], rotation=90, fontsize=8)
    if ensemble:
        gap = axes[1]
        gap.plot(minutes, [m["widest_gap_cents"] for m in moments], "D", color="0.25", **joined)
        limit = gap.axhline(doc["tolerance_cents"], color="C3", ls="--", lw=1,
                            label=f"tolerance {doc['tolerance_cents']:g} cents")
        gap.set_ylim(bottom=0.0)
        gap.set_ylabel("widest gap\n[cents]", fontsize=9)
        gap.legend(handles=[limit], fontsize=8, loc="best")
    air.plot(minutes, [m["temperature_c"] for m in moments], "s", color="0.35", **joined)
    _span_at_least(air.get_ylim, air.set_ylim, 2.0)
    air.set_ylabel("air [°C]", fontsize=9)
    air.set_xlabel("time since the start [min]")
    total = sum(p["minutes"] for p in doc["plan"])
    air.set_xlim(-0.015 * total, 1.015 * total)  # the whole plan, and room for the first and last marks
    names = ", ".join(doc["instruments"])
    who = names if len(names) <= 80 else f"{len(doc['instruments'])} instruments"  # the legend names them
    figure.suptitle(f"{who} in {doc['climate']} (A4 = {doc['a4_hz']:g} Hz)", fontsize=10)
    return figure
