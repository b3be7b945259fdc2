"""The ``drift`` command line: parses options, calls the library, renders the result.

Heavy modules (numpy, CoolProp, scipy) are imported inside the commands, so ``drift --help`` and
``drift --version`` start fast. Errors a user can cause end with a one-line message on stderr and
exit status 2.
"""

from __future__ import annotations

import functools
import os

import click

# The linear algebra of a run is small (heat balances of tens of unknowns, 2x2 matrices): the
# threads of the BLAS library only wait for one another, badly so on a busy machine
# (docs/performance.md). Set before numpy is first imported; a value the user sets wins.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

from drift import __version__
from drift.constants import GIG_PLAN, TOLERANCE_CENTS
from drift.options import (A4_OPTION, AT_REST_OPTION, FORMAT_OPTION, INSTRUMENT_ARGUMENT, MAX_MINUTES_OPTION,
                           OUTPUT_OPTION, PLOT_OPTION, RH_OPTION, WRITTEN_OPTION, Commands, FiniteRange, LazyProgress,
                           air_options, check_budget, check_plot, draw, parse_plan_option, pressure_pa, range_of,
                           reports_errors, warn_on_stderr)


@click.group(cls=Commands, context_settings={"help_option_names": ["-h", "--help"], "max_content_width": 100})
@click.version_option(__version__, "--version", prog_name="drift")
@click.option("--gas-properties", "gas_source", type=click.Choice(["table", "coolprop"]), default="table",
              show_default=True,
              help="Where real-gas properties come from: the shipped table made from CoolProp, or "
                   "CoolProp itself for every state (slower: for checking).")
def main(gas_source):
    """How each note of a wind instrument moves in pitch with the air inside its bore.

    Room temperature, humidity, altitude, CO2, the player's breath and warm-up change the speed
    of sound in the bore; drift computes the real-gas properties of that air, the resonances of
    the bore and the pitch of every note.
    """
    from drift import air

    air.set_property_source(gas_source)


@main.command("air")
@air_options
@click.option("--breath", "breath_fraction", type=range_of("breath_fraction"), default=0.0,
              show_default=True, help="Fraction of exhaled breath mixed into the room air (mole basis), 0 to 1.")
@click.option("--breath-temp", "breath_temp_c", type=range_of("temperature_c"), default=35.0,
              show_default=True, help="Temperature of the exhaled breath [°C].")
@click.option("--breath-co2", "breath_co2_pct", type=range_of("breath_co2_pct"), default=4.5,
              show_default=True, help="CO2 in the dry part of the breath [%], 0 to 10.")
@FORMAT_OPTION
@reports_errors
def air_command(temp_c, rh_pct, pressure_kpa, altitude_m, co2_ppm, breath_fraction, breath_temp_c,
                breath_co2_pct, fmt):
    """Real-gas properties of room air with breath mixed in, at one condition.

    The mixture is taken to --temp; water beyond saturation there condenses and is reported.
    """
    from drift import air, render
    from drift.climate import Breath, Room
    from drift.constants import ZERO_CELSIUS

    room = Room(temp_c + ZERO_CELSIUS, pressure_pa(pressure_kpa, altitude_m), rh_pct / 100.0, co2_ppm * 1e-6)
    breath = Breath(temperature_k=breath_temp_c + ZERO_CELSIUS, co2_fraction=breath_co2_pct / 100.0)
    state = air.air_properties(room, breath_fraction, breath)
    render.emit(render.air_document(state, breath_fraction), fmt, render.air_table, render.air_csv)


SHOW_HELP = "Print the bundled file NAME instead, to start a file of your own from it (docs/formats.md)."


def _shown(text_of, name: str) -> str:
    """A bundled file's text for ``--show``; an unknown name is refused naming the option."""
    from drift.errors import InputFileError

    try:
        return text_of(name)
    except InputFileError as error:
        raise InputFileError(f"--show: {error}") from None


@main.command("climates")
@FORMAT_OPTION
@click.option("--show", "show", default=None, metavar="NAME", help=SHOW_HELP)
@reports_errors
def climates_command(fmt, show):
    """List the bundled climates with their conditions."""
    from drift import climate, render

    if show is not None:
        click.echo(_shown(climate.bundled_climate_text, show), nl=False)
        return
    doc = {"climates": [render.climate_record(c) for c in climate.bundled_climates()]}
    render.emit(doc, fmt, render.climates_table, render.listing_csv)


