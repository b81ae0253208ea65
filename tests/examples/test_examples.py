"""The example scripts run as a user would run them (a child process, small mesh)."""

from __future__ import annotations

import subprocess
import sys

import pytest


@pytest.mark.parametrize("script", ["dband_of_an_alloy.py", "compare_with_measurement.py",
                                    "composition_scan.py", "surface_layer.py"])
def test_example_runs(repo_root, tmp_path, script):
    out = tmp_path / "fig.png"
    res = subprocess.run([sys.executable, str(repo_root / "examples" / script), "--mesh", "6",
                          "--out", str(out)], capture_output=True, text=True, timeout=300)
    assert res.returncode == 0, res.stderr
    assert "d-band centre" in res.stdout
    assert out.stat().st_size > 0
