"""VAMAS (ISO 14976) files: valband's reader against its writer and against hand-made files.

The hand-made files follow the ISO 14976:1998 header/block layout as recalled from memory (the
item order is listed in the docstring of valband.spectra.vamas); they are written item by item
below with each line annotated, so a reader that shifts by one line fails.
"""

from __future__ import annotations

import numpy as np
import pytest

from valband.errors import InputError
from valband.spectra.measured import MeasuredSpectrum, read_spectrum
from valband.spectra.vamas import read_vamas, write_vamas

# ISO 14976 format identifier line (from memory)
IDENT = "VAMAS Surface Chemical Analysis Standard Data Transfer Format 1988 May 4"


def _spec(name, n=11, start=-2.0, step=0.25, hv=1486.6, unit="counts", seed=0):
    rng = np.random.default_rng(seed)
    be = start + step * np.arange(n)
    y = rng.poisson(500.0, n).astype(float) if unit == "counts" else rng.uniform(0, 50, n)
    return MeasuredSpectrum(binding_energy=be, intensity=y, unit=unit, block=name,
                            photon_energy=hv)


def _same(a: MeasuredSpectrum, b: MeasuredSpectrum):
    np.testing.assert_allclose(a.binding_energy, b.binding_energy, rtol=0, atol=1e-12)
    np.testing.assert_array_equal(a.intensity, b.intensity)   # repr → exact
    assert (a.block, a.unit, a.photon_energy) == (b.block, b.unit, b.photon_energy)


def test_round_trip_one_block(tmp_path):
    sp = _spec("Ag valence band", hv=1253.6)
    p = write_vamas(tmp_path / "one.vms", sp)
    (back,) = read_vamas(p)
    _same(back, sp)
    assert back.metadata["axis"] == "binding" and back.source == str(p)
    # √counts uncertainty restored for counts (Poisson, common practice)
    np.testing.assert_allclose(back.uncertainty, np.sqrt(sp.intensity))
    # read_spectrum picks the only block without being told
    _same(read_spectrum(p), sp)


def test_round_trip_three_blocks(tmp_path):
    sps = [_spec("Cu VB", seed=1), _spec("Cu 3p", n=30, start=70.0, step=0.1, seed=2),
           _spec("Fermi edge", n=5, start=-0.4, step=0.2, hv=None, unit="counts/s", seed=3)]
    p = write_vamas(tmp_path / "three.vamas", sps)
    back = read_vamas(p)
    assert [b.block for b in back] == ["Cu VB", "Cu 3p", "Fermi edge"]
    for a, b in zip(back, sps, strict=True):
        _same(a, b)
    assert back[2].photon_energy is None and back[2].uncertainty is None


def test_writer_refuses_non_uniform_axis_and_numeric_names(tmp_path):
    sp = MeasuredSpectrum(binding_energy=[0.0, 0.1, 0.3], intensity=[1.0, 2.0, 3.0])
    with pytest.raises(InputError, match="non-uniform"):
        write_vamas(tmp_path / "x.vms", sp)
    with pytest.raises(InputError, match="bare number"):
        write_vamas(tmp_path / "x.vms", _spec("12"))
    assert not (tmp_path / "x.vms").exists()


