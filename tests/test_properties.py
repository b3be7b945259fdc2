"""Property tests of bad input (issue 14, DEVELOPERS.md "Bad input"): random instrument and climate
documents and random option values give either a valid result or the project's own input error
(exit status 2, one to three lines on stderr), never a traceback, a NaN or a warning (the suite
turns warnings into errors, pyproject.toml).

The documents are TOML texts built from strategies that mix plausible values with wrong types,
odd strings, huge integers, NaN and infinity. Each example costs at most one resonance search of
one bore state (uniform room air, few resonances), so the module stays within about 20 s of CPU.
These are checks of the program's own contract, not of its physics: no outside source applies.
"""

import atexit
import json
import math
import shutil
import tempfile
from pathlib import Path

from hypothesis import HealthCheck, event, given, settings, strategies as st

from conftest import invoke

# --------------------------------------------------------------------------------------------
# TOML text from Python values (tomllib reads only; NaN, infinity and huge integers are written
# as TOML spells them)
# --------------------------------------------------------------------------------------------


def toml_value(value) -> str:
    if isinstance(value, bool):
        return "true" if value else "false"
    if isinstance(value, int):
        return str(value)
    if isinstance(value, float):
        if math.isnan(value):
            return "nan"
        if math.isinf(value):
            return "inf" if value > 0 else "-inf"
        return repr(value)
    if isinstance(value, str):
        return toml_string(value)
    if isinstance(value, list):
        return "[" + ", ".join(toml_value(v) for v in value) + "]"
    if isinstance(value, dict):
        return "{" + ", ".join(f"{toml_string(k)} = {toml_value(v)}" for k, v in value.items()) + "}"
    raise TypeError(value)


def toml_string(text: str) -> str:
    """A TOML basic string: quotes and backslashes escaped, control characters as \\uXXXX."""
    escaped = (f"\\u{ord(c):04x}" if ord(c) < 0x20 or ord(c) == 0x7F else "\\" + c if c in '"\\' else c
               for c in text)
    return '"' + "".join(escaped) + '"'


def toml_text(doc: dict) -> str:
    """A document of top-level keys, tables (dict) and arrays of tables (list of dict)."""
    lines = []
    for key, value in doc.items():
        if not isinstance(value, dict) and not (isinstance(value, list) and value and
                                                 all(isinstance(v, dict) for v in value)):
            lines.append(f"{toml_string(key)} = {toml_value(value)}")
    for key, value in doc.items():
        if isinstance(value, dict):
            lines.append(f"[{toml_string(key)}]")
            lines += [f"{toml_string(k)} = {toml_value(v)}" for k, v in value.items()]
        elif isinstance(value, list) and value and all(isinstance(v, dict) for v in value):
            for item in value:
                lines.append(f"[[{toml_string(key)}]]")
                lines += [f"{toml_string(k)} = {toml_value(v)}" for k, v in item.items()]
    return "\n".join(lines) + "\n"


def test_toml_text_round_trips():
    import tomllib

    doc = {"name": "p", "n": 10 ** 30, "x": -1.5e300, "bore": {"stations_mm": [[0, 1.0]]},
           "hole": [{"name": 'a"b\\'}, {"name": "\u00e9\n"}]}
    assert tomllib.loads(toml_text(doc)) == doc
    back = tomllib.loads(toml_text({"v": [math.nan, math.inf, -math.inf]}))["v"]
    assert math.isnan(back[0]) and back[1:] == [math.inf, -math.inf]


# --------------------------------------------------------------------------------------------
# Strategies
# --------------------------------------------------------------------------------------------

#: Values that are wrong for any number key: NaN, infinities, integers beyond float range, wrong
#: types and odd strings.
BAD_NUMBERS = st.one_of(
    st.just(math.nan), st.just(math.inf), st.just(-math.inf),
    st.integers(min_value=10 ** 309, max_value=10 ** 400), st.just(-(10 ** 320)),
    st.floats(min_value=1e300, max_value=1.7e308), st.just(-1e308),
    st.text(max_size=6), st.booleans(), st.lists(st.integers(0, 3), max_size=2), st.just({}),
)
ODD_STRINGS = st.one_of(st.just(""), st.just(" "), st.text(max_size=12), st.just("\u0000\u202e"),
                        st.just("x" * 300))


