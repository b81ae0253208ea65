"""The main figure of a run, for papers: rebuilt from the run's own CSV files (PNG or PDF).

:func:`main_figure` looks for, in this order, the first ``fit.csv`` (overlay of measurement,
model and background with a residual panel), ``spectrum.csv`` (simulated spectrum and its
components) or ``dos.csv`` (total and partial DOS) in the run folder and its sub-folders,
and draws it on its own; a demo run (``screening.csv`` present) gets the d-band centre ranking
next to it. Binding energy decreases to the right, as the trade plots it.
"""

from __future__ import annotations

import csv
from pathlib import Path

import numpy as np

from valband.errors import InputError

__all__ = ["main_figure", "read_csv_table", "FIGURE_FORMATS"]

FIGURE_FORMATS = (".png", ".pdf", ".svg")
_COLOURS = ["#283593", "#c2185b", "#00897b", "#ef6c00", "#6d4c41", "#7b1fa2"]


def read_csv_table(path: Path) -> tuple[list[str], np.ndarray | list[list[str]]]:
    """Header and rows of a valband CSV (``#`` comment lines skipped); numeric when possible."""
    lines = [ln for ln in Path(path).read_text(encoding="utf-8").splitlines()
             if ln and not ln.startswith("#")]
    if not lines:
        raise InputError(f"{path}: no header line")
    rows = list(csv.reader(lines))
    try:
        return rows[0], np.array(rows[1:], dtype=np.float64)
    except ValueError:
        return rows[0], rows[1:]


def _first(root: Path, name: str) -> Path | None:
    top = root / name
    if top.exists():
        return top
    found = sorted(root.rglob(name))
    return found[0] if found else None


def _draw_fit(ax, axr, path: Path) -> None:
    head, d = read_csv_table(path)
    col = {h: i for i, h in enumerate(head)}
    be = d[:, 0]
    ax.plot(be, d[:, col["measured"]], ".", ms=2, color="0.25", label="measured")
    ax.plot(be, d[:, col["model"]], color="#c2185b", lw=1.4, label="model")
    ax.plot(be, d[:, col["background"]], "--", color="0.5", lw=1.0, label="background")
    for k, name in enumerate(head[6:]):
        ax.plot(be, d[:, col[name]] + d[:, col["background"]], lw=0.9,
                color=_COLOURS[k % len(_COLOURS)], label=name.replace(":", " "))
    ax.legend(frameon=False, fontsize=7, ncols=2)
    ax.set_ylabel("intensity")
    ax.tick_params(labelbottom=False)
    sig = d[:, col["sigma"]]
    axr.plot(be, d[:, col["residual"]] / np.where(sig > 0, sig, 1.0), color="0.3", lw=0.7)
    axr.axhline(0, color="k", lw=0.6)
    axr.set_ylabel("residual/σ", fontsize=8)
    axr.set_xlim(be.max(), be.min())
    axr.set_xlabel("binding energy (eV)")


def _draw_spectrum(ax, path: Path) -> None:
    head, d = read_csv_table(path)
    be = d[:, 0]
    ax.fill_between(be, d[:, 1], color="0.85", lw=0)
    ax.plot(be, d[:, 1], color="0.3", lw=0.9, label="total")
    for k, name in enumerate(head[2:]):
        ax.plot(be, d[:, 2 + k], lw=1.0, color=_COLOURS[k % len(_COLOURS)], label=name)
    ax.set_xlim(be.max(), be.min())
    ax.set_xlabel("binding energy (eV)")
    ax.set_ylabel("intensity (Mb · states / eV / cell)")
    ax.legend(frameon=False, fontsize=7, ncols=2)


def _draw_dos(ax, path: Path) -> None:
    head, d = read_csv_table(path)
    e = d[:, 0]
    ax.fill_between(e, d[:, 1], color="0.85", lw=0)
    ax.plot(e, d[:, 1], color="0.3", lw=0.8, label="total")
    for k, name in enumerate(h for h in head[3:]):
        ax.plot(e, d[:, 3 + k], lw=1.1, color=_COLOURS[k % len(_COLOURS)], label=name)
    ax.axvline(0, color="k", lw=0.6, ls="-.")
    ax.set_xlabel("E − E$_F$ (eV)")
    ax.set_ylabel("DOS (states / eV / cell)")
    ax.legend(frameon=False, fontsize=7, ncols=2)


def _draw_screening(ax, path: Path) -> None:
    head, rows = read_csv_table(path)
    col = {h: i for i, h in enumerate(head)}
    names = [r[col["name"]] for r in rows]
    centre = np.array([float(r[col["d_band_centre_eV"]]) for r in rows])
    ax.barh(names[::-1], centre[::-1], color="#283593")
    ax.axvline(0, color="k", lw=0.6)
    ax.set_xlabel("d-band centre (eV rel. E$_F$)")
    ax.set_title("model ranking", fontsize=9)


def main_figure(run_dir: str | Path, out: str | Path) -> Path:
    """Draw the run's main figure into ``out`` (suffix .png, .pdf or .svg); return the path."""
    from valband.output import atomic_write
    from valband.report.plots import new_figure

    root, target = Path(run_dir), Path(out)
    if target.suffix.lower() not in FIGURE_FORMATS:
        raise InputError(f"figure {target}: suffix {target.suffix or '(none)'}; accepted "
                         f"{', '.join(FIGURE_FORMATS)}")
    fit, spec, dos = (_first(root, n) for n in ("fit.csv", "spectrum.csv", "dos.csv"))
    screening = root / "screening.csv"
    if not (fit or spec or dos):
        raise InputError(f"figure: {root} holds no fit.csv, spectrum.csv or dos.csv")
    fig, _ = new_figure(9.0 if screening.exists() else 6.4, 4.8)
    fig.clear()
    grid = fig.add_gridspec(2, 2 if screening.exists() else 1, height_ratios=(3, 1),
                            width_ratios=(1, 2.2) if screening.exists() else None)
    col = 1 if screening.exists() else 0
    if screening.exists():
        _draw_screening(fig.add_subplot(grid[:, 0]), screening)
    if fit:
        ax = fig.add_subplot(grid[0, col])
        axr = fig.add_subplot(grid[1, col], sharex=ax)
        _draw_fit(ax, axr, fit)
        ax.set_title(f"fit: {fit.parent.relative_to(root).as_posix() or '.'}", fontsize=9)
    else:
        ax = fig.add_subplot(grid[:, col])
        (_draw_spectrum if spec else _draw_dos)(ax, spec or dos)
    fig.suptitle("valband model estimate — not a measurement", fontsize=7, color="0.4",
                 x=0.99, ha="right")
    with atomic_write(target, "wb") as fh:
        fig.savefig(fh, format=target.suffix.lstrip(".").lower(), dpi=200)
    return target
