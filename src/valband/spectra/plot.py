"""Figure of a simulated spectrum: binding energy decreasing to the right (the trade's convention).

matplotlib is imported lazily through :func:`valband.report.plots.new_figure`.
"""

from __future__ import annotations

from valband.spectra.simulate import Spectrum

__all__ = ["plot_spectrum", "plot_fit"]

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
    if spectrum.background is not None:
        ax.plot(be, spectrum.background, color="0.45", lw=1.0, ls="--", label="inelastic")
    ax.axvline(0.0, color="k", lw=0.7, ls="-.")
    ax.set_xlim(be[-1], be[0])  # decreasing to the right
    ax.set_ylim(bottom=0)
    ax.set_xlabel("binding energy (eV)")
    ax.set_ylabel("intensity (Mb · states / eV / cell)")
    ax.legend(frameon=False, fontsize=8, ncols=2)
    st = spectrum.settings
    ax.set_title(title or f"hν = {st.get('photon_energy_eV', float('nan')):g} eV", fontsize=10)


def plot_fit(fig, fit, title: str | None = None) -> tuple:
    """Measured points, fitted model, background and components, with a residual panel below.

    ``fig`` is an empty matplotlib Figure (:func:`valband.report.plots.new_figure` then
    ``fig.clear()``); returns ``(ax_main, ax_residual)``. Binding energy decreases to the
    right; the residual panel shows (measured − model)/σ when the fit was weighted by the
    measurement's uncertainty, else measured − model.
    """
    ax, axr = fig.subplots(2, 1, sharex=True, height_ratios=(3, 1))
    be = fit.binding_energy
    ax.plot(be, fit.measured, ls="none", marker=".", ms=2.5, color="0.25", label="measured")
    ax.plot(be, fit.model, color="#c2185b", lw=1.4, label="model")
    ax.plot(be, fit.background, color="0.5", lw=1.0, ls="--", label="background")
    for k, (name, comp) in enumerate(zip(fit.component_names, fit.components, strict=True)):
        el, sh = name.split(":")
        ax.plot(be, comp + fit.background, lw=0.9, color=_COLOURS[k % len(_COLOURS)],
                ls=_STYLE.get(sh, "-."), label=f"{el} {sh}")
    ax.axvline(fit.value("shift"), color="k", lw=0.7, ls="-.")
    ax.set_ylabel(f"intensity ({fit.provenance.get('measured_unit', 'arb.')})")
    ax.legend(frameon=False, fontsize=8, ncols=2)
    p = fit.parameters
    text = (f"shift {p['shift'].value:+.3f} eV, FWHM {p['gaussian_fwhm'].value:.3f} eV\n"
            f"χ²_red {fit.reduced_chi2:.3g}, R {fit.r_factor:.3g}")
    ax.text(0.02, 0.97, text, transform=ax.transAxes, va="top", fontsize=8)
    if fit.weighted:
        res = fit.residual / fit.sigma
        axr.set_ylabel("(meas − model)/σ", fontsize=8)
    else:
        res = fit.residual
        axr.set_ylabel("meas − model", fontsize=8)
    axr.plot(be, res, color="0.3", lw=0.7)
    axr.axhline(0.0, color="k", lw=0.6)
    axr.set_xlim(be[-1], be[0])  # decreasing to the right
    axr.set_xlabel("binding energy (eV)")
    st = fit.settings
    ax.set_title(title or f"fit at hν = {st.get('photon_energy_eV', float('nan')):g} eV",
                 fontsize=10)
    return ax, axr