def number(low, high, bad=0.05):
    """A number in [low, high] (float or whole); when ``bad`` is over 0.15 (a wild document), also
    numbers slightly outside the range and wrong values."""
    good = st.one_of(st.floats(min_value=low, max_value=high), st.integers(math.ceil(low), math.floor(high)),
                     st.sampled_from([low, high]))
    edge = st.sampled_from([low - 1.0, high + 1.0, low - 1e-6 * max(1.0, abs(low)), high * 1.0001 + 1e-3])
    return good if bad < 0.15 else st.one_of(good, edge, BAD_NUMBERS)


@st.composite
def maybe(draw, strategy, chance=0.5):
    """``strategy``'s value, or the marker ``None`` (key left out)."""
    return draw(strategy) if draw(COIN) < chance else None


#: A uniform number in [0, 1) for the choices between good and bad values (hypothesis's own numbers
#: favour the ends of their range, which would make nearly every document bad).
COIN = st.randoms(use_true_random=True).map(lambda r: r.random())


def put(table: dict, key: str, value):
    if value is not None:
        table[key] = value


GOOD_NOTE_NAMES = ["C4", "D4", "F#4", "Bb3", "A4", "C-1", "G9", "C#5", "Ebb4", "B##2"]
NOTE_NAMES = st.one_of(
    st.sampled_from(GOOD_NOTE_NAMES),
    st.sampled_from(["C99999", "H2", "C10", "C-2", "c4", "C#", "4", "Cb", "A4 ", "Z#1"]),
    ODD_STRINGS,
)


