"""Spin–orbit constants ξ (eV) of the p and d shells of a model's elements, with provenance.

Order of precedence for each (element, shell):

1. a value given by the caller (``soc={"Pt": 0.6}`` sets ξ_d, or ξ_p for an element without
   a d shell; ``soc={"Pt": {"p": 0.9, "d": 0.6}}`` sets shells explicitly);
2. a value in the parameter set, if its element record carries one (the optional
   ``spin_orbit`` table of format v1, shell → ``{value, source}`` in eV; a set without it
   says so in the provenance);
3. the free, scalar-relativistic LDA atom of :mod:`valband.atom` (Koelling & Harmon, J. Phys.
   C 10, 3107 (1977)) through :func:`valband.atom.spin_orbit_constant_ev`, in the ground
   configuration with the valence p level added empty when it is not occupied, and the
   MacDonald–Vosko relativistic exchange (the default of a scalar-relativistic atom). Using the
   free-atom ξ in the solid is common practice (it changes by a few per cent on
   compression); (5/2)ξ_d agrees with the NIST SRD 141 relativistic d splittings within 1.5 %
   (Cu −0.15 %, Ag −0.41 %, Au −1.33 %).
"""

from __future__ import annotations

import functools
import math
from collections.abc import Mapping
from dataclasses import asdict, dataclass

from valband.errors import CalculationError, ParameterError, SettingsError

__all__ = ["SpinOrbitConstant", "atom_spin_orbit", "spin_orbit_constants"]

_SOC_SHELLS = ("p", "d")


@dataclass(frozen=True)
class SpinOrbitConstant:
    """ξ of one element's shell: ``xi_ev`` in eV (H_so = ξ L·S) and where it comes from."""

    element: str
    shell: str
    xi_ev: float
    source: str

    def to_dict(self) -> dict:
        """JSON form."""
        return asdict(self)


def _valence_subshells(element: str) -> dict[str, tuple[int, int, bool]]:
    """Valence n of the p and d shells: shell → (n, l, occupied) in the ground configuration."""
    from valband.atom import ground_state_configuration

    cfg = ground_state_configuration(element)
    n_d = max((n for n, l, f in cfg if l == 2 and f > 0), default=None)  # noqa: E741
    n_s = (n_d + 1) if n_d is not None else max(n for n, l, _ in cfg if l == 0)  # noqa: E741
    n_p_occ = max((n for n, l, f in cfg if l == 1 and f > 0), default=0)  # noqa: E741
    n_p = max(n_s, n_p_occ)
    out = {"p": (n_p, 1, any(n == n_p and l == 1 for n, l, _ in cfg))}  # noqa: E741
    if n_d is not None:
        out["d"] = (n_d, 2, True)
    return out


@functools.lru_cache(maxsize=64)
def atom_spin_orbit(element: str) -> dict[str, tuple[float, str]]:
    """ξ (eV) of the valence p and d shells of the free scalar-relativistic atom.

    Returns shell → (ξ in eV, provenance text). Raises :class:`ParameterError` naming the
    element when the atom engine cannot provide it (unknown element, unbound empty p level).
    """
    from valband.atom import ground_state_configuration, solve_atom, spin_orbit_constant_ev

    try:
        shells = _valence_subshells(element)
        cfg = list(ground_state_configuration(element))
    except (ValueError, KeyError) as exc:
        raise ParameterError(
            f"no spin–orbit constant for element {element!r}: the atom engine does not know it "
            f"({exc}); give the value, e.g. soc={{{element!r}: 0.5}} (ξ_d in eV)"
        ) from None
    extra = [(n, l, 0.0) for n, l, occ in shells.values() if not occ]  # noqa: E741
    text = " ".join(f"{n}{'spd'[l]}{f:g}" for n, l, f in cfg[-3:] + extra)  # noqa: E741
    try:
        atom = solve_atom(element, cfg + extra, relativity="scalar")
    except CalculationError as exc:
        raise ParameterError(
            f"no spin–orbit constant for {element}: the scalar-relativistic atom ({text}) did "
            f"not solve ({exc}); give the values with soc={{{element!r}: {{'p': …, 'd': …}}}}"
        ) from None
    out = {}
    for sh, (n, _, occ) in shells.items():
        xi = float(spin_orbit_constant_ev(atom, f"{n}{sh}"))
        note = "" if occ else f", {n}{sh} added empty"
        rel_x = (", MacDonald-Vosko relativistic exchange" if atom.relativistic_exchange
                 else "")
        out[sh] = (xi, f"valband.atom: free scalar-relativistic LDA atom (…{text}{note}"
                       f"{rel_x}), first-order ξ_{n}{sh} (Koelling & Harmon 1977)")
    return out


