"""The public Python API in drift/__init__.py and the worked example of docs/guide.md."""

import contextlib
import io
import re
import subprocess
import sys
from pathlib import Path

import drift

GUIDE = Path(__file__).resolve().parent.parent / "docs" / "guide.md"


def test_import_is_cheap_and_does_not_load_coolprop():
    # Issue 8, "Done when": the public names resolve without loading CoolProp.
    code = ("import drift, sys; drift.drift_chart; drift.warmup_timeline; drift.find_resonances; "
            "drift.air_properties; drift.load_instrument; assert 'CoolProp' not in sys.modules")
    subprocess.run([sys.executable, "-c", code], check=True)


def test_all_lists_every_public_name_and_each_resolves():
    assert sorted(drift.__all__) == sorted(drift._API)
    for name in drift.__all__:
        assert getattr(drift, name).__name__ == name
        assert getattr(drift, name).__doc__, f"{name} has no docstring"


def test_unknown_attribute_is_an_attribute_error():
    try:
        drift.no_such_thing
    except AttributeError as error:
        assert "no_such_thing" in str(error)
    else:
        raise AssertionError("drift.no_such_thing resolved")


def _guide_example() -> tuple[str, str]:
    """The python block of the guide's "From Python" section and the output block after it."""
    text = GUIDE.read_text(encoding="utf-8")
    section = text[text.index("## From Python"):]
    code = re.search(r"```python\n(.*?)```", section, re.S).group(1)
    printed = re.search(r"```text\n(.*?)```", section, re.S).group(1)
    return code, printed


def test_guide_example_runs_and_prints_what_the_guide_shows():
    code, printed = _guide_example()
    out = io.StringIO()
    with contextlib.redirect_stdout(out):
        exec(compile(code, str(GUIDE), "exec"), {"__name__": "guide"})
    assert out.getvalue().strip() == printed.strip()


def test_docstring_examples_of_the_public_api():
    import doctest

    names = ["load_instrument", "bundled_instruments", "load_climate", "bundled_climates", "air_properties",
             "find_resonances", "drift_chart", "warmup_timeline"]
    for obj in [drift] + [getattr(drift, n) for n in names]:
        finder = doctest.DocTestFinder(recurse=False)
        tests = finder.find(obj, getattr(obj, "__name__", "drift"), globs={})
        assert any(t.examples for t in tests), f"{obj.__name__} has no Examples section"
        runner = doctest.DocTestRunner()
        for t in tests:
            runner.run(t)
        assert runner.failures == 0, obj.__name__
