"""Speed of the drift chart: the default instrument across every bundled climate.

Run: python bench/bench_chart.py
"""

import time

from drift import chart, climate
from drift.instrument import DEFAULT_INSTRUMENT, bundled_instruments, load_instrument


def main():
    start = time.perf_counter()
    instrument = load_instrument(DEFAULT_INSTRUMENT)
    climates = climate.bundled_climates()
    chart.drift_chart(instrument, climates[:1])
    print(f"first chart of one climate (reads the gas table): {time.perf_counter() - start:.1f} s")
    for instrument in bundled_instruments():
        start = time.perf_counter()
        result = chart.drift_chart(instrument, climates)
        elapsed = time.perf_counter() - start
        print(f"{instrument.name}: {len(result.rows)} rows over {len(climates)} climates in {elapsed:.1f} s")


if __name__ == "__main__":
    main()
