"""Reading measured spectra from text/CSV files (valband.spectra.measured)."""

from __future__ import annotations

import re

import numpy as np
import pytest

from valband.errors import InputError
from valband.spectra.measured import MeasuredSpectrum, read_spectrum

BE = np.array([-1.0, 0.0, 1.0, 2.0, 3.0])
Y = np.array([10.0, 250.0, 1200.0, 900.0, 400.0])


def _write(tmp_path, name, text):
    p = tmp_path / name
    p.write_text(text)
    return p


def _rows(delim, x=BE, y=Y):
    return "".join(f"{a:g}{delim}{b:g}\n" for a, b in zip(x, y, strict=True))


@pytest.mark.parametrize("delim,name", [(",", "comma"), (";", "semicolon"), ("\t", "tab"),
                                        ("   ", "whitespace"), (" ", "whitespace")])
@pytest.mark.parametrize("header", [True, False])
def test_delimiters_with_and_without_header(tmp_path, delim, name, header):
    head = f"Binding energy (eV){delim}Counts\n" if header else ""
    p = _write(tmp_path, "s.txt", head + _rows(delim))
    s = read_spectrum(p)
    np.testing.assert_array_equal(s.binding_energy, BE)
    np.testing.assert_array_equal(s.intensity, Y)
    assert s.metadata["delimiter"] == name
    assert s.unit == "counts"
    assert s.metadata["unit_from"] == ("header" if header else "assumed")
    # without axis words the reader assumes binding energy and says so
    assert s.metadata["axis"] == "binding"
    assert s.metadata["axis_from"] == ("header" if header else
                                       "assumed (no axis word in header)")
    # Poisson uncertainty of counts: sqrt(N) (common practice)
    np.testing.assert_allclose(s.uncertainty, np.sqrt(Y))
    assert s.source == str(p)


def test_comment_lines_of_every_kind_are_skipped(tmp_path):
    text = ("# exported spectrum\n% second comment\n; third\n! fourth\n\n"
            "BE,cps\n" + _rows(",", BE[:2], Y[:2]) + "# a comment between rows\n"
            + _rows(",", BE[2:], Y[2:]))
    s = read_spectrum(_write(tmp_path, "c.csv", text))
    np.testing.assert_array_equal(s.intensity, Y)
    assert s.metadata["comments"][:4] == ["exported spectrum", "second comment", "third",
                                          "fourth"]
    assert s.unit == "counts/s" and s.uncertainty is None


def test_commented_header_line_gives_the_axis_and_unit(tmp_path):
    text = "# KE (eV)\tcounts per second\n" + _rows("\t", 1400.0 + BE)
    s = read_spectrum(_write(tmp_path, "k.txt", text), photon_energy=1486.6)
    assert s.metadata["axis"] == "kinetic" and s.unit == "counts/s"


def test_kinetic_axis_converted(tmp_path):
    # BE = hν − E_kin − φ (photoemission energy balance, common practice)
    hv, phi = 1486.6, 4.3
    ke = np.array([1470.0, 1475.0, 1480.0, 1482.3])
    y = np.array([5.0, 6.0, 7.0, 8.0])
    p = _write(tmp_path, "ke.csv", "Kinetic Energy [eV],Counts\n" + _rows(",", ke, y))
    s = read_spectrum(p, photon_energy=hv, work_function=phi)
    np.testing.assert_allclose(s.binding_energy, np.sort(hv - ke - phi), atol=1e-12)
    np.testing.assert_array_equal(s.intensity, y[::-1])   # KE ascending → BE descending
    assert s.photon_energy == hv and s.metadata["work_function_eV"] == phi
    assert s.metadata["axis"] == "kinetic"
    # an explicit kinetic axis on a header-less file does the same
    q = _write(tmp_path, "ke2.csv", _rows(",", ke, y))
    t = read_spectrum(q, axis="kinetic", photon_energy=hv, work_function=phi)
    np.testing.assert_allclose(t.binding_energy, s.binding_energy, atol=1e-12)
    assert t.metadata["axis_from"] == "argument"


def test_kinetic_axis_needs_photon_energy(tmp_path):
    p = _write(tmp_path, "ke.csv", "KE,counts\n" + _rows(",", 1400 + BE))
    with pytest.raises(InputError, match="photon_energy"):
        read_spectrum(p)


def test_explicit_axis_contradicting_header(tmp_path):
    p = _write(tmp_path, "ke.csv", "Kinetic energy,counts\n" + _rows(",", 1400 + BE))
    with pytest.raises(InputError, match=r"line 1: axis='binding'.*kinetic"):
        read_spectrum(p, axis="binding")


