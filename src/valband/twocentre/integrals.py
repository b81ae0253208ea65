"""Two-centre overlap and Hamiltonian integrals of s, p, d orbitals (Slater–Koster convention).

For atoms A (origin) and B (distance R on +z) with orbitals φ_α on A and φ_β on B,

    S_αβ = ⟨φ_α|φ_β⟩,    H_αβ = ⟨φ_α| T + V_A + V_B |φ_β⟩,

where V_X is the neutral-atom potential of atom X (nuclear + Hartree + exchange–correlation
of that atom's own density): the *potential superposition* of Porezag, Frauenheim, Köhler,
Seifert, Kaschner, Phys. Rev. B 51, 12947 (1995). Three-centre and crystal-field terms are
left out, as in any two-centre table.

No derivatives are taken. Each orbital is an eigenfunction of its own atom,
(T + V_own,X) φ = ε φ, where V_own,X is the potential it was solved in (the confined atom's
Kohn–Sham potential, confinement included). With ΔV_X = V_X − V_own,X (the orbital's
*residual* potential, −V_conf when the density and the orbitals come from the same atom),

    route B:  H_αβ = ε_β S_αβ + ⟨φ_α|V_A|φ_β⟩ + ⟨φ_α|ΔV_B|φ_β⟩
    route A:  H_αβ = ε_α S_αβ + ⟨φ_α|ΔV_A|φ_β⟩ + ⟨φ_α|V_B|φ_β⟩.

The two are equal for Schrödinger orbitals and exact quadrature; they differ by the
quadrature error and, for scalar-relativistic orbitals, by the difference between the
relativistic kinetic operators of the two atoms. The reported H is their mean (Hermitian by
construction); half their difference is kept as a diagnostic (:attr:`BondIntegrals.asymmetry`).

Angular parts and signs: :mod:`valband.twocentre.angular`. Units: bohr and Hartree inside,
Å and eV at the public edge (:func:`bond_integrals`).
"""

from __future__ import annotations

from collections.abc import Callable, Sequence
from dataclasses import dataclass, field
from typing import Any

import numpy as np
from numpy.typing import ArrayLike, NDArray

from valband.arrays import readonly
from valband.atom.scf import BOHR_ANGSTROM, HARTREE_EV
from valband.errors import InputError, SettingsError
from valband.params.model import BOND_INTEGRALS

from .angular import BOND_FRAME, SHELL_L, theta_lm
from .quadrature import QuadratureSettings, bond_grid, centre_grid

__all__ = [
    "RadialOrbital",
    "TwoCentreSite",
    "BondFrameElements",
    "BondIntegrals",
    "bond_frame_elements",
    "bond_integrals",
    "check_distances",
]

RadialCallable = Callable[[NDArray[np.float64]], NDArray[np.float64]]


@dataclass(frozen=True, eq=False)
class RadialOrbital:
    """One valence orbital as the integrals need it.

    Attributes
    ----------
    shell : str
        "s", "p" or "d".
    radial : callable
        R(r): bohr → bohr^-3/2, the radial function (φ = R·Y), ∫R² r² dr = 1.
    energy : float
        Eigenvalue ε in the orbital's own potential V_own (Hartree).
    residual : callable or None
        ΔV(r) = V_neutral − V_own (Hartree, r in bohr); None means 0.
    label : str
        Subshell label for records, e.g. "4s".
    """

    shell: str
    radial: RadialCallable = field(repr=False)
    energy: float
    residual: RadialCallable | None = field(default=None, repr=False)
    label: str = ""

    def __post_init__(self) -> None:
        if self.shell not in SHELL_L:
            raise SettingsError(f"orbital shell {self.shell!r}; accepted: s, p, d")

    @property
    def l(self) -> int:  # noqa: E743
        """Angular momentum."""
        return SHELL_L[self.shell]


