"""A small demo run shared by the report tests (built once per session)."""

from __future__ import annotations

import pytest


@pytest.fixture(scope="session")
def demo_run(tmp_path_factory):
    """``valband demo`` on a 12³ mesh into a temporary folder; returns (folder, summary)."""
    from valband.demo import run_demo

    out = tmp_path_factory.mktemp("demo") / "run"
    summary = run_demo(out, mesh="12", log=lambda *a: None)
    return out, summary
