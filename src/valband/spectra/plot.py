"""Figure of a simulated spectrum: binding energy decreasing to the right (the trade's convention).

matplotlib is imported lazily through :func:`valband.report.plots.new_figure`.
"""

from __future__ import annotations

from valband.spectra.simulate import Spectrum

__all__ = ["plot_spectrum"]

_STYLE = {"s": ":", "p": "--", "d": "-"}
_COLOURS = ["#283593", "#c2185b", "#00897b", "#ef6c00", "#6d4c41", "#7b1fa2", "#2e7d32"]


def plot_spectrum(ax, spectrum: Spectrum, title: str | None = None) -> None:
    """Total (grey fill) and element × shell sums of the components (lines) on ``ax``.

    The x axis is binding energy in eV, high on the left and E_F (BE = 0) on the right.
    """
    be = spectrum.binding_energy
    ax.fill_between(be, spectrum.intensity, color="0.85", lw=0, label="total")
    ax.plot(be, spectrum.intensity, color="0.3", lw=0.9)
    elements = list(dict.fromkeys(c.element for c in spectrum.component_labels))
    for k, el in enumerate(elements):
        shells = dict.fromkeys(c.shell for c in spectrum.component_labels if c.element == el)
        for sh in shells:
            ax.plot(be, spectrum.select(element=el, shell=sh), lw=1.2,
                    color=_COLOURS[k % len(_COLOURS)], ls=_STYLE.get(sh, "-."),
                    label=f"{el} {sh}")
    ax.axvline(0.0, color="k", lw=0.7, ls="-.")
    ax.set_xlim(be[-1], be[0])  # decreasing to the right
    ax.set_ylim(bottom=0)
    ax.set_xlabel("binding energy (eV)")
    ax.set_ylabel("intensity (Mb · states / eV / cell)")
    ax.legend(frameon=False, fontsize=8, ncols=2)
    st = spectrum.settings
    ax.set_title(title or f"hν = {st.get('photon_energy_eV', float('nan')):g} eV", fontsize=10)