def _from_parameter_set(params, element: str, shell: str) -> tuple[float, str] | None:
    """ξ from an optional ``spin_orbit`` mapping of the element record, if the set has one."""
    if params is None:
        return None
    try:
        rec = params.element(element)
    except ParameterError:
        return None
    table = getattr(rec, "spin_orbit", None)
    if not table or shell not in table:
        return None
    src = getattr(rec, "provenance", {}).get(f"spin_orbit.{shell}", "parameter set")
    return float(table[shell]), f"parameter set {params.name!r} {params.version}: {src}"


def _check_xi(value, where: str) -> float:
    try:
        xi = float(value)
    except (TypeError, ValueError):
        raise SettingsError(f"{where}: {value!r} is not a number; accepted: ξ ≥ 0 in eV") from None
    if not math.isfinite(xi) or xi < 0:
        raise SettingsError(f"{where}: ξ = {value!r} eV; accepted: a finite number ≥ 0 eV")
    return xi


def _user_values(soc: Mapping, shells_of: Mapping[str, tuple[str, ...]]) -> dict:
    out: dict[tuple[str, str], float] = {}
    for el, val in soc.items():
        if el not in shells_of:
            raise SettingsError(
                f"spin–orbit constant given for {el!r}, which is not in the structure; "
                f"elements present: {', '.join(shells_of)}"
            )
        have = [s for s in _SOC_SHELLS if s in shells_of[el]]
        if isinstance(val, Mapping):
            for sh, xi in val.items():
                if sh not in have:
                    raise SettingsError(
                        f"spin–orbit constant for {el} {sh}: accepted shells of {el} with "
                        f"l ≥ 1: {', '.join(have) or 'none'}"
                    )
                out[el, sh] = _check_xi(xi, f"spin–orbit constant of {el} {sh}")
        else:
            if not have:
                raise SettingsError(f"spin–orbit constant for {el}: it has no p or d shell")
            out[el, have[-1]] = _check_xi(val, f"spin–orbit constant of {el} {have[-1]}")
    return out


def spin_orbit_constants(
    shells_of: Mapping[str, tuple[str, ...]], soc=True, params=None
) -> dict[tuple[str, str], SpinOrbitConstant]:
    """ξ for every p and d shell of the elements in ``shells_of`` (element → its shells).

    Parameters
    ----------
    shells_of : element → shells of the model (e.g. ``{"Pt": ("s", "p", "d")}``)
    soc : True (parameter set, else atom engine), or a mapping of given values (see module)
    params : the model's ParameterSet, or None

    Returns
    -------
    dict (element, shell) → SpinOrbitConstant; s shells carry none.
    """
    if soc is False or soc is None:
        return {}
    if soc is not True and not isinstance(soc, Mapping):
        raise SettingsError(
            f"soc={soc!r}: accepted True, False, or a mapping element → ξ_d in eV "
            "(or element → {shell: ξ})"
        )
    given = _user_values(soc, shells_of) if isinstance(soc, Mapping) else {}
    out = {}
    for el, shells in shells_of.items():
        for sh in (s for s in _SOC_SHELLS if s in shells):
            if (el, sh) in given:
                out[el, sh] = SpinOrbitConstant(el, sh, given[el, sh], "given by the user")
                continue
            found = _from_parameter_set(params, el, sh)
            if found is None:
                xi, src = atom_spin_orbit(el)[sh]
                name = getattr(params, "name", None)
                if name is not None:
                    src += f" (parameter set {name!r} has no spin–orbit constants)"
            else:
                xi, src = found
            out[el, sh] = SpinOrbitConstant(el, sh, _check_xi(xi, f"ξ of {el} {sh}"), src)
    return out
