"""drift: how each note of a wind instrument moves in pitch with the air inside its bore.

Room temperature, humidity, altitude, the player's warm, wet, CO2-rich breath and warm-up change
the speed of sound along the bore; drift computes the real-gas properties of that air, the heat
balance of the played bore and the resonances of the actual bore, and so the pitch of every note.

The layers, each a module answering one physical question, from the bottom up:

- base: :mod:`drift.errors`, :mod:`drift.constants`, :mod:`drift.files`
- data: :mod:`drift.scale`, :mod:`drift.materials`, :mod:`drift.climate`, :mod:`drift.instrument`,
  :mod:`drift.ensemble`
- physics: :mod:`drift.gas_table`, :mod:`drift.air`, :mod:`drift.heat_transfer`, :mod:`drift.acoustics`
- :mod:`drift.segments` (the bore cut into acoustic and wall segments)
- :mod:`drift.bore_state`, :mod:`drift.heat_balance`, :mod:`drift.thermal` (the air and wall along the bore; the heat
  balance of the played bore that gives them)
- :mod:`drift.pitch` (playing frequencies for a bore state)
- jobs: :mod:`drift.chart`, :mod:`drift.design`, :mod:`drift.warmup`, :mod:`drift.fit`,
  :mod:`drift.gig`, :mod:`drift.layout`, :mod:`drift.advice`
- edge: :mod:`drift.render`, :mod:`drift.render_design`, :mod:`drift.sheet`, :mod:`drift.plot`,
  :mod:`drift.cli`, and this package's public API.

The public API below is imported on first use, so ``import drift`` is cheap and never loads
CoolProp (which is loaded only when air properties are first computed).

Examples
--------
>>> import drift
>>> inst = drift.load_instrument("cylindrical-reed")
>>> chart = drift.drift_chart(inst, [drift.load_climate("winter-church")])
>>> chart.summary[0].mean_drift_cents < 0
True
"""

import importlib

__version__ = "0.1.0"

#: Public name -> module that defines it.
_API = {
    "load_instrument": "instrument",
    "bundled_instruments": "instrument",
    "Instrument": "instrument",
    "load_climate": "climate",
    "bundled_climates": "climate",
    "Climate": "climate",
    "Room": "climate",
    "Breath": "climate",
    "Player": "climate",
    "air_properties": "air",
    "AirState": "air",
    "GasProperties": "air",
    "BoreProfile": "bore_state",
    "find_resonances": "pitch",
    "Resonances": "pitch",
    "drift_chart": "chart",
    "Chart": "chart",
    "DriftRow": "chart",
    "ClimateSummary": "chart",
    "design_study": "design",
    "DesignResult": "design",
    "NoteSensitivity": "design",
    "sensitivities": "design",
    "ClimateOffset": "design",
    "retune": "design",
    "RetuneResult": "design",
    "warmup_timeline": "warmup",
    "Warmup": "warmup",
    "read_tuner_log": "fit",
    "TunerLog": "fit",
    "fit_player": "fit",
    "PlayerFit": "fit",
    "plan_gig": "gig",
    "GigPlan": "gig",
    "Weather": "climate",
    "load_ensemble": "ensemble",
    "DriftError": "errors",
    "InputFileError": "errors",
    "OutOfRangeError": "errors",
}

__all__ = sorted(_API)


def __getattr__(name: str):
    if name in _API:
        value = getattr(importlib.import_module(f"drift.{_API[name]}"), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'drift' has no attribute {name!r}")


def __dir__():
    return sorted(set(globals()) | set(__all__))
