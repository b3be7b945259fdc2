"""The gig plan's documents: the JSON document of ``drift advise`` and its text sheet, short
lines that read on a phone (at most :data:`SHEET_WIDTH` columns). Nothing here computes physics.

Notes are named by their sounding pitch; the JSON gives each instrument's
``transposition_semitones`` and ``written_out_of_tolerance`` beside ``out_of_tolerance``, and the
sheet shows the written names on request (``drift advise --written``), as
:mod:`drift.notation` does for the other documents.
"""

from __future__ import annotations

import textwrap

from drift import advice
from drift.constants import ZERO_CELSIUS
from drift.scale import key_name, written_name

#: Widest line of the text sheet [characters].
SHEET_WIDTH = 60
#: Widest instrument name in the sheet's tables; longer names are cut.
NAME_WIDTH = 22


def _minutes(seconds) -> float:
    return round(float(seconds) / 60.0, 3)


def caution_line(c) -> str:
    """One caution (:class:`drift.gig.GigCaution`) as a sentence: topic, condition, the instruments
    it concerns, the text, marked common practice."""
    return f"{c.topic} ({c.when}; {', '.join(c.instruments)}): {c.text} (common practice)"


def gig_document(gig) -> dict:
    """A :class:`drift.gig.GigPlan` as the JSON document of ``drift advise`` (minutes, °C, %, kPa,
    W/m², m/s, mm, cents)."""
    moments = []
    for m in gig.moments:
        room = m.room
        moments.append({
            "minute": _minutes(m.time_s),
            "label": m.label,
            "temperature_c": round(room.temperature_k - ZERO_CELSIUS, 3),
            "relative_humidity_pct": round(room.relative_humidity * 100.0, 3),
            "pressure_kpa": round(room.pressure_pa * 1e-3, 3),
            "sun_w_m2": round(room.sun_w_m2, 3),
            "wind_m_s": round(room.wind_m_s, 3),
            "instruments": [{
                "instrument": s.instrument,
                "mean_drift_cents": s.mean_drift_cents,
                "adjust_mm": None if s.adjust_m is None else s.adjust_m * 1e3,
                "joint_reachable": s.joint_reachable,
                "from_ensemble_cents": s.from_ensemble_cents,
                "out_of_tolerance": s.out_of_tolerance,
                "written_out_of_tolerance": [written_name(n, s.transposition_semitones)
                                             for n in s.out_of_tolerance],
                "transposition_semitones": int(s.transposition_semitones),
                "spread_after_cents": s.spread_cents,
                "warning": s.warning,
                "has_joint": s.has_joint,
            } for s in m.standings],
            "widest_gap_cents": m.widest_gap_cents,
            "widest_gap_between": list(m.widest_pair),
        })
    return {
        "instruments": gig.instruments,
        "climate": gig.climate,
        "a4_hz": gig.a4_hz,
        "tolerance_cents": gig.tolerance_cents,
        "plan": [{"state": p.state, "minutes": _minutes(p.duration_s)} for p in gig.plan],
        "moments": moments,
        "breaks": [{"instrument": b.instrument, "label": b.label, "start_minute": _minutes(b.start_s),
                    "rest_minutes": [_minutes(x) for x in b.rest_s],
                    "shift_cents": [float(x) for x in b.shift_cents],
                    "retune_after_minutes": None if b.retune_after_s is None else _minutes(b.retune_after_s)}
                   for b in gig.breaks],
        "tune_to": gig.tune_to,
        "retune_after_break_minutes": None if gig.retune_after_s is None else _minutes(gig.retune_after_s),
        "advice": list(gig.advice),
        "cautions": [caution_line(c) for c in gig.cautions],
        "care_note": advice.DEFER if gig.cautions else None,
        "extremes": {k: {"value": e.value, "minute": _minutes(e.time_s)} for k, e in gig.extremes.items()},
    }


def _wrap(text: str, first: str = "", rest: str = "  ") -> list[str]:
    return textwrap.wrap(text, SHEET_WIDTH, initial_indent=first, subsequent_indent=rest)


def _name(name: str) -> str:
    return name if len(name) <= NAME_WIDTH else name[:NAME_WIDTH - 1] + "…"


def _signed(value, digits=1) -> str:
    return "—" if value is None else f"{value:+.{digits}f}".replace("-", "−")


def _keys_line(doc: dict) -> str:
    """Which key each instrument's notes are written in (from the first moment's standings)."""
    keys = [f"{s['instrument']} in {key_name(s['transposition_semitones'])}" if s["transposition_semitones"]
            else f"{s['instrument']} as sounding" for s in doc["moments"][0]["instruments"]]
    return f"Written notes: {'; '.join(keys)}."


def gig_sheet(doc: dict, written: bool = False) -> str:
    """The text sheet of ``drift advise``: per moment the conditions and a small table (mean drift,
    joint mm, distance from the ensemble), then the advice and the care cautions; no line over
    :data:`SHEET_WIDTH` characters. With ``written``, the notes still out of tolerance are named
    as written for each instrument (``written_out_of_tolerance``), and a line under the title
    says the key of each."""
    plan = ", ".join(f"{p['state']} {p['minutes']:g}" for p in doc["plan"])
    out = [*_wrap(f"Gig sheet: {', '.join(doc['instruments'])}", rest="  "),
           *(_wrap(_keys_line(doc), rest="  ") if written else ()),
           *_wrap(f"Climate {doc['climate']}; A4 = {doc['a4_hz']:g} Hz; tolerance {doc['tolerance_cents']:g} cents"),
           *_wrap(f"Plan (min): {plan}"),
           "Cents: mean drift, + sharp. Joint mm: + out, − in;",
           "! = beyond the joint. Band: from the ensemble mean."]
    width = min(NAME_WIDTH, max(len(_name(i)) for i in doc["instruments"]))
    for m in doc["moments"]:
        out += ["", f"{m['label'].upper()}, minute {m['minute']:g}",
                f"  {m['temperature_c']:.1f} °C, {m['relative_humidity_pct']:.0f} % RH, sun "
                f"{m['sun_w_m2']:.0f} W/m², wind {m['wind_m_s']:.1f} m/s",
                f"  {'':<{width}} {'cents':>6} {'joint':>7} {'band':>6}"]
        for s in m["instruments"]:
            joint = _signed(s["adjust_mm"]) + ("" if s["joint_reachable"] else "!")
            out.append(f"  {_name(s['instrument']):<{width}} {_signed(s['mean_drift_cents']):>6} "
                       f"{joint:>7} {_signed(s['from_ensemble_cents']):>6}")
        if len(m["instruments"]) > 1:
            a, b = m["widest_gap_between"]
            out += _wrap(f"widest gap {m['widest_gap_cents']:.1f} cents: {a} above {b}", "  ", "    ")
        for s in m["instruments"]:
            if s["out_of_tolerance"]:
                names = s["written_out_of_tolerance"] if written else s["out_of_tolerance"]
                out += _wrap(f"{s['instrument']} still out: {', '.join(names)}", "  ", "    ")
    out += ["", "ADVICE"]
    for line in doc["advice"]:
        out += _wrap(line, "- ")
    if doc["cautions"]:
        out += ["", "CARE (common practice)"]
        for line in doc["cautions"]:
            out += _wrap(line.removesuffix(" (common practice)"), "- ")
        out += _wrap(doc["care_note"], rest="")
    return "\n".join(out) + "\n"