def test_counts_versus_counts_per_second(tmp_path):
    for head, unit in [("BE,Counts", "counts"), ("BE,counts/s", "counts/s"),
                       ("BE,CPS", "counts/s"), ("BE,Intensity (c/s)", "counts/s"),
                       ("BE,intensity (arb. units)", "arb.")]:
        s = read_spectrum(_write(tmp_path, "u.csv", head + "\n" + _rows(",")))
        assert s.unit == unit, head
        assert (s.uncertainty is not None) == (unit == "counts")


def test_non_uniform_steps_kept(tmp_path):
    x = np.array([-0.5, -0.1, 0.0, 0.05, 0.3, 2.0])
    y = np.arange(6.0) + 1
    s = read_spectrum(_write(tmp_path, "n.txt", _rows(" ", x, y)))
    np.testing.assert_array_equal(s.binding_energy, x)
    np.testing.assert_array_equal(s.intensity, y)


def test_descending_input_sorted(tmp_path):
    s = read_spectrum(_write(tmp_path, "d.csv", "BE,counts\n" + _rows(",", BE[::-1], Y[::-1])))
    np.testing.assert_array_equal(s.binding_energy, BE)
    np.testing.assert_array_equal(s.intensity, Y)


def test_decimal_comma_with_semicolons(tmp_path):
    s = read_spectrum(_write(tmp_path, "e.csv", "BE;counts\n1,5;10\n2,5;20\n3,5;30\n"))
    np.testing.assert_array_equal(s.binding_energy, [1.5, 2.5, 3.5])


def test_extra_columns_and_trailing_delimiter(tmp_path):
    s = read_spectrum(_write(tmp_path, "x.csv", "BE,counts,fit\n0,1,9,\n1,2,9,\n2,3,9,\n"))
    np.testing.assert_array_equal(s.intensity, [1, 2, 3])
    assert s.metadata["n_columns"] == 3


def test_dict_round_trip(tmp_path):
    s = read_spectrum(_write(tmp_path, "r.csv", "BE,counts\n" + _rows(",")))
    t = MeasuredSpectrum.from_dict(s.to_dict())
    np.testing.assert_array_equal(t.binding_energy, s.binding_energy)
    np.testing.assert_array_equal(t.intensity, s.intensity)
    np.testing.assert_array_equal(t.uncertainty, s.uncertainty)
    assert (t.unit, t.source, t.metadata) == (s.unit, s.source, s.metadata)
    with pytest.raises(InputError, match="kind"):
        MeasuredSpectrum.from_dict({"kind": "other"})


# ------------------------------------------------------------------------- error cases
# Each must name the file and the offending line.

@pytest.mark.parametrize("text,line,what", [
    ("BE,counts\n0,1\n1,nan\n2,3\n", 3, "NaN"),
    ("BE,counts\n0,1\n1,inf\n2,3\n", 3, "NaN or infinite"),
    ("BE,counts\n0,1\n1,abc\n2,3\n", 3, "non-numeric"),
    ("BE,counts\n0,1\n1,2\nend of data\n", 4, "non-numeric"),
    ("BE\n0\n1\n2\n", 2, "only one column"),
    ("BE,counts\n0,1\n1,2\n1,3\n2,4\n", 4, "duplicates line 3"),
    ("BE,counts\n0,1\n1,2\n2,3\n1.5,4\n3,5\n", 5, "changes direction at line 4"),
    ("BE,counts\n0,1\n1,-2\n2,3\n", 3, "negative intensity"),
    ("BE,counts\n0,1\n1,2,3\n", 3, "3 column"),
])
def test_errors_name_file_and_line(tmp_path, text, line, what):
    p = _write(tmp_path, "bad.csv", text)
    with pytest.raises(InputError) as exc:
        read_spectrum(p)
    msg = str(exc.value)
    assert str(p) in msg and f"line {line}" in msg and what in msg, msg


@pytest.mark.parametrize("text,what", [("", "is empty"),
                                        ("# only comments\nBE,counts\n", "no data rows")])
def test_empty_files(tmp_path, text, what):
    p = _write(tmp_path, "e.csv", text)
    with pytest.raises(InputError, match=re.escape(str(p)) + ".*" + what):
        read_spectrum(p)


def test_bad_arguments(tmp_path):
    p = _write(tmp_path, "a.csv", _rows(","))
    with pytest.raises(InputError, match="axis"):
        read_spectrum(p, axis="energy")
    with pytest.raises(InputError, match="photon_energy"):
        read_spectrum(p, photon_energy=-1.0)
    with pytest.raises(InputError, match="no blocks"):
        read_spectrum(p, block=0)
    with pytest.raises(InputError, match="cannot read"):
        read_spectrum(tmp_path / "missing.csv")