@main.command("chart")
@INSTRUMENT_ARGUMENT
@click.option("--climate", "climate_names", multiple=True, metavar="CLIMATE",
              help="Bundled climate name or climate file; repeat for several. Default: every bundled climate.")
@click.option("--reference", "reference_name", default=None, metavar="CLIMATE",
              help="Condition the drift is measured from. Default: the instrument's [design] condition.")
@click.option("--a4", "a4_hz", type=FiniteRange(380.0, 480.0), default=None,
              help="Pitch of A4 for the offset from equal temperament [Hz], 380 to 480. Default: the "
                   "instrument's [design] a4_hz (440 when the file gives none, ISO 16).")
@click.option("--offsets", "show_offsets", is_flag=True,
              help="Add a table of each note's offset from equal temperament [cents] at that A4, at "
                   "the reference and in each climate.")
@click.option("--tolerance", "tolerance_cents", type=FiniteRange(0.0, 100.0, min_open=True),
              default=TOLERANCE_CENTS,
              show_default=True,
              help="In-tune threshold [cents] after the joint change (5 cents is common practice).")
@WRITTEN_OPTION
@FORMAT_OPTION
@OUTPUT_OPTION
@PLOT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def chart_command(instrument, climate_names, reference_name, a4_hz, show_offsets, tolerance_cents, written, fmt,
                  output, plot_path, max_minutes):
    """Drift of every note across climates, with the tuning-joint change for each.

    INSTRUMENT is a bundled instrument name or an instrument file (default: the bundled
    default instrument, see `drift instruments`).
    """
    from drift import advice, budget, chart, climate, files, notation, render
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    check_plot(plot_path)
    files.check_outputs([output, plot_path], [instrument, reference_name, *climate_names])
    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    climates = ([climate.load_climate(c) for c in climate_names] if climate_names
                else climate.bundled_climates())
    reference = climate.load_climate(reference_name) if reference_name else None
    check_budget(budget.chart_cost(inst, climates, reference), max_minutes,
                 "fewer climates (--climate) would bring it down")
    progress = LazyProgress(len(climates) + 1, "computing")
    try:
        result = chart.drift_chart(inst, climates, reference, a4_hz, tolerance_cents, progress)
    finally:
        progress.close()
    absorptance = inst.wall_material.solar_absorptance
    cautions = [c for where in climates for c in advice.cautions(inst.material, where, absorptance)]
    doc = notation.add_written_notes(render.chart_document(result, cautions, climates), inst.transposition_semitones)
    table = functools.partial(render.chart_table, offsets=show_offsets)
    render.emit(doc, fmt, notation.written_table(table, written), render.chart_csv, output)
    warn_on_stderr(doc, fmt)
    draw("chart", doc, plot_path)


@main.command("warmup")
@INSTRUMENT_ARGUMENT
@click.option("--climate", "climate_name", default=None, metavar="CLIMATE",
              help="Room and breath during the plan: bundled climate name or climate file (its "
                   "[player] playing and minutes_played give way to the plan). Default: the "
                   "instrument's [design] room.")
@click.option("--plan", "plan_text", default="play:20", show_default=True, metavar="PLAN",
              help="Phases in minutes, e.g. play:10,rest:3,play:5; the instrument starts at room "
                   "temperature, full of room air.")
@click.option("--step", "step_s", type=FiniteRange(1.0, 3600.0), default=30.0, show_default=True,
              help="Time between rows [s], 1 to 3600.")
@click.option("--reference", "reference_name", default=None, metavar="CLIMATE",
              help="Condition the drift is measured from. Default: the instrument's [design] condition.")
@click.option("--all-notes", "all_notes", is_flag=True,
              help="Show every note in the table, not only the lowest, middle, highest and tuning note.")
