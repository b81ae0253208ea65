"""The band-structure result: eigenvalues along a path with their orbital character."""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
from numpy.typing import NDArray

from valband.results.channels import Channel

__all__ = ["BandsResult"]


@dataclass(frozen=True, eq=False)
class BandsResult:
    """Bands along a k-path.

    Attributes
    ----------
    kpoints : (n_k, 3) float64, fractional reciprocal coordinates
    distance : (n_k,) float64, 1/Å (2π included), cumulative path length
    energies : (n_k, n_bands) float64, eV relative to ``fermi_level``
    character : (n_k, n_bands, n_ch) float64
        Weight of each state on each channel (Mulliken for non-orthogonal sets); sums to 1.
    channel_labels : tuple of Channel
    label_positions : (n_labels,) float64, 1/Å; ``labels`` their names
    fermi_level : float, eV on the model's absolute scale (taken from a DOS run, or given)
    settings, provenance : dict
    """

    kpoints: NDArray[np.float64]
    distance: NDArray[np.float64]
    energies: NDArray[np.float64]
    character: NDArray[np.float64]
    channel_labels: tuple[Channel, ...]
    label_positions: NDArray[np.float64]
    labels: tuple[str, ...]
    fermi_level: float
    settings: dict = field(default_factory=dict)
    provenance: dict = field(default_factory=dict)

    def __post_init__(self) -> None:
        for name in ("kpoints", "distance", "energies", "character", "label_positions"):
            a = np.array(getattr(self, name), dtype=np.float64, copy=True)
            a.setflags(write=False)
            object.__setattr__(self, name, a)

    def character_of(self, element: str | None = None, shell: str | None = None) -> NDArray:
        """Summed weight of the matching channels, shape (n_k, n_bands)."""
        mask = np.array([
            (element is None or c.element == element) and (shell is None or c.shell == shell)
            for c in self.channel_labels
        ])
        if not mask.any():
            return np.zeros(self.energies.shape)
        return self.character[:, :, mask].sum(axis=2)

    def to_dict(self) -> dict:
        """JSON-ready dictionary."""
        return {
            "kind": "valband.bands",
            "kpoints": self.kpoints.tolist(),
            "distance_inv_angstrom": self.distance.tolist(),
            "energies_eV": self.energies.tolist(),
            "character": self.character.tolist(),
            "channel_labels": [c.to_dict() for c in self.channel_labels],
            "label_positions_inv_angstrom": self.label_positions.tolist(),
            "labels": list(self.labels),
            "fermi_level_eV": self.fermi_level,
            "settings": self.settings,
            "provenance": self.provenance,
        }

    @classmethod
    def from_dict(cls, d: dict) -> BandsResult:
        """Inverse of :meth:`to_dict`."""
        return cls(
            kpoints=np.array(d["kpoints"]),
            distance=np.array(d["distance_inv_angstrom"]),
            energies=np.array(d["energies_eV"]),
            character=np.array(d["character"]),
            channel_labels=tuple(Channel.from_dict(c) for c in d["channel_labels"]),
            label_positions=np.array(d["label_positions_inv_angstrom"]),
            labels=tuple(d["labels"]),
            fermi_level=float(d["fermi_level_eV"]),
            settings=dict(d.get("settings", {})),
            provenance=dict(d.get("provenance", {})),
        )
