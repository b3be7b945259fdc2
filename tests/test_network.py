"""The whole-bore network: stacked bore states against single ones (consistency checks of two
code paths of :mod:`drift.network`; the outside checks of whole bores are in test_acoustics.py
and test_pitch.py)."""

import numpy as np
import pytest

from conftest import DRY_PROFILE as PROFILE
from conftest import make_instrument as make
from drift import instrument, network, pitch, thermal
from drift.climate import bundled_climates


def test_stacked_states_give_each_state_own_impedance():
    # Consistency of two code paths (not an outside check): a stack of bore states gives each
    # state the impedance its own network gives.
    ins = instrument.load_instrument("conical-reed")
    profiles = [thermal.climate_profile(ins, c) for c in bundled_climates()[:3]]
    nets = [pitch.bore_network(ins, p) for p in profiles]
    both = network.Network.stack(nets)
    f = np.linspace(60.0, 3000.0, 40)
    mask = ins.open_mask()
    z = both.impedance(f, mask)
    assert z.shape == (3, len(mask), len(f))
    for k, net in enumerate(nets):
        assert np.allclose(z[k], net.impedance(f, mask), rtol=1e-12, atol=0)
        rows = mask[np.arange(len(f)) % len(mask)]
        paired = both.impedance(f, rows, paired=True, state=np.full(len(f), k))
        assert np.allclose(paired, net.impedance(f, rows, paired=True), rtol=1e-12, atol=0)
        # the shared upper bore (all fingerings) against one fingering at a time
        for i in (0, 5, len(mask) - 1):
            assert np.allclose(z[k, i], net.impedance(f, mask[i:i + 1])[0], rtol=1e-12, atol=0)


def test_stacking_needs_one_topology():
    a = pitch.bore_network(make([[0, 10], [600, 10]]), PROFILE)
    b = pitch.bore_network(make([[0, 10], [700, 10]]), PROFILE)
    with pytest.raises(ValueError):
        network.Network.stack([a, b])
