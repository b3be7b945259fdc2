"""Rendering of the maker's-desk jobs (:mod:`drift.design`): the documents, tables and CSV of
``drift design`` and ``drift retune``, and the text of a retuned instrument file.

Kept apart from :mod:`drift.render` (which it uses for tables, CSV and JSON) so that neither
module grows past the project's length limit. Nothing here computes physics.
"""

from __future__ import annotations

import dataclasses
import math
import textwrap
import tomllib

from drift import render
from drift.constants import ZERO_CELSIUS
from drift.design import rms_cents
from drift.errors import DriftError
from drift.instrument import parse_instrument
from drift.instrument_file import to_toml

SENSITIVITY_KEYS = ("cents_per_k", "cents_per_10pct_rh", "cents_per_km_altitude", "cents_per_pct_co2")


def _celsius(temperature_k):
    return None if temperature_k is None else float(temperature_k) - ZERO_CELSIUS


def design_document(result) -> dict:
    """A :class:`drift.design.DesignResult` as the JSON document of ``drift design`` (the
    contract of docs/formats.md)."""
    return {
        "instrument": result.instrument,
        "a4_hz": result.a4_hz,
        "relative_humidity_pct": result.relative_humidity * 100.0,
        "design_temperature_c": _celsius(result.design_temperature_k),
        "sensitivity": [{"note": s.note, **{k: getattr(s, k) for k in SENSITIVITY_KEYS}}
                        for s in result.sensitivity],
        "climates": [dataclasses.asdict(c) for c in result.climates],
        "compromise_temperature_c": _celsius(result.compromise_temperature_k),
    }


def _signed(value, digits=2) -> str:
    return "—" if value is None or not math.isfinite(value) else f"{value:+.{digits}f}"


def design_table(doc: dict, state: str = "played to the steady state",
                 compromise_worst_cents: float | None = None) -> str:
    """The ``drift design`` document as text: the design temperature, a table of each note's
    sensitivities, and with climates a table of their offsets and the compromise (with
    ``compromise_worst_cents``, its largest |mean offset| over the climates)."""
    t = doc["design_temperature_c"]
    out = [f"{doc['instrument']}: in tune on average at {t:.2f} °C room temperature "
           f"({state}, {doc['relative_humidity_pct']:g} % RH, A4 = {doc['a4_hz']:g} Hz)", "",
           "How each note moves there [cents] (+ sharper):"]
    rows = [[s["note"]] + [_signed(s[k]) for k in SENSITIVITY_KEYS] for s in doc["sensitivity"]]
    out.append(render.table(rows, ["note", "per K", "per 10 % RH", "per km up", "per % breath CO2"],
                            colalign=("left",) + ("right",) * 4))
    if doc["climates"]:
        out.append(f"Offsets from equal temperament in each climate, design at {t:.2f} °C [cents]:")
        rows = [[c["climate"], _signed(c["mean_offset_cents"], 1), f"{c['spread_cents']:.1f}",
                 c["worst_note"], _signed(c["worst_offset_cents"], 1)] for c in doc["climates"]]
        out.append(render.table(rows, ["climate", "mean", "spread", "worst note", "worst"],
                                colalign=("left", "right", "right", "left", "right")))
        worst = max(abs(c["mean_offset_cents"]) for c in doc["climates"])
        line = (f"Compromise design temperature: {doc['compromise_temperature_c']:.2f} °C. Largest "
                f"|mean offset| over these climates: {worst:.1f} cents designed at {t:.2f} °C")
        if compromise_worst_cents is not None:
            line += f", {compromise_worst_cents:.1f} cents designed at the compromise"
        out.append(textwrap.fill(line + ".", render.TABLE_WIDTH, subsequent_indent="    "))
    return "\n".join(out) + "\n"


def design_csv(doc: dict) -> str:
    """One CSV row per note: its sensitivities at the design state (the climates are in the
    table and the JSON)."""
    rows = [{"instrument": doc["instrument"], "design_temperature_c": doc["design_temperature_c"], **s}
            for s in doc["sensitivity"]]
    return render.to_csv(rows, ["instrument", "design_temperature_c", "note", *SENSITIVITY_KEYS])


