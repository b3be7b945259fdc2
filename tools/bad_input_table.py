"""Write the table of docs/formats.md "Bad input and its messages" from real runs.

The cases are the list ``CASES`` of tests/test_bad_input.py (the one list: the test checks that the
table shows exactly these cases and that each still gives the message shown). Each case runs
in-process in a fresh temporary folder; its stderr becomes the message cell. The table goes
between the markers ``TABLE_START`` and ``TABLE_END`` of that module. A case that does not end with
exit status 2 and one to three lines on stderr stops the tool.

Run from the repository root:  python tools/bad_input_table.py   (a few seconds)
"""

from __future__ import annotations

import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
sys.path[:0] = [str(ROOT), str(ROOT / "tests")]

import test_bad_input as cases  # noqa: E402


def main() -> int:
    messages = []
    for number, case in enumerate(cases.CASES, start=1):
        with tempfile.TemporaryDirectory() as folder:
            result = cases.run_case(case, Path(folder))
        lines = [line for line in result.stderr.splitlines() if line.strip()]
        if result.exit_code != 2 or not 1 <= len(lines) <= 3 or result.stdout:
            print(f"case {number} ({case[0]}): exit {result.exit_code}, stderr {result.stderr!r}, "
                  f"exception {result.exception!r}", file=sys.stderr)
            return 1
        messages.append(cases.message_cell(result.stderr))
    text = cases.DOC.read_text(encoding="utf-8")
    before, rest = text.split(cases.TABLE_START, 1)
    _, after = rest.split(cases.TABLE_END, 1)
    cases.DOC.write_text(before + cases.TABLE_START + "\n\n" + cases.table_rows(messages) + "\n"
                         + cases.TABLE_END + after, encoding="utf-8")
    print(f"{len(messages)} cases written to {cases.DOC.relative_to(ROOT)}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
