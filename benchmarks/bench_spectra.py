"""Benchmarks of ``simulate_spectrum`` and ``fit_spectrum`` from an existing DOSResult.

Targets: Cu fcc DOS (3 channels, default DOS grid, step 0.01 eV) → spectrum in < 0.2 s; a
full ``compare`` fit (default free parameters, Shirley background, shift scan) of a
2,000-point invented Poisson spectrum in < 2 s. Each time
is printed together with a baseline measured in the same run — one numpy real FFT pair
(rfft + irfft) of every channel, padded to the same length as the instrument convolution — and
their ratio, so that machines of different speed can be compared.
"""

from __future__ import annotations

import numpy as np
from timing import best_of


def main(repeat: int = 5) -> None:
    from valband.params import load_parameter_set
    from valband.spectra import simulate_spectrum
    from valband.structure import build_structure
    from valband.tb import build_model
    from valband.workflows import DOSSettings, compute_dos

    model = build_model(build_structure("Cu fcc"), load_parameter_set("harrison-universal"))
    dos = compute_dos(model, DOSSettings(mesh=16, step=0.01))
    simulate_spectrum(dos, "Al-Ka")  # compile and load the tables
    t_sim = best_of(lambda: simulate_spectrum(dos, "Al-Ka"), repeat)
    n = 2 * dos.energies.size
    y = np.ascontiguousarray(dos.channels)
    t_fft = best_of(lambda: np.fft.irfft(np.fft.rfft(y, n, axis=-1), n, axis=-1), repeat * 20)
    print(f"grid points {dos.energies.size}, channels {len(dos.channel_labels)}")
    print(f"simulate      {t_sim * 1e3:9.2f} ms   (target < 200 ms)")
    print(f"numpy FFT     {t_fft * 1e3:9.3f} ms   (baseline: rfft+irfft of all channels, n={n})")
    print(f"ratio         {t_sim / t_fft:9.1f}")

    from valband.spectra import MeasuredSpectrum
    from valband.spectra.fit import fit_spectrum

    spec = simulate_spectrum(dos, "Al-Ka", gaussian_fwhm=0.45, keep_area=False)
    be = np.linspace(-2.0, 10.0, 2000)
    mean = 2e4 * np.interp(be - 0.15, spec.binding_energy, spec.intensity) / spec.intensity.max()
    meas = MeasuredSpectrum(be, np.random.default_rng(0).poisson(mean + 30.0).astype(float),
                            photon_energy=1486.6)
    t_fit = best_of(lambda: fit_spectrum(meas, dos), max(1, repeat // 2))
    print(f"compare fit   {t_fit * 1e3:9.1f} ms   (target < 2000 ms; 2000 points)")
    print(f"ratio         {t_fit / t_fft:9.1f}   (to the same FFT baseline)")


if __name__ == "__main__":
    main()
