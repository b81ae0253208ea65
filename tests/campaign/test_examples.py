"""The example campaign files (invented scenarios) are valid and expand as documented."""

from __future__ import annotations

from pathlib import Path

import pytest

from valband.campaign import load_campaign

EXAMPLES = Path(__file__).resolve().parents[2] / "examples" / "campaigns"


@pytest.mark.parametrize("name, n", [
    ("cu-pd-binary.toml", 9 * 2 * 3 - 2 * 3),  # 9 points × 2 cells × 3 strains; ends once
    ("cu-pd-ag-ternary.toml", 15 + 3),         # the step-1/4 triangle + 3 dilute points
    ("surfaces-kpm.toml", 2 * 2 + 3 + 3),      # 2 slabs × 2 strains, 3 KPM bulk, 3 CPA
])
def test_examples_expand(name, n):
    camp = load_campaign(EXAMPLES / name)
    assert len(camp.candidates) == n
    assert len({c.key for c in camp.candidates}) == n
