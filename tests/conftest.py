"""Shared test fixtures: the small instrument files several tests write out, the command line run
in-process, and the expensive results, computed once per session and shared.

The module-level texts can be imported by tests (``from conftest import TWO_HOLE_PIPE``) where a
test edits them.
"""

import json
import os

# One BLAS thread, as the command line runs (drift/cli.py): the bore balances are small, and a
# second thread only spins. It takes effect where numpy is first imported after this.
os.environ.setdefault("OPENBLAS_NUM_THREADS", "1")

import numpy as np  # noqa: E402
import pytest
from hypothesis import settings

# No example database: every run draws its examples afresh and leaves no files behind.
settings.register_profile("drift", database=None)
settings.load_profile("drift")

#: A cylinder-and-cone reed pipe with two holes, two notes and a tuning joint.
TWO_HOLE_PIPE = """
name = "pipe"
excitation = "reed"
[bore]
stations_mm = [[0, 15], [300, 15], [600, 20]]
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 8.0
chimney_mm = 4.0
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 7.0
[[note]]
name = "D3"
closed = ["h1", "h2"]
[[note]]
name = "E3"
closed = ["h2"]
register = 1
[tuning]
position_mm = 100.0
"""

#: A wooden reed pipe with a small register hole and two tone holes; four notes in two registers.
REGISTER_PIPE = """
name = "test pipe"
excitation = "{excitation}"
material = "tropical_hardwood"
{extra}
[bore]
stations_mm = [[0.0, 15.0], [600.0, 15.0]]
[[hole]]
name = "register"
position_mm = 150.0
diameter_mm = 3.0
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 9.0
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 9.0
[[note]]
name = "D3"
closed = ["register", "h1", "h2"]
[[note]]
name = "E3"
closed = ["register", "h2"]
[[note]]
name = "F#3"
closed = ["register"]
[[note]]
name = "A4"
closed = ["h1", "h2"]
register = 2
"""

#: A wooden reed pipe with two tone holes and three notes (the warm-up command's test pipe).
WARMUP_PIPE = """
name = "test pipe"
excitation = "reed"
material = "tropical_hardwood"
[bore]
stations_mm = [[0.0, 15.0], [600.0, 15.0]]
[[hole]]
name = "h2"
position_mm = 400.0
diameter_mm = 9.0
[[hole]]
name = "h1"
position_mm = 450.0
diameter_mm = 9.0
[[note]]
name = "D3"
closed = ["h1", "h2"]
[[note]]
name = "E3"
closed = ["h2"]
[[note]]
name = "F#3"
closed = []
"""

#: A 600 mm cylinder of 10 mm bore, reed-driven with no added volume, no holes.
CYLINDER = ('name = "tube"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [600, 10]]\n'
            '[input]\nreed_volume_mm3 = 0\n')
#: A 600 mm cone from 10 to 50 mm, reed-driven with no added volume, no holes.
CONE = ('name = "cone"\nexcitation = "reed"\n[bore]\nstations_mm = [[0, 10], [600, 50]]\n'
        '[input]\nreed_volume_mm3 = 0\n')

#: A room for climate files: 26 °C, 40 % RH, no [player] table.
WARM_ROOM = """
name = "warm room"
[air]
temperature_c = 26.0
relative_humidity_pct = 40
"""

#: A room at the breath's temperature, saturated: the breath neither warms nor wets the bore, so a
#: bore played there starts in its steady state.
BREATH_WARM_ROOM = """
name = "breath-warm room"
[air]
temperature_c = 35.0
relative_humidity_pct = 100
"""

#: The bundled instruments.
BUNDLED = ("conical-reed", "cylindrical-reed", "double-reed", "duct-flute", "side-blown-flute", "slide-brass",
           "valved-brass")
#: The bundled instruments whose warm-up the suite runs: all of them (a brass warm-up costs about
#: 4 to 5 s of CPU, its valve loops' heat balance and its played paths included).
WARMED = BUNDLED
#: The plan of the shared warm-ups of the bundled instruments: a rise, then a rest.
WARMUP_PLAN = "play:8,rest:3"


def write_file(folder, text, name):
    """Write ``text`` to ``folder/name`` (UTF-8) and return the path."""
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


def make_instrument(stations, holes=(), excitation="reed", **extra):
    """An instrument parsed from a table like an instrument file's (no file written): a bore of
    ``stations`` [[mm, mm], ...], side holes as dicts; a reed gets no added volume."""
    from drift.instrument import parse_instrument

    data = {"name": "test", "excitation": excitation, "bore": {"stations_mm": stations},
            "input": {"reed_volume_mm3": 0.0} if excitation == "reed" else extra.pop("input", {})}
    if holes:
        data["hole"] = list(holes)
    data.update(extra)
    return parse_instrument(data, "test.toml")


