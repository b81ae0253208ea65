"""The invented demo measurements: shipped twice identically, readable, reproducible."""

from __future__ import annotations

import numpy as np

from valband.demo_measurements import (
    FILE_NAME,
    INVENTED_SETTINGS,
    make_invented_spectra,
    shipped_file,
)
from valband.spectra.vamas import read_vamas


def test_both_copies_are_identical(repo_root):
    user = repo_root / "examples" / "demo-measurements"
    for name in (FILE_NAME, "README.md"):
        assert (user / name).read_bytes() == (shipped_file().parent / name).read_bytes()


def test_file_reads_and_says_it_is_invented():
    blocks = read_vamas(shipped_file())
    assert [b.block for b in blocks] == list(INVENTED_SETTINGS["candidates"])
    assert "INVENTED" in shipped_file().read_text().splitlines()[6]
    for b in blocks:
        assert b.unit == "counts" and b.photon_energy == 1486.6
        assert np.all(b.intensity == np.round(b.intensity)) and b.intensity.min() >= 0
        assert b.binding_energy[0] == -2.0 and b.binding_energy.size == 1201


def test_regenerating_reproduces_the_shipped_counts():
    # seeded: the same settings give the same counts (a rare Poisson draw may flip where a
    # floating-point difference between platforms moves a mean by an ulp)
    shipped = {b.block: b.intensity for b in read_vamas(shipped_file())}
    for sp in make_invented_spectra():
        same = np.mean(sp.intensity == shipped[sp.block])
        assert same > 0.99, (sp.block, same)