@dataclass(frozen=True, eq=False)
class TwoCentreSite:
    """What the two-centre integrals need from one atom.

    Attributes
    ----------
    symbol : str
        Element symbol (for records and messages).
    orbitals : tuple of RadialOrbital
        At most one per shell.
    potential : callable
        Neutral-atom potential V(r) (Hartree, r in bohr) entering H as V_A + V_B.
    """

    symbol: str
    orbitals: tuple[RadialOrbital, ...]
    potential: RadialCallable = field(repr=False)

    def __post_init__(self) -> None:
        shells = [o.shell for o in self.orbitals]
        if len(set(shells)) != len(shells) or not shells:
            raise SettingsError(
                f"site {self.symbol}: need one orbital per shell (s, p, d), got {shells}"
            )

    @property
    def shells(self) -> tuple[str, ...]:
        """Shells carried, in the order s, p, d."""
        return tuple(sh for sh in "spd" if any(o.shell == sh for o in self.orbitals))

    def orbital(self, shell: str) -> RadialOrbital:
        """Return the orbital of ``shell``."""
        for o in self.orbitals:
            if o.shell == shell:
                return o
        raise SettingsError(f"site {self.symbol} has no {shell} orbital; it has {self.shells}")


@dataclass(frozen=True, eq=False)
class BondFrameElements:
    """Bond-frame integrals in atomic units (columns in :data:`BOND_INTEGRALS` order).

    Attributes
    ----------
    distances : array (n,)
        Bond lengths (bohr).
    overlap, hamiltonian : arrays (n, 14)
        S (dimensionless) and the symmetrised H (Hartree); 0 where ``present`` is False.
    hamiltonian_a, hamiltonian_b : arrays (n, 14)
        H by route A and route B (Hartree).
    potential_a, potential_b : arrays (n, 14)
        ⟨φ_α|V_A|φ_β⟩ and ⟨φ_α|V_B|φ_β⟩ (Hartree).
    present : array (14,) of bool
        Integrals whose shells both sites carry.
    """

    distances: NDArray[np.float64] = field(repr=False)
    overlap: NDArray[np.float64] = field(repr=False)
    hamiltonian: NDArray[np.float64] = field(repr=False)
    hamiltonian_a: NDArray[np.float64] = field(repr=False)
    hamiltonian_b: NDArray[np.float64] = field(repr=False)
    potential_a: NDArray[np.float64] = field(repr=False)
    potential_b: NDArray[np.float64] = field(repr=False)
    present: NDArray[np.bool_] = field(repr=False)


@dataclass(frozen=True, eq=False)
class BondIntegrals:
    """Slater–Koster bond integrals of the directed pair first → second on a distance grid.

    Attributes
    ----------
    first, second : str
        Elements; ``"sps"`` is s on ``first``, p on ``second``.
    distances : array (n,)
        Bond lengths (Å).
    hopping : array (n, 14)
        H integrals (eV), :data:`BOND_INTEGRALS` columns; 0 for absent shells.
    overlap : array (n, 14)
        S integrals (dimensionless).
    asymmetry : array (n, 14)
        Half the difference of the two routes to H (eV): the Hermiticity diagnostic.
    present : array (14,) of bool
        Integrals whose shells both atoms carry.
    settings : dict
        Quadrature settings and method, for provenance.
    """

    first: str
    second: str
    distances: NDArray[np.float64] = field(repr=False)
    hopping: NDArray[np.float64] = field(repr=False)
    overlap: NDArray[np.float64] = field(repr=False)
    asymmetry: NDArray[np.float64] = field(repr=False)
    present: NDArray[np.bool_] = field(repr=False)
    settings: dict[str, Any] = field(repr=False)

    def names(self) -> tuple[str, ...]:
        """Names of the integrals present."""
        return tuple(n for n, p in zip(BOND_INTEGRALS, self.present, strict=True) if p)

    def at(self, index: int) -> dict[str, tuple[float, float]]:
        """{name: (H eV, S)} of the present integrals at distance number ``index``."""
        return {
            n: (float(self.hopping[index, k]), float(self.overlap[index, k]))
            for k, n in enumerate(BOND_INTEGRALS)
            if self.present[k]
        }


