"""What every result records about how it was made."""

from __future__ import annotations

import platform

import valband

__all__ = ["provenance_of"]


def provenance_of(model) -> dict:
    """Structure, parameter set and software versions behind a model's results."""
    import ase
    import numba
    import numpy
    import scipy
    import spglib

    from valband.kspace.symmetry import space_group

    st = model.structure
    return {
        "valband_version": valband.__version__,
        "structure": {
            "formula": st.formula,
            "source": st.source,
            "n_sites": st.n_sites,
            "space_group": space_group(st),
            "cell_angstrom": st.cell.tolist(),
            "symbols": list(st.symbols),
            "positions_angstrom": st.positions.tolist(),
        },
        "parameter_set": {"name": model.parameter_set, "version": model.parameter_version,
                          "caution": getattr(model, "parameter_caution", None)},
        "software": {
            "python": platform.python_version(),
            "numpy": numpy.__version__,
            "scipy": scipy.__version__,
            "ase": ase.__version__,
            "spglib": spglib.__version__,
            "numba": numba.__version__,
        },
    }