@st.composite
def instrument_documents(draw):
    """An instrument document: mostly well-formed with a few bad keys or values, sometimes wrong
    throughout. Well-formed bores are 50 to 2000 mm long (the search stays cheap)."""
    wild = draw(st.booleans())         # a document with bad values drawn at every key
    chance = 0.3 if wild else 0.05

    def value(good, bad=BAD_NUMBERS):
        return draw(st.one_of(bad, good)) if draw(COIN) < chance else draw(good)

    doc: dict = {}
    put(doc, "name", value(st.sampled_from(["pipe", "a b", "\u00e9t\u00e9"]), ODD_STRINGS | BAD_NUMBERS))
    excitation = value(st.sampled_from(["reed", "lips", "jet"]), st.sampled_from(["Reed", "", "flute", 1]))
    put(doc, "excitation", excitation)
    put(doc, "material", draw(maybe(st.sampled_from(["tropical_hardwood", "brass", "plastic", "wood!", 3]), 0.3)))
    put(doc, "reference_temperature_c", draw(maybe(number(-30.0, 60.0, chance), 0.2)))
    put(doc, "wall_mm", draw(maybe(number(0.1, 50.0, chance), 0.2)))
    if draw(COIN) < 0.05:
        doc[draw(st.sampled_from(["colour", "holes", "Name", "bore_mm"]))] = 1

    # the bore: stations from 0, strictly increasing, or a broken list
    n = draw(st.integers(2, 5))
    length = draw(st.floats(50.0, 2000.0))
    xs = [0.0] + sorted(draw(st.lists(st.floats(1.0, length - 1.0), min_size=n - 2, max_size=n - 2,
                                      unique=True))) + [length]
    stations = [[x, draw(number(0.5, 40.0, chance))] for x in xs]
    if draw(COIN) < chance:
        broken = draw(st.sampled_from(["swap", "start", "short", "triple", "type", "nested", "pos"]))
        if broken == "swap":
            stations[0], stations[-1] = stations[-1], stations[0]
        elif broken == "start":
            stations[0][0] = 5.0
        elif broken == "short":
            stations = stations[:1]
        elif broken == "triple":
            stations[1] = stations[1] + [1.0]
        elif broken == "type":
            stations = draw(st.sampled_from(["0, 10", 7, [1, 2]]))
        elif broken == "nested":
            stations = [[[[0.0]]], [1.0, 2.0]]
        else:
            stations[-1][0] = draw(BAD_NUMBERS)
    if draw(COIN) > chance / 3:
        doc["bore"] = {"stations_mm": stations}
    elif draw(st.booleans()):
        doc["bore"] = draw(st.sampled_from([[], "bore", {"stations": stations}]))

    # the input end, keys of any excitation (a key of another excitation is unknown)
    inp: dict = {}
    keys = {"reed": [("reed_volume_mm3", 0, 1e6), ("cavity_volume_mm3", 0, 1e6)],
            "lips": [("cup_volume_mm3", 0, 1e6), ("throat_diameter_mm", 0.5, 50), ("throat_length_mm", 0, 100),
                     ("backbore_length_mm", 0, 300)],
            "jet": [("embouchure_position_mm", 0, 0.4 * length), ("embouchure_diameter_mm", 0.5, 12),
                    ("embouchure_chimney_mm", 0, 50), ("lip_cover_pct", 0, 70),
                    ("embouchure_outer_correction_mm", 0, 100)]}
    kind = excitation if excitation in keys and draw(COIN) > chance else draw(st.sampled_from(list(keys)))
    for key, low, high in keys[kind]:
        put(inp, key, draw(maybe(number(low, high, chance), 0.4)))
    if inp:
        doc["input"] = inp

    holes = []
    widths = [pair[1] for pair in stations if isinstance(pair, list) and len(pair) == 2] \
        if isinstance(stations, list) else []
    narrowest = min((d for d in widths if isinstance(d, (int, float)) and 0.5 <= d <= 40.0), default=10.0)
    for i in range(draw(st.integers(0, 3))):
        hole: dict = {}
        put(hole, "name", value(st.just(f"h{i}"), st.sampled_from(["h0", "", 5])))
        put(hole, "position_mm", value(st.floats(0.25 + 0.2 * i, 0.3 + 0.2 * i).map(lambda f: f * length),
                                       st.floats(-10.0, 2 * length) | BAD_NUMBERS))
        put(hole, "diameter_mm", value(st.floats(0.1, 0.9).map(lambda f: f * narrowest),
                                       st.floats(0.0, 60.0) | BAD_NUMBERS))
        put(hole, "chimney_mm", draw(maybe(number(0.0, 100.0, chance), 0.5)))
        holes.append(hole)
    if holes:
        doc["hole"] = holes
    names = [h.get("name") for h in holes if isinstance(h.get("name"), str)]

    # valves (loops drawn like the bore) and a slide, sometimes
    valves = []
    for i in range(draw(st.integers(0, 2)) if draw(COIN) < 0.3 else 0):
        valve: dict = {}
        put(valve, "name", value(st.just(f"v{i}"), st.sampled_from(["v0", "", 7])))
        put(valve, "position_mm", value(st.floats(0.1, 0.2).map(lambda f, i=i: (f + 0.1 * i) * length),
                                        st.floats(-10.0, 2 * length) | BAD_NUMBERS))
        loop = draw(st.floats(1.0, 0.5 * length))
        put(valve, "stations_mm", value(st.just([[0.0, draw(number(0.5, 40.0))], [loop, draw(number(0.5, 40.0))]]),
                                        st.sampled_from([[[5.0, 10.0], [20.0, 10.0]], [[0.0, 10.0]], "loop", 3])))
        valves.append(valve)
    if valves:
        doc["valve"] = valves
    if draw(COIN) < 0.15:
        top = draw(number(1.0, 1000.0, chance))
        doc["slide"] = {"position_mm": value(st.floats(0.5, 0.6).map(lambda f: f * length)),
                        "positions_mm": value(st.just([0.0, 10.0, 30.0]), st.sampled_from([[5.0], [], [0, 40, 20]])),
                        "max_travel_mm": top}
    valve_names = [v.get("name") for v in valves if isinstance(v.get("name"), str)] + ["nov"] * (chance > 0.1)

    notes = []
    for _ in range(draw(st.integers(0, 3))):
        note: dict = {}
        put(note, "name", value(st.sampled_from(GOOD_NOTE_NAMES), NOTE_NAMES | BAD_NUMBERS))
        choices = names + ["nohole"] * (chance > 0.1)
        closed = (draw(st.lists(st.sampled_from(choices), max_size=3, unique=True))
                  if choices and draw(COIN) < 0.7 else None)
        put(note, "closed", value(st.just(closed), st.sampled_from(["h0", [1], [["h0"]]])) if closed is not None
            else None)
        if draw(st.booleans()):
            note["register"] = value(st.integers(1, 3), st.sampled_from([0, 13, 1.5, "1", True]))
        if valve_names and draw(COIN) < 0.5:
            note["valves"] = draw(st.lists(st.sampled_from(valve_names), max_size=2, unique=True))
        if "slide" in doc and draw(COIN) < 0.5:
            if draw(st.booleans()):
                note["slide_position"] = value(st.integers(1, 3), st.sampled_from([0, 4, 1.5, "2"]))
            else:
                note["slide_mm"] = draw(number(0.0, 30.0, chance))
        notes.append(note)
    if notes:
        doc["note"] = notes

    if draw(COIN) < 0.4:
        design: dict = {}
        put(design, "temperature_c", draw(maybe(number(-30.0, 60.0, chance))))
        put(design, "relative_humidity_pct", draw(maybe(number(0.0, 100.0, chance))))
        put(design, "pressure_kpa", draw(maybe(number(50.0, 110.0, chance))))
        put(design, "co2_ppm", draw(maybe(number(0.0, 100000.0, chance))))
        put(design, "a4_hz", draw(maybe(number(380.0, 480.0, chance))))
        put(design, "playing", draw(maybe(st.sampled_from([False, False, True, "yes", 1]), 0.3)))
        doc["design"] = design
    if draw(COIN) < 0.4:
        tuning: dict = {}
        put(tuning, "position_mm", value(st.floats(0.0, length)))
        put(tuning, "min_change_mm", draw(maybe(number(-50.0, 0.0, chance), 0.3)))
        put(tuning, "max_change_mm", draw(maybe(number(0.0, 50.0, chance), 0.3)))
        doc["tuning"] = tuning
    return doc


