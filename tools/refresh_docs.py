"""Refresh the program output shown in README.md and docs/guide.md from real runs.

- README.md: the sample chart (`drift chart --climate winter-church --climate sunny-lawn
  --climate mountain-festival`, some notes left out) between the lines "A part of that chart" and
  the explanation under it.
- docs/guide.md: every code block holding one `drift ...` command (optionally after a `cd DIR`
  line, DIR relative to the repository root) that is followed directly by an output block
  (```` ``` ```` or ```` ```text ````): the output block is replaced by the command's standard
  output. Climate and instrument files the guide shows as ```` ```toml ```` blocks starting with
  `name = "X"` are written as X.toml into the folder the guide's commands run in (a temporary
  folder, unless a `cd` names one). The Python example under "From Python" is run and its printed
  output replaces the ```` ```text ```` block after it.

Prose that quotes figures from these outputs is not touched: read the diff (`git diff docs`)
and mend it by hand. Tests compare several of these blocks with real output (tests/test_api.py,
tests/test_sheet.py), so a stale block fails the suite.

Run from the repository root:  python tools/refresh_docs.py   (about a minute)
"""

from __future__ import annotations

import contextlib
import io
import re
import shlex
import subprocess
import sys
import tempfile
from pathlib import Path

ROOT = Path(__file__).resolve().parent.parent
README = ROOT / "README.md"
GUIDE = ROOT / "docs" / "guide.md"
README_COMMAND = ["chart", "--climate", "winter-church", "--climate", "sunny-lawn", "--climate", "mountain-festival"]
README_NOTES = {"D3", "G3", "E4", "A4", "E5", "B5"}

BLOCK = re.compile(r"```(\w*)\n(.*?)```\n", re.S)


def drift(args: list[str], cwd: Path) -> str:
    """Standard output of ``drift ARGS`` run in ``cwd`` (the package of this checkout)."""
    result = subprocess.run([sys.executable, "-m", "drift", *args], cwd=cwd, capture_output=True, text=True,
                            env={"PYTHONPATH": str(ROOT), "PATH": "/usr/bin:/bin", "COLUMNS": "100"})
    if result.returncode != 0:
        raise SystemExit(f"drift {' '.join(args)} failed in {cwd}:\n{result.stderr}")
    return result.stdout


def readme_sample(text: str) -> str:
    """The README with its sample chart replaced by a fresh one (the same notes kept)."""
    out = drift(README_COMMAND, ROOT).splitlines()
    keep = []
    for line in out:
        if line.startswith("joint mm:") or line.startswith("still out") or line.startswith("warning"):
            break
        note = line.split(" ")[0]
        if re.fullmatch(r"[A-G][#b]?\d", note) and note not in README_NOTES:
            continue
        if not line.strip() and keep and not keep[-1].strip():
            continue
        keep.append(line)
    while keep and not keep[-1].strip():
        keep.pop()
    keep = [line for i, line in enumerate(keep) if line.strip() or i < 3]
    start = text.index("```\nDrift of ")
    end = text.index("```\n", start + 4)
    return text[:start] + "```\n" + "\n".join(keep) + "\n" + text[end:]


def python_example(text: str) -> str:
    """The guide with the output of its "From Python" example refreshed."""
    i = text.index("## From Python")
    section = text[i:]
    code = re.search(r"```python\n(.*?)```", section, re.S).group(1)
    printed = io.StringIO()
    with contextlib.redirect_stdout(printed):
        exec(compile(code, str(GUIDE), "exec"), {"__name__": "guide"})
    shown = re.search(r"```text\n(.*?)```", section, re.S)
    return text[:i] + section[:shown.start(1)] + printed.getvalue() + section[shown.end(1):]


def guide_commands(text: str, folder: Path) -> str:
    """The guide with the output block after each single-command block refreshed."""
    for block in BLOCK.finditer(text):
        if block.group(1) == "toml":
            name = re.match(r'name = "([^"]+)"', block.group(2))
            if name:
                (folder / f"{name.group(1)}.toml").write_text(block.group(2), encoding="utf-8")
    pieces, at = [], 0
    blocks = list(BLOCK.finditer(text))
    for this, after in zip(blocks, blocks[1:]):
        lines = [line for line in this.group(2).splitlines() if line.strip()]
        commands = [line for line in lines if line.startswith("drift ")]
        moves = [line for line in lines if line.startswith("cd ")]
        between = text[this.end():after.start()]
        if (this.group(1) or len(commands) != 1 or len(lines) != len(commands) + len(moves)
                or between.strip() or after.group(1) not in ("", "text")):
            continue
        cwd = ROOT / moves[0][3:].strip() if moves else folder
        output = drift(shlex.split(commands[0])[1:], cwd)
        pieces.append(text[at:after.start(2)] + output)
        at = after.end(2)
    return "".join(pieces) + text[at:]


def main() -> None:
    README.write_text(readme_sample(README.read_text(encoding="utf-8")), encoding="utf-8")
    with tempfile.TemporaryDirectory() as tmp:
        text = guide_commands(GUIDE.read_text(encoding="utf-8"), Path(tmp))
    GUIDE.write_text(python_example(text), encoding="utf-8")
    print("refreshed README.md and docs/guide.md; now read `git diff README.md docs` and mend the prose")


if __name__ == "__main__":
    main()