def _handmade(*, mode="NORM", abscissa="Kinetic Energy", nvalues=None, values=None,
              truncate_at=None, n_blocks=2):
    """A VAMAS file with every optional list non-empty; returns the text."""
    ke = 1475.0 + 0.5 * np.arange(4)
    counts = [120.0, 340.0, 560.0, 230.0]
    sputter = mode == "SDP"
    L = [IDENT,
         "Some Institute", "Some Spectrometer", "A. Operator", "valence band test",
         "3", "header comment one", "header comment two: 5 lines below", "",  # 3 comment lines
         mode, "REGULAR",
         str(n_blocks),                            # number of spectral regions
         "2", "Sample temperature", "K", "Etch time", "s",    # experimental variables
         "0",                                      # inclusion/exclusion list
         "1", "14",                                # manually entered items: one item
         "1", "1",                                 # future upgrade: experiment, block entries
         "future experiment entry",                # the one future experiment entry
         str(n_blocks)]                            # number of blocks
    for b in range(n_blocks):
        vals = values if values is not None else [v for c in counts for v in (c, 1.0)]
        L += [f"VB{b}", "Au foil",
              "2024", "5", "17", "12", "30", "0", "1",           # date and GMT offset
              "2", "block comment", "12345",                      # two comment lines
              "XPS",
              "295", "0",                                         # experimental variable values
              "Al"]
        if sputter:
            L += ["18", "1", "+1"]                                 # sputtering particle
        L += ["1486.6",                                           # source energy, eV
              "300", "1E37", "1E37", "54.7", "0",                 # strength .. azimuth
              "FAT", "20",                                        # analyser mode, pass energy
              "1E37",                                             # magnification
              "4.25",                                             # analyser work function, eV
              "0", "1E37", "1E37", "0", "0",                      # bias, widths, take-off
              "Au", "VB", "-1",
              abscissa, "eV", str(ke[0]), "0.5",                  # regular abscissa
              "2", "Intensity", "c", "Transmission", "d",         # two corresponding variables
              "pulse counting", "0.1", "3", "0"]
        if sputter:
            L += ["500", "1E37", "1E37", "1E37", "45", "0", "continuous"]
        L += ["0", "0", "0",                                       # sample orientation
              "1", "Energy shift", "eV", "0.0",                   # one additional parameter
              "future block entry",                               # the future block entry
              str(nvalues if nvalues is not None else 8),
              "120", "560", "1", "1",                             # min/max of both variables
              *(repr(v) if isinstance(v, float) else v for v in vals)]
    L.append("end of experiment")
    if truncate_at is not None:
        L = L[:truncate_at]
    return "\n".join(L) + "\n", ke, np.array(counts)


@pytest.mark.parametrize("mode", ["NORM", "SDP"])
def test_handmade_file_with_comments_and_extra_variables(tmp_path, mode):
    text, ke, counts = _handmade(mode=mode)
    p = tmp_path / "hand.vms"
    p.write_text(text)
    blocks = read_vamas(p)
    assert [b.block for b in blocks] == ["VB0", "VB1"]
    b = blocks[0]
    # BE = hν − E_kin − φ with the block's hν and φ (common practice)
    np.testing.assert_allclose(b.binding_energy, np.sort(1486.6 - ke - 4.25), atol=1e-12)
    np.testing.assert_array_equal(b.intensity, counts[::-1])   # first variable only
    assert b.photon_energy == 1486.6 and b.unit == "counts"
    assert b.metadata["work_function_eV"] == 4.25 and b.metadata["axis"] == "kinetic"
    assert b.metadata["comments"] == ["block comment", "12345"]
    assert b.metadata["file_comments"][0] == "header comment one"
    assert b.metadata["experimental_variables"] == {"Sample temperature (K)": "295",
                                                    "Etch time (s)": "0"}
    assert b.metadata["species"] == "Au" and b.metadata["sample"] == "Au foil"
    # a photon-energy argument replaces the file's
    c = read_spectrum(p, block="VB1", photon_energy=1486.7)
    np.testing.assert_allclose(c.binding_energy, np.sort(1486.7 - ke - 4.25), atol=1e-12)


def test_binding_energy_abscissa(tmp_path):
    text, ke, counts = _handmade(abscissa="Binding Energy")
    p = tmp_path / "be.vms"
    p.write_text(text)
    b = read_vamas(p)[0]
    np.testing.assert_allclose(b.binding_energy, ke)
    np.testing.assert_array_equal(b.intensity, counts)
    with pytest.raises(InputError, match="axis='kinetic'"):
        read_vamas(p, axis="kinetic")