def check_distances(distances: ArrayLike, unit: str = "Å") -> NDArray[np.float64]:
    """Distances as a 1-D float array; InputError unless finite and > 0."""
    try:
        d = np.atleast_1d(np.asarray(distances, dtype=float))
    except (TypeError, ValueError):
        raise InputError(
            f"distances must be numbers ({unit}), got {distances!r}; accepted: finite numbers > 0"
        ) from None
    if d.ndim != 1 or d.size == 0:
        raise InputError(f"distances must be a non-empty 1-D array ({unit}), got shape {d.shape}")
    bad = ~np.isfinite(d) | (d <= 0)
    if np.any(bad):
        raise InputError(
            f"distance {d[bad][0]!r} {unit} is not allowed; accepted: finite distances > 0 {unit}"
        )
    return d


def _active(site_a: TwoCentreSite, site_b: TwoCentreSite) -> list:
    return [bf for bf in BOND_FRAME if bf.shell_a in site_a.shells and bf.shell_b in site_b.shells]


def _zero(r: NDArray[np.float64]) -> NDArray[np.float64]:
    return np.zeros_like(r)


def bond_frame_elements(
    site_a: TwoCentreSite,
    site_b: TwoCentreSite,
    distances_bohr: ArrayLike,
    settings: QuadratureSettings | None = None,
) -> BondFrameElements:
    """Overlap and Hamiltonian integrals in atomic units (bohr in, Hartree out).

    Parameters
    ----------
    site_a, site_b : TwoCentreSite
        First atom (origin) and second atom (on +z).
    distances_bohr : array_like (n,)
        Bond lengths R > 0 (bohr).
    settings : QuadratureSettings, optional
        Grid parameters (default :class:`QuadratureSettings`).
    """
    dist = check_distances(distances_bohr, "bohr")
    s = settings or QuadratureSettings()
    cgrid = centre_grid(s)
    active = _active(site_a, site_b)
    orb_a = {o.shell: o for o in site_a.orbitals}
    orb_b = {o.shell: o for o in site_b.orbitals}
    shells_a = [sh for sh in site_a.shells if any(bf.shell_a == sh for bf in active)]
    shells_b = [sh for sh in site_b.shells if any(bf.shell_b == sh for bf in active)]
    n, nk = dist.size, len(BOND_INTEGRALS)
    out = {k: np.zeros((n, nk)) for k in ("S", "H", "HA", "HB", "PA", "PB")}
    present = np.zeros(nk, dtype=bool)
    for bf in active:
        present[bf.index] = True

    # functions of each atom on its own grid do not depend on R
    def on_grid(orbs, shells, site, r):
        rad = {sh: orbs[sh].radial(r) for sh in shells}
        res = {sh: (orbs[sh].residual or _zero)(r) for sh in shells}
        return rad, res, site.potential(r)

    own_a = on_grid(orb_a, shells_a, site_a, cgrid.r)
    own_b = on_grid(orb_b, shells_b, site_b, cgrid.r)
    ang = {}
    for i, bigr in enumerate(dist):
        g = bond_grid(bigr, s, cgrid)
        na = g.n_a
        cross_a = on_grid(orb_a, shells_a, site_a, g.r_a[na:])  # A's functions on B's grid
        cross_b = on_grid(orb_b, shells_b, site_b, g.r_b[:na])  # B's functions on A's grid
        rad_a = {sh: np.concatenate([own_a[0][sh], cross_a[0][sh]]) for sh in shells_a}
        rad_b = {sh: np.concatenate([cross_b[0][sh], own_b[0][sh]]) for sh in shells_b}
        cols = [np.ones_like(g.weights), np.concatenate([own_a[2], cross_a[2]]),
                np.concatenate([cross_b[2], own_b[2]])]  # fmt: skip
        col_res_a = {}
        for sh in shells_a:
            col_res_a[sh] = len(cols)
            cols.append(np.concatenate([own_a[1][sh], cross_a[1][sh]]))
        col_res_b = {}
        for sh in shells_b:
            col_res_b[sh] = len(cols)
            cols.append(np.concatenate([cross_b[1][sh], own_b[1][sh]]))
        wcols = np.stack(cols, axis=1) * g.weights[:, None]
        ang.clear()
        prods = np.empty((len(active), g.weights.size))
        for j, bf in enumerate(active):
            key_a, key_b = ("a", bf.l_a, bf.m), ("b", bf.l_b, bf.m)
            if key_a not in ang:
                ang[key_a] = theta_lm(bf.l_a, bf.m, g.mu_a)
            if key_b not in ang:
                ang[key_b] = theta_lm(bf.l_b, bf.m, g.mu_b)
            prods[j] = rad_a[bf.shell_a] * ang[key_a] * rad_b[bf.shell_b] * ang[key_b]
        moments = prods @ wcols  # (n_active, n_cols)
        for j, bf in enumerate(active):
            ov, pa, pb = moments[j, 0], moments[j, 1], moments[j, 2]
            ra, rb = moments[j, col_res_a[bf.shell_a]], moments[j, col_res_b[bf.shell_b]]
            ea, eb = orb_a[bf.shell_a].energy, orb_b[bf.shell_b].energy
            h_b = eb * ov + pa + rb
            h_a = ea * ov + ra + pb
            k = bf.index
            out["S"][i, k] = bf.sign * ov
            out["HA"][i, k] = bf.sign * h_a
            out["HB"][i, k] = bf.sign * h_b
            out["H"][i, k] = bf.sign * 0.5 * (h_a + h_b)
            out["PA"][i, k] = bf.sign * pa
            out["PB"][i, k] = bf.sign * pb
    return BondFrameElements(
        distances=readonly(dist),
        overlap=readonly(out["S"]),
        hamiltonian=readonly(out["H"]),
        hamiltonian_a=readonly(out["HA"]),
        hamiltonian_b=readonly(out["HB"]),
        potential_a=readonly(out["PA"]),
        potential_b=readonly(out["PB"]),
        present=readonly(present, np.bool_),
    )


