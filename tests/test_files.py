"""Strict reading of the project's TOML files (drift.files): messages name the file, the key and
what is allowed."""

import os
import tomllib

import pytest

from drift import files
from drift.errors import DriftError, InputFileError
from drift.files import Table


def test_read_toml_missing_malformed_and_unreadable(tmp_path):
    with pytest.raises(InputFileError) as info:
        files.read_toml(tmp_path / "missing.toml", "climate file")
    assert str(info.value) == f"{tmp_path / 'missing.toml'}: no such climate file"
    bad = tmp_path / "bad.toml"
    bad.write_text("name = \n")
    with pytest.raises(InputFileError, match=f"{bad}: not valid TOML"):
        files.read_toml(bad)
    with pytest.raises(InputFileError, match="is a folder"):
        files.read_toml(tmp_path)
    good = tmp_path / "good.toml"
    good.write_text('name = "x"\n[air]\ntemperature_c = 1.5\n')
    assert files.read_toml(good) == {"name": "x", "air": {"temperature_c": 1.5}}


@pytest.mark.parametrize("content, needle", [
    (b"name = \"\xff\xfe\"\n", "is not UTF-8 text (byte 9)"),
    (b"a = " + b"1" * 400 + b"\n", None),                       # parses; the key's check refuses it
    (b"a = " + b"1" * 5000 + b"\n", "a number too long to read"),
    (b"a = " + b"[" * 5000 + b"]" * 5000 + b"\n", "nested too deeply"),
    (b"# " + b"x" * 1_000_001 + b"\n", "is larger than 1 MB"),
])
def test_hostile_files_get_one_clear_line(tmp_path, content, needle):
    path = tmp_path / "odd.toml"
    path.write_bytes(content)
    if needle is None:
        value = files.read_toml(path)["a"]
        with pytest.raises(InputFileError) as info:
            Table({"a": value}, path, allowed=("a",)).number("a", low=0.0, high=10.0, unit="mm")
        assert "a is a number beyond any allowed range; allowed: 0 to 10 mm" in str(info.value)
        assert len(str(info.value)) < 200
        return
    with pytest.raises(InputFileError) as info:
        files.read_toml(path)
    message = str(info.value)
    assert message.startswith(f"{path}: ") and needle in message and "\n" not in message


def test_devices_pipes_and_long_names_are_refused_before_reading(tmp_path):
    fifo = tmp_path / "pipe.toml"
    os.mkfifo(fifo)
    with pytest.raises(InputFileError, match="is not a regular file"):
        files.read_toml(fifo)                   # would block forever if opened
    with pytest.raises(InputFileError, match="is not a regular file"):
        files.read_toml("/dev/zero")            # would be read without end
    with pytest.raises(InputFileError, match="cannot read the file"):
        files.read_toml(tmp_path / ("x" * 300 + ".toml"))
    with pytest.raises(InputFileError, match=r"^unknown instrument 'xxxxx.{32}\.\.\.'"):
        files.load_named("x" * 5000, tmp_path, "here", "instrument")


@pytest.mark.parametrize("value", [float("nan"), float("inf"), -float("inf")])
def test_nan_and_infinity_are_refused_by_key(tmp_path, value):
    with pytest.raises(InputFileError, match="x.toml: \\[air\\] temperature_c = .* outside the allowed range"):
        Table({"temperature_c": value}, tmp_path / "x.toml", "[air]", ("temperature_c",)).number(
            "temperature_c", low=-30.0, high=60.0)


def test_read_toml_text():
    assert files.read_toml_text("a = 1", "label") == {"a": 1}
    with pytest.raises(InputFileError, match="^label: not valid TOML"):
        files.read_toml_text("a = [", "label")


def test_choose_suggests_and_lists_the_allowed_names():
    options = ["yellow_brass", "abs", "ebonite"]
    assert files.choose("abs", options, "material") == "abs"
    with pytest.raises(InputFileError) as info:
        files.choose("yelow_brass", options, "material")
    assert str(info.value) == ("unknown material 'yelow_brass' (did you mean 'yellow_brass'?). "
                               "Allowed: abs, ebonite, yellow_brass")
    with pytest.raises(InputFileError) as info:
        files.choose("zzz", options, "material")
    assert "did you mean" not in str(info.value) and "Allowed: abs, ebonite, yellow_brass" in str(info.value)


def test_load_named_reads_bundled_names_and_paths(tmp_path):
    folder = tmp_path / "bundle"
    folder.mkdir()
    (folder / "cold-room.toml").write_text('name = "cold"\n')
    (folder / "notes.md").write_text("not a data file")
    assert set(files.bundled_files(folder)) == {"cold-room"}
    data, label = files.load_named("cold-room", folder, "rooms", "climate")
    assert data == {"name": "cold"} and label == "rooms/cold-room.toml"
    # a path (an existing file, a name ending in .toml or holding a /) is read as a file
    own = tmp_path / "mine.toml"
    own.write_text('name = "mine"\n')
    assert files.load_named(str(own), folder, "rooms", "climate") == ({"name": "mine"}, str(own))
    with pytest.raises(InputFileError, match="no such climate file"):
        files.load_named("elsewhere.toml", folder, "rooms", "climate")
    with pytest.raises(InputFileError) as info:
        files.load_named("cold-rom", folder, "rooms", "climate")
    assert str(info.value) == ("unknown climate 'cold-rom' (did you mean 'cold-room'?). Bundled: cold-room; "
                               "or give the path of a .toml file")
    (folder / "broken.toml").write_text("x = ")
    with pytest.raises(InputFileError, match="^rooms/broken.toml: not valid TOML"):
        files.load_named("broken", folder, "rooms", "climate")


