"""Layer- and site-group-resolved band descriptors of slabs and overlayers.

A group's curve is the ``shell`` partial DOS per atom of its sites (sum of the site channels
divided by the number of sites carrying the shell), so groups of different sizes compare
directly; the descriptors are those of :func:`valband.dos.band_descriptors` (centre, width,
filling, skewness, kurtosis, upper edge) over one energy window (eV, relative to E_F).

Groups come from a :class:`~valband.structure.SlabInfo` or a slab spec's info dict
(``"surface"``, ``"overlayer"``, ``"substrate"``, ``"L0"``, ``"L1"``, …, plus ``"centre"``: the
middle layer of an odd slab, the middle two of an even one, defined from 3 layers on), from a
mapping ``{name: sites}``, or from a per-site layer index. The table lists the surface layer
first, then the overlayer/substrate, the centre, and the layers from the top down.
"""

from __future__ import annotations

from collections.abc import Mapping, Sequence
from dataclasses import dataclass
from types import SimpleNamespace

import numpy as np

from valband.dos import BandDescriptors, band_descriptors
from valband.errors import InputError, SettingsError, StructureError
from valband.results import DOSResult

__all__ = ["GroupDescriptorTable", "layer_descriptors", "layer_partition", "resolve_groups"]

_FIRST = ("surface", "overlayer", "substrate", "centre")


def _is_slab_info(obj) -> bool:
    return hasattr(obj, "layer") and hasattr(obj, "n_layers") and hasattr(obj, "groups")


def _from_spec_info(obj):
    """Return the slab part of a :func:`valband.structure.build_from_spec` info dict, if any."""
    if isinstance(obj, Mapping) and isinstance(obj.get("slab"), Mapping):
        d = obj["slab"]
        if {"layer", "n_layers", "groups"} <= set(d):
            return SimpleNamespace(layer=np.asarray(d["layer"], dtype=np.int64),
                                   n_layers=int(d["n_layers"]), groups=dict(d["groups"]))
    return obj


def _check_sites(name: str, sites, n_sites: int) -> tuple[int, ...]:
    try:
        idx = tuple(int(i) for i in sites)
    except (TypeError, ValueError):
        raise InputError(f"group {name!r}: sites {sites!r} are not integers") from None
    if not idx:
        raise InputError(f"group {name!r} has no sites")
    bad = [i for i in idx if not 0 <= i < n_sites]
    if bad:
        raise InputError(
            f"group {name!r}: unknown site {bad[0]}; the cell has sites 0 … {n_sites - 1}"
        )
    if len(set(idx)) != len(idx):
        raise InputError(f"group {name!r} lists a site twice")
    return idx


def _order(groups: dict[str, tuple[int, ...]]) -> dict[str, tuple[int, ...]]:
    def key(name: str):
        if name in _FIRST:
            return (0, _FIRST.index(name), 0, name)
        if name.startswith("L") and name[1:].isdigit():
            return (1, 0, int(name[1:]), name)
        return (2, 0, 0, name)

    return {k: groups[k] for k in sorted(groups, key=key)}


