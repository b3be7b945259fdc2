"""Run the command line as ``python -m drift``."""

from drift.cli import main

main(prog_name="drift")
