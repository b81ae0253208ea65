"""d-band (or any shell's) descriptors per element and per site from a DOS result.

Each element's curve is its partial DOS per atom (summed over its sites, divided by their
number); each site's is its own. Every descriptor records the energy window it was taken over.
"""

from __future__ import annotations

from dataclasses import dataclass

from valband.dos import BandDescriptors, band_descriptors
from valband.errors import SettingsError
from valband.results import DOSResult

__all__ = ["DescriptorTable", "describe", "DEFAULT_WINDOW"]

#: Default descriptor window, eV relative to E_F (clipped to the DOS grid): the valence band
#: and the lowest empty d states. It keeps out the d weight that non-orthogonal (Mulliken)
#: projections leave in the p bands 10–25 eV above E_F, which otherwise moves the centre of
#: a first-principles set by ~0.9 eV (DEVELOPERS.md, "First-principles parameter sets").
DEFAULT_WINDOW = (-15.0, 5.0)


@dataclass(frozen=True)
class DescriptorTable:
    """Descriptors of one shell: whole cell (per atom carrying it), per element, per site."""

    shell: str
    window: tuple[float, float]
    cell: BandDescriptors
    elements: dict[str, BandDescriptors]
    sites: dict[int, BandDescriptors]
    site_labels: dict[int, str]

    def to_dict(self) -> dict:
        """JSON form: ``{"shell", "window_eV", "elements": {El: {...}}, "sites": [...]}``."""
        return {
            "shell": self.shell,
            "window_eV": list(self.window),
            "cell": self.cell.to_dict(),
            "elements": {e: d.to_dict() for e, d in self.elements.items()},
            "sites": [
                {"site": i, "label": self.site_labels.get(i, str(i)), **d.to_dict()}
                for i, d in self.sites.items()
            ],
        }


def describe(
    dos: DOSResult, shell: str = "d", window: tuple[float, float] | None = None,
    site_labels: dict[int, str] | None = None,
) -> DescriptorTable:
    """Descriptors (centre, width, filling, skewness, kurtosis, upper edge) of ``shell``.

    Parameters
    ----------
    dos : a DOS result (energies relative to E_F).
    shell : "s", "p" or "d".
    window : (emin, emax) in eV relative to E_F; default :data:`DEFAULT_WINDOW` clipped to the
        DOS grid; ``"full"`` for the whole grid (the moments theorem holds there).
    """
    if shell not in ("s", "p", "d"):
        raise SettingsError(f"shell {shell!r}: accepted 's', 'p' or 'd'")
    if isinstance(window, str) and window == "full":
        win = (float(dos.energies[0]), float(dos.energies[-1]))
    elif window is None:
        win = (max(float(dos.energies[0]), DEFAULT_WINDOW[0]),
               min(float(dos.energies[-1]), DEFAULT_WINDOW[1]))
    else:
        win = (float(window[0]), float(window[1]))
    elements = {}
    sites = {}
    for el in dos.elements:
        if shell not in dos.shells_of(el):
            continue
        members = dos.sites_of(el)
        curve = dos.select(element=el, shell=shell) / len(members)
        elements[el] = band_descriptors(dos.energies, curve, win)
        for i in members:
            sites[i] = band_descriptors(dos.energies, dos.select(site=i, shell=shell), win)
    if not elements:
        raise SettingsError(
            f"no element of this model has a {shell} shell; shells present: "
            + ", ".join(f"{e}: {''.join(dos.shells_of(e))}" for e in dos.elements)
        )
    curve = dos.select(shell=shell) / len(sites)
    return DescriptorTable(shell, win, band_descriptors(dos.energies, curve, win), elements, sites,
                           dict(site_labels or {}))
