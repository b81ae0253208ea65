"""The density-of-states result: total, partial and integrated DOS with the settings that made it."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.arrays import readonly
from valband.errors import InputError
from valband.results.channels import Channel

__all__ = ["DOSResult"]


@dataclass(frozen=True, eq=False)
class DOSResult:
    """Total and partial densities of states.

    Attributes
    ----------
    energies : (n_e,) float64, eV
        Energy grid relative to the Fermi level (E − E_F).
    total : (n_e,) float64, states / eV / cell (both spins)
        Total DOS.
    channels : (n_ch, n_e) float64, states / eV / cell
        Partial DOS per :class:`Channel` (site × shell, or site × orbital).
    channel_labels : tuple of Channel
        One label per row of ``channels``.
    fermi_level : float, eV
        E_F on the model's absolute energy scale (the zero of ``energies``).
    n_electrons : float
        Valence electrons per cell that fix E_F.
    n_sites : int
        Sites in the cell (for per-atom normalisation).
    settings : dict
        Method, width, mesh, grid, symmetry — everything needed to reproduce the curve.
    provenance : dict
        Structure, parameter set (name, version), valband version.
    """

    energies: NDArray[np.float64]
    total: NDArray[np.float64]
    channels: NDArray[np.float64]
    channel_labels: tuple[Channel, ...]
    fermi_level: float
    n_electrons: float
    n_sites: int
    settings: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        object.__setattr__(self, "energies", readonly(self.energies))
        object.__setattr__(self, "total", readonly(self.total))
        object.__setattr__(self, "channels", readonly(self.channels).reshape(len(self.channel_labels), -1))
        object.__setattr__(self, "channel_labels", tuple(self.channel_labels))
        if self.total.shape != self.energies.shape or self.channels.shape[1] != len(self.energies):
            raise ValueError("DOSResult: energies, total and channels must share the energy axis")

    # ------------------------------------------------------------------ views
    @property
    def step(self) -> float:
        """Grid spacing in eV."""
        return float(self.energies[1] - self.energies[0])

    def integrated(self, curve: NDArray | None = None) -> NDArray[np.float64]:
        """Running integral ∫_{E_min}^{E} of ``curve`` (default the total DOS), trapezoidal."""
        y = self.total if curve is None else np.asarray(curve)
        out = np.zeros_like(y, dtype=np.float64)
        out[1:] = np.cumsum(0.5 * (y[1:] + y[:-1]) * np.diff(self.energies))
        return out

    def select(
        self, element: str | None = None, shell: str | None = None, site: int | None = None,
        orbital: str | None = None,
    ) -> NDArray[np.float64]:
        """Sum of the channels matching every given criterion, shape (n_e,).

        Raises :class:`InputError` when nothing matches, naming what exists.
        """
        mask = [
            (element is None or c.element == element)
            and (shell is None or c.shell == shell)
            and (site is None or c.site == site)
            and (orbital is None or c.orbital == orbital)
            for c in self.channel_labels
        ]
        if not any(mask):
            have = sorted({f"{c.element}:{c.shell}" for c in self.channel_labels})
            raise InputError(
                f"no DOS channel matches element={element}, shell={shell}, site={site}, "
                f"orbital={orbital}; available: {', '.join(have)}"
            )
        return self.channels[np.array(mask)].sum(axis=0)

    @property
    def elements(self) -> tuple[str, ...]:
        """Elements present, in order."""
        return tuple(dict.fromkeys(c.element for c in self.channel_labels))

    @property
    def sites(self) -> tuple[int, ...]:
        """Site indices present, in order."""
        return tuple(dict.fromkeys(c.site for c in self.channel_labels))

    def shells_of(self, element: str) -> tuple[str, ...]:
        """Shells of an element, in order."""
        return tuple(dict.fromkeys(c.shell for c in self.channel_labels if c.element == element))

    def sites_of(self, element: str) -> tuple[int, ...]:
        """Sites occupied by an element."""
        return tuple(dict.fromkeys(c.site for c in self.channel_labels if c.element == element))

    def value_at_fermi(self, curve: NDArray | None = None) -> float:
        """Interpolated value of ``curve`` (default total DOS) at E − E_F = 0."""
        y = self.total if curve is None else curve
        return float(np.interp(0.0, self.energies, y))

    # ------------------------------------------------------------------ serialisation
    def to_dict(self) -> dict:
        """JSON-ready dictionary holding every array and label."""
        return {
            "kind": "valband.dos",
            "energies_eV": self.energies.tolist(),
            "total": self.total.tolist(),
            "channels": self.channels.tolist(),
            "channel_labels": [c.to_dict() for c in self.channel_labels],
            "fermi_level_eV": self.fermi_level,
            "n_electrons": self.n_electrons,
            "n_sites": self.n_sites,
            "settings": self.settings,
            "provenance": self.provenance,
        }

    @classmethod
    def from_dict(cls, d: dict) -> DOSResult:
        """Inverse of :meth:`to_dict`."""
        return cls(
            energies=np.array(d["energies_eV"]),
            total=np.array(d["total"]),
            channels=np.array(d["channels"]),
            channel_labels=tuple(Channel.from_dict(c) for c in d["channel_labels"]),
            fermi_level=float(d["fermi_level_eV"]),
            n_electrons=float(d["n_electrons"]),
            n_sites=int(d["n_sites"]),
            settings=dict(d.get("settings", {})),
            provenance=dict(d.get("provenance", {})),
        )