def test_bundled_folder_falls_back_outside_a_package(tmp_path):
    assert files.bundled_folder("drift.no_such_package", tmp_path) == tmp_path
    assert files.bundled_folder("drift.data", tmp_path).joinpath("materials.toml").is_file()


def test_unknown_keys_get_a_suggestion_or_the_allowed_list():
    with pytest.raises(InputFileError) as info:
        Table({"temprature_c": 1}, "c.toml", "[air]", ("temperature_c", "co2_ppm"))
    assert str(info.value) == "c.toml: [air] temprature_c is not a known key; did you mean 'temperature_c'?"
    with pytest.raises(InputFileError) as info:
        Table({"colour": 1}, "c.toml", "", ("name", "air"))
    assert str(info.value) == "c.toml: colour is not a known key; allowed: name, air"
    with pytest.raises(InputFileError, match="c.toml: \\[air\\] must be a table"):
        Table(3, "c.toml", "[air]", ())


TOML = """
name = "x"
count = 3
flag = true
empty = ""
nan_value = nan
big = inf
word = "warm"
list = [1, 2]
near = -30.00003
[inner]
depth_mm = 12.5
[[item]]
size = 1
[[item]]
size = "large"
"""


@pytest.fixture
def top():
    return Table(tomllib.loads(TOML), "f.toml", "",
                 ("name", "count", "flag", "empty", "nan_value", "big", "word", "list", "near", "inner", "item"))


def test_numbers_are_typed_and_range_checked(top):
    assert top.number("count", low=0, high=10) == 3.0
    assert top.number("absent", 7.0) == 7.0
    assert top.number("absent") is None
    cases = [
        (dict(key="count", low=5, high=10, unit="mm"), "f.toml: count = 3 is outside the allowed range 5 to 10 mm"),
        (dict(key="count", low=5), "f.toml: count = 3 is outside the allowed range 5 or more"),
        (dict(key="count", high=1, unit="°C"), "f.toml: count = 3 is outside the allowed range 1 °C or less"),
        (dict(key="nan_value"), "f.toml: nan_value = nan is outside the allowed range"),
        (dict(key="big", low=0, high=1e9), "f.toml: big = inf is outside the allowed range 0 to 1e+09"),
        (dict(key="word"), "f.toml: word must be a number, not 'warm'"),
        (dict(key="flag"), "f.toml: flag must be a number, not True"),
        (dict(key="list"), "f.toml: list must be a number, not [1, 2]"),
        (dict(key="absent", required=True), "f.toml: absent is missing (a number is required)"),
        # just outside the range: every digit, not a rounded value that looks allowed
        (dict(key="count", low=3.00001, high=4), "f.toml: count = 3 is outside the allowed range 3.00001 to 4"),
        (dict(key="near", low=-30, high=60), "f.toml: near = -30.00003 is outside the allowed range -30 to 60"),
    ]
    for kwargs, message in cases:
        with pytest.raises(InputFileError) as info:
            top.number(**kwargs)
        assert str(info.value).startswith(message), (kwargs, str(info.value))


def test_strings_booleans_and_tables(top):
    assert top.string("name") == "x"
    assert top.string("absent", "dflt") == "dflt"
    with pytest.raises(InputFileError, match="f.toml: empty must be a non-empty string"):
        top.string("empty")
    with pytest.raises(InputFileError, match="f.toml: count must be a non-empty string"):
        top.string("count")
    with pytest.raises(InputFileError, match="f.toml: word = 'warm' is not allowed; use one of: hot, cold"):
        top.string("word", choices=("hot", "cold"))
    with pytest.raises(InputFileError, match="f.toml: absent is missing \\(a string is required\\)"):
        top.string("absent", required=True)
    assert top.boolean("flag", False) is True and top.boolean("absent", False) is False
    with pytest.raises(InputFileError, match="f.toml: count must be true or false"):
        top.boolean("count", False)
    inner = top.table("inner", ("depth_mm",))
    assert inner.where == "[inner]" and inner.number("depth_mm") == 12.5
    with pytest.raises(InputFileError, match="f.toml: \\[inner.deep\\] is missing"):
        inner.table("deep", (), required=True)
    assert top.table("absent", ("a",)).data == {}
    items = top.tables("item", ("size",))
    assert [t.where for t in items] == ["[[item]] #1", "[[item]] #2"]
    with pytest.raises(InputFileError, match="f.toml: \\[\\[item\\]\\] #2 size must be a number"):
        items[1].number("size")
    with pytest.raises(InputFileError, match="f.toml: name must be an array of tables"):
        top.tables("name", ())


def test_output_naming_an_input_file_is_refused(tmp_path):
    source = tmp_path / "pipe.toml"
    source.write_text("x")
    files.check_outputs([None], [str(source)])
    files.check_outputs([tmp_path / "other.json", None], [str(source), "cylindrical-reed"])
    with pytest.raises(DriftError, match="is named twice"):
        files.check_outputs([tmp_path / "a.json", tmp_path / "b.json", str(tmp_path / "a.json")], [])
    with pytest.raises(DriftError, match="is the input file"):
        files.check_outputs([None, str(source)], ["cylindrical-reed", str(source)])