def resolve_groups(groups, n_sites: int) -> dict[str, tuple[int, ...]]:
    """Named site groups from a SlabInfo, a mapping ``{name: sites}`` or per-site layers.

    The result is ordered (surface first, see the module docstring); groups may overlap. The
    info dict of a slab or overlayer spec (:func:`valband.structure.build_from_spec`) is
    accepted as well (its ``"slab"`` entry).
    """
    groups = _from_spec_info(groups)
    if groups is None:
        raise InputError(
            "no site groups given; accepted: a SlabInfo (from valband.structure.slab/overlayer "
            "or the info of a slab spec), a mapping {name: [sites]} or one layer index per site"
        )
    if _is_slab_info(groups):
        layer = np.asarray(groups.layer)
        if len(layer) != n_sites:
            raise StructureError(
                f"the slab info describes {len(layer)} sites but the model has {n_sites}"
            )
        out = {k: _check_sites(k, v, n_sites) for k, v in dict(groups.groups).items()}
        n = int(groups.n_layers)
        if n >= 3:
            mid = [(n - 1) // 2] if n % 2 else [n // 2 - 1, n // 2]
            out["centre"] = tuple(int(i) for i in np.flatnonzero(np.isin(layer, mid)))
        return _order(out)
    if isinstance(groups, Mapping):
        if not groups:
            raise InputError("the group mapping is empty; give {name: [site, …]}")
        return _order({str(k): _check_sites(str(k), v, n_sites) for k, v in groups.items()})
    if isinstance(groups, Sequence | np.ndarray) and not isinstance(groups, str):
        layer = np.asarray(groups)
        if layer.shape != (n_sites,) or not np.issubdtype(layer.dtype, np.integer):
            raise InputError(
                f"per-site layers: need {n_sites} integers (one per site), got {groups!r}"
            )
        return _order({f"L{k}": tuple(int(i) for i in np.flatnonzero(layer == k))
                       for k in np.unique(layer)})  # fmt: skip
    raise InputError(
        f"site groups {groups!r}: accepted a SlabInfo, a mapping {{name: [sites]}} or one layer "
        "index per site"
    )


def layer_partition(groups, n_sites: int) -> dict[str, tuple[int, ...]]:
    """Disjoint groups for self-consistency: the layers ``L<k>`` of a SlabInfo, or a mapping.

    Raises InputError if the groups of a mapping overlap.
    """
    groups = _from_spec_info(groups)
    if _is_slab_info(groups):
        layer = np.asarray(groups.layer)
        if len(layer) != n_sites:
            raise StructureError(
                f"the slab info describes {len(layer)} sites but the model has {n_sites}"
            )
        groups = layer
    out = resolve_groups(groups, n_sites)
    seen: dict[int, str] = {}
    for name, sites in out.items():
        for i in sites:
            if i in seen:
                raise InputError(
                    f"groups {seen[i]!r} and {name!r} share site {i}; self-consistent shifts "
                    "need disjoint groups"
                )
            seen[i] = name
    return out


@dataclass(frozen=True)
class GroupDescriptorTable:
    """Descriptors of one shell per site group (surface first).

    Attributes
    ----------
    shell : str
    window : (float, float), eV relative to E_F
    groups : dict name → BandDescriptors (ordered)
    sites : dict name → tuple of site indices used (those carrying the shell)
    """

    shell: str
    window: tuple[float, float]
    groups: dict[str, BandDescriptors]
    sites: dict[str, tuple[int, ...]]

    @property
    def surface(self) -> BandDescriptors:
        """Descriptors of the ``"surface"`` group (InputError if there is none)."""
        return self["surface"]

    def __getitem__(self, name: str) -> BandDescriptors:
        if name not in self.groups:
            raise InputError(f"no group {name!r}; groups: {', '.join(self.groups)}")
        return self.groups[name]

    def difference(self, a: str, b: str, field: str = "centre") -> float:
        """``field`` of group a minus that of group b (e.g. surface − centre d-band centre, eV)."""
        return float(getattr(self[a], field) - getattr(self[b], field))

    def to_dict(self) -> dict:
        """JSON form: ``{"shell", "window_eV", "groups": [{"group", "sites", ...}, …]}``."""
        return {
            "shell": self.shell,
            "window_eV": list(self.window),
            "groups": [
                {"group": k, "sites": list(self.sites[k]), **d.to_dict()}
                for k, d in self.groups.items()
            ],
        }


def layer_descriptors(
    dos: DOSResult,
    groups,
    shell: str = "d",
    window: tuple[float, float] | None = None,
    required: Sequence[str] = (),
) -> GroupDescriptorTable:
    """Descriptors of ``shell`` per layer / site group.

    Parameters
    ----------
    dos
        A site-resolved DOS (``resolve="l"`` or ``"m"``) of the slab.
    groups
        SlabInfo, mapping or per-site layers (:func:`resolve_groups`).
    shell, window
        As for :func:`valband.workflows.describe`.
    required
        Group names that must exist (e.g. ``("surface", "centre", "L2")``); a slab too thin for
        them raises :class:`StructureError` naming the groups it has.
    """
    if shell not in ("s", "p", "d"):
        raise SettingsError(f"shell {shell!r}: accepted 's', 'p' or 'd'")
    n_sites = int(dos.n_sites)
    resolved = resolve_groups(groups, n_sites)
    missing = [g for g in required if g not in resolved]
    if missing:
        n_layers = getattr(_from_spec_info(groups), "n_layers", None)
        thin = f" (the slab has {n_layers} layers)" if n_layers is not None else ""
        raise StructureError(
            f"group(s) {', '.join(missing)} requested but not present{thin}; "
            f"available: {', '.join(resolved)}; 'centre' needs at least 3 layers"
        )
    have = {c.site for c in dos.channel_labels if c.shell == shell}
    win = (float(dos.energies[0]), float(dos.energies[-1])) if window is None else (
        float(window[0]), float(window[1]))  # fmt: skip
    out, used = {}, {}
    for name, sites in resolved.items():
        members = tuple(i for i in sites if i in have)
        if not members:
            continue
        curve = sum(dos.select(site=i, shell=shell) for i in members) / len(members)
        out[name] = band_descriptors(dos.energies, curve, win)
        used[name] = members
    if not out:
        raise SettingsError(f"no site of the groups carries a {shell} shell")
    return GroupDescriptorTable(shell, win, out, used)