@WRITTEN_OPTION
@FORMAT_OPTION
@OUTPUT_OPTION
@PLOT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def warmup_command(instrument, climate_name, plan_text, step_s, reference_name, all_notes, written, fmt, output,
                   plot_path, max_minutes):
    """Pitch of every note over a play/rest plan, and the time it takes to settle.

    INSTRUMENT is a bundled instrument name or an instrument file. The bore warms while it is
    played and cools during rests; each row gives the drift in cents from the reference. During
    a rest a row gives where the notes would sound if playing resumed then (the wall as it has
    cooled, the bore refilled with breath). `air in` and `air out` are the air temperature [°C]
    where the breath enters the bore and at its open end; `loop NAME` the mean air temperature
    in each valve loop (a loop warms with the share of notes that use it); `joint mm` how far to
    move the tuning joint then to centre the notes (+ out, − in). The report ends with the time each
    play phase takes to come within 2 cents of the steady state, when to tune and how far to
    move the joint then, and the care cautions of the climate.
    """
    from drift import advice, budget, climate, files, notation, render, thermal, warmup
    from drift.constants import ZERO_CELSIUS
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    check_plot(plot_path)
    plan = parse_plan_option(plan_text)
    files.check_outputs([output, plot_path], [instrument, climate_name, reference_name])
    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    check_budget(budget.warmup_cost(inst, plan, step_s), max_minutes,
                 "a plan of fewer phases (--plan) or a larger --step would bring it down")
    design = inst.design
    blowing = None
    if climate_name:
        where = climate.load_climate(climate_name)
        room, breath, climate_label = where.room, where.player.breath, where.name
        blowing = where.player.blowing(inst.excitation)
    else:
        room, breath = design.room(), climate.DEFAULT_BREATH
        climate_label = (f"design room ({design.temperature_k - ZERO_CELSIUS:g} °C, "
                         f"{design.relative_humidity * 100:g} % RH)")
    if reference_name:
        ref_climate = climate.load_climate(reference_name)
        reference, reference_label = thermal.climate_profile(inst, ref_climate), ref_climate.name
    else:
        reference = thermal.design_profile(inst)
        reference_label = "design condition" + (" (played)" if design.playing else " (at rest)")
    # Bore states searched: the reference and the steady state, about 20 knots per phase, and
    # about 32 for the settle time from cold (an estimate; the bar stops at its end).
    progress = LazyProgress(2 + 20 * len(plan) + 32, "computing")
    try:
        result = warmup.warmup_timeline(inst, room, plan, step_s, breath, reference, blowing, progress=progress,
                                        names=(climate_label, reference_label))
    finally:
        progress.close()
    cautions = (advice.cautions(inst.material, where, inst.wall_material.solar_absorptance)
                if climate_name else [])
    doc = notation.add_written_notes(render.warmup_document(result, cautions), inst.transposition_semitones)
    table = functools.partial(render.warmup_table, all_notes=all_notes)
    render.emit(doc, fmt, notation.written_table(table, written), render.warmup_csv, output)
    warn_on_stderr(doc, fmt)
    draw("warmup", doc, plot_path)


@main.command("fit")
@click.argument("log_path", metavar="LOG", type=click.Path(dir_okay=False))
@INSTRUMENT_ARGUMENT
@click.option("--climate", "climate_name", default=None, metavar="CLIMATE",
              help="The room the readings were taken in, and the player the fit starts from: bundled "
                   "climate name or climate file. Default: the instrument's [design] room.")
@click.option("--plan", "plan_text", default=None, metavar="PLAN",
              help="What the instrument did from minute 0, e.g. play:10,rest:3,play:5. Default: the "
                   "log's state column (each change halfway between two readings), else playing "
                   "throughout.")
@click.option("--a4", "a4_hz", type=FiniteRange(380.0, 480.0), default=None,
              help="The tuner's A4 [Hz], 380 to 480. Default: the instrument's [design] a4_hz.")
@click.option("--write-player", "player_path", type=click.Path(dir_okay=False, writable=True), default=None,
              metavar="FILE", help="Write the fitted values as a player file, for a climate's "
                                   "[player] player_file.")
