"""Model alloys of our own invention, built from the shipped harrison-universal set.

``model_alloy_set`` makes a two-component orthogonal spd set in which both components and
their cross pair carry the Cu–Cu bond integrals of harrison-universal (so the disorder is
purely diagonal, the case single-site CPA treats exactly in its own terms) and the second
component's onsite energies are those of Cu shifted by (ds, dp, dd) eV. The component
symbols "Cu" and "Ni" are only labels here. ``scale`` multiplies every bond integral (a
narrow-band variant for the split-band limit).
"""

from __future__ import annotations

import copy

from valband.params import ParameterSet, load_parameter_set

_REVERSED = (("pss", "sps"), ("dss", "sds"), ("dps", "pds"), ("dpp", "pdp"))


def model_alloy_set(dd: float, ds: float = 0.0, dp: float = 0.0, scale: float = 1.0,
                    valence_b: float = 10.0) -> ParameterSet:
    base = load_parameter_set("harrison-universal").to_dict()
    cu = base["elements"]["Cu"]
    other = copy.deepcopy(cu)
    for sh, d in (("s", ds), ("p", dp), ("d", dd)):
        other["onsite"][sh]["value"] += d
    other["valence_electrons"]["value"] = valence_b
    pair = copy.deepcopy(base["pairs"]["Cu-Cu"])
    for law in pair["hopping"].values():
        law["v0"] *= scale
    cross = copy.deepcopy(pair)
    for rev, fwd in _REVERSED:
        cross["hopping"][rev] = copy.deepcopy(cross["hopping"][fwd])
    data = {k: v for k, v in base.items() if k not in ("elements", "pairs")}
    data.update(
        name="model-alloy", description="model alloy of our own invention (tests)",
        elements={"Cu": cu, "Ni": other},
        pairs={"Cu-Cu": pair, "Ni-Ni": copy.deepcopy(pair), "Cu-Ni": cross},
    )
    return ParameterSet.from_dict(data)
