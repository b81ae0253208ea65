"""Projection channels: an explicit label for each partial-DOS or fat-band curve."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numpy.typing import NDArray

from valband.conventions import OrbitalLabel

__all__ = ["Channel", "channel_matrix"]


@dataclass(frozen=True, order=True)
class Channel:
    """One projection channel: a site's shell (``orbital=None``) or one of its orbitals."""

    site: int
    element: str
    shell: str
    orbital: str | None = None

    @property
    def name(self) -> str:
        """Column name in output files, e.g. ``Cu0:d`` or ``Cu0:dxy``."""
        return f"{self.element}{self.site}:{self.orbital or self.shell}"

    def to_dict(self) -> dict:
        """JSON form."""
        return {"site": self.site, "element": self.element, "shell": self.shell, "orbital": self.orbital}

    @classmethod
    def from_dict(cls, d: dict) -> Channel:
        """Inverse of :meth:`to_dict`."""
        return cls(int(d["site"]), d["element"], d["shell"], d.get("orbital"))


def channel_matrix(
    orbitals: tuple[OrbitalLabel, ...], resolve: str
) -> tuple[tuple[Channel, ...], NDArray[np.float64]]:
    """Channels and the (n_orb, n_ch) 0/1 matrix mapping basis orbitals onto them.

    ``resolve="l"`` gives one channel per site and shell, ``"m"`` one per basis orbital.
    """
    if resolve == "m":
        chans = tuple(Channel(o.site, o.element, o.shell, o.orbital) for o in orbitals)
    else:
        chans = tuple(dict.fromkeys(Channel(o.site, o.element, o.shell) for o in orbitals))
    index = {c: i for i, c in enumerate(chans)}
    mat = np.zeros((len(orbitals), len(chans)))
    for i, o in enumerate(orbitals):
        key = Channel(o.site, o.element, o.shell, o.orbital if resolve == "m" else None)
        mat[i, index[key]] = 1.0
    return chans, mat
