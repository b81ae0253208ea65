"""Matplotlib figures of DOS and bands. matplotlib is imported lazily (Agg backend for files).

Binding-energy plots run from high BE on the left to E_F on the right, as the trade does; the
DOS plot here uses E − E_F increasing to the right (the band-structure convention) and says so.
"""

from __future__ import annotations

from pathlib import Path

import numpy as np

from valband.results import BandsResult, DOSResult

__all__ = ["plot_dos", "plot_bands", "save_figure", "new_figure"]

#: Our own palette for shells (chosen for contrast; not taken from any other program).
SHELL_COLOURS = {"s": "#c2185b", "p": "#00897b", "d": "#283593"}
_EXTRA = ["#ef6c00", "#6d4c41", "#7b1fa2", "#2e7d32", "#546e7a"]


def new_figure(width: float = 6.4, height: float = 4.2):
    """A figure and axes on the non-interactive Agg canvas (no display needed)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), layout="constrained")
    FigureCanvasAgg(fig)
    return fig, fig.add_subplot()


def plot_dos(ax, dos: DOSResult, by: str = "element-shell", title: str | None = None) -> None:
    """Total DOS (grey fill) and partial DOS per element and shell (lines) on ``ax``."""
    e = dos.energies
    ax.fill_between(e, dos.total, color="0.85", lw=0, label="total")
    ax.plot(e, dos.total, color="0.35", lw=0.8)
    k = 0
    multi = len(dos.elements) > 1
    for el in dos.elements:
        for sh in dos.shells_of(el):
            colour = SHELL_COLOURS[sh] if not multi else _EXTRA[k % len(_EXTRA)]
            style = {"s": ":", "p": "--", "d": "-"}[sh]
            ax.plot(e, dos.select(element=el, shell=sh), color=colour, ls=style, lw=1.3,
                    label=f"{el} {sh}")
        k += 1
    ax.axvline(0.0, color="k", lw=0.7, ls="-.")
    ax.set_xlabel("E − E$_F$ (eV)")
    ax.set_ylabel("DOS (states / eV / cell)")
    ax.set_xlim(e[0], e[-1])
    ax.set_ylim(bottom=0)
    ax.legend(frameon=False, fontsize=8, ncols=2)
    if title:
        ax.set_title(title, fontsize=10)


def plot_bands(ax, bands: BandsResult, element: str | None = None, shell: str = "d",
               erange: tuple[float, float] = (-10.0, 4.0), title: str | None = None) -> None:
    """Bands as thin lines with the weight of ``element``/``shell`` as marker size (fat bands)."""
    x = bands.distance
    ax.plot(x, bands.energies, color="0.45", lw=0.6)
    weight = bands.character_of(element, shell)
    colour = SHELL_COLOURS.get(shell, "#283593")
    xx = np.broadcast_to(x[:, None], bands.energies.shape)
    ax.scatter(xx.ravel(), bands.energies.ravel(), s=14.0 * np.clip(weight.ravel(), 0, 1),
               color=colour, alpha=0.45, lw=0, label=f"{element or 'all'} {shell} weight")
    for pos in bands.label_positions:
        ax.axvline(pos, color="0.7", lw=0.5)
    ax.axhline(0.0, color="k", lw=0.7, ls="-.")
    ax.set_xticks(bands.label_positions, bands.labels)
    ax.set_xlim(x[0], x[-1])
    ax.set_ylim(*erange)
    ax.set_ylabel("E − E$_F$ (eV)")
    ax.legend(frameon=False, fontsize=8, loc="upper right")
    if title:
        ax.set_title(title, fontsize=10)


def save_figure(fig, path: str | Path) -> Path:
    """Save atomically (PNG at 150 dpi or SVG, by suffix)."""
    from valband.output import atomic_write

    path = Path(path)
    fmt = path.suffix.lstrip(".").lower()
    with atomic_write(path, "wb") as fh:
        fig.savefig(fh, format=fmt, dpi=150)
    return path