@st.composite
def climate_documents(draw):
    """A climate document with room, player and later conditions, good and bad values mixed."""
    chance = 0.3 if draw(st.booleans()) else 0.05
    doc: dict = {}
    put(doc, "name", draw(ODD_STRINGS) if draw(COIN) < chance else "room")
    put(doc, "description", draw(maybe(ODD_STRINGS | BAD_NUMBERS if chance > 0.1 else st.just("a room"), 0.2)))
    air: dict = {}
    put(air, "temperature_c", draw(number(-30.0, 60.0, chance)) if draw(COIN) > chance / 2 else None)
    for key, low, high in (("relative_humidity_pct", 0, 100), ("pressure_kpa", 50, 110), ("altitude_m", -400, 5000),
                           ("co2_ppm", 0, 100000), ("sun_w_m2", 0, 1200), ("wind_m_s", 0, 20)):
        put(air, key, draw(maybe(number(low, high, chance), 0.3)))
    if draw(COIN) > chance / 3:
        doc["air"] = air
    if draw(st.booleans()):
        player: dict = {}
        put(player, "playing", draw(maybe(st.sampled_from([True, False, "no", 0]), 0.4)))
        put(player, "minutes_played", draw(maybe(number(0.0, 600.0, chance), 0.3)))
        put(player, "breath_temperature_c", draw(maybe(number(-30.0, 60.0, chance), 0.3)))
        put(player, "breath_co2_pct", draw(maybe(number(0.0, 10.0, chance), 0.3)))
        put(player, "breath_o2_pct", draw(maybe(number(5.0, 21.0, chance), 0.3)))
        put(player, "player_file", draw(maybe(st.sampled_from(["missing.toml", "", 3, "/dev/null"]), 0.1)))
        doc["player"] = player
    changes = []
    minutes = sorted(draw(st.lists(st.floats(0.5, 600.0), max_size=3, unique=True)))
    for minute in minutes:
        change: dict = {}
        put(change, "minute", draw(number(0.0, 600.0, chance)) if draw(COIN) < chance else minute)
        for key, low, high in (("temperature_c", -30, 60), ("relative_humidity_pct", 0, 100),
                               ("pressure_kpa", 50, 110), ("sun_w_m2", 0, 1200), ("wind_m_s", 0, 20)):
            put(change, key, draw(maybe(number(low, high, chance), 0.3)))
        if draw(COIN) < chance / 3:
            change["altitude_m"] = 100
        changes.append(change)
    if changes:
        doc["change"] = changes
    return doc


# --------------------------------------------------------------------------------------------
# Checks
# --------------------------------------------------------------------------------------------

#: The folder of the documents (hypothesis runs many examples in one test: no tmp_path each).
_FOLDER = Path(tempfile.mkdtemp(prefix="drift-properties-"))
atexit.register(shutil.rmtree, _FOLDER, ignore_errors=True)