@pytest.fixture
def write_toml(tmp_path):
    """``write_toml(text, name="file.toml")``: the path of ``text`` written in the test's folder."""
    def write(text, name="file.toml"):
        return write_file(tmp_path, text, name)

    return write


@pytest.fixture
def two_hole_pipe(tmp_path):
    return write_file(tmp_path, TWO_HOLE_PIPE, "pipe.toml")


@pytest.fixture
def register_pipe(tmp_path):
    return write_file(tmp_path, REGISTER_PIPE.format(excitation="reed", extra=""), "pipe.toml")


@pytest.fixture
def warmup_pipe(tmp_path):
    return write_file(tmp_path, WARMUP_PIPE, "pipe.toml")


# --------------------------------------------------------------------------------------------
# The command line, in-process
# --------------------------------------------------------------------------------------------


def invoke(*args, code=0):
    """Run ``drift ARGS`` in this process through click's test runner; check the exit status
    (unless ``code`` is None) and return the result (``.stdout``, ``.stderr``, ``.exit_code``)."""
    from click.testing import CliRunner

    from drift.cli import main

    result = CliRunner().invoke(main, [str(a) for a in args])
    if code is not None:
        assert result.exit_code == code, (result.stdout, result.stderr, result.exception)
    return result


def assert_refused(result, *words):
    """Bad input (DEVELOPERS.md and the project rules): exit status 2 through ``SystemExit`` (no
    uncaught exception, so no traceback), one to three lines on stderr holding every word, nothing
    on stdout."""
    assert result.exit_code == 2, (result.stdout, result.stderr, result.exception)
    assert isinstance(result.exception, SystemExit), result.exception
    assert result.stdout == ""
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert 1 <= len(lines) <= 3, result.stderr
    for word in words:
        assert word in result.stderr, (word, result.stderr)


@pytest.fixture
def cli():
    return invoke


# --------------------------------------------------------------------------------------------
# Expensive results, computed once per session
# --------------------------------------------------------------------------------------------


@pytest.fixture(scope="session")
def default_chart():
    """The JSON document of ``drift chart --format json``: the default instrument over every
    bundled climate."""
    return json.loads(invoke("chart", "--format", "json").stdout)


@pytest.fixture(scope="session")
def bundled_instruments():
    """The bundled instruments by name."""
    from drift.instrument import load_instrument

    return {name: load_instrument(name) for name in BUNDLED}


@pytest.fixture(scope="session")
def design_profiles(bundled_instruments):
    """The bore profile of each bundled instrument at its [design] condition (the steady state of
    playing where the design is played)."""
    from drift import thermal

    return {name: thermal.design_profile(ins) for name, ins in bundled_instruments.items()}


@pytest.fixture(scope="session")
def design_notes(bundled_instruments, design_profiles):
    """Name -> (instrument, note frequencies at its design condition)."""
    from drift import pitch

    return {name: (ins, pitch.note_frequencies(ins, design_profiles[name]))
            for name, ins in bundled_instruments.items()}


class _Warmups(dict):
    """Name -> JSON document of ``drift warmup NAME --plan play:8,rest:3 --step 60 --format json``,
    run when first asked for (the default instrument's without naming it)."""

    def __missing__(self, name):
        from drift.instrument import DEFAULT_INSTRUMENT

        which = [] if name == DEFAULT_INSTRUMENT else [name]
        self[name] = json.loads(invoke("warmup", *which, "--plan", WARMUP_PLAN, "--step", "60",
                                       "--format", "json").stdout)
        return self[name]


@pytest.fixture(scope="session")
def bundled_warmups():
    """The bundled instruments' warm-ups (:class:`_Warmups`), shared by the session."""
    return _Warmups()


@pytest.fixture(scope="session")
def default_design(bundled_instruments):
    """The design study of the conical reed with two customers' climates: (instrument, climates,
    :class:`drift.design.DesignResult`)."""
    from drift import design
    from drift.climate import load_climate

    ins = bundled_instruments["conical-reed"]
    climates = [load_climate("winter-church"), load_climate("sunny-lawn")]
    return ins, climates, design.design_study(ins, climates)


#: The plan of the shared warm-up of the test pipe: a rise, a rest and a second rise.
PIPE_PLAN = "play:6,rest:3,play:3"


