"""Shared pieces of the command line: option types and options, progress on a terminal, error
handling, pictures.

Every error a user can cause ends as one line on stderr and exit status 2: click's usage errors
through :class:`Commands`, the library's :class:`drift.errors.DriftError` through
:func:`reports_errors`.
"""

from __future__ import annotations

import functools
import sys

import click

from drift.constants import MAX_MINUTES

FORMAT_OPTION = click.option(
    "--format",
    "fmt",
    type=click.Choice(["table", "json", "csv"]),
    default="table",
    show_default=True,
    help="Output format.",
)


INSTRUMENT_ARGUMENT = click.argument("instrument", required=False, default=None, metavar="[INSTRUMENT]")


OUTPUT_OPTION = click.option("--output", "output", type=click.Path(dir_okay=False, writable=True), default=None,
                             help="Write the result to this file instead of standard output.")


PLOT_OPTION = click.option("--plot", "plot_path", type=click.Path(dir_okay=False, writable=True), default=None,
                           metavar="FILE",
                           help="Also draw the result as a picture, FILE.png or FILE.svg (needs the plot "
                                "extra: pip install '.[plot]').")


def check_plot(plot_path: str | None) -> None:
    """Refuse a --plot name that is neither .png nor .svg before anything is computed."""
    if plot_path is not None:
        from drift import plot

        try:
            plot.picture_format(plot_path)
        except plot.PlotError as error:
            raise click.BadParameter(str(error).removeprefix(f"--plot {plot_path}: "), param_hint="--plot") from None


def draw(kind: str, doc: dict, plot_path: str | None) -> None:
    """Draw ``doc`` with :mod:`drift.plot`'s function ``kind`` to --plot's file, after the result is
    shown: without matplotlib, the result stands and the picture fails with one line, exit 2."""
    if plot_path is not None:
        from drift import plot

        plot.write_picture(getattr(plot, kind), doc, plot_path)


class FiniteRange(click.FloatRange):
    """click's FloatRange that also refuses NaN and infinity (which compare as in range); a value
    that is not a number is called so ("'x' is not a valid number")."""

    name = "number"

    def convert(self, value, param, ctx):
        number = super().convert(value, param, ctx)
        if number != number or number in (float("inf"), float("-inf")):
            self.fail(f"{value!r} is not a finite number; allowed: {self._describe_range()}", param, ctx)
        return number


def range_of(name: str):
    """A click range type from the limits of the conditions (drift.constants.LIMITS)."""
    from drift.constants import LIMITS

    low, high, _ = LIMITS[name]
    return FiniteRange(low, high)


class Commands(click.Group):
    """The drift group: a usage error (unknown option, bad value) is one line on stderr naming the
    option and what is allowed, then exit status 2, instead of click's usage block."""

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra):
        if not standalone_mode:
            return super().main(args, prog_name, complete_var, standalone_mode, **extra)
        try:
            code = super().main(args, prog_name, complete_var, standalone_mode=False, **extra)
        except click.UsageError as error:
            path = error.ctx.command_path.split(" ", 1) if error.ctx is not None else []
            where = " ".join(["drift", *path[1:]])
            click.echo(f"drift: error: {error.format_message()} ('{where} --help' lists the options)", err=True)
            sys.exit(2)
        except click.ClickException as error:
            error.show()
            sys.exit(error.exit_code)
        except click.exceptions.Abort:
            click.echo("Aborted!", err=True)
            sys.exit(1)
        sys.exit(code if isinstance(code, int) else 0)


def warn_on_stderr(doc: dict, fmt: str) -> None:
    """With CSV output, which has no place for them, the notes far from their names go to stderr
    (tables carry them as lines, JSON as ``name_warnings``)."""
    from drift import render

    if fmt == "csv":
        for line in render.name_warning_lines(doc):
            click.echo(f"drift: {line}", err=True)


def reports_errors(command):
    """Turn the library's DriftError (and unreadable files) into a message and exit status 2."""

    @functools.wraps(command)
    def wrapper(*args, **kwargs):
        from drift.errors import DriftError

        try:
            return command(*args, **kwargs)
        except DriftError as error:
            click.echo(f"drift: error: {error}", err=True)
            sys.exit(2)
        except OSError as error:
            click.echo(f"drift: error: {error.filename or ''}: {error.strerror or error}", err=True)
            sys.exit(2)

    return wrapper


