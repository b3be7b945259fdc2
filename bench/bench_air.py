"""Speed of the air layer: gas states per second from the shipped table, and through CoolProp.

Run: python bench/bench_air.py
"""

import time

import numpy as np

from drift import air


def main():
    for source in air.PROPERTY_SOURCES:
        air.set_property_source(source)
        print(f"source: {source}")
        measure(source)


def measure(source):
    start = time.perf_counter()
    air.air_state(293.15, 101325.0, 293.15, 0.5)
    print(f"first state ({'reads the table' if source == 'table' else 'loads CoolProp'}): "
          f"{time.perf_counter() - start:.2f} s")

    temperatures = np.linspace(285.0, 308.0, 1000)
    phi = np.linspace(0.0, 1.0, 1000)
    start = time.perf_counter()
    air.air_state(temperatures, 101325.0, 293.15, 0.5, breath_fraction=phi)
    cold = time.perf_counter() - start
    start = time.perf_counter()
    air.air_state(temperatures, 101325.0, 293.15, 0.5, breath_fraction=phi)
    warm = time.perf_counter() - start
    print(f"1000 distinct states: {cold * 1e3:.0f} ms ({cold:.2f} ms per state)")
    print(f"the same 1000 states again{' (from its cache)' if source == 'coolprop' else ''}: {warm * 1e3:.1f} ms")


if __name__ == "__main__":
    main()
