"""Depth weighting of slab sites for photoemission (exp(−z/(λ cos θ)))."""

from __future__ import annotations

import json
import math

import numpy as np
import pytest

from valband.errors import SettingsError
from valband.spectra.depth import slab_depth_weights
from valband.spectra.imfp import imfp_of
from valband.structure import load_structure_with_info


def test_weights_follow_the_escape_law():
    st, info = load_structure_with_info("slab Pt fcc111 layers=4 vacuum=12")
    w, rec = slab_depth_weights(st, info, 1486.6, imfp=10.0, theta_deg=60.0)
    z = st.positions[:, 2].max() - st.positions[:, 2]
    # straight-line escape: exp(−z/(λ cos θ)), cos 60° = 1/2 (Beer–Lambert; common practice)
    np.testing.assert_allclose(w, np.exp(-z / 5.0))
    assert w.max() == 1.0 and rec["imfp_from"] == "given"
    # fcc(111) interlayer spacing a/√3 (geometry): the deepest of 4 layers is 3a/√3 down
    a = st.cell[0, 0] * math.sqrt(2.0)
    assert max(rec["depth_angstrom"]) == pytest.approx(3 * a / math.sqrt(3.0), rel=1e-6)


def test_auto_lambda_is_tpp2m_of_the_main_element():
    st, info = load_structure_with_info("overlayer Pd/Cu fcc111 layers=4")
    _, rec = slab_depth_weights(st, info, 1486.6)
    assert rec["imfp_from"].startswith("TPP-2M of Cu")
    assert rec["imfp_angstrom"] == pytest.approx(imfp_of("Cu", 1486.6 - 4.5))


@pytest.mark.parametrize("spec, kwargs, match", [
    ("Pt fcc", {}, "needs a slab"),
    ("slab Pt fcc111 layers=3", {"imfp": -1.0}, "must be > 0"),
    ("slab Pt fcc111 layers=3", {"imfp": "deep"}, "give a number"),
    ("slab Pt fcc111 layers=3", {"theta_deg": 95.0}, "0 ≤ θ < 90"),
])
def test_bad_depth_settings(spec, kwargs, match):
    st, info = load_structure_with_info(spec)
    with pytest.raises(SettingsError, match=match):
        slab_depth_weights(st, info, 1486.6, **kwargs)


def test_simulate_cli_records_depth_weights(capsys):
    from valband.cli.main import main

    assert main(["simulate", "slab Pt fcc111 layers=3", "--mesh", "4x4x1", "--step", "0.02",
                 "--photon-energy", "Al-Ka", "--depth-weighting", "8", "--emission-angle", "30",
                 "--json", "--out", "sp"]) == 0
    rec = json.loads(capsys.readouterr().out)["spectrum"]["depth_weighting"]
    assert rec["imfp_angstrom"] == 8.0 and rec["emission_angle_deg"] == 30.0
    assert len(rec["weights"]) == 3 and max(rec["weights"]) == 1.0