def pressure_pa(pressure_kpa: float | None, altitude_m: float | None) -> float:
    """Pressure [Pa] from --pressure or --altitude (not both); sea level when neither is given."""
    from drift import climate, constants

    if pressure_kpa is not None and altitude_m is not None:
        raise click.UsageError("give --pressure or --altitude, not both")
    if altitude_m is not None:
        return float(climate.pressure_from_altitude(altitude_m))
    return constants.STANDARD_PRESSURE if pressure_kpa is None else pressure_kpa * 1e3


def air_options(command):
    """The room-air options shared by the computing commands."""
    options = [
        click.option("--temp", "temp_c", type=range_of("temperature_c"), default=20.0, show_default=True,
                     help="Air temperature [°C], -30 to 60."),
        click.option("--rh", "rh_pct", type=range_of("relative_humidity_pct"), default=50.0,
                     show_default=True, help="Relative humidity of the room air [%], 0 to 100."),
        click.option("--pressure", "pressure_kpa", type=range_of("pressure_kpa"), default=None,
                     help="Pressure [kPa], 50 to 110. Default: sea level, 101.325 kPa."),
        click.option("--altitude", "altitude_m", type=range_of("altitude_m"), default=None,
                     help="Altitude [m], -400 to 5000, through the ISO 2533 standard atmosphere "
                          "(instead of --pressure)."),
        click.option("--co2", "co2_ppm", type=range_of("co2_ppm"), default=420.0, show_default=True,
                     help="CO2 of the dry room air [ppm], 0 to 100000."),
    ]
    for option in reversed(options):
        command = option(command)
    return command


class LazyProgress:
    """A click progress bar on stderr that appears only once a run has taken over a second, and
    only when stderr is a terminal (it never mixes into redirected output)."""

    def __init__(self, total: int, label: str):
        import time

        self.total, self.label, self.done, self.bar = total, label, 0, None
        self.start = time.monotonic()
        self.enabled = sys.stderr.isatty()

    def __call__(self, count: int = 1):
        """Count ``count`` more steps done (never past the total: some totals are estimates)."""
        import time

        step = max(0, min(count, self.total - self.done))
        self.done += step
        if not self.enabled:
            return
        if self.bar is None and time.monotonic() - self.start > 1.0:
            self.bar = click.progressbar(length=self.total, label=self.label, file=sys.stderr)
            self.bar.__enter__()
            self.bar.update(self.done - step)
        if self.bar is not None:
            self.bar.update(step)

    def close(self):
        if self.bar is not None:
            self.bar.__exit__(None, None, None)


def parse_plan_option(plan_text: str):
    """The phases of --plan; a bad plan is a usage error naming --plan."""
    from drift import climate
    from drift.errors import DriftError

    try:
        return climate.parse_plan(plan_text)
    except DriftError as error:
        raise click.BadParameter(str(error), param_hint="--plan") from None


A4_OPTION = click.option("--a4", "a4_hz", type=FiniteRange(380.0, 480.0), default=None,
                         help="Pitch of A4 of equal temperament [Hz], 380 to 480. Default: the instrument's "
                              "[design] a4_hz (440 when the file gives none, ISO 16).")


RH_OPTION = click.option("--rh", "rh_pct", type=range_of("relative_humidity_pct"), default=None,
                         help="Relative humidity of the room [%], 0 to 100. Default: the instrument's "
                              "[design] relative_humidity_pct.")


AT_REST_OPTION = click.option("--at-rest", is_flag=True,
                              help="In tune at rest (bore full of room air at room temperature) instead of "
                                   "played to the steady state.")


WRITTEN_OPTION = click.option("--written", is_flag=True,
                              help="Show written note names in the table (the instrument file's "
                                   "transposition_semitones); JSON always carries both note (sounding) and "
                                   "written_note.")


MAX_MINUTES_OPTION = click.option(
    "--max-minutes", "max_minutes", type=FiniteRange(0.0, 10000.0, min_open=True), default=MAX_MINUTES,
    show_default=True, metavar="MIN",
    help="Refuse, before it starts, a run estimated to take longer than this many minutes of computing "
         "[min], above 0 (the estimate counts the bore's wall nodes, climates, plan, notes and played "
         "paths: docs/performance.md). Raise it to allow a long run.")


def check_budget(estimate, max_minutes: float, remedy: str) -> None:
    """Refuse a run whose estimated cost (:mod:`drift.budget`) exceeds ``--max-minutes``: two
    lines on stderr, exit status 2 (through :func:`reports_errors`). ``remedy`` says what would
    bring the cost down."""
    from drift import budget

    budget.check(estimate, max_minutes, "--max-minutes", remedy)
