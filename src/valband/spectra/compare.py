"""The ``compare`` job: measured spectrum + model → Fermi-edge calibration (optional), fit, files.

Files written to the output folder:

``fit.csv``
    comment lines (``#``), then ``binding_energy_eV,measured,model,background,residual,sigma``
    and one column per component group (``Cu:d``: the fitted peak of that element and shell,
    without background), on the fitted points of the measured axis (after any calibration),
    binding energy ascending, intensities in the measured unit.
``compare.<fmt>``
    overlay of measurement, model, background and components with a residual panel.
``summary.json``
    schema ``valband.summary`` with ``command: "compare"`` and the blocks ``fit``
    (:meth:`valband.spectra.fit.SpectrumFit.summary`), ``measured`` and ``calibration``
    (null when the axis was not calibrated).
"""

from __future__ import annotations

from pathlib import Path

from valband.output import SCHEMA_VERSION, prepare_out_dir, write_csv
from valband.spectra.fit import DEFAULT_FREE, SpectrumFit, fit_spectrum
from valband.spectra.measured import MeasuredSpectrum

__all__ = ["write_fit_csv", "calibrate_measured", "compare_job", "default_free",
           "DEFAULT_EDGE_WINDOW"]

#: Binding-energy window (eV) of the Fermi-edge fit when none is given.
DEFAULT_EDGE_WINDOW = (-1.0, 1.0)


def default_free(calibrated: bool) -> tuple[str, ...]:
    """Default free parameters of ``compare``: with a calibrated edge ``d_offset`` replaces
    ``shift`` (a free shift would move the model's edge off the measured one)."""
    if not calibrated:
        return DEFAULT_FREE
    return tuple("d_offset" if n == "shift" else n for n in DEFAULT_FREE)


def write_fit_csv(path: str | Path, fit: SpectrumFit) -> Path:
    """Write ``fit.csv`` atomically (layout in the module docstring)."""
    st = fit.settings
    comments = [
        f"valband spectrum fit, schema_version {SCHEMA_VERSION}",
        f"binding_energy_eV ascending; intensities in {fit.provenance.get('measured_unit')}",
        f"photon energy {st.get('photon_energy_eV')} eV; background {st.get('background')}; "
        f"shift {fit.value('shift'):.6g} eV; reduced chi2 {fit.reduced_chi2:.6g}; "
        f"R {fit.r_factor:.6g}",
        "components: fitted peak per element:shell, without background",
    ]
    header = ["binding_energy_eV", "measured", "model", "background", "residual", "sigma",
              *fit.component_names]
    cols = [fit.binding_energy, fit.measured, fit.model, fit.background, fit.residual,
            fit.sigma, *fit.components]
    return write_csv(path, header, cols, comments)


def calibrate_measured(measured: MeasuredSpectrum, window=DEFAULT_EDGE_WINDOW,
                       temperature: float = 300.0) -> tuple[MeasuredSpectrum, dict]:
    """Fit the Fermi edge of ``measured`` and return it on the corrected axis, plus a record.

    The record holds E_F on the input axis (the shift subtracted), its uncertainty, the
    Gaussian FWHM of the edge, χ²_red and the window; it is also stored in the returned
    spectrum's ``metadata["calibration"]``.
    """
    from valband.spectra.calibrate import apply_shift, fit_fermi_edge

    edge = fit_fermi_edge(measured.binding_energy, measured.intensity,
                          counts=measured.unit == "counts", window=window,
                          temperature=temperature)
    record = {"method": "Fermi-edge fit (linear DOS x Fermi-Dirac, Gaussian, constant)",
              "fermi_level_eV": edge.fermi_level, "fermi_level_err_eV": edge.fermi_level_err,
              "edge_fwhm_eV": edge.fwhm, "edge_fwhm_err_eV": edge.fwhm_err,
              "temperature_K": edge.temperature, "reduced_chi2": edge.reduced_chi2,
              "window_eV": list(edge.window), "applied_shift_eV": -edge.fermi_level}
    calibrated = MeasuredSpectrum(
        binding_energy=apply_shift(measured.binding_energy, edge),
        intensity=measured.intensity, unit=measured.unit, uncertainty=measured.uncertainty,
        source=measured.source, block=measured.block, photon_energy=measured.photon_energy,
        metadata=measured.metadata | {"calibration": record})
    return calibrated, record


