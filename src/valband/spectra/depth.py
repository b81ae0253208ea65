"""Depth weights of the sites of a slab for photoemission: exp(−z / (λ cos θ)).

z is each site's depth below the top surface of the slab (Å, along the cell's third axis, the
slab normal of valband's slab and overlayer specs), λ the inelastic mean free path — given in
Å, or ``"auto"``: TPP-2M (Tanuma, Powell & Penn, Surf. Interface Anal. 21, 165 (1994)) of the
slab's most abundant element that has TPP-2M data, at the kinetic energy of electrons from
the Fermi level, E_kin = hν − φ with φ = 4.5 eV (over a 10 eV valence band λ changes by
< 1 % at XPS energies, so one λ serves every state) — and θ the emission angle from the
surface normal. Elastic scattering is neglected (straight-line approximation, common
practice).
"""

from __future__ import annotations

import math
from collections import Counter

import numpy as np
from numpy.typing import NDArray

from valband.errors import SettingsError
from valband.spectra.imfp import ELEMENTS, depth_weights, imfp_of

__all__ = ["slab_depth_weights", "WORK_FUNCTION_EV"]

#: Work function used for the kinetic energy of the auto λ (eV; typical metal, common practice).
WORK_FUNCTION_EV = 4.5


def slab_depth_weights(structure, info: dict, photon_energy_ev: float, imfp="auto",
                       theta_deg: float = 0.0) -> tuple[NDArray[np.float64], dict]:
    """Per-site depth weights and a record (λ, its origin, depths, angle) for ``summary.json``.

    ``info`` is the spec info of :func:`valband.structure.load_structure_with_info`; only slab
    and overlayer structures have a surface (SettingsError otherwise).
    """
    if info.get("kind") not in ("slab", "overlayer"):
        raise SettingsError(f"depth weighting needs a slab or overlayer structure (a spec such "
                            f"as 'slab Pt fcc111 layers=5'); got {info.get('kind', 'a bulk cell')}")
    z = np.asarray(structure.positions, dtype=np.float64)[:, 2]
    depth = z.max() - z
    hv = float(photon_energy_ev)
    if isinstance(imfp, str):
        if imfp != "auto":
            raise SettingsError(f"inelastic mean free path {imfp!r}: give a number of Å or 'auto'")
        counts = Counter(s for s in structure.symbols if s in ELEMENTS)
        if not counts:
            raise SettingsError("no TPP-2M data for any element of the slab "
                                f"({', '.join(sorted(set(structure.symbols)))}); give λ in Å")
        element = counts.most_common(1)[0][0]
        ekin = hv - WORK_FUNCTION_EV
        if not ekin > 50.0:
            raise SettingsError(f"hν = {hv:g} eV: TPP-2M holds from 50 eV kinetic energy; give λ "
                                "in Å for UPS energies")
        lam = float(imfp_of(element, ekin))
        origin = f"TPP-2M of {element} at E_kin = {ekin:g} eV"
    else:
        try:
            lam = float(imfp)
        except (TypeError, ValueError):
            raise SettingsError(f"inelastic mean free path {imfp!r}: give a number of Å or "
                                "'auto'") from None
        if not (math.isfinite(lam) and lam > 0):
            raise SettingsError(f"inelastic mean free path {imfp!r} Å: must be > 0")
        origin = "given"
    w = depth_weights(depth, lam, theta_deg)
    record = {"imfp_angstrom": lam, "imfp_from": origin, "emission_angle_deg": float(theta_deg),
              "depth_angstrom": depth.tolist(), "weights": w.tolist(),
              "law": "exp(-z/(lambda cos theta)), z below the top surface"}
    return w, record