def written(text: str, name: str = "doc.toml") -> Path:
    path = _FOLDER / name
    path.write_text(text, encoding="utf-8")
    return path


def _refuse_constant(name):
    raise AssertionError(f"{name} in JSON output")


def assert_valid_or_refused(result, *words):
    """Exit 0 with JSON free of NaN and infinity, or the project's input error: exit 2 through
    SystemExit, one to three lines on stderr starting 'drift: error:', nothing on stdout."""
    if result.exit_code == 0:
        assert result.exception is None
        return json.loads(result.stdout, parse_constant=_refuse_constant)
    assert result.exit_code == 2, (result.exit_code, result.stderr, result.exception)
    assert isinstance(result.exception, SystemExit), repr(result.exception)
    assert result.stdout == ""
    lines = [line for line in result.stderr.splitlines() if line.strip()]
    assert 1 <= len(lines) <= 3, result.stderr
    assert lines[0].startswith("drift: error: "), result.stderr
    for word in words:
        assert word in result.stderr, (word, result.stderr)
    return None


def all_numbers(doc):
    """Every number of a JSON document."""
    if isinstance(doc, dict):
        for value in doc.values():
            yield from all_numbers(value)
    elif isinstance(doc, list):
        for value in doc:
            yield from all_numbers(value)
    elif isinstance(doc, (int, float)) and not isinstance(doc, bool):
        yield doc


PROPERTY = settings(max_examples=60, deadline=None, suppress_health_check=[HealthCheck.too_slow])


@PROPERTY
@given(instrument_documents())
def test_random_instrument_documents_give_resonances_or_an_input_error(doc):
    """``drift resonances FILE --count 2``: finite, ascending, positive resonances, or an error
    naming the file."""
    path = written(toml_text(doc), "instrument.toml")
    result = invoke("resonances", path, "--count", 2, "--format", "json", code=None)
    doc_out = assert_valid_or_refused(result, str(path))
    event(f"exit status {result.exit_code}")
    if doc_out is None:
        return
    for row in doc_out["fingerings"]:
        f = row["resonances_hz"]
        assert len(f) <= 2 and all(0 < x < 15000.0 for x in f) and f == sorted(f), row


def test_instrument_errors_name_the_file():
    """The property above accepts any input error; this pins that one from a file names it."""
    path = written(toml_text({"name": "p", "excitation": "reed", "bore": {"stations_mm": [[0, 10], [100, math.nan]]}}))
    result = invoke("resonances", path, code=None)
    assert_valid_or_refused(result, str(path), "stations_mm entry 2 diameter")
    assert result.exit_code == 2


def assert_input_error(error, path):
    """The project's input error: one to three lines naming the file."""
    lines = [line for line in str(error).splitlines() if line.strip()]
    assert 1 <= len(lines) <= 3, str(error)
    assert str(path) in str(error), str(error)


@settings(max_examples=40, deadline=None)
@given(st.binary(max_size=200) | st.text(max_size=200).map(lambda t: t.encode("utf-8")))
def test_random_bytes_as_an_instrument_or_a_climate_file(raw):
    """Any bytes as a file: a valid result or an input error naming the file."""
    from drift.climate import load_climate
    from drift.errors import DriftError

    path = _FOLDER / "raw.toml"
    path.write_bytes(raw)
    assert_valid_or_refused(invoke("resonances", path, "--count", 1, "--format", "json", code=None), str(path))
    try:
        load_climate(path)
    except DriftError as error:
        assert_input_error(error, path)


@PROPERTY
@given(climate_documents())
def test_random_climate_documents_load_or_give_an_input_error(doc):
    """A climate file loads into finite conditions whose air (with breath mixed in) has finite
    properties at every minute of its weather, or gives an input error naming the file."""
    from drift import air
    from drift.climate import load_climate
    from drift.errors import DriftError

    path = written(toml_text(doc), "climate.toml")
    try:
        where = load_climate(path)
    except DriftError as error:
        assert_input_error(error, path)
        event("refused")
        return
    event("loaded")
    weather = where.schedule()
    for minute in (0.0, *(t / 60.0 for t in weather.times_s), 601.0):
        room = weather.room_at(minute * 60.0)
        state = air.air_properties(room, 0.5, where.player.breath, temperature_k=where.player.breath.temperature_k)
        props = state.properties
        for name in ("sound_speed", "density", "viscosity", "gamma"):
            assert math.isfinite(float(getattr(props, name))) and float(getattr(props, name)) > 0, name


