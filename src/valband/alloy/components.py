"""Components of a substitutional alloy: validated compositions and per-orbital onsite energies.

Unlike :func:`valband.structure.alloys.normalise_composition`, a component with fraction 0 is
kept here: the coherent potential approximation still defines the Green function of a single
impurity of that element in the other components' medium (the dilute limit), and composition
scans run through x = 0 and x = 1.
"""

from __future__ import annotations

from collections.abc import Mapping

import numpy as np
from numpy.typing import NDArray

from valband.conventions import SHELL_ORBITALS
from valband.errors import ParameterError
from valband.structure.alloys import format_composition, normalise_composition

__all__ = [
    "check_composition",
    "common_shells",
    "composition_label",
    "component_onsite",
]


def check_composition(composition: Mapping[str, float], params=None) -> dict[str, float]:
    """Validate ``{element: fraction}`` (zeros kept) and return it rescaled to sum to 1.

    Raises :class:`StructureError` for unknown elements, negative or non-finite fractions, fewer
    than one element with a positive fraction, or fractions that do not sum to 1 (within
    :data:`~valband.structure.alloys.COMPOSITION_SUM_TOL`); :class:`ParameterError` when
    ``params`` is given and lacks an element.
    """
    out = normalise_composition(composition, keep_zeros=True)
    if params is not None:
        for el in out:
            params.element(el)
    return out


def composition_label(composition: Mapping[str, float]) -> str:
    """``{'Cu': 0.5, 'Pd': 0.5}`` → ``'Cu0.5Pd0.5'`` (the label of a virtual site)."""
    return format_composition(composition)


def common_shells(composition: Mapping[str, float], params) -> tuple[str, ...]:
    """Return the valence shells shared by every component (ParameterError if they differ).

    Averaging an onsite energy needs the shell on every component (a virtual crystal of an sp
    and an spd element has no meaningful d level for the sp one).
    """
    shells = {el: tuple(params.element(el).shells) for el in composition}
    first = next(iter(shells.values()))
    if any(s != first for s in shells.values()):
        raise ParameterError(
            "the components carry different valence shells ("
            + ", ".join(f"{e}: {''.join(s)}" for e, s in shells.items())
            + "); the virtual crystal and the CPA average shell by shell and need the same "
            "shells on every component"
        )
    return first


def component_onsite(
    composition: Mapping[str, float], params, shells: tuple[str, ...]
) -> NDArray[np.float64]:
    """Onsite energy of every orbital of a site for each component, shape (n_comp, n_orb), eV."""
    rows = []
    for el in composition:
        rec = params.element(el)
        rows.append([float(rec.onsite[sh]) for sh in shells for _ in SHELL_ORBITALS[sh]])
    return np.array(rows, dtype=np.float64)
