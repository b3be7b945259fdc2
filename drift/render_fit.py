"""The documents, table and CSV of ``drift fit``, and the player file it writes (kept apart from
:mod:`drift.render` for length)."""

from __future__ import annotations

import json

from drift.constants import ZERO_CELSIUS
from drift.render import table, to_csv


def fit_document(fit) -> dict:
    """A :class:`drift.fit.PlayerFit` as the JSON document of ``drift fit``: the fitted values
    with their standard uncertainties, the readings against the fit, and the fitted curves."""
    return {
        "instrument": fit.instrument,
        "climate": fit.climate,
        "log": fit.log,
        "a4_hz": fit.a4_hz,
        "plan": [{"state": p.state, "minutes": p.duration_s / 60.0} for p in fit.plan],
        "player": {
            "breath_flow_l_s": fit.flow_m3_s * 1e3, "breath_flow_sd_l_s": fit.flow_sd_m3_s * 1e3,
            "breath_temperature_c": fit.breath_temperature_k - ZERO_CELSIUS,
            "breath_temperature_sd_c": fit.breath_temperature_sd_k,
            "heat_exchange_factor": fit.heat_transfer_factor,
            "heat_exchange_factor_sd": fit.heat_transfer_factor_sd,
        },
        "offset_cents": fit.offset_cents,
        "offset_sd_cents": fit.offset_sd_cents,
        "rms_cents": fit.rms_cents,
        "correlation": fit.correlation.tolist(),
        "readings": len(fit.notes),
        "evaluations": fit.evaluations,
        "converged": fit.converged,
        "at_bounds": list(fit.at_bounds),
        "rows": [{"minute": float(t) / 60.0, "note": n, "reading_cents": float(y), "fitted_cents": float(m),
                  "residual_cents": float(y - m)}
                 for t, n, y, m in zip(fit.times_s, fit.notes, fit.readings_cents, fit.fitted_cents)],
        "curve": [{"minute": round(float(t) / 60.0, 6), "note": n, "fitted_cents": float(c)}
                  for t, row in zip(fit.curve_times_s, fit.curve_cents) for n, c in zip(fit.curve_notes, row)],
    }


#: The fitted values of a fit document: key, key of its uncertainty, label, unit, format.
FIT_VALUES = (("breath_flow_l_s", "breath_flow_sd_l_s", "breath flow", "L/s", ".4f"),
              ("breath_temperature_c", "breath_temperature_sd_c", "breath temperature", "°C", ".2f"),
              ("heat_exchange_factor", "heat_exchange_factor_sd", "heat-exchange factor", "", ".3f"))


def _fit_notes(doc: dict) -> list[str]:
    """Lines that qualify a fit: values on a bound, no convergence."""
    lines = []
    if doc["at_bounds"]:
        lines.append(f"warning: {', '.join(doc['at_bounds'])} ended on the bound of the search; its "
                     "uncertainty means little (more readings, earlier ones or a rest help)")
    if not doc["converged"]:
        lines.append(f"warning: the fit stopped after {doc['evaluations']} model evaluations before "
                     "meeting its tolerances")
    return lines


def fit_table(doc: dict) -> str:
    """The ``drift fit`` document as text: the fitted values ± standard uncertainty, the offset
    and RMS residual, then every reading against the fit."""
    player = doc["player"]
    rows = [[label, format(player[key], fmt), "± " + format(player[sd], fmt), unit]
            for key, sd, label, unit, fmt in FIT_VALUES]
    rows.append(["embouchure offset", f"{doc['offset_cents']:+.2f}", f"± {doc['offset_sd_cents']:.2f}", "cents"])
    rows.append(["RMS residual", f"{doc['rms_cents']:.2f}", "", "cents"])
    head = (f"{doc['instrument']} in {doc['climate']}: player fitted to {doc['readings']} readings of "
            f"{doc['log']} (A4 = {doc['a4_hz']:g} Hz; {doc['evaluations']} model evaluations)\n")
    text = head + table(rows, ["value", "fitted", "uncertainty", "unit"],
                        colalign=("left", "right", "right", "left"))
    readings = [[f"{r['minute']:g}", r["note"], f"{r['reading_cents']:+.1f}", f"{r['fitted_cents']:+.1f}",
                 f"{r['residual_cents']:+.1f}"] for r in doc["rows"]]
    text += "\n" + table(readings, ["minute", "note", "reading ¢", "fitted ¢", "residual ¢"],
                         colalign=("right", "left", "right", "right", "right"))
    return text + "".join(line + "\n" for line in _fit_notes(doc))


def fit_csv(doc: dict) -> str:
    """The ``drift fit`` readings against the fit as CSV."""
    return to_csv(doc["rows"], ["minute", "note", "reading_cents", "fitted_cents", "residual_cents"])


def player_file_text(doc: dict) -> str:
    """A player file (docs/formats.md) holding the fitted values of a ``drift fit`` document, for a
    climate's ``[player] player_file``; its ``[fit]`` table records how they were fitted."""
    player = doc["player"]

    def quoted(text):
        return json.dumps(str(text), ensure_ascii=False)

    return "\n".join([
        "# Player values fitted by drift fit to tuner readings (docs/guide.md).",
        f"name = {quoted('player fitted to ' + doc['log'])}",
        f"breath_flow_l_s = {player['breath_flow_l_s']:.6g}",
        f"breath_temperature_c = {player['breath_temperature_c']:.6g}",
        f"heat_exchange_factor = {player['heat_exchange_factor']:.6g}",
        "",
        "[fit]",
        f"instrument = {quoted(doc['instrument'])}",
        f"climate = {quoted(doc['climate'])}",
        f"log = {quoted(doc['log'])}",
        f"readings = {doc['readings']}",
        f"rms_cents = {doc['rms_cents']:.4g}",
        f"offset_cents = {doc['offset_cents']:.4g}",
        f"breath_flow_sd_l_s = {player['breath_flow_sd_l_s']:.4g}",
        f"breath_temperature_sd_c = {player['breath_temperature_sd_c']:.4g}",
        f"heat_exchange_factor_sd = {player['heat_exchange_factor_sd']:.4g}",
    ]) + "\n"
