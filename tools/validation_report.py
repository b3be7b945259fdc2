"""Write docs/validation.md from the test suite's own outside checks.

Every comparison of drift with a published source in tests/ goes through the ``outside`` fixture
(tests/conftest.py), which asserts it and records the quantity, the source, the reference values,
the tolerance and the measured deviation. This script runs the whole suite with
DRIFT_OUTSIDE_RECORDS set, groups the records by test function and writes the report, so the
report can only show what the tests measured. It writes nothing if a test fails.
tests/test_validation.py checks that the report lists every test that makes an outside check.

Run from the repository root:  python tools/validation_report.py   (about as long as the suite)
"""

from __future__ import annotations

import collections
import datetime
import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
REPORT = ROOT / "docs" / "validation.md"

HEAD = """# Validation

Every row below is a test in `tests/` that compares a quantity drift computes with a published
source: a standard, a paper's equation or table, a handbook value, or an independent
general-purpose library (CoolProp, scipy). The test asserts the deviation stays within the
tolerance, which comes from the source's own precision; where a value or coefficient was recalled
rather than checked against print, the source says "from memory". The table is written by
`tools/validation_report.py` from the records the tests themselves make while they run (the
`outside` fixture of tests/conftest.py), so it shows what the suite measured on the date below;
`tests/test_validation.py` fails when a test with an outside check is missing from it.

Reference: the published value, or the range and number of values when a test compares many.
Tolerance and deviation are relative (a fraction) or in the unit shown. Deviation: the largest
measured over the values and, for a parametrized test, over its cases.

Generated {date} ({count} checks in {tests} tests).
"""

TAIL = """
## What has no published check yet

- **The in-bore air temperature while playing**, and so the warm-up times and the played
  steady-state drift: the thermal model (docs/physics.md, section 3) is built from published
  correlations, each checked above, and its energy balance closes to rounding (tests/test_thermal.py),
  but there is no published measurement of the air temperature along a played woodwind bore to
  compare the whole with. Its defaults (breath flow, breath temperature) are estimates.
- **The tone holes' outer end correction** (Dalmont et al. 2002) and the Lefebvre & Scavone
  (2012) and Dubos et al. (1999) hole corrections are checked above only against the formulas as
  recalled (from memory), not against the printed papers; the flute's lip cover is our own
  equal-area approximation with no published check.
- **The bundled instruments** are tuned by drift's own layout solver: that they sit near equal
  temperament at their design condition is a consistency check, not evidence that the model is
  right, and is not listed above.

## Resonance and played pitch

drift's playing frequency is the frequency of the bore's input-impedance peak (reed, lips) or
dip (flute) for the fingering and register. Players sound a little away from that resonance: the
reed's or lips' own dynamics pull the note, for example about 1 % above the impedance peak for
trombonists (Boutin et al. 2015, J. Acoust. Soc. Am. 137(3)), and players bend notes with the
embouchure. What drift predicts is the drift: the change of a note between two conditions (a
cold and a warm room, the start and the end of a warm-up), in which such a constant offset of
the player cancels to first order. The absolute offsets from equal temperament (`drift chart
--offsets`) carry that offset and should be read as the instrument's, not the player's.
"""


def run_suite(records_path: str) -> int:
    env = dict(os.environ, DRIFT_OUTSIDE_RECORDS=records_path)
    # the test of the report itself is left out: it reads the report being written
    return subprocess.run([sys.executable, "-m", "pytest", "-q", "-p", "no:cacheprovider", "tests",
                           "--deselect", "tests/test_validation.py::test_report_lists_every_outside_check"],
                          cwd=ROOT, env=env).returncode


def number(x: float) -> str:
    return f"{x:.3g}" if x else "0"


def reference_text(rows: list[dict]) -> str:
    low = min(r["reference_min"] for r in rows)
    high = max(r["reference_max"] for r in rows)
    count = sum(r["count"] for r in rows)
    unit = rows[0]["unit"]
    text = f"{low:.6g}" if count == 1 else f"{count} values, {low:.6g} to {high:.6g}"
    if rows[0].get("complex"):
        text = f"{count} complex values, magnitude {low:.6g} to {high:.6g}"
    return f"{text} {unit}".strip()


def tolerance_text(row: dict) -> str:
    if row["kind"] == "relative":
        return f"{number(row['tolerance'])} relative"
    return f"{number(row['tolerance'])} {row['kind']}".strip()


def deviation_text(rows: list[dict]) -> str:
    worst = max(r["deviation"] for r in rows)
    kind = rows[0]["kind"]
    return number(worst) if kind == "relative" else f"{number(worst)} {kind}".strip()


def report(records: list[dict], date: str) -> str:
    """The markdown report of ``records`` (the dicts the ``outside`` fixture writes)."""
    groups = collections.OrderedDict()
    for r in records:
        path, _, name = r["test"].partition("::")
        function = name.split("[")[0]
        groups.setdefault((path, function, r["quantity"], r["source"], r["kind"], r["tolerance"]), []).append(r)
    by_module = collections.OrderedDict()
    for key, rows in groups.items():
        by_module.setdefault(key[0], []).append((key, rows))
    tests = {(k[0], k[1]) for k in groups}
    lines = [HEAD.format(date=date, count=len(groups), tests=len(tests))]
    for module in sorted(by_module):
        lines += [f"## {module}", "",
                  "| quantity | source | reference | tolerance | deviation | test |",
                  "| --- | --- | --- | --- | --- | --- |"]
        for (path, function, quantity, source, _, _), rows in by_module[module]:
            cells = [quantity, source, reference_text(rows), tolerance_text(rows[0]), deviation_text(rows),
                     f"`{path}::{function}`"]
            lines.append("| " + " | ".join(c.replace("|", "/") for c in cells) + " |")
        lines.append("")
    return "\n".join(lines) + TAIL


def main() -> int:
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "records.json")
        if run_suite(path) != 0:
            print("the test suite failed: docs/validation.md left as it was", file=sys.stderr)
            return 1
        with open(path, encoding="utf-8") as f:
            records = json.load(f)
    text = report(records, datetime.date.today().isoformat())
    partial = REPORT.with_suffix(".md.tmp")
    partial.write_text(text, encoding="utf-8")
    partial.replace(REPORT)
    print(f"wrote {REPORT.relative_to(ROOT)}: {len(records)} records")
    return 0


if __name__ == "__main__":
    sys.exit(main())
