"""Write the invented example tuner log of docs/guide.md, docs/examples/practice-log.csv.

The log is made by the model itself, not measured: the cylindrical-reed played in the attic study
(docs/examples/attic-study.toml: 17 °C, 40 % RH) by an invented player whose breath flow is
0.13 L/s, breath temperature 33 °C and heat-exchange factor 1.5, with a constant embouchure offset
of -4 cents, a seeded random error of up to ±1 cent, and each reading rounded to the whole cent a
tuner shows. The plan: 12 min playing, a 4 min rest (one quick check of A4 at its end), 6 min
playing. ``drift fit`` on it should find those values back within their uncertainties.

Run from the repository root:  PYTHONPATH=. python tools/make_example_log.py
"""

from pathlib import Path

import numpy as np

from drift import fit
from drift.climate import Breath, Player, load_climate
from drift.instrument import load_instrument

ROOT = Path(__file__).resolve().parent.parent
LOG = ROOT / "docs" / "examples" / "practice-log.csv"
PLAN = "play:12,rest:4,play:6"
READINGS = [(0.25, "D4", "play"), (0.5, "A4", "play"), (1.0, "E5", "play"), (1.75, "D4", "play"),
            (3.0, "A4", "play"), (5.0, "E5", "play"), (8.0, "D4", "play"),
            (11.5, "E5", "play"), (15.75, "A4", "rest"), (17.0, "D4", "play"), (19.0, "A4", "play"),
            (21.5, "E5", "play")]
PLAYER = Player(breath=Breath(temperature_k=273.15 + 33.0), flow_m3_s=0.13e-3, heat_transfer_factor=1.5)
OFFSET_CENTS = -4.0


def main():
    from drift.climate import parse_plan

    inst = load_instrument("cylindrical-reed")
    room = load_climate(ROOT / "docs" / "examples" / "attic-study.toml").room
    minutes, notes, states = zip(*READINGS)
    log = fit.TunerLog(np.array(minutes) * 60.0, notes, np.zeros(len(notes)), states, "invented")
    model = fit.LogModel(inst, room, log, parse_plan(PLAN), PLAYER)
    noise = np.random.default_rng(13).uniform(-1.0, 1.0, len(notes))
    cents = np.round(model(model.start()) + OFFSET_CENTS + noise)
    lines = ["# Invented example tuner log (docs/guide.md): made by tools/make_example_log.py from the",
             "# model, not measured. cylindrical-reed in docs/examples/attic-study.toml, tuner at A4 = 440 Hz.",
             "minute,note,cents,state"]
    lines += [f"{m:g},{n},{c:+.0f},{s}" for m, n, c, s in zip(minutes, notes, cents, states)]
    LOG.write_text("\n".join(lines) + "\n", encoding="utf-8")
    print(f"wrote {LOG.relative_to(ROOT)}")


if __name__ == "__main__":
    main()