@FORMAT_OPTION
@OUTPUT_OPTION
@PLOT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def fit_command(log_path, instrument, climate_name, plan_text, a4_hz, player_path, fmt, output, plot_path,
                max_minutes):
    """Fit the player's breath flow, breath temperature and the bore's heat exchange to a tuner log.

    LOG is a CSV file with a header: minute,note,cents and optionally state (play or rest), one
    tuner reading per row (docs/formats.md). INSTRUMENT is a bundled instrument name or an
    instrument file. One constant offset (the player's embouchure) is fitted with them, so that
    only the drift counts; each value is reported with its standard uncertainty.
    """
    from drift import budget, climate, files, fit, render, render_fit
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    check_plot(plot_path)
    plan = parse_plan_option(plan_text) if plan_text else None
    files.check_outputs([output, plot_path, player_path], [log_path, instrument, climate_name])
    log = fit.read_tuner_log(log_path)
    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    check_budget(budget.fit_cost(inst, fit.log_plan(log, plan), len(log.times_s), log.notes), max_minutes,
                 "a plan of fewer phases (--plan) or fewer readings would bring it down")
    if climate_name:
        where = climate.load_climate(climate_name)
        room, player, label = where.room, where.player, where.name
    else:
        room, player, label = inst.design.room(), climate.Player(), "design room"
    progress = LazyProgress(4 * 8, "fitting")
    try:
        result = fit.fit_player(inst, room, log, plan, player, a4_hz, progress, names=(label, str(log_path)))
    finally:
        progress.close()
    doc = render_fit.fit_document(result)
    if player_path:
        render.write_text(render_fit.player_file_text(doc), player_path)
    render.emit(doc, fmt, render_fit.fit_table, render_fit.fit_csv, output)
    draw("fit", doc, plot_path)


@main.command("design")
@INSTRUMENT_ARGUMENT
@A4_OPTION
@RH_OPTION
@click.option("--climate", "climate_names", multiple=True, metavar="CLIMATE",
              help="A customer's climate (bundled name or climate file); repeat for several. Adds each "
                   "climate's offsets and the compromise design temperature.")
@AT_REST_OPTION
@WRITTEN_OPTION
@FORMAT_OPTION
@OUTPUT_OPTION
@PLOT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def design_command(instrument, a4_hz, rh_pct, climate_names, at_rest, written, fmt, output, plot_path, max_minutes):
    """The room temperature the instrument is in tune at, and how each note moves there.

    INSTRUMENT is a bundled instrument name or an instrument file. The design temperature is the
    room temperature between -10 and 45 °C at which the notes, played to the steady state, are in
    tune on average (mean offset zero from equal temperament at A4). Each note's sensitivity
    there is given per K of room temperature, per 10 % RH, per km of altitude and per % of CO2
    in the breath. With --climate, each climate's offsets for that design and the compromise
    design temperature that keeps the worst climate's mean offset smallest.
    """
    from drift import budget, climate, design, files, notation, render, render_design
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    check_plot(plot_path)
    files.check_outputs([output, plot_path], [instrument, *climate_names])
    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    climates = [climate.load_climate(c) for c in climate_names]
    check_budget(budget.design_cost(inst, climates, playing=not at_rest), max_minutes,
                 "fewer climates (--climate) or --at-rest would bring it down")
    # batches of bore states: the scan, about three steps of the root, the sensitivities; with
    # climates, theirs and about three steps of the compromise (an estimate: the bar stops at its end)
    progress = LazyProgress(5 + (4 if climates else 0), "computing")
    try:
        result = design.design_study(inst, climates, a4_hz, None if rh_pct is None else rh_pct / 100.0,
                                     playing=not at_rest, progress=progress)
    finally:
        progress.close()
    table = functools.partial(render_design.design_table,
                              state="at rest" if at_rest else "played to the steady state",
                              compromise_worst_cents=result.compromise_worst_cents)
    doc = notation.add_written_notes(render_design.design_document(result), inst.transposition_semitones)
    render.emit(doc, fmt, notation.written_table(table, written), render_design.design_csv, output)
    draw("design", doc, plot_path)


@main.command("retune")
@INSTRUMENT_ARGUMENT
@click.option("--room-temp", "room_temp_c", type=range_of("temperature_c"), required=True,
              help="Room temperature of the new design condition [°C], -30 to 60.")
@RH_OPTION
@A4_OPTION
@AT_REST_OPTION
@click.option("--output", "output", type=click.Path(dir_okay=False, writable=True), required=True,
              help="The new instrument file to write (never the input file).")