# --------------------------------------------------------------------------------------------
# Options
# --------------------------------------------------------------------------------------------

AIR_RANGES = {"--temp": (-30.0, 60.0), "--rh": (0.0, 100.0), "--pressure": (50.0, 110.0),
              "--altitude": (-400.0, 5000.0), "--co2": (0.0, 100000.0), "--breath": (0.0, 1.0),
              "--breath-temp": (-30.0, 60.0), "--breath-co2": (0.0, 10.0)}


def in_range(option):
    low, high = AIR_RANGES[option]
    return st.one_of(st.floats(min_value=low, max_value=high), st.sampled_from([low, high]))


@st.composite
def air_options(draw):
    """Allowed values for any subset of drift air's options (--pressure or --altitude, not both)."""
    options = [o for o in AIR_RANGES if draw(st.booleans())]
    if "--pressure" in options and "--altitude" in options:
        options.remove(draw(st.sampled_from(["--pressure", "--altitude"])))
    args = []
    for option in options:
        args += [option, repr(draw(in_range(option)))]
    return args


@PROPERTY
@given(air_options(), st.sampled_from(["json", "csv", "table"]), st.sampled_from(["table", "coolprop"]))
def test_every_combination_of_allowed_air_options_works(args, fmt, source):
    """Both sources of gas properties: the shipped table and CoolProp itself (the table restored
    after, for the tests that call the library directly)."""
    from drift import air

    try:
        result = invoke("--gas-properties", source, "air", *args, "--format", fmt, code=None)
    finally:
        air.set_property_source("table")
    assert result.exit_code == 0, (args, result.stderr, result.exception)
    if fmt == "json":
        numbers = list(all_numbers(json.loads(result.stdout, parse_constant=_refuse_constant)))
        assert numbers and all(math.isfinite(x) for x in numbers)
    else:
        assert "nan" not in result.stdout.lower() and "inf" not in result.stdout.lower()


@st.composite
def out_of_range(draw):
    option = draw(st.sampled_from(sorted(AIR_RANGES)))
    low, high = AIR_RANGES[option]
    value = draw(st.one_of(st.sampled_from(["nan", "inf", "-inf", "NaN", "1e999", "x", ""]),
                           st.floats(max_value=low, exclude_max=True, allow_infinity=False).map(repr),
                           st.floats(min_value=high, exclude_min=True, allow_infinity=False).map(repr)))
    return option, value


@PROPERTY
@given(out_of_range())
def test_out_of_range_and_non_finite_air_options_are_refused_in_one_line(case):
    option, value = case
    result = invoke("air", f"{option}={value}", code=None)
    assert_valid_or_refused(result, option)
    assert result.exit_code == 2
    assert len(result.stderr.strip().splitlines()) == 1


@st.composite
def resonance_options(draw):
    """Options of drift resonances on a bundled instrument: allowed values, or one bad value."""
    args = [draw(st.sampled_from(["cylindrical-reed", "side-blown-flute", "conical-reed"]))]
    for option in ("--temp", "--rh", "--co2"):
        if draw(st.booleans()):
            args += [option, repr(draw(in_range(option)))]
    where = draw(st.sampled_from(["--pressure", "--altitude", None, "both"]))
    for option in (["--pressure", "--altitude"] if where == "both" else [where] if where else []):
        args += [option, repr(draw(in_range(option)))]
    args += ["--count", str(draw(st.integers(1, 3)))]
    if draw(st.booleans()):
        args += ["--note", draw(NOTE_NAMES.filter(lambda t: not t.startswith("-")))]
    if draw(COIN) < 0.3:
        args += [draw(st.sampled_from(["--temp", "--rh", "--count", "--co2"])),
                 draw(st.sampled_from(["nan", "-inf", "1e400", "0x10", "21", "-31", "200000"]))]
    return args


@settings(max_examples=25, deadline=None)
@given(resonance_options())
def test_random_resonance_options_give_a_result_or_one_line(args):
    result = invoke("resonances", *args, "--format", "json", code=None)
    doc = assert_valid_or_refused(result)
    event(f"exit status {result.exit_code}")
    if doc is not None:
        assert all(math.isfinite(x) for x in all_numbers(doc))