@pytest.fixture(scope="session")
def pipe_warmup(tmp_path_factory):
    """``drift warmup PIPE --plan play:6,rest:3,play:3 --step 60 --format json --output FILE`` for
    the test pipe of :data:`WARMUP_PIPE` in its design room (20 °C, 50 % RH): a namespace with the
    pipe's path, the output file, the run's result and the document read from the file."""
    from types import SimpleNamespace

    folder = tmp_path_factory.mktemp("pipe_warmup")
    pipe = write_file(folder, WARMUP_PIPE, "pipe.toml")
    output = folder / "warmup.json"
    result = invoke("warmup", pipe, "--plan", PIPE_PLAN, "--step", "60", "--format", "json",
                    "--output", output)
    return SimpleNamespace(pipe=pipe, output=output, result=result,
                           doc=json.loads(output.read_text(encoding="utf-8")))


def load_pitch_reference():
    """bench/bench_pitch.py as a module: its ``reference_*`` functions are the straightforward
    search (25-cent grid, Chandrupatla refinement, Brent joint change) the fast search is checked
    against, two implementations of the same model."""
    import importlib.util
    from pathlib import Path

    path = Path(__file__).resolve().parents[1] / "bench" / "bench_pitch.py"
    spec = importlib.util.spec_from_file_location("bench_pitch_reference", path)
    module = importlib.util.module_from_spec(spec)
    spec.loader.exec_module(module)
    return module


def _dry_profile():
    from drift.bore_state import BoreProfile
    from drift.climate import Room

    return BoreProfile.uniform(Room(293.15, relative_humidity=0.0))


#: Uniform dry air at 20 °C and sea level, walls at 20 °C: the bore of the analytic checks.
DRY_PROFILE = _dry_profile()


@pytest.fixture(scope="session")
def room_air():
    """The gas properties of :data:`DRY_PROFILE` (arrays of one value)."""
    return DRY_PROFILE.air_at([0.0]).properties


def first_resonances(inst, count=5, **kw):
    """The first ``count`` resonances [Hz] of an instrument's first fingering in :data:`DRY_PROFILE`."""
    from drift import pitch

    return pitch.find_resonances(inst, DRY_PROFILE, count=count, **kw).frequencies_hz[0]


# --------------------------------------------------------------------------------------------
# Outside checks: every comparison with a published source goes through ``outside.check``, which
# asserts it and records it; tools/validation_report.py runs the suite with DRIFT_OUTSIDE_RECORDS
# set to a file name and writes docs/validation.md from the records.
# --------------------------------------------------------------------------------------------

#: The records of this session: one dict per ``outside.check`` call.
OUTSIDE_RECORDS = []


class OutsideCheck:
    """Compares a measured quantity with a published reference, asserts it and records it."""

    def __init__(self, test_id):
        self.test_id = test_id

    def check(self, measured, expected, *, quantity, source, rel=None, abs=None, cents=None, unit=""):
        """Assert |measured - expected| <= abs, |measured / expected - 1| <= rel, or
        |1200 log2(measured / expected)| <= cents (for frequencies), everywhere. Complex values
        are compared by rel.

        ``quantity`` says what is compared, ``source`` the publication (authors, year, table or
        equation; "from memory" where the value was recalled), ``unit`` the unit of ``expected``.
        The deviation recorded is the largest over the values.
        """
        if sum(t is not None for t in (rel, abs, cents)) != 1:
            raise TypeError("give exactly one of rel, abs and cents")
        complex_values = np.iscomplexobj(measured) or np.iscomplexobj(expected)
        if complex_values and rel is None:
            raise TypeError("complex values are compared by rel: |measured / expected - 1|")
        m = np.asarray(measured, dtype=complex if complex_values else float)
        e = np.asarray(expected, dtype=complex if complex_values else float)
        if rel is not None:
            deviation = float(np.max(np.abs(m / e - 1.0)))
            tolerance, kind = rel, "relative"
        elif cents is not None:
            deviation = float(np.max(np.abs(1200.0 * np.log2(m / e))))
            tolerance, kind = cents, "cent"
        else:
            deviation = float(np.max(np.abs(m - e)))
            tolerance, kind = abs, unit
        size = np.abs(e) if complex_values else e
        OUTSIDE_RECORDS.append({"test": self.test_id, "quantity": quantity, "source": source, "unit": unit,
                                "complex": bool(complex_values),
                                "reference_min": float(size.min()), "reference_max": float(size.max()),
                                "count": int(e.size), "tolerance": tolerance, "kind": kind,
                                "deviation": deviation})
        assert np.all(np.isfinite(m)) and deviation <= tolerance, (
            f"{quantity}: deviation {deviation:.3g} ({kind}) beyond {tolerance:.3g}; source: {source}")


@pytest.fixture
def outside(request):
    """An :class:`OutsideCheck` for this test."""
    return OutsideCheck(request.node.nodeid)


def pytest_sessionfinish(session, exitstatus):
    path = os.environ.get("DRIFT_OUTSIDE_RECORDS")
    if path:
        with open(path, "w", encoding="utf-8") as f:
            json.dump(OUTSIDE_RECORDS, f, indent=1)
