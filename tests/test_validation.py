"""docs/validation.md against the tests: every test that makes an outside check (takes the
``outside`` fixture) is listed in it, and every test it lists still exists. The report itself is
written by tools/validation_report.py from the records those tests make."""

import ast
import re
from pathlib import Path

TESTS = Path(__file__).resolve().parent
REPORT = TESTS.parent / "docs" / "validation.md"


def outside_check_tests() -> set[str]:
    found = set()
    for path in sorted(TESTS.glob("test_*.py")):
        for node in ast.walk(ast.parse(path.read_text(encoding="utf-8"))):
            if isinstance(node, ast.FunctionDef) and node.name.startswith("test_") and \
                    any(a.arg == "outside" for a in node.args.args):
                found.add(f"tests/{path.name}::{node.name}")
    return found


def test_report_lists_every_outside_check():
    listed = set(re.findall(r"`(tests/test_\w+\.py::test_\w+)`", REPORT.read_text(encoding="utf-8")))
    expected = outside_check_tests()
    assert len(expected) > 20
    assert not expected - listed, f"rerun tools/validation_report.py: missing {sorted(expected - listed)}"
    assert not listed - expected, f"rerun tools/validation_report.py: gone {sorted(listed - expected)}"
