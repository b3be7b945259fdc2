"""Choose the bore shapes of the bundled brass instruments (``BRASS_SHAPES`` in
tools/make_demo_instruments.py) by least squares over all their notes.

The residuals are those of tools/make_demo_instruments.py (:func:`brass_residuals`: each note's
deviation from equal temperament at the [design] condition, played, plus a steep penalty beyond
8 cent for every note not on three valves); the free variables are the shape's mouthpiece (cup
volume, throat diameter, backbore length), lead pipe (length, entry diameter), bell tail (length,
end diameter), flare (length, power), the bore length and the valve loops or slide travels, within
the bounds below. It starts from the shape in the generator and prints the shape it ends at, to be
rounded and written into ``BRASS_SHAPES`` by hand; the generator then refits only the lengths. A
fit on notes computed by drift's own model: it tunes the invented geometry to the model, it is no
evidence that the model is right.

Run from the repository root:  python tools/fit_brass_shapes.py valved-brass|slide-brass [max_nfev]
(about 1 minute for the valved and 3 for the slide instrument from the shapes written there, on
the two-core development machine; 2 and 6 to 11 minutes from rougher shapes).
"""

from __future__ import annotations

import sys
import time
from pathlib import Path

import numpy as np
from scipy.optimize import least_squares

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

import make_demo_instruments as gen  # noqa: E402

#: The free shape values: (key, index in a pair or None, scale [mm or mm^3 per unit], bounds)
#: per instrument. The lead pipe ends before the tuning slide; the cylinder must run past the
#: valves (valved: 500 mm) or the slide (950 mm): CYLINDER_END_MM.
FREE = {
    "valved-brass": [("cup_volume_mm3", None, 1000.0, (500.0, 3000.0)), ("throat_diameter_mm", None, 1.0, (3.0, 4.5)),
                     ("backbore_length_mm", None, 100.0, (30.0, 110.0)), ("lead", 0, 100.0, (120.0, 370.0)),
                     ("lead", 1, 1.0, (7.5, 11.4)), ("tail", 0, 100.0, (20.0, 700.0)), ("tail", 1, 1.0, (11.9, 25.0)),
                     ("flare", 0, 100.0, (200.0, 700.0)), ("power", None, 1.0, (0.4, 1.3))],
    "slide-brass": [("cup_volume_mm3", None, 1000.0, (500.0, 12000.0)), ("throat_diameter_mm", None, 1.0, (3.0, 7.5)),
                    ("backbore_length_mm", None, 100.0, (30.0, 160.0)), ("lead", 0, 100.0, (120.0, 680.0)),
                    ("lead", 1, 1.0, (7.5, 12.4)), ("tail", 0, 100.0, (20.0, 1200.0)), ("tail", 1, 1.0, (12.9, 30.0)),
                    ("flare", 0, 100.0, (200.0, 1500.0)), ("power", None, 1.0, (0.4, 1.3))],
}
CYLINDER_END_MM = {"valved-brass": 500.0, "slide-brass": 950.0}


def shape_of(name: str, z) -> dict:
    """The shape with the free values ``z`` (in units of their scale)."""
    shape = {k: list(v) if isinstance(v, tuple) else v for k, v in gen.BRASS_SHAPES[name].items()}
    for (key, i, scale, _), v in zip(FREE[name], z):
        if i is None:
            shape[key] = float(v * scale)
        else:
            shape[key][i] = float(v * scale)
    return {k: tuple(v) if isinstance(v, list) else v for k, v in shape.items()}


def main(name: str, max_nfev: int = 60) -> None:
    free, start = FREE[name], gen.BRASS_SHAPES[name]
    x0 = [(start[k] if i is None else start[k][i]) / s for k, i, s, _ in free]
    lengths0 = np.array([start["length"], *start["lengths"]]) / 100.0          # [dm]
    z0 = np.concatenate([x0, lengths0])
    low = np.concatenate([[b[0] / s for _, _, s, b in free], lengths0 - 10.0])
    high = np.concatenate([[b[1] / s for _, _, s, b in free], lengths0 + 10.0])
    count = len(gen.brass_residuals(name, np.zeros(len(gen.VALVED_NOTES if name == "valved-brass"
                                                          else gen.SLIDE_NOTES))))

    def residuals(z):
        shape, lengths = shape_of(name, z[:len(free)]), z[len(free):] * 100.0
        short = CYLINDER_END_MM[name] - (lengths[0] - shape["flare"][0] - shape["tail"][0])
        if short > 0:                           # the bell would reach the valves or the slide
            return np.full(count, 50.0 + short)
        return gen.brass_residuals(name, gen.brass_deviations(name, shape, lengths[0], lengths[1:])[0])

    t0 = time.perf_counter()
    fit = least_squares(residuals, np.clip(z0, low, high), bounds=(low, high), diff_step=1e-3,
                        max_nfev=max_nfev, verbose=1)
    shape, lengths = shape_of(name, fit.x[:len(free)]), fit.x[len(free):] * 100.0
    dev, _ = gen.brass_deviations(name, shape, lengths[0], lengths[1:])
    print(f"{name}: {time.perf_counter() - t0:.0f} s, {fit.nfev} steps; within {gen.KEEP_CENTS:g} cent: "
          f"{int(np.sum(np.abs(dev) <= gen.KEEP_CENTS))} of {len(dev)}, worst {np.max(np.abs(dev)):.2f} cent")
    shape = dict(shape, length=round(float(lengths[0]), 1), lengths=tuple(round(float(v), 1) for v in lengths[1:]))
    print({k: round(v, 4) if isinstance(v, float) else tuple(round(u, 4) for u in v) for k, v in shape.items()})


if __name__ == "__main__":
    main(sys.argv[1], *(int(a) for a in sys.argv[2:3]))
