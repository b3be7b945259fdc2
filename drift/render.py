"""Rendering of results: the documents of every command, tables (tabulate), CSV and JSON text, and
safe writing of output files.

The library's results are dataclasses in SI units; the ``*_document`` functions here turn them into
plain documents (dicts and lists) in boundary units (°C, mm, kPa, %, cents), which the JSON output
shows as they are and the table and CSV functions format. Nothing here computes physics.
"""

from __future__ import annotations

import csv
import dataclasses
import io
import json
import math
import os
import textwrap

from drift import advice, files
from drift.constants import SPECIES, ZERO_CELSIUS


def _clean(value):
    """Make a value JSON-safe: numpy scalars to Python, NaN/inf to None."""
    if hasattr(value, "item") and not isinstance(value, (list, tuple, dict)):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if isinstance(value, dict):
        return {k: _clean(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [_clean(v) for v in value]
    return value


def to_json(document) -> str:
    """JSON text of a document of dicts, lists and numbers (indent 2, trailing newline)."""
    return json.dumps(_clean(document), indent=2, ensure_ascii=False) + "\n"


def to_csv(rows: list[dict], columns: list[str] | None = None) -> str:
    """CSV text (header + one line per row) of a list of flat dicts."""
    columns = columns or (list(rows[0]) if rows else [])
    buffer = io.StringIO()
    writer = csv.DictWriter(buffer, fieldnames=columns, lineterminator="\n", extrasaction="ignore")
    writer.writeheader()
    for row in rows:
        writer.writerow({k: _csv_cell(v) for k, v in row.items()})
    return buffer.getvalue()


def _csv_cell(value):
    """A CSV cell: NaN and None empty, booleans true/false, lists space-separated."""
    value = _clean(value)
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, list):
        return " ".join(str(_csv_cell(v)) for v in value)
    return value


def table(rows, headers, colalign=None) -> str:
    """A plain-text table (tabulate, 'simple' style) of pre-formatted cells, with a trailing newline."""
    from tabulate import tabulate

    return tabulate(rows, headers=headers, tablefmt="simple", colalign=colalign,
                    disable_numparse=True) + "\n"


def emit(doc, fmt: str, table, csv, output: str | os.PathLike | None = None) -> None:
    """Render ``doc`` as JSON, or with the ``table`` or ``csv`` function, and write it
    (:func:`write_text`) to ``output`` or standard output."""
    text = to_json(doc) if fmt == "json" else (table if fmt == "table" else csv)(doc)
    write_text(text, output)


def write_text(text: str, path: str | os.PathLike | None) -> None:
    """Write ``text`` to ``path`` atomically (:func:`drift.files.write_file`), or to standard output when
    ``path`` is None."""
    if path is None:
        import click

        click.echo(text, nl=False)
        return
    files.write_file(path, lambda stream: stream.write(text.encode("utf-8")))


# --------------------------------------------------------------------------------------------
# Documents: results in boundary units
# --------------------------------------------------------------------------------------------


def air_document(state, breath_fraction: float = 0.0) -> dict:
    """One scalar :class:`drift.air.AirState` as a flat dict in boundary units (``drift air``)."""
    props = state.properties
    return {
        "temperature_c": float(state.temperature) - ZERO_CELSIUS,
        "pressure_kpa": float(state.pressure) * 1e-3,
        "relative_humidity_pct": float(state.relative_humidity) * 100.0,
        "breath_fraction": float(breath_fraction),
        "mole_fractions": {s: float(v) for s, v in zip(SPECIES, state.mole_fractions)},
        "sound_speed_m_s": float(props.sound_speed),
        "density_kg_m3": float(props.density),
        "viscosity_pa_s": float(props.viscosity),
        "thermal_conductivity_w_m_k": float(props.conductivity),
        "heat_capacity_j_kg_k": float(props.cp),
        "heat_capacity_ratio": float(props.gamma),
        "prandtl_number": float(props.prandtl),
        "condensed": bool(state.condensed),
    }


def climate_record(c) -> dict:
    """A :class:`drift.climate.Climate` as a flat dict in boundary units."""
    return {
        "name": c.name,
        "temperature_c": round(c.temperature_c, 3),
        "relative_humidity_pct": round(c.room.relative_humidity * 100, 3),
        "pressure_kpa": round(c.room.pressure_pa * 1e-3, 3),
        "co2_ppm": round(c.room.co2_fraction * 1e6, 1),
        "sun_w_m2": round(c.room.sun_w_m2, 3),
        "wind_m_s": round(c.room.wind_m_s, 3),
        "later_conditions": 0 if c.weather is None else len(c.weather.rooms) - 1,
        "playing": c.player.playing,
        "minutes_played": c.player.minutes_played,
        "description": c.description,
    }


def instrument_record(instrument) -> dict:
    """A flat summary of an instrument for listings: name, description, excitation, material,
    length_mm, holes, notes (counts)."""
    return {"name": instrument.name, "description": instrument.description,
            "excitation": instrument.excitation, "material": instrument.material,
            "length_mm": instrument.length_m * 1e3, "holes": len(instrument.holes),
            "notes": len(instrument.notes)}


def chart_document(chart, cautions, conditions=()) -> dict:
    """A :class:`drift.chart.Chart`, its care cautions (:class:`drift.advice.Caution`) and the
    climates it charts (:class:`drift.climate.Climate`, for their conditions) as the JSON document
    of ``drift chart``."""
    summary = []
    for s in chart.summary:
        item = {("adjust_mm" if k == "adjust_m" else k): v for k, v in dataclasses.asdict(s).items()
                if k != "adjusted_drift_cents"}
        item["adjust_mm"] = None if s.adjust_m is None else s.adjust_m * 1e3
        summary.append(item)
    rows = [{"climate": c.climate, "topic": c.topic, "text": c.text} for c in cautions]
    return {
        "instrument": chart.instrument,
        "a4_hz": chart.a4_hz,
        "reference": chart.reference,
        "tolerance_cents": chart.tolerance_cents,
        "climates": chart.climates,
        "conditions": [climate_record(c) for c in conditions],
        "rows": [dataclasses.asdict(r) for r in chart.rows],
        "summary": summary,
        "cautions": rows,
        "care_note": advice.DEFER if rows else None,
        "reference_notes": [{"note": n, "frequency_hz": f, "offset_from_equal_cents": o}
                            for n, f, o in zip(chart.notes, chart.reference_hz, chart.reference_offset_cents)],
        "name_warnings": name_warning_records(chart.name_warnings),
    }


def name_warning_records(warnings) -> list[dict]:
    """The notes far from their names (:class:`drift.chart.NameWarning`) as JSON records."""
    return [{"note": w.note, "register": w.register, "frequency_hz": w.frequency_hz,
             "equal_temperament_hz": w.target_hz, "offset_from_equal_cents": w.offset_cents,
             "a4_hz": w.a4_hz} for w in warnings]


def name_warning_lines(doc: dict) -> list[str]:
    """One line per note of ``doc["name_warnings"]``, for tables and standard error."""
    return [f"warning: {w['note']} is {w['offset_from_equal_cents']:+.0f} cents from its name at the "
            f"design condition: {w['frequency_hz']:.2f} Hz, not {w['equal_temperament_hz']:.2f} Hz"
            for w in doc.get("name_warnings") or []]


def resonances_document(found, warnings=()) -> dict:
    """A :class:`drift.pitch.Resonances` as the JSON document of ``drift resonances``; the register
    is shown only for the named fingerings of an instrument file that lists notes. ``warnings``:
    the shown notes far from their names (:func:`drift.chart.name_warnings`)."""
    named = any(n.name for n in found.notes)
    return {"instrument": found.instrument,
            "fingerings": [{"note": n.name, "register": n.register if named else None,
                            "resonances_hz": [float(f) for f in res]}
                           for n, res in zip(found.notes, found.frequencies_hz)],
            "name_warnings": name_warning_records(warnings)}


def warmup_document(w, cautions=()) -> dict:
    """A :class:`drift.warmup.Warmup` and the climate's care cautions
    (:class:`drift.advice.Caution`) as the JSON document of ``drift warmup``."""
    rows, bore_rows, loop_rows = [], [], []
    joints = [None] * len(w.times_s) if w.joint_m is None else [float(j) * 1e3 for j in w.joint_m]
    for t, state, freqs, drift, joint in zip(w.times_s, w.states, w.frequencies_hz, w.drift_cents, joints):
        minute = round(float(t) / 60.0, 6)
        for note, f, d in zip(w.notes, freqs, drift):
            rows.append({"minute": minute, "state": state.phase, "note": note, "frequency_hz": float(f),
                         "drift_cents": float(d), "joint_mm": joint})
        p = state.profile
        for x, ta, tw, phi in zip(p.positions_m, p.temperature_k, p.wall_temperature_k, p.breath_fraction):
            bore_rows.append({"minute": minute, "position_mm": round(float(x) * 1e3, 3),
                              "air_temperature_c": float(ta) - ZERO_CELSIUS,
                              "wall_temperature_c": float(tw) - ZERO_CELSIUS,
                              "breath_fraction": float(phi)})
        loop_rows += [{"minute": minute, "state": state.phase, **r} for r in _loop_means(p)]
    return {
        "instrument": w.instrument,
        "climate": w.climate,
        "reference": w.reference,
        "plan": [{"state": p.state, "minutes": p.duration_s / 60.0} for p in w.plan],
        "tolerance_cents": w.tolerance_cents,
        "rows": rows,
        "bore": bore_rows,
        "loops": loop_rows,
        "steady": [{"note": n, "frequency_hz": float(f), "drift_cents": float(d)}
                   for n, f, d in zip(w.notes, w.steady_hz, w.steady_drift_cents)],
        "steady_loops": _loop_means(w.steady.profile),
        "settle": [{"phase": i + 1, "start_minute": s / 60.0,
                    "settled_minute": None if t is None else t / 60.0,
                    "minutes_to_settle": None if t is None else (t - s) / 60.0}
                   for i, s, t in w.settle],
        "key_notes": [w.notes[i] for i in w.key_notes()],
        "settle_from_cold_minutes": (None if w.settle_from_cold_s is None
                                     else w.settle_from_cold_s / 60.0),
        "inlet_position_mm": round(w.inlet_position_m * 1e3, 3),
        "name_warnings": name_warning_records(w.name_warnings),
        "tune_minute": None if w.tune_s is None else w.tune_s / 60.0,
        "tune_adjust_mm": None if w.tune_adjust_m is None else w.tune_adjust_m * 1e3,
        "cautions": [{"climate": c.climate, "topic": c.topic, "text": c.text} for c in cautions],
        "care_note": advice.DEFER if cautions else None,
    }


def _loop_means(profile) -> list[dict]:
    """Mean air and wall temperature [°C] and breath fraction in each valve loop of a profile."""
    return [{"valve": name, "air_temperature_c": float(p.temperature_k.mean()) - ZERO_CELSIUS,
             "wall_temperature_c": float(p.wall_temperature_k.mean()) - ZERO_CELSIUS,
             "breath_fraction": float(p.breath_fraction.mean())} for name, p in profile.loops]


# --------------------------------------------------------------------------------------------
# drift air
# --------------------------------------------------------------------------------------------

AIR_QUANTITIES = (
    ("temperature_c", "temperature", "°C", ".2f"),
    ("pressure_kpa", "pressure", "kPa", ".3f"),
    ("relative_humidity_pct", "relative humidity", "%", ".2f"),
    ("breath_fraction", "breath fraction", "", ".3f"),
    ("sound_speed_m_s", "speed of sound", "m/s", ".3f"),
    ("density_kg_m3", "density", "kg/m³", ".5f"),
    ("viscosity_pa_s", "dynamic viscosity", "Pa s", ".4e"),
    ("thermal_conductivity_w_m_k", "thermal conductivity", "W/(m K)", ".5f"),
    ("heat_capacity_j_kg_k", "heat capacity cp", "J/(kg K)", ".2f"),
    ("heat_capacity_ratio", "heat capacity ratio γ", "", ".5f"),
    ("prandtl_number", "Prandtl number", "", ".4f"),
)


def air_table(doc: dict) -> str:
    """The ``drift air`` document as a two-part table: properties, then composition."""
    rows = [[label, format(doc[key], fmt), unit] for key, label, unit, fmt in AIR_QUANTITIES]
    rows += [[f"mole fraction {s}", f"{x:.6f}", "mol/mol"] for s, x in doc["mole_fractions"].items()]
    text = table(rows, headers=["quantity", "value", "unit"], colalign=("left", "right", "left"))
    if doc["condensed"]:
        text += "note: the mixture is supersaturated at this temperature; the excess water condenses.\n"
    return text


def air_csv(doc: dict) -> str:
    """The ``drift air`` document as one CSV row, mole fractions as x_<species> columns."""
    row = {k: v for k, v in doc.items() if k != "mole_fractions"}
    row.update({f"x_{s}": x for s, x in doc["mole_fractions"].items()})
    return to_csv([row])


# --------------------------------------------------------------------------------------------
# drift climates
# --------------------------------------------------------------------------------------------


def _player_label(row: dict) -> str:
    if not row["playing"]:
        return "resting"
    minutes = row["minutes_played"]
    return "steady" if minutes is None else f"{minutes:g} min"


def climates_table(doc: dict) -> str:
    """The bundled climates (``doc["climates"]``), one line each, fitting 100 columns."""
    rows = doc["climates"]
    body = [[r["name"], f"{r['temperature_c']:.1f}", f"{r['relative_humidity_pct']:.0f}",
             f"{r['pressure_kpa']:.1f}", _player_label(r), textwrap.shorten(r["description"], 48)]
            for r in rows]
    return table(body, headers=["climate", "°C", "RH %", "kPa", "played", "description"],
                 colalign=("left", "right", "right", "right", "left", "left"))


# --------------------------------------------------------------------------------------------
# drift chart
# --------------------------------------------------------------------------------------------

#: Width budget of a table [characters].
TABLE_WIDTH = 100


def _header(name: str, width: int) -> str:
    """A column header wrapped onto lines of at most ``width`` characters (at hyphens first)."""
    parts = name.replace("-", "- ").split()
    return "\n".join(textwrap.wrap(" ".join(parts), width, break_long_words=True)).replace("- ", "-")


def _column_blocks(first_width: int, headers: list[str]) -> list[range]:
    """Split the columns into blocks that fit :data:`TABLE_WIDTH` beside the first column.

    A column takes its widest header line plus tabulate's padding of 2 (multiline headers), plus
    2 characters between columns.
    """
    blocks, start, used = [], 0, first_width
    for i, header in enumerate(headers):
        width = max(len(line) for line in header.split("\n")) + 4
        if used + width > TABLE_WIDTH and i > start:
            blocks.append(range(start, i))
            start, used = i, first_width
        used += width
    blocks.append(range(start, len(headers)))
    return blocks


def _signed(value, digits=1) -> str:
    if value is None or not math.isfinite(value):
        return "—"
    return f"{value:+.{digits}f}"


def chart_table(doc: dict, offsets: bool = False) -> str:
    """The chart as text: notes as rows, climates as columns (drift in cents, one decimal), the
    summary lines under each block of columns; with ``offsets``, a second table of each note's
    offset from equal temperament [cents] at the chart's A4, at the reference and in each
    climate; then warnings and the notes still out of tune."""
    notes = list(dict.fromkeys(r["note"] for r in doc["rows"]))
    climates = doc["climates"]
    drift = {(r["note"], r["climate"]): r["drift_cents"] for r in doc["rows"]}
    summary = {s["climate"]: s for s in doc["summary"]}
    width = 9
    labels = ["mean", "spread", "joint mm", "spread after", "out of tune"]
    first = max(len(x) for x in notes + labels)
    out = [f"Drift of {doc['instrument']} in cents against {doc['reference']} "
           f"(A4 = {doc['a4_hz']:g} Hz; + sharp, − flat)", ""]
    headers = [_header(c, width) for c in climates]
    for block in _column_blocks(first + 2, headers):
        names = [climates[i] for i in block]
        rows = [[n] + [_signed(drift[(n, c)]) for c in names] for n in notes]
        rows.append(["", *[""] * len(names)])
        rows.append(["mean"] + [_signed(summary[c]["mean_drift_cents"]) for c in names])
        rows.append(["spread"] + [f"{summary[c]['spread_cents']:.1f}" for c in names])
        rows.append(["joint mm"] + [_signed(summary[c]["adjust_mm"]) for c in names])
        rows.append(["spread after"] + [f"{summary[c]['residual_spread_cents']:.1f}" for c in names])
        rows.append(["out of tune"] + [str(len(summary[c]["out_of_tolerance"])) for c in names])
        out.append(table(rows, ["note"] + [headers[i] for i in block],
                         colalign=("left",) + ("right",) * len(names)))
    if offsets:
        out += _offset_table(doc, notes, first, width)
    notes_text = [f"joint mm: + pull the tuning joint out, − push it in, to centre the mean drift. "
                  f"out of tune: notes beyond ±{doc['tolerance_cents']:g} cents after that change."]
    for s in doc["summary"]:
        if s["out_of_tolerance"]:
            when = "after the change" if s["adjust_mm"] is not None else "(no joint to move)"
            notes_text.append(f"{s['climate']}: still out {when}: {', '.join(s['out_of_tolerance'])}")
        if s.get("warning"):
            notes_text.append(f"{s['climate']}: warning: {s['warning']}")
    notes_text += name_warning_lines(doc)
    out += [textwrap.fill(line, TABLE_WIDTH, subsequent_indent="    ") for line in notes_text]
    if doc.get("cautions"):
        out += ["", "Care:"]
        out += [textwrap.fill(f"{c['climate']} ({c['topic']}): {c['text']}", TABLE_WIDTH,
                              initial_indent="  ", subsequent_indent="    ") for c in doc["cautions"]]
        out.append(textwrap.fill(doc["care_note"], TABLE_WIDTH, initial_indent="  ", subsequent_indent="  "))
    return "\n".join(out) + "\n"


def _offset_table(doc: dict, notes: list[str], first: int, width: int) -> list[str]:
    """The lines of the chart's table of offsets from equal temperament [cents]: notes as rows,
    the reference and then each climate as columns."""
    offset = {(r["note"], r["climate"]): r["offset_from_equal_cents"] for r in doc["rows"]}
    at_reference = {r["note"]: r["offset_from_equal_cents"] for r in doc.get("reference_notes", [])}
    reference = "reference"
    columns = [reference, *doc["climates"]]
    for n in notes:
        offset[(n, reference)] = at_reference.get(n)
    headers = [_header(c, width) for c in columns]
    out = [f"Offset from equal temperament in cents (A4 = {doc['a4_hz']:g} Hz; reference: "
           f"{doc['reference']}; + sharp, − flat)", ""]
    for block in _column_blocks(first + 2, headers):
        rows = [[n] + [_signed(offset[(n, columns[i])]) for i in block] for n in notes]
        out.append(table(rows, ["note"] + [headers[i] for i in block],
                         colalign=("left",) + ("right",) * len(block)))
    return out


CHART_COLUMNS = ["note", "register", "climate", "frequency_hz", "drift_cents", "offset_from_equal_cents"]


#: The summary columns of the chart CSV (``kind`` = summary), as in the JSON's ``summary``.
CHART_SUMMARY_COLUMNS = ["mean_drift_cents", "spread_cents", "adjust_mm", "residual_spread_cents",
                         "out_of_tolerance", "warning"]


def chart_csv(doc: dict) -> str:
    """The chart in one CSV: a ``kind`` column, then one ``drift`` line per note and climate
    (long format), one ``summary`` line per climate (joint change, spreads, notes still out) and
    one ``caution`` line per care caution; cells that do not apply are empty."""
    rows = [{"kind": "drift", **r} for r in doc["rows"]]
    rows += [{"kind": "summary", **s} for s in doc["summary"]]
    rows += [{"kind": "caution", **c} for c in doc["cautions"]]
    return to_csv(rows, ["kind", *CHART_COLUMNS, *CHART_SUMMARY_COLUMNS, "topic", "text"])


# --------------------------------------------------------------------------------------------
# drift warmup
# --------------------------------------------------------------------------------------------


def _warmup_grid(doc: dict):
    """Minutes, states, {(minute, note): drift}, {minute: (first, last) air °C} and {minute: joint
    mm} of a document."""
    minutes, states, drift, ends, joints = [], {}, {}, {}, {}
    for r in doc["rows"]:
        if r["minute"] not in states:
            minutes.append(r["minute"])
            states[r["minute"]] = r["state"]
            joints[r["minute"]] = r.get("joint_mm")
        drift[(r["minute"], r["note"])] = r["drift_cents"]
    inlet = doc.get("inlet_position_mm", 0.0)
    for b in doc["bore"]:
        first, _ = ends.get(b["minute"], (None, None))
        if first is None or b["position_mm"] <= inlet + 1e-9:
            first = b["air_temperature_c"]  # the last sample at or before the breath's inlet
        ends[b["minute"]] = (first, b["air_temperature_c"])
    return minutes, states, drift, ends, joints


def warmup_table(doc: dict, all_notes: bool = False) -> str:
    """The ``drift warmup`` document as a table: minutes as rows, the air temperature where the
    breath enters and at the open end, the mean air temperature in each valve loop, and the drift [cents] of a handful of notes (``all_notes``:
    of every note) as columns; the steady state, the settle times, when to tune and the care
    cautions under it."""
    minutes, states, drift, ends, joints = _warmup_grid(doc)
    notes = list(dict.fromkeys(r["note"] for r in doc["rows"])) if all_notes else doc["key_notes"]
    has_joint = any(j is not None for j in joints.values())
    steady_loops = sorted(doc.get("steady_loops", []), key=lambda r: r["valve"])
    valves = [r["valve"] for r in steady_loops]
    loops = {(r["minute"], r["valve"]): r["air_temperature_c"] for r in doc.get("loops", [])}
    rows = []
    for m in minutes:
        first, last = ends.get(m, (math.nan, math.nan))
        rows.append([f"{m:g}", states[m], f"{first:.1f}", f"{last:.1f}"] + [f"{loops[(m, v)]:.1f}" for v in valves]
                    + ([_signed(joints[m])] if has_joint else []) + [_cents(drift.get((m, n))) for n in notes])
    steady = {s["note"]: s["drift_cents"] for s in doc["steady"]}
    rows.append(["steady", "play", "", ""] + [f"{r['air_temperature_c']:.1f}" for r in steady_loops]
                + ([""] if has_joint else []) + [_cents(steady.get(n)) for n in notes])
    headers = (["minute", "state", "air in °C", "air out °C"] + [f"loop {v} °C" for v in valves]
               + (["joint mm"] if has_joint else []) + [f"{n} ¢" for n in notes])
    head = (f"{doc['instrument']} in {doc['climate']}: drift [cents] against {doc['reference']}\n")
    text = head + table(rows, headers=headers, colalign=("right", "left") + ("right",) * (len(headers) - 2))
    cold = doc.get("settle_from_cold_minutes")
    if cold is None:
        text += (f"from cold, continuous playing: not within {doc['tolerance_cents']:g} cents of the "
                 "steady state within 10 h\n")
    else:
        text += (f"from cold, continuous playing: within {doc['tolerance_cents']:g} cents of the "
                 f"steady state after {cold:.1f} min\n")
    for s in doc["settle"]:
        if s["settled_minute"] is None:
            text += (f"play phase {s['phase']} (from minute {s['start_minute']:g}): not yet within "
                     f"{doc['tolerance_cents']:g} cents of the steady state when it ends\n")
        else:
            text += (f"play phase {s['phase']} (from minute {s['start_minute']:g}): within "
                     f"{doc['tolerance_cents']:g} cents of the steady state after "
                     f"{s['minutes_to_settle']:.1f} min (minute {s['settled_minute']:.1f})\n")
    if doc.get("tune_minute") is not None:
        joint = ("" if doc.get("tune_adjust_mm") is None else
                 f", moving the joint {_signed(doc['tune_adjust_mm'])} mm (+ out, − in) to centre the notes")
        text += textwrap.fill(f"tune after minute {doc['tune_minute']:.1f} (the mean drift then stays within "
                              f"{doc['tolerance_cents']:g} cents of its steady value){joint}", TABLE_WIDTH,
                              subsequent_indent="    ") + "\n"
    text += "".join(line + "\n" for line in name_warning_lines(doc))
    if doc.get("cautions"):
        text += "Care:\n" + "".join(
            textwrap.fill(f"{c['topic']}: {c['text']}", TABLE_WIDTH, initial_indent="  ",
                          subsequent_indent="    ") + "\n" for c in doc["cautions"])
        text += textwrap.fill(doc["care_note"], TABLE_WIDTH, initial_indent="  ", subsequent_indent="  ") + "\n"
    return text


def _cents(value) -> str:
    return "" if value is None or not math.isfinite(value) else f"{value:+.1f}"


def warmup_csv(doc: dict) -> str:
    """The warm-up in one CSV: a ``kind`` column, then one ``row`` line per minute and note (state,
    frequency, drift, and the joint setting that centres the row's mean drift), one ``steady``
    line per note, one ``settle`` line per play phase, a ``from_cold`` line (minutes of continuous
    playing to settle), a ``tune`` line (when to tune, the joint change then), and for valve loops
    one ``loop`` line per minute and valve and one ``steady_loop`` line per valve (mean air and wall
    temperature and breath fraction in the loop); cells that do not apply are empty."""
    rows = [{"kind": "row", **r} for r in doc["rows"]]
    rows += [{"kind": "steady", "state": "play", **s} for s in doc["steady"]]
    rows += [{"kind": "settle", **s} for s in doc["settle"]]
    rows.append({"kind": "from_cold", "minutes_to_settle": doc.get("settle_from_cold_minutes")})
    rows.append({"kind": "tune", "minute": doc.get("tune_minute"), "joint_mm": doc.get("tune_adjust_mm")})
    rows += [{"kind": "loop", **r} for r in doc.get("loops", [])]
    rows += [{"kind": "steady_loop", "state": "play", **r} for r in doc.get("steady_loops", [])]
    return to_csv(rows, ["kind", "minute", "state", "note", "frequency_hz", "drift_cents", "joint_mm", "phase",
                         "start_minute", "settled_minute", "minutes_to_settle", "valve", "air_temperature_c",
                         "wall_temperature_c", "breath_fraction"])


# --------------------------------------------------------------------------------------------
# drift resonances, drift instruments
# --------------------------------------------------------------------------------------------


def resonances_table(doc: dict) -> str:
    """The ``drift resonances`` document: one line per fingering, resonances in Hz."""
    fingerings = doc["fingerings"]
    width = max((len(f["resonances_hz"]) for f in fingerings), default=0)
    body = [[f["note"] or "(all open)", "" if f["register"] is None else str(f["register"])]
            + [f"{v:.2f}" for v in f["resonances_hz"]] + [""] * (width - len(f["resonances_hz"]))
            for f in fingerings]
    headers = ["note", "reg"] + [f"f{i + 1} Hz" for i in range(width)]
    text = f"{doc['instrument']}\n" + table(body, headers, colalign=("left", "right") + ("right",) * width)
    return text + "".join(line + "\n" for line in name_warning_lines(doc))


def resonances_csv(doc: dict) -> str:
    """The ``drift resonances`` document as CSV, one row per resonance (long format)."""
    rows = [{"instrument": doc["instrument"], "note": f["note"], "register": f["register"], "resonance": i + 1,
             "frequency_hz": v}
            for f in doc["fingerings"] for i, v in enumerate(f["resonances_hz"])]
    return to_csv(rows, ["instrument", "note", "register", "resonance", "frequency_hz"])


def instruments_table(doc: dict) -> str:
    """The bundled instruments (``doc["instruments"]``), one line each."""
    rows = doc["instruments"]
    body = [[r["name"], r["excitation"], f"{r['length_mm']:.0f}", str(r["notes"]),
             textwrap.shorten(r["description"], 56)] for r in rows]
    return table(body, headers=["instrument", "excitation", "mm", "notes", "description"],
                 colalign=("left", "left", "right", "right", "left"))


def listing_csv(doc: dict) -> str:
    """CSV of a listing document: the rows of its single key (``climates`` or ``instruments``)."""
    (rows,) = doc.values()
    return to_csv(rows)
