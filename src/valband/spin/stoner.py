"""Stoner parameters I (eV) per element, with sources, and the exchange splitting they give.

Scheme (Stoner, Proc. R. Soc. A 165, 372 (1938); Gunnarsson, J. Phys. F 6, 587 (1976)):
the d orbitals of site i move by ∓ I_i m_i / 2 for spin ↑/↓, ΔE_i = I_i m_i, where m_i is the
site's d-shell moment n_d↑ − n_d↓ (μ_B; Mulliken for non-orthogonal sets). s and p
orbitals are not shifted: the exchange integral of the localised d shell dominates and the
sp moment follows by hybridisation (common practice in d-band tight binding). Reported
moments are the whole site's (s + p + d).

Convention and values. Here ΔE = I·m with m in μB, so the Stoner criterion for the onset of
ferromagnetism is I·N_σ(E_F) > 1 with N_σ the paramagnetic DOS per atom **per spin**. The
tabulated I are Janak's (Phys. Rev. B 16, 255 (1977)) as recalled **from memory**: in this
convention about 68 mRy ≈ 0.92 eV for Fe, rising to ≈ 1.0 eV for Ni; they give his criterion
values I·N ≈ 1.4 (Fe) and ≈ 2.0 (Ni) with paramagnetic N_σ(E_F) ≈ 1.5 and 2.0 states/eV, and
the LSDA exchange splitting of about 1 eV per μB of Fe, Co and Ni (common practice). The often
quoted eV figures 0.46 (Fe), 0.49 (Co), 0.50 (Ni) are exactly half of these: they belong to the
other convention (shifts ∓I·m, or N counted for both spins), so they are doubled here. The 4d
values are recalled the same way (uncertain by about ±0.1 eV); Janak's table stops before the
5d row, so the 5d values are estimates from memory of the row trend (I falls from 3d to 5d as
the d orbital spreads), uncertain by about ±0.15 eV. None of them is fitted to a moment.
"""

from __future__ import annotations

import math
from collections.abc import Mapping
from dataclasses import asdict, dataclass

from valband.errors import ParameterError, SettingsError

__all__ = ["STONER_TABLE", "StonerParameter", "stoner_parameters"]

_JANAK3 = ("Janak, Phys. Rev. B 16, 255 (1977), from memory (±0.05 eV), in the convention "
           "ΔE = I·m (twice the often quoted 0.46/0.49/0.50 eV of Fe/Co/Ni)")
_JANAK4 = "Janak, Phys. Rev. B 16, 255 (1977), from memory (±0.1 eV), convention ΔE = I·m"
_ROW5D = ("estimate from memory of the 3d → 4d → 5d trend of Janak's values "
          "(Phys. Rev. B 16, 255 (1977) has no 5d row), ±0.15 eV, convention ΔE = I·m")

#: Default Stoner parameters (ΔE = I·m): element → (I in eV, source).
STONER_TABLE: dict[str, tuple[float, str]] = {
    "Fe": (0.92, _JANAK3), "Co": (0.98, _JANAK3), "Ni": (1.00, _JANAK3), "Cu": (0.72, _JANAK3),
    "Rh": (0.66, _JANAK4), "Pd": (0.70, _JANAK4), "Ag": (0.56, _JANAK4),
    "Ir": (0.60, _ROW5D), "Pt": (0.60, _ROW5D), "Au": (0.52, _ROW5D),
}  # fmt: skip


@dataclass(frozen=True)
class StonerParameter:
    """I of one element (eV) and its source."""

    element: str
    value_ev: float
    source: str

    def to_dict(self) -> dict:
        """JSON form."""
        return asdict(self)


def _check(value, element: str) -> float:
    try:
        v = float(value)
    except (TypeError, ValueError):
        raise SettingsError(
            f"Stoner parameter of {element}: {value!r} is not a number; accepted: I ≥ 0 in eV"
        ) from None
    if not math.isfinite(v) or v < 0:
        raise SettingsError(
            f"Stoner parameter of {element}: I = {value!r} eV; accepted: a finite number ≥ 0 eV "
            "(a negative I would favour anti-alignment on one site, which is not the Stoner model)"
        )
    return v


def stoner_parameters(
    elements_with_d: tuple[str, ...], stoner: Mapping[str, float] | None = None,
    all_elements: tuple[str, ...] | None = None,
) -> dict[str, StonerParameter]:
    """I for every element carrying a d shell: the caller's value, else :data:`STONER_TABLE`.

    Raises
    ------
    SettingsError
        A negative or non-numeric I, or a value for an element that is not in the structure.
    ParameterError
        An element with a d shell that has no tabulated I and none was given.
    """
    given = dict(stoner or {})
    if stoner is not None and not isinstance(stoner, Mapping):
        raise SettingsError(f"stoner={stoner!r}: accepted None (tabulated) or element → I in eV")
    known = tuple(all_elements or elements_with_d)
    for el in given:
        if el not in known:
            raise SettingsError(
                f"Stoner parameter given for {el!r}, which is not in the structure; elements "
                f"present: {', '.join(known)}"
            )
    out = {}
    for el in elements_with_d:
        if el in given:
            out[el] = StonerParameter(el, _check(given[el], el), "given by the user")
        elif el in STONER_TABLE:
            v, src = STONER_TABLE[el]
            out[el] = StonerParameter(el, v, src)
        else:
            raise ParameterError(
                f"no Stoner parameter for element {el!r}; tabulated: "
                f"{', '.join(sorted(STONER_TABLE))}; give one, e.g. stoner={{{el!r}: 0.4}} (eV)"
            )
    for el in given:
        if el not in out:
            _check(given[el], el)  # elements without d: still validate the number
    return out