def compare_job(model, dos_settings, measured: MeasuredSpectrum, out_dir, *,
                photon_energy=None, temperature: float = 300.0, geometry=None,
                background: str = "shirley", free=None, initial=None, shift_range=None,
                window=None, band_window=None, calibrate_window=None, fmt: str = "png",
                progress: bool = False, dos=None, layer_weights=None,
                depth_record: dict | None = None, extra: dict | None = None,
                d_correction="auto"):
    """DOS → fit against ``measured``; writes the files of the module docstring.

    ``calibrate_window`` (BE_low, BE_high) runs the Fermi-edge calibration first; then the
    default free parameters leave out ``shift`` (the Fermi level is known) and fit the d-band
    offset ``d_offset`` instead (the d components against the fixed edge and the s, p
    components; without a calibrated edge it would trade off against the free shift, so it is
    not free by default then). ``d_correction`` as in
    :func:`~valband.spectra.simulate_spectrum` (default "auto": on). A ``dos`` already
    computed with ``dos_settings`` may be passed to skip the computation. Returns
    ``(summary, fit, dos, calibration_record_or_None)``; ``out_dir=None`` writes nothing.
    """
    from valband.spectra.simulate import DEFAULT_GEOMETRY
    from valband.workflows import compute_dos
    from valband.writers import summary_of, write_summary

    calibration = None
    if calibrate_window is not None:
        measured, calibration = calibrate_measured(measured, calibrate_window, temperature)
    if free is None:
        free = default_free(calibration is not None)
    if dos is None:
        dos = compute_dos(model, dos_settings, progress=progress)
    kwargs = {} if shift_range is None else {"shift_range": shift_range}
    fit = fit_spectrum(measured, dos, photon_energy, temperature=temperature,
                       geometry=geometry or DEFAULT_GEOMETRY, background=background, free=free,
                       initial=initial, window=window, band_window=band_window,
                       layer_weights=layer_weights, d_correction=d_correction, **kwargs)
    files = {}
    if out_dir is not None:
        out = prepare_out_dir(out_dir)
        files["fit"] = write_fit_csv(out / "fit.csv", fit)
        from valband.report.plots import new_figure, save_figure
        from valband.spectra.plot import plot_fit

        fig, _ = new_figure(6.4, 5.2)
        fig.clear()
        plot_fit(fig, fit, title=f"{model.structure.formula} ({model.parameter_set}) vs "
                 f"{Path(measured.source).name if measured.source else 'measurement'}")
        files["compare_plot"] = save_figure(fig, out / f"compare.{fmt}")
    measured_block = {"source": measured.source, "block": measured.block,
                      "unit": measured.unit, "photon_energy_eV": measured.photon_energy,
                      "n_points": int(measured.binding_energy.size),
                      "binding_energy_range_eV": [float(measured.binding_energy[0]),
                                                  float(measured.binding_energy[-1])],
                      "reader": {k: v for k, v in measured.metadata.items()
                                 if k in ("axis", "axis_from", "work_function_eV", "conversion")}}
    summary = summary_of("compare", dos, extra={"fit": fit.summary(), "measured": measured_block,
                                                "calibration": calibration,
                                                "depth_weighting": depth_record,
                                                "d_band_correction":
                                                    fit.settings["d_band_correction"]}
                         | (extra or {}),
                         files=files or None)
    if out_dir is not None:
        write_summary(Path(out_dir) / "summary.json", summary)
    return summary, fit, dos, calibration