def test_block_selection(tmp_path):
    sps = [_spec("a", seed=1), _spec("b", seed=2), _spec("c", seed=3)]
    p = write_vamas(tmp_path / "s.vms", sps)
    _same(read_spectrum(p, block="b"), sps[1])
    _same(read_spectrum(p, block=2), sps[2])
    _same(read_spectrum(p, block=-1), sps[2])
    with pytest.raises(InputError, match=r"no block named 'zz'.*0: 'a', 1: 'b', 2: 'c'"):
        read_spectrum(p, block="zz")
    with pytest.raises(InputError, match=r"index 3 out of range.*'a'.*'b'.*'c'"):
        read_spectrum(p, block=3)
    with pytest.raises(InputError, match=r"3 blocks; choose one.*'a'"):
        read_spectrum(p)


def test_vamas_detected_by_first_line(tmp_path):
    p = write_vamas(tmp_path / "s.vms", _spec("a"))
    q = tmp_path / "renamed.dat"
    q.write_text(p.read_text())
    _same(read_spectrum(q), read_spectrum(p))


# ---------------------------------------------------------------------- broken files

def _err(tmp_path, text):
    p = tmp_path / "broken.vms"
    p.write_text(text)
    with pytest.raises(InputError) as exc:
        read_vamas(p)
    msg = str(exc.value)
    assert str(p) in msg, msg
    return msg


def test_truncated_block(tmp_path):
    text, *_ = _handmade()
    lines = text.splitlines()
    for cut in (30, 60, len(lines) - 3):   # inside block 0, inside block 1, in the values
        msg = _err(tmp_path, "\n".join(lines[:cut]) + "\n")
        assert "truncated" in msg, msg


def test_fewer_data_values_than_declared(tmp_path):
    text, *_ = _handmade(n_blocks=1, nvalues=10)
    msg = _err(tmp_path, text)
    assert "after 8 ordinate values; the block declares 10" in msg, msg


def test_more_data_values_than_declared(tmp_path):
    text, *_ = _handmade(nvalues=6)
    msg = _err(tmp_path, text)
    assert "more ordinate values than the 6 declared" in msg and "block 0 ('VB0')" in msg, msg


def test_odd_value_count(tmp_path):
    msg = _err(tmp_path, _handmade(nvalues=7)[0])
    assert "not a multiple of the 2 corresponding variables" in msg, msg


def test_non_numeric_value(tmp_path):
    vals = ["120", "1", "34O", "1", "560", "1", "230", "1"]   # letter O for zero
    text, *_ = _handmade(values=vals)
    msg = _err(tmp_path, text)
    line = text.splitlines().index("34O") + 1
    assert f"line {line}" in msg and "ordinate value 3 of 8 must be a number" in msg, msg


def test_non_numeric_source_energy_and_bad_header(tmp_path):
    text, *_ = _handmade()
    msg = _err(tmp_path, text.replace("\n1486.6\n", "\nAl Ka\n", 1))
    assert "analysis source characteristic energy" in msg and "'Al Ka'" in msg, msg
    msg = _err(tmp_path, text.replace("\nNORM\n", "\nMAP\n"))
    assert "experiment mode 'MAP' is not supported; accepted: NORM, SDP" in msg, msg
    msg = _err(tmp_path, text.replace("\nREGULAR\n", "\nIRREGULAR\n"))
    assert "scan mode 'IRREGULAR'" in msg, msg
    msg = _err(tmp_path, text.replace("Kinetic Energy", "Time"))
    assert "abscissa label 'Time'" in msg, msg
    msg = _err(tmp_path, "not a vamas file\n")
    assert "line 1: not a VAMAS file" in msg


def test_negative_counts_rejected(tmp_path):
    vals = ["120", "1", "-4", "1", "560", "1", "230", "1"]
    text, *_ = _handmade(values=vals)
    msg = _err(tmp_path, text)
    assert f"line {text.splitlines().index('-4') + 1}" in msg and "negative" in msg, msg
