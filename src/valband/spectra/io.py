"""Files of a simulated spectrum: ``spectrum.csv``, the plot and ``summary.json``.

``spectrum.csv``: comment lines (``#``), then ``binding_energy_eV,total,<component> …`` with
one column per component (``Cu0:d``) and, when requested, ``inelastic_background`` last
(the columns after the first sum to ``total``); binding energy ascending, intensities in
Mb·states/eV per cell.
"""

from __future__ import annotations

from pathlib import Path

from valband.output import SCHEMA_VERSION, prepare_out_dir, write_csv
from valband.spectra.simulate import Spectrum

__all__ = ["write_spectrum_csv", "spectrum_summary", "simulate_job"]


def write_spectrum_csv(path: str | Path, spectrum: Spectrum) -> Path:
    """Write ``spectrum.csv`` atomically (layout in the module docstring)."""
    st = spectrum.settings
    comments = [
        f"valband spectrum, schema_version {SCHEMA_VERSION}",
        "binding_energy_eV = E_F - E (ascending); intensity unit: Mb states/eV per cell",
        f"photon energy {st.get('photon_energy_eV')} eV ({st.get('photon_source') or 'number'}), "
        f"T {st.get('temperature_K')} K, Gaussian FWHM {st.get('gaussian_fwhm_eV')} eV, "
        f"lifetime HWHM {st['lifetime']['gamma0_eV']} + {st['lifetime']['a_per_eV']}*(E-E_F)^2 eV",
    ]
    header = ["binding_energy_eV", "total", *spectrum.component_names]
    cols = [spectrum.binding_energy, spectrum.intensity, *spectrum.components]
    if spectrum.background is not None:
        header.append("inelastic_background")
        cols.append(spectrum.background)
    return write_csv(path, header, cols, comments)


def spectrum_summary(spectrum: Spectrum) -> dict:
    """Build the ``spectrum`` block of ``summary.json`` (settings and integrated components)."""
    import numpy as np

    be = spectrum.binding_energy
    h = float(be[1] - be[0])
    areas = {n: float(c.sum() * h) for n, c in zip(spectrum.component_names,
                                                  spectrum.components, strict=True)}
    i_max = int(np.argmax(spectrum.intensity))
    return spectrum.settings | {
        "binding_energy_range_eV": [float(be[0]), float(be[-1])],
        "binding_energy_step_eV": h,
        "components": list(spectrum.component_names),
        "component_areas": areas,
        "total_area": float(spectrum.intensity.sum() * h),
        "area_unit": "Mb states per cell",
        "peak_binding_energy_eV": float(be[i_max]),
    }


def simulate_job(model, dos_settings, out_dir, photon_energy, temperature, gaussian_fwhm,
                 lorentz, geometry, fmt: str = "png", progress: bool = False, inelastic=None,
                 dos=None, layer_weights=None, depth_record: dict | None = None,
                 extra: dict | None = None, d_correction="auto"):
    """DOS → spectrum; writes ``spectrum.csv``, ``spectrum.<fmt>``, ``summary.json``.

    Returns ``(summary, spectrum, dos)``; with ``out_dir=None`` nothing is written. A ``dos``
    already computed with ``dos_settings`` may be passed to skip the computation;
    ``layer_weights`` (per site) and their ``depth_record`` come from
    :func:`valband.spectra.depth.slab_depth_weights`. ``d_correction`` as in
    :func:`~valband.spectra.simulate_spectrum` ("auto": the photoemission d-band correction of
    the parameter set; None: off); the DOS in ``summary.json`` stays the first-principles one.
    """
    from valband.spectra.simulate import simulate_spectrum
    from valband.workflows import compute_dos
    from valband.writers import summary_of, write_summary

    if dos is None:
        dos = compute_dos(model, dos_settings, progress=progress)
    spec = simulate_spectrum(dos, photon_energy, temperature=temperature,
                             gaussian_fwhm=gaussian_fwhm, lorentz=lorentz, geometry=geometry,
                             inelastic=inelastic, layer_weights=layer_weights,
                             d_correction=d_correction)
    files = {}
    if out_dir is not None:
        out = prepare_out_dir(out_dir)
        files["spectrum"] = write_spectrum_csv(out / "spectrum.csv", spec)
        from valband.report.plots import new_figure, save_figure
        from valband.spectra.plot import plot_spectrum

        fig, ax = new_figure()
        plot_spectrum(ax, spec, title=f"{model.structure.formula} — hν = "
                      f"{spec.settings['photon_energy_eV']:g} eV — {model.parameter_set}")
        files["spectrum_plot"] = save_figure(fig, out / f"spectrum.{fmt}")
    block = spectrum_summary(spec) | ({"depth_weighting": depth_record} if depth_record else {})
    summary = summary_of("simulate", dos, extra={"spectrum": block,
                                                 "d_band_correction":
                                                     spec.settings["d_band_correction"]}
                         | (extra or {}),
                         files=files or None)
    if out_dir is not None:
        write_summary(Path(out_dir) / "summary.json", summary)
    return summary, spec, dos
