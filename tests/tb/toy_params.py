"""A tiny parameter set satisfying the protocol :func:`valband.tb.build_model` consumes.

Integrals are given per unordered element pair in one direction (a → b) as a function of the
bond length; the reverse direction swaps the shell letters of each integral name
(``pss(a, b) = sps(b, a)``, Slater & Koster, Phys. Rev. 94, 1498 (1954)). Integrals whose
shells are absent on either atom are returned as zero, as the protocol asks.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass, field

import numpy as np

from valband.errors import ParameterError

NAMES = ("sss", "sps", "pss", "sds", "dss", "pps", "ppp",
         "pds", "pdp", "dps", "dpp", "dds", "ddp", "ddd")  # fmt: skip
_SWAP = np.array([NAMES.index(n[1] + n[0] + n[2]) for n in NAMES])

Law = Callable[[np.ndarray], np.ndarray]  # r (n,) -> integrals (n, 14)


@dataclass(frozen=True)
class ToyElement:
    shells: tuple[str, ...]
    onsite: dict[str, float]
    valence_electrons: float


def integrals(**values: float) -> np.ndarray:
    """A (14,) vector from keyword values (missing names are 0)."""
    bad = set(values) - set(NAMES)
    assert not bad, bad
    return np.array([values.get(n, 0.0) for n in NAMES])


def like_pair(v: np.ndarray) -> np.ndarray:
    """Make a homonuclear integral vector reciprocal: pss = sps, dss = sds, dps = pds, dpp = pdp."""
    v = np.array(v, float)
    for rev, fwd in (("pss", "sps"), ("dss", "sds"), ("dps", "pds"), ("dpp", "pdp")):
        v[NAMES.index(rev)] = v[NAMES.index(fwd)]
    return v


def constant(v: np.ndarray) -> Law:
    """The same integrals at every distance inside the cutoff."""
    v = np.asarray(v, float)
    return lambda r: np.tile(v, (len(r), 1))


def exponential(v0: np.ndarray, q: np.ndarray, r0: float) -> Law:
    """V_i(r) = v0_i exp(−q_i (r − r0)), a different decay for each integral."""
    v0, q = np.asarray(v0, float), np.asarray(q, float)
    return lambda r: v0[None, :] * np.exp(-q[None, :] * (np.asarray(r)[:, None] - r0))


def shell_table(shells: list[tuple[float, np.ndarray]], tol: float = 1e-6) -> Law:
    """One integral vector per neighbour-shell distance (Å); other distances get 0."""

    def law(r):
        out = np.zeros((len(r), 14))
        for d, v in shells:
            out[np.abs(np.asarray(r) - d) < tol] = v
        return out

    return law


@dataclass
class ToyParams:
    """Protocol-complete toy parameter set (name, version, orthogonal, element, cutoff,
    hopping, overlap)."""

    elements: dict[str, ToyElement]
    hoppings: dict[tuple[str, str], Law]
    cutoffs: dict[tuple[str, str], float]
    overlaps: dict[tuple[str, str], Law] | None = None
    name: str = "toy"
    version: str = "0"
    calls: list = field(default_factory=list)

    @property
    def orthogonal(self) -> bool:
        return self.overlaps is None

    def element(self, symbol):
        if symbol not in self.elements:
            raise ParameterError(f"toy set has no element {symbol!r}")
        return self.elements[symbol]

    def cutoff(self, a, b):
        for key in ((a, b), (b, a)):
            if key in self.cutoffs:
                return self.cutoffs[key]
        raise ParameterError(f"toy set has no pair {a}-{b}")

    def _directed(self, table, a, b, r):
        self.element(a), self.element(b)
        r = np.asarray(r, float)
        if (a, b) in table:
            v = table[a, b](r)
        elif (b, a) in table:
            v = table[b, a](r)[:, _SWAP]
        else:
            raise ParameterError(f"toy set has no pair {a}-{b}")
        sa, sb = self.elements[a].shells, self.elements[b].shells
        mask = np.array([n[0] in sa and n[1] in sb for n in NAMES])
        return v * mask

    def hopping(self, a, b, r):
        self.calls.append(("hopping", a, b, len(r)))
        return self._directed(self.hoppings, a, b, r)

    def overlap(self, a, b, r):
        if self.overlaps is None:
            return None
        self.calls.append(("overlap", a, b, len(r)))
        return self._directed(self.overlaps, a, b, r)


SPD = ("s", "p", "d")


def random_integrals(rng: np.random.Generator, scale: float = 1.0) -> np.ndarray:
    """14 distinct non-zero integrals (|V| in [0.2, 1.2]·scale with random signs)."""
    while True:
        v = rng.uniform(0.2, 1.2, 14) * rng.choice([-1.0, 1.0], 14) * scale
        if np.min(np.abs(np.subtract.outer(v, v))[np.triu_indices(14, 1)]) > 1e-3:
            return v


def spd_params(rng, symbols=("Cu",), second_neighbours=True, overlap=False, cutoff=3.2):
    """spd toy set for the given elements; exponential laws with distinct decays.

    Like pairs get 10 independent integrals (pss = sps etc., as reciprocity demands); unlike
    pairs get all 14 distinct.
    """
    elements = {
        s: ToyElement(
            SPD, {"s": rng.uniform(-2, 2), "p": rng.uniform(2, 6), "d": rng.uniform(-5, -1)}, 11.0
        )
        for s in symbols
    }
    hop, ovl, cut = {}, {}, {}
    for i, a in enumerate(symbols):
        for b in symbols[i:]:
            v = random_integrals(rng)
            sv = random_integrals(rng, 0.05)
            q = rng.uniform(0.5, 2.0, 14)
            if a == b:
                v, sv, q = like_pair(v), like_pair(sv), like_pair(q)
            hop[a, b] = exponential(v, q, 2.5)
            ovl[a, b] = exponential(sv, q, 2.5)
            cut[a, b] = cutoff
    return ToyParams(elements, hop, cut, overlaps=ovl if overlap else None)
