"""Small campaigns of our own invention for the campaign tests (tiny meshes, fast)."""

from __future__ import annotations

from pathlib import Path

#: A binary grid (pure ends + one random alloy), an L1₂ compound by KPM, a candidate whose
#: element the parameter set lacks, and a CPA candidate (not available yet).
SMALL = """\
schema = 1

[campaign]
name = "small-test"
seed = 11

[defaults]
descriptors = ["d"]
window = [-7.0, 5.0]

[defaults.kmesh]
mesh = 4
width = 0.2
step = 0.05

[[system]]
elements = ["Cu", "Pd"]
step = 0.5
structures = ["random {composition} fcc 2x1x1 seed={seed}"]
pure = "{element} fcc"

[[system]]
name = "kpm"
method = "kpm"
kpm = { resolution = 0.4, repeat = [2, 2, 2], n_vectors = 2, trace = "stochastic" }
structures = ["Cu3Pd L12"]

[[system]]
name = "missing"
structures = ["Zr hcp"]

[[system]]
name = "cpa"
method = "cpa"
structures = ["Cu fcc"]
"""


def write(folder: Path, text: str, name: str = "campaign.toml") -> Path:
    path = folder / name
    path.write_text(text, encoding="utf-8")
    return path


#: Seven 8-site random alloys (~0.2–0.6 s each): slow enough to be interrupted part-way.
SLOW = """\
schema = 1

[campaign]
name = "slow-test"
seed = 5

[defaults.kmesh]
mesh = 6
width = 0.2
step = 0.05

[[system]]
elements = ["Cu", "Pd"]
step = 0.125
structures = ["random {composition} fcc 2x2x2 seed={seed}"]
"""

#: What must agree between two runs of the same candidate (not timings or worker names).
SAME = ("key", "status", "error", "descriptors", "results", "seed", "structure", "inputs")


def comparable(rows: list[dict]) -> dict:
    return {r["key"]: {k: r[k] for k in SAME} for r in rows}