@FORMAT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def retune_command(instrument, room_temp_c, rh_pct, a4_hz, at_rest, output, fmt, max_minutes):
    """Move the holes (and the bore length at the tuning joint) for another design condition.

    INSTRUMENT is a bundled instrument name or an instrument file. Every note is brought as close
    to equal temperament as the holes allow at the new condition (played to the steady state
    unless --at-rest); the new instrument file, whose [design] is that condition, goes to
    --output, and the offsets before and after and the hole moves to standard output.
    """
    from importlib import resources
    from pathlib import Path

    from drift import budget, design, files, render, render_design
    from drift.constants import ZERO_CELSIUS
    from drift.errors import DriftError
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    bundled = resources.files("drift.data.instruments") / f"{inst.name}.toml"
    files.check_outputs([output], [instrument, inst.source, str(bundled)])
    if not Path(output).resolve().parent.is_dir():
        raise DriftError(f"--output {output}: the folder {Path(output).parent} does not exist")
    check_budget(budget.retune_cost(inst, playing=not at_rest), max_minutes,
                 "--at-rest (no steady states) would bring it down")
    progress = LazyProgress(100, "retuning")   # evaluations of the notes: 70-100 on the bundled instruments
    try:
        result = design.retune(inst, room_temp_c + ZERO_CELSIUS, None if rh_pct is None else rh_pct / 100.0,
                               a4_hz, playing=not at_rest, progress=progress)
    finally:
        progress.close()
    doc = render_design.retune_document(result, output)
    render.write_text(render_design.retuned_toml(doc, result.instrument, inst.source), output)
    render.emit(doc, fmt, render_design.retune_table, render_design.retune_csv)


@main.command("advise")
@click.argument("instruments", nargs=-1, metavar="[INSTRUMENT]...")
@click.option("--ensemble", "ensemble_file", type=click.Path(dir_okay=False), default=None, metavar="FILE",
              help="An ensemble file: the players, each with an instrument and perhaps a plan of their "
                   "own (docs/formats.md); with INSTRUMENT too, those join it.")
@click.option("--climate", "climate_name", required=True, metavar="CLIMATE",
              help="The evening: bundled climate name or climate file, its later conditions "
                   "([[change]]), sun and wind included.")
@click.option("--plan", "plan_text", default=None, metavar="PLAN",
              help="Phases in minutes from the start, beginning with play (the warm-up); every play "
                   f"after a rest is a set. Default: the ensemble file's plan, else {GIG_PLAN}.")
@click.option("--a4", "a4_hz", type=FiniteRange(380.0, 480.0), default=None,
              help="The evening's A4 [Hz], 380 to 480 (default 440): each instrument's design "
                   "tuning is moved to it.")
@click.option("--tolerance", "tolerance_cents", type=FiniteRange(0.0, 100.0, min_open=True),
              default=TOLERANCE_CENTS, show_default=True,
              help="In-tune threshold [cents]; a break that moves a first note further calls for retuning.")
@click.option("--written", is_flag=True,
              help="Name the notes on the sheet as written for each instrument (its file's "
                   "transposition_semitones), with a line saying each one's key; JSON always carries both "
                   "out_of_tolerance (sounding) and written_out_of_tolerance.")
@click.option("--format", "fmt", type=click.Choice(["text", "json"]), default="text", show_default=True,
              help="A sheet of short lines (60 columns) or JSON.")