def retune_document(result, output: str) -> dict:
    """A :class:`drift.design.RetuneResult` as the JSON document of ``drift retune``: the new
    condition, each note's offset before and after [cents], each hole's move [mm], the bore
    length change at the joint [mm] and the file written."""
    ins, d = result.instrument, result.instrument.design
    return {
        "instrument": ins.name,
        "output": str(output),
        "temperature_c": d.temperature_k - ZERO_CELSIUS,
        "relative_humidity_pct": d.relative_humidity * 100.0,
        "playing": d.playing,
        "a4_hz": d.a4_hz,
        "notes": [{"note": n.name, "register": n.register, "before_cents": float(b), "after_cents": float(a)}
                  for n, b, a in zip(ins.notes, result.before_cents, result.after_cents)],
        "rms_before_cents": rms_cents(result.before_cents),
        "rms_after_cents": rms_cents(result.after_cents),
        "holes": [{"hole": h.name, "position_mm": h.position_m * 1e3, "move_mm": result.hole_moves_m[h.name] * 1e3}
                  for h in ins.holes],
        "largest_hole_move_mm": result.largest_move_m * 1e3,
        "length_change_mm": result.length_change_m * 1e3,
        "evaluations": result.evaluations,
    }


def _condition(doc: dict) -> str:
    state = "played" if doc["playing"] else "at rest"
    return (f"{doc['temperature_c']:g} °C, {doc['relative_humidity_pct']:g} % RH, {state}, "
            f"A4 = {doc['a4_hz']:g} Hz")


def retune_table(doc: dict) -> str:
    """The ``drift retune`` document as text: notes before and after, hole moves, summary."""
    out = [f"{doc['instrument']} retuned for {_condition(doc)}", "",
           "Offset from equal temperament [cents]:"]
    rows = [[n["note"], str(n["register"]), _signed(n["before_cents"], 1), _signed(n["after_cents"], 1)]
            for n in doc["notes"]]
    rows.append(["RMS", "", f"{doc['rms_before_cents']:.2f}", f"{doc['rms_after_cents']:.2f}"])
    out.append(render.table(rows, ["note", "reg", "before", "after"],
                            colalign=("left", "right", "right", "right")))
    rows = [[h["hole"], f"{h['position_mm']:.2f}", _signed(h["move_mm"], 2)] for h in doc["holes"]]
    if rows:
        out.append("Holes (new position from the input end; move along the body, + away from the input end):")
        out.append(render.table(rows, ["hole", "position mm", "move mm"], colalign=("left", "right", "right")))
    out.append(f"largest hole move: {doc['largest_hole_move_mm']:.2f} mm; bore length at the tuning joint: "
               f"{doc['length_change_mm']:+.2f} mm")
    out.append(f"new instrument file: {doc['output']}")
    return "\n".join(out) + "\n"


def retune_csv(doc: dict) -> str:
    """One CSV row per note: its offset before and after [cents]."""
    return render.to_csv(doc["notes"], ["note", "register", "before_cents", "after_cents"])


def retuned_toml(doc: dict, instrument, source: str) -> str:
    """The retuned instrument as instrument-file text (:func:`drift.instrument_file.to_toml`), with a
    header from its ``drift retune`` document saying where it came from; checked by reading it
    back (:func:`drift.instrument.parse_instrument`)."""
    header = (f"Retuned by drift retune from {source} for {_condition(doc)}.\n"
              f"RMS offset from equal temperament there: {doc['rms_before_cents']:.2f} cents before, "
              f"{doc['rms_after_cents']:.2f} after; largest hole move {doc['largest_hole_move_mm']:.2f} mm, "
              f"bore length at the tuning joint {doc['length_change_mm']:+.2f} mm.")
    text = to_toml(instrument, header)
    try:
        parse_instrument(tomllib.loads(text), "the retuned instrument")
    except (DriftError, tomllib.TOMLDecodeError) as error:
        raise DriftError(f"the retuned instrument does not read back ({error}); nothing written") from None
    return text
