"""Whole jobs as the CLI and the demo run them: compute, describe, write files, plot.

Each returns the summary dictionary it wrote to ``summary.json``.
"""

from __future__ import annotations

from pathlib import Path

from valband.output import prepare_out_dir
from valband.writers import (
    summary_of,
    write_bands_csv,
    write_dos_csv,
    write_pdos_csv,
    write_summary,
)

__all__ = ["dos_job", "bands_job"]


def dos_job(model, settings, out_dir: str | Path | None, window=None, shell: str = "d",
            fmt: str = "png", progress: bool = False, command: str = "dos", plot: bool = True,
            dos=None, extra: dict | None = None):
    """DOS + descriptors; writes ``dos.csv``, ``pdos_sites.csv``, ``dos.<fmt>``, ``summary.json``.

    Returns ``(summary, dos_result, descriptor_table)``; with ``out_dir=None`` nothing is written.
    A ``dos`` computed elsewhere (CPA, neutrality, spin: :mod:`valband.workflows.methods`) is
    written instead of computing one; ``extra`` adds blocks to the summary.
    """
    from valband.workflows import compute_dos, describe

    if dos is None:
        dos = compute_dos(model, settings, progress=progress)
    has_shell = any(c.shell == shell for c in dos.channel_labels)
    labels = (dict(enumerate(model.structure.labels))
              if len(model.structure.labels) == dos.n_sites else None)
    table = describe(dos, shell, window, labels) if has_shell else None
    files = {}
    if out_dir is not None:
        out = prepare_out_dir(out_dir)
        files["dos"] = write_dos_csv(out / "dos.csv", dos)
        files["pdos_sites"] = write_pdos_csv(out / "pdos_sites.csv", dos)
        if plot:
            from valband.report.plots import new_figure, plot_dos, save_figure

            fig, ax = new_figure()
            plot_dos(ax, dos, title=f"{model.structure.formula} — {model.parameter_set}")
            files["dos_plot"] = save_figure(fig, out / f"dos.{fmt}")
    summary = summary_of(command, dos, [table] if table else None, extra=extra,
                         files=files or None)
    if out_dir is not None:
        write_summary(Path(out_dir) / "summary.json", summary)
    return summary, dos, table


def bands_job(model, out_dir: str | Path | None, path: str | None = None, npoints: int = 300,
              mesh="16", fmt: str = "png", element: str | None = None, shell: str = "d",
              progress: bool = False, extra: dict | None = None):
    """Bands along a path with E_F from a quick DOS on ``mesh``; writes ``bands.csv``, plot, summary."""
    from valband.workflows import DOSSettings, compute_bands, compute_dos

    dos = compute_dos(model, DOSSettings(mesh=mesh), progress=progress)
    bands = compute_bands(model, path, npoints, fermi_level=dos.fermi_level, progress=progress)
    files = {}
    if element is None:
        with_shell = [c.element for c in bands.channel_labels if c.shell == shell]
        element = with_shell[0] if with_shell else None
    if out_dir is not None:
        out = prepare_out_dir(out_dir)
        files["bands"] = write_bands_csv(out / "bands.csv", bands)
        from valband.report.plots import new_figure, plot_bands, save_figure

        fig, ax = new_figure(6.4, 4.8)
        plot_bands(ax, bands, element=element, shell=shell,
                   title=f"{model.structure.formula} — {model.parameter_set}")
        files["bands_plot"] = save_figure(fig, out / f"bands.{fmt}")
    blocks = {"bands": bands.settings | {"labels": list(bands.labels),
                                        "label_positions_inv_angstrom": bands.label_positions.tolist(),
                                        "fermi_level_from_mesh": str(mesh)}} | (extra or {})
    summary = summary_of("bands", dos, extra=blocks, files=files or None)
    if out_dir is not None:
        write_summary(Path(out_dir) / "summary.json", summary)
    return summary, bands