@OUTPUT_OPTION
@PLOT_OPTION
@MAX_MINUTES_OPTION
@reports_errors
def advise_command(instruments, ensemble_file, climate_name, plan_text, a4_hz, tolerance_cents, written, fmt,
                   output, plot_path, max_minutes):
    """What to tell the players through an evening: one instrument or an ensemble.

    INSTRUMENT is a bundled instrument name or an instrument file; repeat it for an ensemble, or
    give an ensemble file.
    At the start, after the warm-up and at the start of each set: each instrument's mean drift,
    the joint setting that centres it, how far it sits from the ensemble; then who tunes to
    whom, when to retune, and the care cautions of the evening's extremes.
    """
    from drift import budget, climate, files, gig, sheet
    from drift.ensemble import load_ensemble
    from drift.errors import DriftError
    from drift.instrument import load_instrument
    from drift.render import write_text, to_json

    if not instruments and ensemble_file is None:
        raise click.UsageError("give one or more INSTRUMENT, or --ensemble FILE")
    check_plot(plot_path)
    files.check_outputs([output, plot_path], [*instruments, ensemble_file, climate_name])
    group = load_ensemble(ensemble_file) if ensemble_file else None
    if group:
        files.check_outputs([output, plot_path], [m.instrument.source for m in group.members])
    try:
        if plan_text:
            plan = climate.parse_plan(plan_text)
        else:
            plan = group.plan if group and group.plan else climate.parse_plan(GIG_PLAN)
        gig.plan_moments(plan)
    except DriftError as error:
        raise click.BadParameter(str(error), param_hint="--plan") from None
    ensemble = [*(group.members if group else ()), *(load_instrument(name) for name in instruments)]
    evening = climate.load_climate(climate_name)
    check_budget(budget.advise_cost(ensemble, plan, len(evening.schedule().times_s) - 1), max_minutes,
                 "fewer instruments or a plan of fewer phases (--plan) would bring it down")
    progress = LazyProgress(len(ensemble), "computing")
    try:
        result = gig.plan_gig(ensemble, evening, plan, a4_hz, tolerance_cents, progress)
    finally:
        progress.close()
    doc = sheet.gig_document(result)
    write_text(to_json(doc) if fmt == "json" else sheet.gig_sheet(doc, written), output)
    draw("advise", doc, plot_path)


@main.command("resonances")
@INSTRUMENT_ARGUMENT
@click.option("--note", "note_name", default=None, metavar="NAME",
              help="Only the fingerings of this note (scientific pitch notation, e.g. F#4).")
@air_options
@click.option("--lossless", is_flag=True, help="Drop wall and radiation losses (for validation).")
@click.option("--count", type=click.IntRange(1, 20), default=5, show_default=True,
              help="Resonances per fingering, 1 to 20.")
@WRITTEN_OPTION
@FORMAT_OPTION
@reports_errors
def resonances_command(instrument, note_name, temp_c, rh_pct, pressure_kpa, altitude_m, co2_ppm,
                       lossless, count, written, fmt):
    """Resonance frequencies of each fingering: impedance peaks (reed, lips) or dips (jet).

    INSTRUMENT is a bundled instrument name or an instrument file (default: the bundled default,
    see `drift instruments`). The bore is filled with uniform room air at the given condition and
    its walls are at that temperature. A named note that plays more than 50 cents from its
    name at the instrument's design condition is flagged.
    """
    from drift import chart, notation, pitch, render
    from drift.climate import Room
    from drift.constants import ZERO_CELSIUS
    from drift.instrument import DEFAULT_INSTRUMENT, load_instrument

    inst = load_instrument(instrument or DEFAULT_INSTRUMENT)
    notes = inst.fingerings()
    if note_name is not None:
        chosen = tuple(n for n in notes if n.name == note_name)
        if not chosen:
            names = ", ".join(dict.fromkeys(n.name for n in notes if n.name)) or "none (one unnamed fingering)"
            raise click.BadParameter(f"{inst.name} has no note '{note_name}'; its notes: {names}",
                                     param_hint="--note")
        notes = chosen
    room = Room(temp_c + ZERO_CELSIUS, pressure_pa(pressure_kpa, altitude_m), rh_pct / 100.0, co2_ppm * 1e-6)
    found = pitch.find_resonances(inst, room, count=count, notes=notes, lossless=lossless)
    doc = notation.add_written_notes(render.resonances_document(found, chart.name_warnings(inst, notes)),
                                     inst.transposition_semitones)
    render.emit(doc, fmt, notation.written_table(render.resonances_table, written), render.resonances_csv)
    warn_on_stderr(doc, fmt)


@main.command("instruments")
@FORMAT_OPTION
@click.option("--show", "show", default=None, metavar="NAME", help=SHOW_HELP)
@reports_errors
def instruments_command(fmt, show):
    """List the bundled instruments with a one-line description."""
    from drift import render
    from drift.instrument import bundled_instrument_text, bundled_instruments

    if show is not None:
        click.echo(_shown(bundled_instrument_text, show), nl=False)
        return
    doc = {"instruments": [render.instrument_record(i) for i in bundled_instruments()]}
    render.emit(doc, fmt, render.instruments_table, render.listing_csv)


if __name__ == "__main__":  # pragma: no cover
    main()
