"""Loading a large parameter set: memoised per process, cached on disk by content hash."""

from __future__ import annotations

import numpy as np
import pytest

from valband.params import load_parameter_set
from valband.params import model as M


@pytest.fixture
def big_set(tmp_path, monkeypatch):
    """A private copy of the shipped first-principles set and an empty cache folder."""
    monkeypatch.setenv("VALBAND_CACHE_DIR", str(tmp_path / "cache"))
    monkeypatch.setattr(M, "_MEMO", {})
    src = M._data_dir() / "valband-tc-2026.toml"
    path = tmp_path / "set.toml"
    path.write_bytes(src.read_bytes())
    return path


def _values(pset):
    r = np.array([2.4, 2.6, 3.0])
    return pset.hopping("Cu", "Pd", r), pset.overlap("Cu", "Pd", r)


def test_second_load_comes_from_the_cache_and_is_identical(big_set, tmp_path):
    first = load_parameter_set(big_set)
    cached = list((tmp_path / "cache" / "params").glob("*.pickle"))
    assert len(cached) == 1
    M._MEMO.clear()                      # as a new process would start
    second = load_parameter_set(big_set)
    assert second is not first
    for a, b in zip(_values(first), _values(second), strict=True):
        np.testing.assert_array_equal(a, b)
    assert load_parameter_set(big_set) is second     # memoised in this process


def test_an_edited_file_is_parsed_again(big_set):
    first = load_parameter_set(big_set)
    text = big_set.read_text(encoding="utf-8")
    big_set.write_text(text.replace(f'name = "{first.name}"', 'name = "edited-copy"', 1),
                       encoding="utf-8")
    assert load_parameter_set(big_set).name == "edited-copy"


def test_a_broken_cache_entry_is_ignored(big_set, tmp_path):
    load_parameter_set(big_set)
    (entry,) = (tmp_path / "cache" / "params").glob("*.pickle")
    entry.write_bytes(b"not a pickle")
    M._MEMO.clear()
    assert load_parameter_set(big_set).elements    # parsed again from the TOML


def test_other_code_never_reads_this_codes_cache(big_set, tmp_path, monkeypatch):
    load_parameter_set(big_set)
    monkeypatch.setattr(M, "_CODE_TAG", ["0123456789abcdef"])   # as if the modules changed
    M._MEMO.clear()
    load_parameter_set(big_set)
    assert len(list((tmp_path / "cache" / "params").glob("*.pickle"))) == 2
