"""Writing an instrument as instrument-file TOML text, the inverse of
:func:`drift.instrument.parse_instrument` (kept apart from :mod:`drift.instrument` for length)."""

from __future__ import annotations

from drift.constants import ZERO_CELSIUS
from drift.instrument import REED_REFERENCE_GAMMA, REED_REFERENCE_PRESSURE, Instrument


def _fmt(value: float, digits: int = 3) -> str:
    text = f"{value:.{digits}f}".rstrip("0")
    return text + "0" if text.endswith(".") else text


def to_toml(instrument: Instrument, header: str = "") -> str:
    """The instrument as instrument-file TOML text (the inverse of :func:`parse_instrument`).

    Lengths are written in mm to 0.001 mm, volumes in mm^3; ``header`` (comment lines without
    the leading ``#``) goes at the top.
    """
    ins = instrument
    lines = [f"# {line}".rstrip() for line in header.splitlines()] if header else []
    if lines:
        lines.append("")
    lines.append(f"name = {_quote(ins.name)}")
    if ins.description:
        lines.append(f"description = {_quote(ins.description)}")
    lines.append(f"excitation = {_quote(ins.excitation)}")
    if ins.material:
        lines.append(f"material = {_quote(ins.material)}")
    lines.append(f"reference_temperature_c = {_fmt(ins.reference_temperature_k - ZERO_CELSIUS, 2)}")
    if ins.wall_m is not None:
        lines.append(f"wall_mm = {_fmt(ins.wall_m * 1e3)}")
    if ins.transposition_semitones:
        lines.append(f"transposition_semitones = {ins.transposition_semitones}")
    lines += ["", "[bore]", "stations_mm = ["]
    lines += [f"    [{_fmt(x * 1e3)}, {_fmt(d * 1e3)}]," for x, d in ins.stations_m]
    lines.append("]")
    inp = ins.input_end
    lines += ["", "[input]"]
    if ins.excitation == "reed":
        reed = inp.reed_compliance_m3_pa * REED_REFERENCE_GAMMA * REED_REFERENCE_PRESSURE
        lines += [f"reed_volume_mm3 = {_fmt(reed * 1e9, 1)}",
                  f"cavity_volume_mm3 = {_fmt(inp.added_volume_m3 * 1e9, 1)}"]
    elif ins.excitation == "lips":
        lines += [f"cup_volume_mm3 = {_fmt(inp.added_volume_m3 * 1e9, 1)}",
                  f"throat_diameter_mm = {_fmt(inp.throat_diameter_m * 1e3)}",
                  f"throat_length_mm = {_fmt(inp.throat_length_m * 1e3)}",
                  f"backbore_length_mm = {_fmt(inp.backbore_length_m * 1e3)}"]
    else:
        lines += [f"embouchure_position_mm = {_fmt(inp.embouchure_position_m * 1e3)}",
                  f"embouchure_diameter_mm = {_fmt(inp.embouchure_diameter_m * 1e3)}",
                  f"embouchure_chimney_mm = {_fmt(inp.embouchure_chimney_m * 1e3)}"]
        if inp.embouchure_outer_correction_m is not None:
            lines.append(f"embouchure_outer_correction_mm = {_fmt(inp.embouchure_outer_correction_m * 1e3)}")
        else:
            lines.append(f"lip_cover_pct = {_fmt(inp.lip_cover * 100, 1)}")
    d = ins.design
    lines += ["", "[design]",
              f"temperature_c = {_fmt(d.temperature_k - ZERO_CELSIUS, 2)}",
              f"relative_humidity_pct = {_fmt(d.relative_humidity * 100, 1)}",
              f"pressure_kpa = {_fmt(d.pressure_pa / 1e3, 3)}",
              f"co2_ppm = {_fmt(d.co2_fraction * 1e6, 1)}",
              f"playing = {'true' if d.playing else 'false'}",
              f"a4_hz = {_fmt(d.a4_hz, 2)}"]
    if ins.tuning is not None:
        t = ins.tuning
        lines += ["", "[tuning]", f"position_mm = {_fmt(t.position_m * 1e3)}",
                  f"min_change_mm = {_fmt(t.min_change_m * 1e3)}",
                  f"max_change_mm = {_fmt(t.max_change_m * 1e3)}"]
    if ins.slide is not None:
        sl = ins.slide
        lines += ["", "[slide]", f"position_mm = {_fmt(sl.position_m * 1e3)}",
                  f"positions_mm = [{', '.join(_fmt(x * 1e3) for x in sl.positions_m)}]",
                  f"max_travel_mm = {_fmt(sl.max_travel_m * 1e3)}"]
    for v in ins.valves:
        loop = ", ".join(f"[{_fmt(x * 1e3)}, {_fmt(d * 1e3)}]" for x, d in v.loop_stations_m)
        lines += ["", "[[valve]]", f"name = {_quote(v.name)}", f"position_mm = {_fmt(v.position_m * 1e3)}",
                  f"stations_mm = [{loop}]"]
    for h in ins.holes:
        lines += ["", "[[hole]]", f"name = {_quote(h.name)}", f"position_mm = {_fmt(h.position_m * 1e3)}",
                  f"diameter_mm = {_fmt(h.diameter_m * 1e3)}", f"chimney_mm = {_fmt(h.chimney_m * 1e3)}"]
    for n in ins.notes:
        closed = ", ".join(_quote(c) for c in n.closed)
        lines += ["", "[[note]]", f"name = {_quote(n.name)}", f"closed = [{closed}]", f"register = {n.register}"]
        if n.valves:
            lines.append(f"valves = [{', '.join(_quote(v) for v in n.valves)}]")
        if n.slide_m and n.slide_m in ins.slide.positions_m:        # a numbered position, by its number
            lines.append(f"slide_position = {ins.slide.positions_m.index(n.slide_m) + 1}")
        elif n.slide_m:
            lines.append(f"slide_mm = {_fmt(n.slide_m * 1e3)}")
    return "\n".join(lines) + "\n"


def _quote(text: str) -> str:
    return '"' + str(text).replace("\\", "\\\\").replace('"', '\\"') + '"'
