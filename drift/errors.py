"""The project's error types, and the range check every layer uses.

Every error a user can cause by input derives from :class:`DriftError`; the command line turns
it into a one-line message and exit status 2.
"""

import numpy as np

from drift.constants import LIMITS


class DriftError(Exception):
    """Base class of every error drift raises on purpose."""


class OutOfRangeError(DriftError, ValueError):
    """A physical condition lies outside the range a model is valid for."""


class InputFileError(DriftError, ValueError):
    """An instrument, climate or materials file is unreadable or has a bad key or value."""


def check_range(name: str, value, scale: float = 1.0, offset: float = 0.0) -> None:
    """Raise :class:`OutOfRangeError` if ``value*scale + offset`` leaves ``LIMITS[name]``.

    ``scale`` and ``offset`` turn an SI value into the boundary unit of ``name`` (for example
    ``offset=-273.15`` for a temperature in K checked against °C); see
    :data:`drift.constants.LIMITS`. NaN is out of range.
    """
    low, high, unit = LIMITS[name]
    shown = np.asarray(value, dtype=float) * scale + offset
    bad = ~((shown >= low - 1e-9) & (shown <= high + 1e-9))
    if np.any(bad):
        worst = np.atleast_1d(shown)[np.atleast_1d(bad)][0]
        label = name.replace("_", " ")
        u = f" {unit}" if unit else ""
        raise OutOfRangeError(f"{label} {worst:g}{u} is outside the allowed range {low:g} to {high:g}{u}")