def bond_integrals(
    site_a: TwoCentreSite,
    site_b: TwoCentreSite,
    distances_angstrom: ArrayLike | Sequence[float],
    *,
    quadrature: QuadratureSettings | None = None,
) -> BondIntegrals:
    """Slater–Koster H (eV) and S integrals of the directed pair a → b at distances in Å.

    Parameters
    ----------
    site_a, site_b : TwoCentreSite
        The two atoms (e.g. :meth:`ConfinedAtom.site`); the bond runs from a to b.
    distances_angstrom : array_like (n,)
        Bond lengths (Å, > 0).
    quadrature : QuadratureSettings, optional
        Grid parameters.

    Returns
    -------
    BondIntegrals
    """
    d = check_distances(distances_angstrom, "Å")
    s = quadrature or QuadratureSettings()
    el = bond_frame_elements(site_a, site_b, d / BOHR_ANGSTROM, s)
    return BondIntegrals(
        first=site_a.symbol,
        second=site_b.symbol,
        distances=readonly(d),
        hopping=readonly(el.hamiltonian * HARTREE_EV),
        overlap=readonly(el.overlap),
        asymmetry=readonly(0.5 * (el.hamiltonian_a - el.hamiltonian_b) * HARTREE_EV),
        present=el.present,
        settings={
            "method": "two-centre integrals, potential superposition (V_A + V_B of neutral "
            "atoms); H symmetrised over the eigen-equations of both atoms",
            "quadrature": s.as_dict(),
            "hartree_eV": HARTREE_EV,
            "bohr_angstrom": BOHR_ANGSTROM,
        },
    )
