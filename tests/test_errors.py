"""The project's error types and the range check every layer uses (drift.errors)."""

import math

import numpy as np
import pytest

from drift.constants import LIMITS
from drift.errors import DriftError, InputFileError, OutOfRangeError, check_range


def test_error_types_are_drift_errors_and_value_errors():
    for kind in (OutOfRangeError, InputFileError):
        assert issubclass(kind, DriftError) and issubclass(kind, ValueError)
    assert not issubclass(DriftError, ValueError)


@pytest.mark.parametrize("name", sorted(LIMITS))
def test_both_ends_of_every_range_are_allowed(name):
    low, high, _ = LIMITS[name]
    check_range(name, low)
    check_range(name, high)
    check_range(name, np.array([low, 0.5 * (low + high), high]))


@pytest.mark.parametrize("name", sorted(LIMITS))
def test_just_outside_every_range_is_refused(name):
    low, high, _ = LIMITS[name]
    step = 1e-6 * (high - low)
    with pytest.raises(OutOfRangeError, match="outside the allowed range"):
        check_range(name, high + step)
    with pytest.raises(OutOfRangeError, match="outside the allowed range"):
        check_range(name, low - step)


@pytest.mark.parametrize("bad", [math.nan, math.inf, -math.inf])
def test_nan_and_infinity_are_out_of_range(bad):
    with pytest.raises(OutOfRangeError, match="temperature c"):
        check_range("temperature_c", bad)
    with pytest.raises(OutOfRangeError):
        check_range("temperature_c", np.array([20.0, bad, 25.0]))


def test_message_names_quantity_value_range_and_unit():
    with pytest.raises(OutOfRangeError) as info:
        check_range("relative_humidity_pct", np.array([50.0, 120.0, 130.0]))
    assert str(info.value) == "relative humidity pct 120 % is outside the allowed range 0 to 100 %"


def test_message_of_a_quantity_without_unit_has_single_spaces():
    with pytest.raises(OutOfRangeError) as info:
        check_range("breath_fraction", 1.5)
    assert str(info.value) == "breath fraction 1.5 is outside the allowed range 0 to 1"


def test_scale_and_offset_convert_si_values_to_the_boundary_unit():
    # 333.15 K = 60 °C (the top of the range); 333.2 K is beyond it and shown in °C.
    check_range("temperature_c", 333.15, offset=-273.15)
    with pytest.raises(OutOfRangeError, match="60.05 °C"):
        check_range("temperature_c", 333.2, offset=-273.15)
    check_range("pressure_kpa", 50e3, scale=1e-3)
    with pytest.raises(OutOfRangeError, match="pressure kpa 49.9 kPa"):
        check_range("pressure_kpa", 49.9e3, scale=1e-3)
