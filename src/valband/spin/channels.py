"""Projection channels of the doubled basis: site × shell, × spin, and × j.

Every channel keeps the plain :class:`valband.results.Channel` label (site, element, shell),
so the DOS results built from them work with :func:`valband.workflows.describe` and
:func:`valband.spectra.simulate_spectrum` unchanged. j channels put the j label in the
``orbital`` field (``Channel(0, "Pt", "d", "d5/2")``, column name ``Pt0:d5/2``); spin channels
go into separate per-spin results rather than new label fields.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from valband.conventions import SHELL_L
from valband.results import Channel
from valband.spin.angular import j_label, j_projectors
from valband.spin.model import SPINS, shell_blocks
from valband.spin.solve import Projector

__all__ = ["ChannelSet", "doubled_channels"]


@dataclass(frozen=True, eq=False)
class ChannelSet:
    """Labels and projectors of one family of channels.

    ``kind`` is "shell", "spin" or "j"; ``spins`` gives each channel's spin (None when the
    channel covers both).
    """

    kind: str
    labels: tuple[Channel, ...]
    spins: tuple[str | None, ...]
    projectors: tuple[Projector, ...]


def doubled_channels(base_orbitals, kinds=("shell", "spin", "j")) -> dict[str, ChannelSet]:
    """Channel families of the spin-major doubled basis of ``base_orbitals``."""
    n = len(base_orbitals)
    blocks = shell_blocks(base_orbitals)
    out = {}
    for kind in kinds:
        labels, spins, projs = [], [], []
        for site, el, sh, idx in blocks:
            both = np.concatenate([idx, n + idx])
            if kind == "shell":
                labels.append(Channel(site, el, sh))
                spins.append(None)
                projs.append(Projector(both, np.eye(len(both), dtype=np.complex128)))
            elif kind == "spin":
                for k, sp in enumerate(SPINS):
                    labels.append(Channel(site, el, sh))
                    spins.append(sp)
                    projs.append(Projector(k * n + idx, np.eye(len(idx), dtype=np.complex128)))
            elif kind == "j":
                for j, p in j_projectors(SHELL_L[sh]).items():
                    labels.append(Channel(site, el, sh, j_label(sh, j)))
                    spins.append(None)
                    projs.append(Projector(both, np.asarray(p, dtype=np.complex128)))
            else:
                raise ValueError(kind)
        out[kind] = ChannelSet(kind, tuple(labels), tuple(spins), tuple(projs))
    return out
